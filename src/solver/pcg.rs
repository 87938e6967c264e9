//! Conjugate gradients preconditioned by a modified diagonal incomplete Cholesky factor, for the
//! large systems of 3D models where a direct factor would not fit or would cost too much per
//! change of the matrix.
//!
//! The matrix A (SPD, lower triangle in CSC as the network stores it, unknowns in the grid's
//! natural order) is preconditioned by M = (D + L) D⁻¹ (D + Lᵀ), L its strict lower part and D
//! from the recurrence (in ascending order)
//!
//! ```text
//! d_i = a_ii − Σ_{j<i, a_ij≠0} [ a_ij² + ω a_ij (s_j − a_ij) ] / d_j,   s_j = Σ_{k>j} a_kj
//! ```
//!
//! With ω = 0 this is IC(0) of a 5- or 7-point stencil in natural order (its fill falls outside
//! the stencil and is dropped); ω > 0 adds the dropped fill to the diagonal (modified incomplete
//! Cholesky, row sums kept), which makes the iteration count grow far more slowly with the grid
//! (Gustafsson 1978, BIT 18:142–156). Setting up M costs one pass over the matrix, so it is
//! redone whenever the matrix or ω changes (steady solves use their own ω,
//! [`PcgParams::omega_steady`]). CG stops when ‖r‖₂ ≤ `rel_tol` ‖b‖₂, or, for a Newton step's
//! correction ([`PcgSolver::solve_step`]), as soon as max_k w_k |r_k| ≤ a given bound: with
//! w_k = Δt/(V_k C_k) this is the temperature-equivalent residual the Newton iteration tests, so
//! the correction is solved only as far as the next Newton iterate needs (inexact Newton).
use crate::error::{Error, Result};

/// Settings of the iterative solver.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PcgParams {
    /// Relative residual at which CG stops. Default 1e-8 (1e-6 raised the Newton iteration count;
    /// 1e-10 cost more CG iterations for the same results to the printed digits).
    pub rel_tol: f64,
    /// Most CG iterations per solve. Default 5000.
    pub max_iter: usize,
    /// Modification ω of the incomplete factor for the transient steps' matrices, 0 … 1.
    /// Default 0.99 (measured on the 3D demo's cold-spell steps, CG iterations per solve at
    /// ω = 0.95 / 0.99 / 1.0: coarse mesh 11.6 / 12.3 / 12.6, normal 15.0 / 15.5 / 16.9, fine
    /// 28.0 / 21.6 / 25.3: a fixed ω < 1 lets the count grow like IC(0)'s on fine grids).
    pub omega: f64,
    /// ω for steady solves (no capacity term on the diagonal). Default 1.0 (MIC proper; steady
    /// start of the fine 3D demo 10.7 s at 0.95, 4.6 s at 1.0).
    pub omega_steady: f64,
}

impl Default for PcgParams {
    fn default() -> Self {
        PcgParams {
            rel_tol: 1e-8,
            max_iter: 5000,
            omega: 0.99,
            omega_steady: 1.0,
        }
    }
}

/// A reusable preconditioned-CG solver for one sparsity pattern.
///
/// The iteration is memory-bound on large grids, so the pattern is held in 32-bit indices and the
/// preconditioner's values in single precision (it only has to be close to A; CG itself runs in
/// double precision with A's own values).
pub struct PcgSolver {
    n: usize,
    col_ptr: Vec<usize>,
    /// Column pointers and row indices of the lower pattern, 32-bit.
    col_ptr32: Vec<u32>,
    row32: Vec<u32>,
    /// Strict lower part by rows: for row i, entries row_ptr[i]..row_ptr[i+1]
    /// of (column, slot).
    row_ptr: Vec<u32>,
    lo_col: Vec<u32>,
    lo_slot: Vec<u32>,
    /// … and by columns: for column i, entries up_ptr[i]..up_ptr[i+1] of (row, slot).
    up_ptr: Vec<u32>,
    up_row: Vec<u32>,
    up_slot: Vec<u32>,
    /// The preconditioner's off-diagonal values, by rows (forward) and by columns (backward).
    lo_val: Vec<f32>,
    up_val: Vec<f32>,
    /// 1/d of the incomplete factor.
    dinv: Vec<f32>,
    d: Vec<f64>,
    factored: Vec<f64>,
    valid: bool,
    /// The ω the factor was built with.
    omega: f64,
    params: PcgParams,
    work: [Vec<f64>; 4],
    /// Preconditioner set-ups done.
    pub setups: usize,
    /// Solves done.
    pub solves: usize,
    /// CG iterations done.
    pub iterations: usize,
    /// Largest iteration count of one solve.
    pub max_iterations: usize,
}

