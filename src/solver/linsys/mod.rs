//! Sparse symmetric positive-definite solves with faer's supernodal/simplicial Cholesky.
//!
//! The symbolic analysis (fill-reducing ordering, elimination tree) is done once per grid; the
//! numeric factorisation is redone only when the matrix values differ from the last factored ones,
//! so steps in which no cell changed its phase segment or conductivity cost one triangular solve.
//! For a supernodal factor the triangular solves run in plain loops over faer's factor layout
//! (`Layout`), about a quarter faster than faer's generic solve on the demo matrix.
//!
//! With a split point given to [`SpdSolver::new`] the factorisation and the solves run in two
//! halves side by side (`Split`): the unknowns on either side of the first nested-dissection
//! separator, each with the separator, are factored by faer on their own, and the separator's
//! Schur complement is assembled from the two trailing blocks and factored densely. Demo (`cargo bench --bench
//! engine`, 2 cores): 0.70–0.84 of the whole factor's time per freezing step, 0.80 end to end.
mod order;
mod split;
mod whole;

pub use order::{nested_dissection, nested_dissection_split};

use crate::error::Result;
use faer::sparse::SymbolicSparseColMat;
use split::Split;
use whole::Whole;

/// A reusable Cholesky solver for one sparsity pattern (lower triangle, CSC).
pub struct SpdSolver {
    n: usize,
    pattern: SymbolicSparseColMat<usize>,
    factored: Vec<f64>,
    valid: bool,
    /// Numeric factorisations done.
    pub factorizations: usize,
    /// Triangular solves done.
    pub solves: usize,
    /// Solves done by conjugate gradients preconditioned with a nearby factor.
    pub near_solves: usize,
    /// Conjugate-gradient iterations in those solves.
    pub cg_iterations: usize,
    touched: Vec<bool>,
    work: [Vec<f64>; 4],
    factor: Factor,
}

/// How the matrix is factored: whole, or in two halves and the separator (`Split`).
enum Factor {
    Whole(Box<Whole>),
    Split(Box<Split>),
}

/// Column pointers and row indices of an n × n CSC pattern from its (column, row) entries,
/// sorted by column and then row.
fn csc_from_sorted(
    n: usize,
    entries: impl Iterator<Item = (usize, usize)>,
) -> SymbolicSparseColMat<usize> {
    let mut cp = vec![0usize; n + 1];
    let mut ri = Vec::new();
    for (c, r) in entries {
        cp[c + 1] += 1;
        ri.push(r);
    }
    for c in 0..n {
        cp[c + 1] += cp[c];
    }
    SymbolicSparseColMat::new_checked(n, n, cp, None, ri)
}

impl SpdSolver {
    /// Analyse the pattern: `col_ptr` (n + 1) and `row_idx` of the lower triangle, rows sorted.
    /// `order`, if given, is a fill-reducing elimination order (`order[k]` = the unknown eliminated
    /// k-th), used with the supernodal factorisation; otherwise faer's AMD ordering is used.
    /// `split_at`, with an order bisected at positions (a, b) ([`nested_dissection_split`]),
    /// factors and solves in two halves side by side (see `Split`) when the pattern allows it
    /// (not tiny, a true separator); only then is the whole matrix's symbolic analysis skipped.
    pub fn new(
        n: usize,
        col_ptr: Vec<usize>,
        row_idx: Vec<usize>,
        order: Option<&[usize]>,
        split_at: Option<(usize, usize)>,
    ) -> Result<Self> {
        let nnz = row_idx.len();
        let pattern = SymbolicSparseColMat::new_checked(n, n, col_ptr, None, row_idx);
        let split = match (order, split_at) {
            (Some(fwd), Some((a, b))) => Split::new(&pattern, fwd, a, b)?,
            _ => None,
        };
        let factor = match split {
            Some(sp) => Factor::Split(Box::new(sp)),
            None => Factor::Whole(Box::new(Whole::new(&pattern, order)?)),
        };
        Ok(SpdSolver {
            n,
            pattern,
            factored: vec![0.0; nnz],
            valid: false,
            factorizations: 0,
            solves: 0,
            near_solves: 0,
            cg_iterations: 0,
            touched: vec![false; n],
            work: [vec![0.0; n], vec![0.0; n], vec![0.0; n], vec![0.0; n]],
            factor,
        })
    }

