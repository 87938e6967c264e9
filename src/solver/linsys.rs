//! Sparse symmetric positive-definite solves with faer's supernodal/simplicial Cholesky.
//!
//! The symbolic analysis (fill-reducing ordering, elimination tree) is done once per grid; the
//! numeric factorisation is redone only when the matrix values differ from the last factored ones,
//! so steps in which no cell changed its phase segment or conductivity cost one triangular solve.
use crate::error::{Error, Result};
use faer::dyn_stack::{MemBuffer, MemStack};
use faer::sparse::linalg::cholesky::{
    factorize_symbolic_cholesky, LltRef, SymbolicCholesky, SymmetricOrdering,
};
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
}

impl SpdSolver {
    /// Analyse the pattern: `col_ptr` (n + 1) and `row_idx` of the lower triangle, rows sorted.
    pub fn new(n: usize, col_ptr: Vec<usize>, row_idx: Vec<usize>) -> Result<Self> {
        let nnz = row_idx.len();
        let pattern = SymbolicSparseColMat::new_checked(n, n, col_ptr, None, row_idx);
        let chol = factorize_symbolic_cholesky(
            pattern.as_ref(),
            Side::Lower,
            SymmetricOrdering::Amd,
            Default::default(),
        )
        .map_err(|e| Error::NotPositiveDefinite(format!("symbolic analysis: {e:?}")))?;
        let fbuf = MemBuffer::new(chol.factorize_numeric_llt_scratch::<f64>(Par::Seq, Default::default()));
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
        })
    }

    /// Solve A x = rhs in place; `vals` are A's lower-triangle values in pattern order.
    /// Refactors only when `vals` changed since the last factorisation.
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
        let llt = LltRef::new(&self.chol, &self.l_val);
        llt.solve_in_place_with_conj(
            Conj::No,
            MatMut::from_column_major_slice_mut(rhs, self.n, 1),
            Par::Seq,
            MemStack::new(&mut self.sbuf),
        );
        self.solves += 1;
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
        let mut s = SpdSolver::new(3, col_ptr, row_idx).unwrap();
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
}
