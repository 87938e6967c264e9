//! Geometric nested-dissection ordering of a rectilinear grid's unknowns (bisect the longer
//! side, order both halves, the separator line last), which gives faer's supernodal Cholesky
//! less work than its default minimum-degree ordering on these grids.
/// Geometric nested-dissection order of the unknowns of an nx × nz grid (`unk_of[j·nx + i]` =
/// unknown or `usize::MAX`): bisect the longer side of a box, order both halves, then the separator
/// line last; boxes of at most 32 cells are ordered row by row.
pub fn nested_dissection(nx: usize, nz: usize, unk_of: &[usize]) -> Vec<usize> {
    nested_dissection_split(nx, nz, unk_of).0
}

/// [`nested_dissection`] and where its first bisection falls: the order is the first half's
/// unknowns at `0..a`, the second half's at `a..b`, the separator's at `b..` (a = b = n when the
/// grid is too small to be bisected).
pub fn nested_dissection_split(
    nx: usize,
    nz: usize,
    unk_of: &[usize],
) -> (Vec<usize>, usize, usize) {
    let mut out = Vec::new();
    if nx * nz <= 32 {
        nd_box((0, nx, 0, nz), nx, unk_of, &mut out);
        let n = out.len();
        return (out, n, n);
    }
    let (first, second, sep): (_, _, Vec<(usize, usize)>) = if nx >= nz {
        let m = nx / 2;
        (
            (0, m, 0, nz),
            (m + 1, nx, 0, nz),
            (0..nz).map(|j| (m, j)).collect(),
        )
    } else {
        let m = nz / 2;
        (
            (0, nx, 0, m),
            (0, nx, m + 1, nz),
            (0..nx).map(|i| (i, m)).collect(),
        )
    };
    nd_box(first, nx, unk_of, &mut out);
    let a = out.len();
    nd_box(second, nx, unk_of, &mut out);
    let b = out.len();
    out.extend(
        sep.into_iter()
            .map(|(i, j)| unk_of[j * nx + i])
            .filter(|&p| p != usize::MAX),
    );
    (out, a, b)
}

/// Nested-dissection order of the box (i0, i1, j0, j1) (half-open), appended to `out`.
fn nd_box(bx: (usize, usize, usize, usize), nx: usize, unk_of: &[usize], out: &mut Vec<usize>) {
    let (i0, i1, j0, j1) = bx;
    if i1 <= i0 || j1 <= j0 {
        return;
    }
    let push = |i: usize, j: usize, out: &mut Vec<usize>| {
        let p = unk_of[j * nx + i];
        if p != usize::MAX {
            out.push(p);
        }
    };
    if (i1 - i0) * (j1 - j0) <= 32 {
        for j in j0..j1 {
            for i in i0..i1 {
                push(i, j, out);
            }
        }
    } else if i1 - i0 >= j1 - j0 {
        let m = (i0 + i1) / 2;
        nd_box((i0, m, j0, j1), nx, unk_of, out);
        nd_box((m + 1, i1, j0, j1), nx, unk_of, out);
        for j in j0..j1 {
            push(m, j, out);
        }
    } else {
        let m = (j0 + j1) / 2;
        nd_box((i0, i1, j0, m), nx, unk_of, out);
        nd_box((i0, i1, m + 1, j1), nx, unk_of, out);
        for i in i0..i1 {
            push(i, m, out);
        }
    }
}