    /// Whether the split factorisation is in use.
    pub fn is_split(&self) -> bool {
        matches!(self.factor, Factor::Split(_))
    }

    /// Solve A x = rhs in place; `vals` are A's lower-triangle values in pattern order.
    ///
    /// Refactors only when `vals` changed since the last factorisation. When they changed in the
    /// rows and columns of at most `max_touched` unknowns, A differs from the factored matrix A₀ by
    /// a matrix of low rank, and conjugate gradients preconditioned with A₀'s factor converge in
    /// about that many iterations (in exact arithmetic at most rank + 1); this is tried first, to a
    /// relative residual of 1e-10, and the factorisation is redone if it does not converge.
    pub fn solve_near(&mut self, vals: &[f64], rhs: &mut [f64], max_touched: usize) -> Result<()> {
        if self.valid && max_touched > 0 && self.factored != vals {
            let mut count = 0;
            let mut small = true;
            'cols: for c in 0..self.n {
                let (a, b) = (self.pattern.col_ptr()[c], self.pattern.col_ptr()[c + 1]);
                for k in a..b {
                    if vals[k] != self.factored[k] {
                        for u in [c, self.pattern.row_idx()[k]] {
                            if !self.touched[u] {
                                self.touched[u] = true;
                                count += 1;
                            }
                        }
                        if count > max_touched {
                            small = false;
                            break 'cols;
                        }
                    }
                }
            }
            self.touched.iter_mut().for_each(|t| *t = false);
            if small && self.pcg(vals, rhs, 2 * max_touched + 4) {
                self.near_solves += 1;
                return Ok(());
            }
        }
        self.solve(vals, rhs)
    }

    /// y = A x for the symmetric matrix stored as its lower triangle.
    fn matvec(&self, vals: &[f64], x: &[f64], y: &mut [f64]) {
        y.iter_mut().for_each(|v| *v = 0.0);
        let (cp, ri) = (self.pattern.col_ptr(), self.pattern.row_idx());
        for c in 0..self.n {
            for k in cp[c]..cp[c + 1] {
                let r = ri[k];
                y[r] += vals[k] * x[c];
                if r != c {
                    y[c] += vals[k] * x[r];
                }
            }
        }
    }

    /// Apply the current factor's inverse to `v` in place.
    fn precondition(&mut self, v: &mut [f64]) {
        match &mut self.factor {
            Factor::Split(sp) => sp.solve(v),
            Factor::Whole(w) => w.solve(v),
        }
        self.solves += 1;
    }

    /// Preconditioned conjugate gradients with the current factor; `rhs` becomes x on success.
    fn pcg(&mut self, vals: &[f64], rhs: &mut [f64], max_iter: usize) -> bool {
        let [mut x, mut r, mut z, mut q] = std::mem::take(&mut self.work);
        let bnorm = rhs.iter().map(|v| v * v).sum::<f64>().sqrt();
        x.copy_from_slice(rhs);
        self.precondition(&mut x);
        self.matvec(vals, &x, &mut q);
        for i in 0..self.n {
            r[i] = rhs[i] - q[i];
        }
        z.copy_from_slice(&r);
        self.precondition(&mut z);
        let mut p = z.clone();
        let mut rz: f64 = r.iter().zip(&z).map(|(a, b)| a * b).sum();
        let mut ok = bnorm == 0.0;
        for _ in 0..max_iter {
            let rn = r.iter().map(|v| v * v).sum::<f64>().sqrt();
            if rn <= 1e-10 * bnorm {
                ok = true;
                break;
            }
            self.cg_iterations += 1;
            self.matvec(vals, &p, &mut q);
            let pq: f64 = p.iter().zip(&q).map(|(a, b)| a * b).sum();
            if pq <= 0.0 {
                break;
            }
            let alpha = rz / pq;
            for i in 0..self.n {
                x[i] += alpha * p[i];
                r[i] -= alpha * q[i];
            }
            z.copy_from_slice(&r);
            self.precondition(&mut z);
            let rz_new: f64 = r.iter().zip(&z).map(|(a, b)| a * b).sum();
            let beta = rz_new / rz;
            rz = rz_new;
            for i in 0..self.n {
                p[i] = z[i] + beta * p[i];
            }
        }
        if !ok {
            let rn = r.iter().map(|v| v * v).sum::<f64>().sqrt();
            ok = rn <= 1e-10 * bnorm;
        }
        if ok {
            rhs.copy_from_slice(&x);
        }
        self.work = [x, r, z, q];
        ok
    }

    /// Solve A x = rhs in place, refactoring whenever `vals` changed.
    pub fn solve(&mut self, vals: &[f64], rhs: &mut [f64]) -> Result<()> {
        if !self.valid || self.factored != vals {
            match &mut self.factor {
                Factor::Split(sp) => sp.factor(vals)?,
                Factor::Whole(w) => w.factor(&self.pattern, vals)?,
            }
            self.factored.copy_from_slice(vals);
            self.valid = true;
            self.factorizations += 1;
        }
        self.precondition(rhs);
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn solves_small_spd_system() {
        // A = [[4, -1, 0], [-1, 4, -1], [0, -1, 4]], lower triangle.
        let col_ptr = vec![0, 2, 4, 5];
        let row_idx = vec![0, 1, 1, 2, 2];
        let vals = vec![4.0, -1.0, 4.0, -1.0, 4.0];
        let mut s = SpdSolver::new(3, col_ptr, row_idx, None, None).unwrap();
        let mut b = vec![3.0, 2.0, 3.0];
        s.solve(&vals, &mut b).unwrap();
        for v in &b {
            assert!((v - 1.0).abs() < 1e-12);
        }
        let mut b = vec![4.0, -1.0, 0.0];
        s.solve(&vals, &mut b).unwrap();
        assert_eq!(s.factorizations, 1);
        assert!((b[0] - 1.0).abs() < 1e-12 && b[1].abs() < 1e-12);
    }

    /// A tridiagonal SPD matrix (lower triangle) with diagonal `d`.
    fn tridiag(d: &[f64]) -> (Vec<usize>, Vec<usize>, Vec<f64>) {
        let n = d.len();
        let (mut cp, mut ri, mut v) = (vec![0], Vec::new(), Vec::new());
        for c in 0..n {
            ri.push(c);
            v.push(d[c]);
            if c + 1 < n {
                ri.push(c + 1);
                v.push(-1.0);
            }
            cp.push(ri.len());
        }
        (cp, ri, v)
    }

    /// The 5-point pattern (lower triangle, CSC) of an nx × nz grid without the cells i < hole.0,
    /// j < hole.1 (air): `unk_of` of the grid, column pointers, row indices.
    fn grid_pattern(
        nx: usize,
        nz: usize,
        hole: (usize, usize),
    ) -> (Vec<usize>, Vec<usize>, Vec<usize>) {
        let mut unk = vec![usize::MAX; nx * nz];
        let mut cells = Vec::new();
        for j in 0..nz {
            for i in 0..nx {
                if !(i < hole.0 && j < hole.1) {
                    unk[j * nx + i] = cells.len();
                    cells.push((i, j));
                }
            }
        }
        let (mut cp, mut ri) = (vec![0], Vec::new());
        for &(i, j) in &cells {
            ri.push(unk[j * nx + i]);
            for (ii, jj) in [(i + 1, j), (i, j + 1)] {
                if ii < nx && jj < nz && unk[jj * nx + ii] != usize::MAX {
                    ri.push(unk[jj * nx + ii]);
                }
            }
            let c = ri.len();
            ri[cp[cp.len() - 1]..c].sort_unstable();
            cp.push(c);
        }
        (unk, cp, ri)
    }

    /// SPD values for a [`grid_pattern`]: a varied diagonal and negative couplings.
    fn grid_values(cp: &[usize], ri: &[usize], round: usize) -> Vec<f64> {
        let mut v = Vec::new();
        for c in 0..cp.len() - 1 {
            for &r in &ri[cp[c]..cp[c + 1]] {
                v.push(if r == c {
                    4.2 + ((c + round) % 5) as f64
                } else {
                    -1.0 - 0.1 * ((c * 7 + round) % 4) as f64
                });
            }
        }
        v
    }

    /// The plain-loop supernodal solve gives faer's answer (5-point Laplacian plus a diagonal on
    /// a 30 × 20 grid, nested-dissection order, forced supernodal).
    #[test]
    fn plain_supernodal_solve_matches_faer() {
        let (nx, nz) = (30usize, 20usize);
        let (unk, cp, ri) = grid_pattern(nx, nz, (0, 0));
        let n = cp.len() - 1;
        let v = grid_values(&cp, &ri, 0);
        let order = nested_dissection(nx, nz, &unk);
        let mut own = SpdSolver::new(n, cp.clone(), ri.clone(), Some(&order), None).unwrap();
        let Factor::Whole(w) = &own.factor else {
            panic!("whole factor expected")
        };
        assert!(w.layout.is_some(), "forced supernodal");
        let mut faer_only = SpdSolver::new(n, cp, ri, Some(&order), None).unwrap();
        if let Factor::Whole(w) = &mut faer_only.factor {
            w.layout = None;
        }
        let b: Vec<f64> = (0..n).map(|k| (k as f64 * 0.7).cos()).collect();
        let (mut x1, mut x2) = (b.clone(), b.clone());
        own.solve(&v, &mut x1).unwrap();
        faer_only.solve(&v, &mut x2).unwrap();
        for (a, c) in x1.iter().zip(&x2) {
            assert!((a - c).abs() < 1e-12 * (1.0 + c.abs()), "{a} vs {c}");
        }
    }

    /// The split factorisation (two halves and the separator's Schur complement) solves the
    /// same system as the whole factor, on the 30 × 20 grid with a hole (air cells) and on
    /// several matrices in turn.
    #[test]
    fn split_factorisation_matches_whole() {
        let (nx, nz) = (30usize, 20usize);
        let (unk, cp, ri) = grid_pattern(nx, nz, (6, 4));
        let n = cp.len() - 1;
        let (order, a, b) = nested_dissection_split(nx, nz, &unk);
        assert!(a > 0 && a < b && b < n, "{a} {b} {n}");
        let mut split =
            SpdSolver::new(n, cp.clone(), ri.clone(), Some(&order), Some((a, b))).unwrap();
        assert!(split.is_split());
        let mut whole = SpdSolver::new(n, cp.clone(), ri.clone(), Some(&order), None).unwrap();
        for round in 0..3 {
            let v = grid_values(&cp, &ri, round);
            let rhs: Vec<f64> = (0..n)
                .map(|k| (k as f64 * 0.3 + round as f64).sin())
                .collect();
            let (mut x1, mut x2) = (rhs.clone(), rhs.clone());
            split.solve(&v, &mut x1).unwrap();
            whole.solve(&v, &mut x2).unwrap();
            for (p, q) in x1.iter().zip(&x2) {
                assert!((p - q).abs() < 1e-12 * (1.0 + q.abs()), "{p} vs {q}");
            }
        }
        assert_eq!(split.factorizations, 3);
    }

    #[test]
    fn near_factor_cg_matches_direct_solve() {
        let n = 50;
        let d0 = vec![2.5; n];
        let (cp, ri, v0) = tridiag(&d0);
        let mut s = SpdSolver::new(n, cp.clone(), ri.clone(), None, None).unwrap();
        let mut b: Vec<f64> = (0..n).map(|i| (i as f64).sin()).collect();
        s.solve(&v0, &mut b).unwrap();
        // Change two diagonal entries: CG with the old factor must reach the direct answer.
        let mut d1 = d0.clone();
        d1[10] = 40.0;
        d1[30] = 2.6;
        let (_, _, v1) = tridiag(&d1);
        let rhs: Vec<f64> = (0..n).map(|i| 1.0 + (i as f64).cos()).collect();
        let mut x_near = rhs.clone();
        s.solve_near(&v1, &mut x_near, 4).unwrap();
        assert_eq!(s.near_solves, 1);
        assert_eq!(s.factorizations, 1);
        let mut direct = SpdSolver::new(n, cp, ri, None, None).unwrap();
        let mut x = rhs.clone();
        direct.solve(&v1, &mut x).unwrap();
        for (a, b) in x.iter().zip(&x_near) {
            assert!((a - b).abs() < 1e-8, "{a} vs {b}");
        }
    }
}