impl PcgSolver {
    /// A solver for the n × n pattern (lower triangle, CSC, diagonal first in each column).
    pub fn new(n: usize, col_ptr: Vec<usize>, row_idx: Vec<usize>, params: PcgParams) -> Self {
        let mut count = vec![0usize; n + 1];
        let (mut up_ptr, mut up_row, mut up_slot) = (vec![0u32], Vec::new(), Vec::new());
        for c in 0..n {
            for (slot, &r) in row_idx
                .iter()
                .enumerate()
                .take(col_ptr[c + 1])
                .skip(col_ptr[c])
            {
                if r > c {
                    count[r + 1] += 1;
                    up_row.push(r as u32);
                    up_slot.push(slot as u32);
                }
            }
            up_ptr.push(up_row.len() as u32);
        }
        for i in 0..n {
            count[i + 1] += count[i];
        }
        assert!(
            row_idx.len() < u32::MAX as usize,
            "pattern too large for 32-bit indices"
        );
        let (mut lo_col, mut lo_slot) = (vec![0u32; count[n]], vec![0u32; count[n]]);
        let mut next = count.clone();
        for c in 0..n {
            for slot in col_ptr[c]..col_ptr[c + 1] {
                let r = row_idx[slot];
                if r > c {
                    lo_col[next[r]] = c as u32;
                    lo_slot[next[r]] = slot as u32;
                    next[r] += 1;
                }
            }
        }
        PcgSolver {
            n,
            factored: vec![f64::NAN; row_idx.len()],
            col_ptr32: col_ptr.iter().map(|&v| v as u32).collect(),
            row32: row_idx.iter().map(|&v| v as u32).collect(),
            lo_val: vec![0.0; lo_col.len()],
            up_val: vec![0.0; up_row.len()],
            up_ptr,
            up_row,
            up_slot,
            dinv: vec![0.0; n],
            col_ptr,
            row_ptr: count.iter().map(|&v| v as u32).collect(),
            lo_col,
            lo_slot,
            d: vec![0.0; n],
            valid: false,
            omega: params.omega,
            params,
            work: [vec![0.0; n], vec![0.0; n], vec![0.0; n], vec![0.0; n]],
            setups: 0,
            solves: 0,
            iterations: 0,
            max_iterations: 0,
        }
    }

