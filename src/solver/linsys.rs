//! Sparse symmetric positive-definite solves with faer's supernodal/simplicial Cholesky.
//!
//! The symbolic analysis (fill-reducing ordering, elimination tree) is done once per grid; the
//! numeric factorisation is redone only when the matrix values differ from the last factored ones,
//! so steps in which no cell changed its phase segment or conductivity cost one triangular solve.
use crate::error::{Error, Result};
use faer::dyn_stack::{MemBuffer, MemStack};
use faer::sparse::linalg::cholesky::{
    factorize_symbolic_cholesky, CholeskySymbolicParams, LltRef, SymbolicCholesky,
    SymmetricOrdering,
};
use faer::sparse::linalg::SupernodalThreshold;
use faer::sparse::{SparseColMatRef, SymbolicSparseColMat};
use faer::{Conj, MatMut, Par, Side};

/// A reusable Cholesky solver for one sparsity pattern (lower triangle, CSC).
pub struct SpdSolver {
    n: usize,
    pattern: SymbolicSparseColMat<usize>,
    chol: SymbolicCholesky<usize>,
    l_val: Vec<f64>,
    fbuf: MemBuffer,
    sbuf: MemBuffer,
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
}

/// Geometric nested-dissection order of the unknowns of an nx × nz grid (`unk_of[j·nx + i]` =
/// unknown or `usize::MAX`): bisect the longer side of a box, order both halves, then the separator
/// line last; boxes of at most 32 cells are ordered row by row.
pub fn nested_dissection(nx: usize, nz: usize, unk_of: &[usize]) -> Vec<usize> {
    fn rec(b: (usize, usize, usize, usize), nx: usize, unk_of: &[usize], out: &mut Vec<usize>) {
        let (i0, i1, j0, j1) = b;
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
            rec((i0, m, j0, j1), nx, unk_of, out);
            rec((m + 1, i1, j0, j1), nx, unk_of, out);
            for j in j0..j1 {
                push(m, j, out);
            }
        } else {
            let m = (j0 + j1) / 2;
            rec((i0, i1, j0, m), nx, unk_of, out);
            rec((i0, i1, m + 1, j1), nx, unk_of, out);
            for i in i0..i1 {
                push(i, m, out);
            }
        }
    }
    let mut out = Vec::new();
    rec((0, nx, 0, nz), nx, unk_of, &mut out);
    out
}

impl SpdSolver {
    /// Analyse the pattern: `col_ptr` (n + 1) and `row_idx` of the lower triangle, rows sorted.
    /// `order`, if given, is a fill-reducing elimination order (`order[k]` = the unknown eliminated
    /// k-th), used with the supernodal factorisation; otherwise faer's AMD ordering is used.
    pub fn new(
        n: usize,
        col_ptr: Vec<usize>,
        row_idx: Vec<usize>,
        order: Option<&[usize]>,
    ) -> Result<Self> {
        let nnz = row_idx.len();
        let pattern = SymbolicSparseColMat::new_checked(n, n, col_ptr, None, row_idx);
        let sym_err = |e| Error::NotPositiveDefinite(format!("symbolic analysis: {e:?}"));
        let chol = match order {
            Some(fwd) => {
                let mut inv = vec![0usize; n];
                for (k, &p) in fwd.iter().enumerate() {
                    inv[p] = k;
                }
                let perm = faer::perm::PermRef::new_checked(fwd, &inv, n);
                factorize_symbolic_cholesky(
                    pattern.as_ref(),
                    Side::Lower,
                    SymmetricOrdering::Custom(perm),
                    CholeskySymbolicParams {
                        supernodal_flop_ratio_threshold: SupernodalThreshold::FORCE_SUPERNODAL,
                        ..Default::default()
                    },
                )
                .map_err(sym_err)?
            }
            None => factorize_symbolic_cholesky(
                pattern.as_ref(),
                Side::Lower,
                SymmetricOrdering::Amd,
                CholeskySymbolicParams {
                    supernodal_flop_ratio_threshold: SupernodalThreshold::AUTO,
                    ..Default::default()
                },
            )
            .map_err(sym_err)?,
        };
        let fbuf =
            MemBuffer::new(chol.factorize_numeric_llt_scratch::<f64>(Par::Seq, Default::default()));
        let sbuf = MemBuffer::new(chol.solve_in_place_scratch::<f64>(1, Par::Seq));
        Ok(SpdSolver {
            n,
            l_val: vec![0.0; chol.len_val()],
            pattern,
            chol,
            fbuf,
            sbuf,
            factored: vec![0.0; nnz],
            valid: false,
            factorizations: 0,
            solves: 0,
            near_solves: 0,
            cg_iterations: 0,
            touched: vec![false; n],
            work: [vec![0.0; n], vec![0.0; n], vec![0.0; n], vec![0.0; n]],
        })
    }

    /// Number of stored values of the Cholesky factor (fill).
    pub fn factor_len(&self) -> usize {
        self.chol.len_val()
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
        let llt = LltRef::new(&self.chol, &self.l_val);
        llt.solve_in_place_with_conj(
            Conj::No,
            MatMut::from_column_major_slice_mut(v, self.n, 1),
            Par::Seq,
            MemStack::new(&mut self.sbuf),
        );
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
            let a = SparseColMatRef::new(self.pattern.as_ref(), vals);
            self.chol
                .factorize_numeric_llt::<f64>(
                    &mut self.l_val,
                    a,
                    Side::Lower,
                    Default::default(),
                    Par::Seq,
                    MemStack::new(&mut self.fbuf),
                    Default::default(),
                )
                .map_err(|e| Error::NotPositiveDefinite(format!("{e:?}")))?;
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
        let mut s = SpdSolver::new(3, col_ptr, row_idx, None).unwrap();
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

    #[test]
    fn near_factor_cg_matches_direct_solve() {
        let n = 50;
        let d0 = vec![2.5; n];
        let (cp, ri, v0) = tridiag(&d0);
        let mut s = SpdSolver::new(n, cp.clone(), ri.clone(), None).unwrap();
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
        let mut direct = SpdSolver::new(n, cp, ri, None).unwrap();
        let mut x = rhs.clone();
        direct.solve(&v1, &mut x).unwrap();
        for (a, b) in x.iter().zip(&x_near) {
            assert!((a - b).abs() < 1e-8, "{a} vs {b}");
        }
    }
}
