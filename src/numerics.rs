//! Small numerical tools shared by the physics, the published methods and the sizing: a
//! least-squares annual sinusoid, a 3×3 dense solve, root bisection on a bracket and bisection
//! for the first index where a monotone test passes. A leaf: it depends on nothing in the crate.

/// Least-squares fit of v(t) = m + a cos(ωt) + b sin(ωt); returns (mean, amplitude, phase φ) with
/// v = m + A cos(ωt − φ), A = √(a² + b²), φ = atan2(b, a).
pub fn fit_sinusoid(times: &[f64], values: &[f64], omega: f64) -> (f64, f64, f64) {
    // Normal equations AᵀA x = Aᵀv for the basis (1, cos ωt, sin ωt).
    let mut ata = [[0.0; 3]; 3];
    let mut atb = [0.0; 3];
    for (&t, &v) in times.iter().zip(values) {
        let row = [1.0, (omega * t).cos(), (omega * t).sin()];
        for r in 0..3 {
            atb[r] += row[r] * v;
            for c in 0..3 {
                ata[r][c] += row[r] * row[c];
            }
        }
    }
    let x = solve3(ata, atb);
    let amp = (x[1] * x[1] + x[2] * x[2]).sqrt();
    (x[0], amp, x[2].atan2(x[1]))
}

/// Solve the 3×3 system a x = b by Gaussian elimination with partial pivoting.
pub fn solve3(mut a: [[f64; 3]; 3], mut b: [f64; 3]) -> [f64; 3] {
    for c in 0..3 {
        let piv = (c..3)
            .max_by(|&r, &s| a[r][c].abs().total_cmp(&a[s][c].abs()))
            .unwrap_or(c);
        a.swap(c, piv);
        b.swap(c, piv);
        for r in c + 1..3 {
            let f = a[r][c] / a[c][c];
            for k in c..3 {
                a[r][k] -= f * a[c][k];
            }
            b[r] -= f * b[c];
        }
    }
    let mut x = [0.0; 3];
    for r in (0..3).rev() {
        let s: f64 = (r + 1..3).map(|k| a[r][k] * x[k]).sum();
        x[r] = (b[r] - s) / a[r][r];
    }
    x
}

/// Root of a continuous `f` on the bracket [lo, hi] where f changes sign, by bisection: at most
/// 200 halvings, stopping early when the bracket is narrower than `x_tol` (0: run all 200, which
/// reaches the spacing of doubles) or f is exactly zero at a midpoint. Returns the midpoint of the
/// last bracket.
pub fn bisect_root(f: impl Fn(f64) -> f64, mut lo: f64, mut hi: f64, x_tol: f64) -> f64 {
    let lo_positive = f(lo) > 0.0;
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        let fm = f(mid);
        if fm == 0.0 {
            return mid;
        }
        if (fm > 0.0) == lo_positive {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo < x_tol {
            break;
        }
    }
    0.5 * (lo + hi)
}

/// The least index in `lo..=hi` whose `pass` is true, for a test that is false at `lo` and true
/// at `hi` and monotone in between (false … false true … true), by bisection; `pass` is called on
/// interior indices only. Errors from `pass` end the search.
pub fn first_passing<E>(
    lo: usize,
    hi: usize,
    mut pass: impl FnMut(usize) -> Result<bool, E>,
) -> Result<usize, E> {
    let (mut lo, mut hi) = (lo, hi);
    while hi - lo > 1 {
        let mid = (lo + hi) / 2;
        if pass(mid)? {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    Ok(hi)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sinusoid_fit_recovers_parameters() {
        let w = 2.0 * std::f64::consts::PI / 365.0;
        let ts: Vec<f64> = (0..365).map(|d| d as f64).collect();
        let vs: Vec<f64> = ts
            .iter()
            .map(|&t| 4.0 + 12.0 * (w * t - 0.7).cos())
            .collect();
        let (m, a, p) = fit_sinusoid(&ts, &vs, w);
        assert!((m - 4.0).abs() < 1e-9 && (a - 12.0).abs() < 1e-9 && (p - 0.7).abs() < 1e-9);
    }

    #[test]
    fn solve3_with_pivoting() {
        // First pivot is zero: needs a row swap.
        let x = solve3(
            [[0.0, 1.0, 2.0], [1.0, 0.0, 1.0], [2.0, 1.0, 0.0]],
            [8.0, 4.0, 4.0],
        );
        for (got, want) in x.iter().zip([1.0, 2.0, 3.0]) {
            assert!((got - want).abs() < 1e-12);
        }
    }

    #[test]
    fn bisection_finds_roots_either_way_round() {
        let r = bisect_root(|x| x * x - 2.0, 0.0, 2.0, 1e-14);
        assert!((r - 2f64.sqrt()).abs() < 1e-13);
        let r = bisect_root(|x| 2.0 - x * x, 0.0, 2.0, 0.0);
        assert!((r - 2f64.sqrt()).abs() < 1e-15);
    }

    #[test]
    fn first_passing_index() {
        let mut calls = Vec::new();
        let k = first_passing(0, 10, |i| {
            calls.push(i);
            Ok::<_, ()>(i >= 7)
        })
        .unwrap();
        assert_eq!(k, 7);
        assert!(calls.iter().all(|&i| i > 0 && i < 10));
        assert_eq!(
            first_passing(3, 4, |_| Err::<bool, _>("never called")),
            Ok(4)
        );
    }
}