    /// The incomplete factor's diagonal for the values `vals`.
    fn setup(&mut self, vals: &[f64]) -> Result<()> {
        // Invalid until complete: a failure part-way leaves no half-built factor in use.
        self.valid = false;
        let n = self.n;
        let colsum: Vec<f64> = (0..n)
            .map(|c| {
                let (k0, k1) = (self.up_ptr[c] as usize, self.up_ptr[c + 1] as usize);
                self.up_slot[k0..k1].iter().map(|&s| vals[s as usize]).sum()
            })
            .collect();
        for i in 0..n {
            let a_ii = vals[self.col_ptr[i]];
            let mut d = a_ii;
            let (k0, k1) = (self.row_ptr[i] as usize, self.row_ptr[i + 1] as usize);
            for (&j, &slot) in self.lo_col[k0..k1].iter().zip(&self.lo_slot[k0..k1]) {
                let (j, a) = (j as usize, vals[slot as usize]);
                d -= (a * a + self.omega * a * (colsum[j] - a)) / self.d[j];
            }
            let small = d.partial_cmp(&(1e-3 * a_ii)) != Some(std::cmp::Ordering::Greater);
            if small {
                if a_ii.partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater) {
                    return Err(Error::NotPositiveDefinite(format!(
                        "diagonal {a_ii} at unknown {i}"
                    )));
                }
                d = 1e-3 * a_ii;
            }
            self.d[i] = d;
            self.dinv[i] = (1.0 / d) as f32;
        }
        for (v, &slot) in self.lo_val.iter_mut().zip(&self.lo_slot) {
            *v = vals[slot as usize] as f32;
        }
        for (v, &slot) in self.up_val.iter_mut().zip(&self.up_slot) {
            *v = vals[slot as usize] as f32;
        }
        self.factored.copy_from_slice(vals);
        self.valid = true;
        self.setups += 1;
        Ok(())
    }

    /// z = M⁻¹ r: forward and backward substitution.
    fn apply(&self, r: &[f64], z: &mut [f64]) {
        for i in 0..self.n {
            let mut s = r[i];
            let (k0, k1) = (self.row_ptr[i] as usize, self.row_ptr[i + 1] as usize);
            for (&j, &a) in self.lo_col[k0..k1].iter().zip(&self.lo_val[k0..k1]) {
                s -= f64::from(a) * z[j as usize];
            }
            z[i] = s * f64::from(self.dinv[i]);
        }
        for i in (0..self.n).rev() {
            let mut s = 0.0;
            let (k0, k1) = (self.up_ptr[i] as usize, self.up_ptr[i + 1] as usize);
            for (&q, &a) in self.up_row[k0..k1].iter().zip(&self.up_val[k0..k1]) {
                s += f64::from(a) * z[q as usize];
            }
            z[i] -= s * f64::from(self.dinv[i]);
        }
    }

    /// y = A x for the symmetric matrix whose lower triangle is `vals`.
    fn matvec(&self, vals: &[f64], x: &[f64], y: &mut [f64]) {
        y.iter_mut().for_each(|v| *v = 0.0);
        for c in 0..self.n {
            let (start, end) = (self.col_ptr32[c] as usize, self.col_ptr32[c + 1] as usize);
            let xc = x[c];
            let mut yc = vals[start] * xc;
            for (&r, &a) in self.row32[start + 1..end].iter().zip(&vals[start + 1..end]) {
                let r = r as usize;
                y[r] += a * xc;
                yc += a * x[r];
            }
            y[c] += yc;
        }
    }

    /// Solve A x = rhs in place (x starts from 0) for a transient step's matrix.
    pub fn solve(&mut self, vals: &[f64], rhs: &mut [f64]) -> Result<()> {
        self.solve_with(vals, rhs, self.params.omega, None)
    }

    /// [`PcgSolver::solve`] that also stops once max_k w_k |r_k| ≤ `bound` (the residual in the
    /// units the caller's own convergence test uses).
    pub fn solve_step(
        &mut self,
        vals: &[f64],
        rhs: &mut [f64],
        w: &[f64],
        bound: f64,
    ) -> Result<()> {
        self.solve_with(vals, rhs, self.params.omega, Some((w, bound)))
    }

    /// Solve A x = rhs in place (x starts from 0) for a steady matrix.
    pub fn solve_steady(&mut self, vals: &[f64], rhs: &mut [f64]) -> Result<()> {
        self.solve_with(vals, rhs, self.params.omega_steady, None)
    }

    fn solve_with(
        &mut self,
        vals: &[f64],
        rhs: &mut [f64],
        omega: f64,
        scaled: Option<(&[f64], f64)>,
    ) -> Result<()> {
        if !self.valid || self.omega != omega || self.factored != vals {
            self.omega = omega;
            self.setup(vals)?;
        }
        self.solves += 1;
        let b_norm = rhs.iter().map(|v| v * v).sum::<f64>().sqrt();
        if b_norm == 0.0 {
            return Ok(());
        }
        let [mut x, mut z, mut p, mut q] = std::mem::take(&mut self.work);
        let r = rhs;
        x.iter_mut().for_each(|v| *v = 0.0);
        self.apply(r, &mut z);
        p.copy_from_slice(&z);
        let mut rz: f64 = r.iter().zip(&z).map(|(a, b)| a * b).sum();
        let mut done = false;
        let mut it = 0;
        while it < self.params.max_iter {
            self.matvec(vals, &p, &mut q);
            let pq: f64 = p.iter().zip(&q).map(|(a, b)| a * b).sum();
            let alpha = rz / pq;
            let (mut r2, mut scaled_max) = (0.0, 0.0f64);
            for k in 0..self.n {
                x[k] += alpha * p[k];
                r[k] -= alpha * q[k];
                r2 += r[k] * r[k];
                if let Some((w, _)) = scaled {
                    scaled_max = scaled_max.max((w[k] * r[k]).abs());
                }
            }
            it += 1;
            let r_norm = r2.sqrt();
            if super::cg_stops(r_norm, self.params.rel_tol * b_norm, scaled_max, scaled) {
                done = true;
                break;
            }
            self.apply(r, &mut z);
            let rz_new: f64 = r.iter().zip(&z).map(|(a, b)| a * b).sum();
            let beta = rz_new / rz;
            rz = rz_new;
            for k in 0..self.n {
                p[k] = z[k] + beta * p[k];
            }
        }
        self.iterations += it;
        self.max_iterations = self.max_iterations.max(it);
        r.copy_from_slice(&x);
        self.work = [x, z, p, q];
        if done {
            Ok(())
        } else {
            Err(Error::Method(format!(
                "conjugate gradients: no convergence in {it} iterations"
            )))
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The lower CSC of a 5-point nx × nz grid matrix: diagonal `diag(c)`, couplings −1.
    fn laplacian_2d(
        nx: usize,
        nz: usize,
        diag: impl Fn(usize) -> f64,
    ) -> (Vec<usize>, Vec<usize>, Vec<f64>) {
        let (mut cp, mut ri, mut v) = (vec![0], Vec::new(), Vec::new());
        for c in 0..nx * nz {
            let (i, j) = (c % nx, c / nx);
            ri.push(c);
            v.push(diag(c));
            if i + 1 < nx {
                ri.push(c + 1);
                v.push(-1.0);
            }
            if j + 1 < nz {
                ri.push(c + nx);
                v.push(-1.0);
            }
            cp.push(ri.len());
        }
        (cp, ri, v)
    }

    /// A 2D Laplacian with a mass term on an 8 × 6 grid (lower CSC): the solution of A x = A 1 is
    /// 1 to the tolerance, whatever ω.
    #[test]
    fn solves_a_grid_laplacian() {
        let (nx, nz) = (8usize, 6usize);
        let n = nx * nz;
        let (cp, ri, v) = laplacian_2d(nx, nz, |c| 4.0 + 0.01 * (c as f64));
        for omega in [0.0, 0.95, 0.99] {
            let mut s = PcgSolver::new(
                n,
                cp.clone(),
                ri.clone(),
                PcgParams {
                    omega,
                    ..Default::default()
                },
            );
            let ones = vec![1.0; n];
            let mut b = vec![0.0; n];
            s.matvec(&v, &ones, &mut b);
            s.solve(&v, &mut b).unwrap();
            assert!(b.iter().all(|x| (x - 1.0).abs() < 1e-8), "ω {omega}: {b:?}");
            assert!(s.iterations < n);
            // A steady solve of the same matrix rebuilds the factor with ω_steady = 1 (MIC
            // proper) and reaches the same solution; a transient solve after it rebuilds again.
            s.matvec(&v, &ones, &mut b);
            s.solve_steady(&v, &mut b).unwrap();
            assert!(b.iter().all(|x| (x - 1.0).abs() < 1e-8), "steady: {b:?}");
            assert_eq!(s.setups, 2);
            s.matvec(&v, &ones, &mut b);
            s.solve(&v, &mut b).unwrap();
            assert_eq!(s.setups, 3);
            // The same matrix and ω again: the factor is reused.
            s.matvec(&v, &ones, &mut b);
            s.solve(&v, &mut b).unwrap();
            assert_eq!(s.setups, 3);
        }
    }

    /// A Newton correction solved only as far as asked: `solve_step` returns once the weighted
    /// residual max_k w_k |r_k| of A x = b (recomputed here from x) is at most the bound, in
    /// fewer iterations than the full solve, and its x is the full solution within that bound.
    #[test]
    fn solve_step_stops_at_the_weighted_bound() {
        let (nx, nz) = (30usize, 20usize);
        let n = nx * nz;
        let (cp, ri, v) = laplacian_2d(nx, nz, |_| 4.01);
        let mut s = PcgSolver::new(n, cp, ri, PcgParams::default());
        let b: Vec<f64> = (0..n).map(|k| ((k * 7) % 13) as f64 - 6.0).collect();
        let w: Vec<f64> = (0..n).map(|k| 0.5 + (k % 3) as f64).collect();
        let max_w = |s: &PcgSolver, x: &[f64]| {
            let mut ax = vec![0.0; n];
            s.matvec(&v, x, &mut ax);
            (0..n)
                .map(|k| (w[k] * (b[k] - ax[k])).abs())
                .fold(0.0, f64::max)
        };
        let start = (0..n).map(|k| (w[k] * b[k]).abs()).fold(0.0, f64::max);
        let bound = 1e-3 * start;
        let mut x = b.clone();
        s.solve_step(&v, &mut x, &w, bound).unwrap();
        let partial = s.iterations;
        let reached = max_w(&s, &x);
        assert!(reached <= bound * (1.0 + 1e-9), "{reached} > {bound}");
        let mut full = b.clone();
        s.solve(&v, &mut full).unwrap();
        assert!(
            partial < s.iterations - partial,
            "{partial} vs {}",
            s.iterations - partial
        );
        assert!(max_w(&s, &full) < 1e-3 * bound);
    }

    /// A steady matrix: the 3D 7-point Laplacian of a 10³ grid held only through its boundary
    /// faces (conductance 1 to a fixed temperature), so every interior row sums to zero, the case
    /// where MIC proper (ω = 1) could break down. The steady solve reaches A x = A 1 to the
    /// tolerance, with far fewer iterations than the unknowns.
    #[test]
    fn steady_laplacian_with_mic_proper() {
        let m = 10usize;
        let n = m * m * m;
        let (mut cp, mut ri, mut v) = (vec![0], Vec::new(), Vec::new());
        for c in 0..n {
            let (i, j, k) = (c % m, (c / m) % m, c / (m * m));
            // Six faces of conductance 1, each to a neighbour or to the held boundary.
            ri.push(c);
            v.push(6.0);
            for (ok, d) in [(i + 1 < m, 1), (j + 1 < m, m), (k + 1 < m, m * m)] {
                if ok {
                    ri.push(c + d);
                    v.push(-1.0);
                }
            }
            cp.push(ri.len());
        }
        let mut s = PcgSolver::new(n, cp, ri, PcgParams::default());
        let ones = vec![1.0; n];
        let mut b = vec![0.0; n];
        s.matvec(&v, &ones, &mut b);
        s.solve_steady(&v, &mut b).unwrap();
        assert!(b.iter().all(|x| (x - 1.0).abs() < 1e-7), "{:?}", &b[..5]);
        assert!(s.iterations < 40, "{} iterations", s.iterations);
    }
}
