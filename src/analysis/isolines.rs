//! Isolines of a field sampled at the cell centres of a rectilinear grid (marching squares with
//! non-uniform coordinates).
//!
//! Each lattice square between four neighbouring centres with finite values is classified by which
//! corners are at or above the level; edges whose end values straddle the level carry a crossing
//! at the linearly interpolated position. A square with four crossings (a saddle) is resolved by
//! the mean of its corners. Segments are joined into polylines through shared edges, so a line is
//! open where it meets missing data or the lattice border and closed where it returns to its start.

/// A polyline of (x, z) points.
pub type Polyline = Vec<(f64, f64)>;

#[derive(Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Debug)]
enum Edge {
    /// Between centres (i, j) and (i + 1, j).
    H(usize, usize),
    /// Between centres (i, j) and (i, j + 1).
    V(usize, usize),
}

/// Isolines at `level` of `v` (row-major, `v[j * xs.len() + i]`, NaN = no data) sampled at
/// centres `xs` × `zs`.
pub fn isolines(xs: &[f64], zs: &[f64], v: &[f64], level: f64) -> Vec<Polyline> {
    let nx = xs.len();
    let nz = zs.len();
    let at = |i: usize, j: usize| v[j * nx + i];
    let point = |e: Edge| -> (f64, f64) {
        let (a, b, pa, pb) = match e {
            Edge::H(i, j) => (at(i, j), at(i + 1, j), (xs[i], zs[j]), (xs[i + 1], zs[j])),
            Edge::V(i, j) => (at(i, j), at(i, j + 1), (xs[i], zs[j]), (xs[i], zs[j + 1])),
        };
        let f = if b != a {
            ((level - a) / (b - a)).clamp(0.0, 1.0)
        } else {
            0.5
        };
        (pa.0 + f * (pb.0 - pa.0), pa.1 + f * (pb.1 - pa.1))
    };
    let mut segs: Vec<(Edge, Edge)> = Vec::new();
    for j in 0..nz.saturating_sub(1) {
        for i in 0..nx.saturating_sub(1) {
            let c = [at(i, j), at(i + 1, j), at(i + 1, j + 1), at(i, j + 1)];
            if c.iter().any(|x| !x.is_finite()) {
                continue;
            }
            let up = c.map(|x| x >= level);
            let (top, right, bottom, left) = (
                Edge::H(i, j),
                Edge::V(i + 1, j),
                Edge::H(i, j + 1),
                Edge::V(i, j),
            );
            let mut cut = Vec::with_capacity(4);
            if up[0] != up[1] {
                cut.push(top);
            }
            if up[1] != up[2] {
                cut.push(right);
            }
            if up[3] != up[2] {
                cut.push(bottom);
            }
            if up[0] != up[3] {
                cut.push(left);
            }
            match cut.len() {
                2 => segs.push((cut[0], cut[1])),
                4 => {
                    let centre = c.iter().sum::<f64>() / 4.0 >= level;
                    if centre == up[0] {
                        // a and c connected through the centre: cut off corners b and d.
                        segs.push((top, right));
                        segs.push((left, bottom));
                    } else {
                        segs.push((top, left));
                        segs.push((right, bottom));
                    }
                }
                _ => {}
            }
        }
    }
    // Join segments through shared edges.
    let mut by_edge: std::collections::HashMap<Edge, Vec<usize>> = std::collections::HashMap::new();
    for (k, &(a, b)) in segs.iter().enumerate() {
        by_edge.entry(a).or_default().push(k);
        by_edge.entry(b).or_default().push(k);
    }
    let mut used = vec![false; segs.len()];
    let mut lines = Vec::new();
    let next = |e: Edge, from: usize, used: &[bool]| -> Option<usize> {
        by_edge
            .get(&e)?
            .iter()
            .copied()
            .find(|&k| k != from && !used[k])
    };
    // Start from open ends first (edges used once), then the remaining closed loops.
    let mut starts: Vec<usize> = (0..segs.len())
        .filter(|&k| by_edge[&segs[k].0].len() == 1 || by_edge[&segs[k].1].len() == 1)
        .collect();
    starts.extend(0..segs.len());
    for s in starts {
        if used[s] {
            continue;
        }
        used[s] = true;
        let (mut a, mut b) = segs[s];
        if by_edge[&a].len() > 1 && by_edge[&b].len() == 1 {
            std::mem::swap(&mut a, &mut b);
        }
        let mut chain = vec![a, b];
        let mut cur = s;
        let mut end = b;
        while let Some(k) = next(end, cur, &used) {
            used[k] = true;
            let (p, q) = segs[k];
            end = if p == end { q } else { p };
            chain.push(end);
            cur = k;
            if end == a {
                break;
            }
        }
        lines.push(chain.into_iter().map(point).collect());
    }
    lines
}

#[cfg(test)]
mod tests {
    use super::*;

    fn graded(n: usize, a: f64, b: f64) -> Vec<f64> {
        (0..n)
            .map(|k| a + (b - a) * ((k as f64) / (n - 1) as f64).powf(1.4))
            .collect()
    }

    /// A linear field's isoline is a straight line at the exact place (linear interpolation is
    /// exact for a linear field, on any grid spacing).
    #[test]
    fn linear_field_gives_straight_line() {
        let xs = graded(30, -1.0, 2.0);
        let zs = graded(20, 0.0, 1.5);
        let v: Vec<f64> = zs
            .iter()
            .flat_map(|&z| xs.iter().map(move |&x| 2.0 * x + 0.5 * z))
            .collect();
        let lines = isolines(&xs, &zs, &v, 1.0);
        assert_eq!(lines.len(), 1);
        for &(x, z) in &lines[0] {
            assert!((2.0 * x + 0.5 * z - 1.0).abs() < 1e-12);
        }
        assert!(lines[0].len() >= 20);
    }

    /// A radial field's isoline is a circle: every point within O(h²) of the radius, and the line
    /// is closed when the circle lies inside the lattice.
    #[test]
    fn radial_field_gives_circle() {
        let xs: Vec<f64> = (0..81).map(|k| -2.0 + 0.05 * k as f64).collect();
        let zs = xs.clone();
        let v: Vec<f64> = zs
            .iter()
            .flat_map(|&z| xs.iter().map(move |&x| (x * x + z * z).sqrt()))
            .collect();
        let lines = isolines(&xs, &zs, &v, 1.2);
        assert_eq!(lines.len(), 1);
        let l = &lines[0];
        assert_eq!(l.first(), l.last(), "closed");
        for &(x, z) in l {
            assert!(((x * x + z * z).sqrt() - 1.2).abs() < 2e-3);
        }
    }

    /// Missing data stops a line (open ends), no segment crosses a NaN square.
    #[test]
    fn nan_region_splits_lines() {
        let xs: Vec<f64> = (0..10).map(|k| k as f64).collect();
        let zs = xs.clone();
        let mut v: Vec<f64> = zs.iter().flat_map(|_| xs.iter().copied()).collect();
        for i in 0..10 {
            v[5 * 10 + i] = f64::NAN;
        }
        let lines = isolines(&xs, &zs, &v, 4.5);
        assert_eq!(lines.len(), 2);
        for l in lines {
            assert!(l
                .iter()
                .all(|&(x, z)| (x - 4.5).abs() < 1e-12 && !(4.0 + 1e-9..=6.0 - 1e-9).contains(&z)));
        }
    }
}
