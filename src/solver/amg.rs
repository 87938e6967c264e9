//! Flexible conjugate gradients preconditioned by an aggregation multigrid cycle, for the large
//! systems of 3D models: the iteration count stays nearly constant as the grid is refined, where
//! an incomplete factor's grows (see [`super::pcg`]).
//!
//! # Method
//! - **Hierarchy.** Unknowns are grouped into aggregates by their strong couplings: j is a strong
//!   neighbour of i when −a_ij ≥ θ max_k(−a_ik) (θ = `strength`). Unknowns whose diagonal
//!   dominates their row (a_ii ≥ `dominance` Σ_{j≠i}|a_ij|: large cells, whose heat capacity over
//!   the step outweighs their conduction) are left out of the coarse levels, since the smoother
//!   alone solves them. The prolongation P is piecewise constant (plain aggregation), so the
//!   coarse matrix A_c = Pᵀ A P is the sum of the entries between two aggregates
//!   ((A_c)_IJ = Σ_{i∈I, j∈J} a_ij) and is recomputed in one pass whenever A changes. The
//!   aggregates are chosen once, from the first matrix, and kept. The coarsest level (at most
//!   `coarse_size` unknowns) is solved by a dense Cholesky factor.
//! - **Cycle.** One forward Gauss–Seidel sweep, the coarse correction, one backward sweep. On
//!   levels of at least 4,096 unknowns (`PAR_MIN`) the rows are split in two halves swept at
//!   once on two threads, each reading the other half's unknowns as they were when the sweep began (block
//!   Gauss–Seidel: the split depends on the matrix only, so results do not depend on the thread
//!   count or timing); matrix products and long dot products are split the same way, their two
//!   partial sums added in a fixed order. The cycle uses the values in single precision; the
//!   outer iteration's products are in double precision. On the finest level, whose rows hold
//!   their entries left of the diagonal first, the forward sweep from zero reads only those
//!   (the others multiply zeros) and the residual after it only the entries right of the
//!   diagonal. The coarse correction on every level but the last is two steps of flexible CG
//!   preconditioned by the next cycle (the K-cycle), which keeps plain aggregation's
//!   convergence independent of the number of levels (Notay & Vassilevski 2008, Numer. Linear Algebra Appl. 15:123–142;
//!   Notay 2010, Electron. Trans. Numer. Anal. 37:123–146).
//! - **Outer iteration.** The cycle is not a fixed linear operator, so the outer iteration is
//!   flexible CG (each new direction A-orthogonalised against the previous one). It stops when
//!   ‖r‖₂ ≤ `rel_tol` ‖b‖₂, as the incomplete-factor solver does.
//!
//! # Measured (examples/bench3d.rs `days 10 … [amg]`, Alder Bend 3D demo, cold-spell steps)
//! Both solvers measured together (twelfth session; medians of 3, fine 1 run; wall time, the
//! multigrid on two threads, the incomplete factor on one), coarse / normal / fine mesh
//! (37,636 / 137,151 / 975,494 unknowns):
//! - iterations per solve with the inexact Newton stop ([`AmgSolver::solve_step`]): 4.9 / 4.8 /
//!   5.1, independent of the mesh (incomplete factor 5.4 / 6.5 / 9.5); solved fully
//!   (forcing 0): 12.5 / 13.2 / 14.3;
//! - time per step 0.089 / 0.404 / 3.96 s against 0.057 / 0.296 / 3.20 s: 1.56 / 1.36 / 1.24
//!   times as long, since one iteration costs more (two sweeps, half a residual and the
//!   K-cycle's coarse levels, whose work adds up to about the finest level's, against two
//!   triangular solves);
//! - time per Newton iteration grows as n^1.03 (coarse → normal) and n^1.06 (normal → fine),
//!   the incomplete factor's as n^1.16 and n^1.13; per step n^1.17 and n^1.16 (incomplete
//!   factor n^1.27 and n^1.21), the Newton iterations per step (5.1 / 6.1 / 7.4, more cells
//!   crossing the freezing interval per daily step on a finer grid) adding n^0.10–0.14.
//!
//! So the work grows in proportion to the cells, but the incomplete factor is faster on every
//! mesh the tool offers: it stays the default, and this solver is `simulation.solver_3d =
//! "multigrid"`.
use crate::error::{Error, Result};

/// Settings of the multigrid-preconditioned solver.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AmgParams {
    /// Relative residual at which the outer iteration stops. Default 1e-8 (as the
    /// incomplete-factor solver's).
    pub rel_tol: f64,
    /// Most outer iterations per solve. Default 500.
    pub max_iter: usize,
    /// Strength threshold θ of a coupling, relative to the row's strongest. Default 0.25.
    pub strength: f64,
    /// Diagonal dominance beyond which an unknown stays off the coarse levels. Default 5.
    pub dominance: f64,
    /// Unknowns on the coarsest level, solved directly. Default 400.
    pub coarse_size: usize,
    /// Aggregation passes per level (2: aggregates of aggregates). Default 1.
    pub passes: usize,
}

impl Default for AmgParams {
    fn default() -> Self {
        AmgParams {
            rel_tol: 1e-8,
            max_iter: 500,
            strength: 0.25,
            dominance: 5.0,
            coarse_size: 400,
            passes: 1,
        }
    }
}

/// Unknowns from which a level's kernels share their rows between two threads.
const PAR_MIN: usize = 4_096;

/// The two row blocks of a level shared between two threads: rows 0..mid and mid..n. Each block's
/// Gauss–Seidel sweep reads the other block's unknowns as they were when the sweep began (block
/// Gauss–Seidel), so the result does not depend on the threads' timing, nor on how many threads
/// the machine has: the split depends on the matrix only.
#[derive(Debug, Clone, Copy)]
struct Blocks {
    mid: usize,
    /// Columns the rows of the first block reach, beyond their own: up to `hi` (exclusive).
    hi: usize,
    /// Columns the rows of the second block reach, below their own: from `lo`.
    lo: usize,
    /// Rows of the second block below `cross` may have columns in the first.
    cross: usize,
}

/// A symmetric matrix by full rows (compressed sparse rows, 32-bit pattern).
struct Csr {
    ptr: Vec<u32>,
    col: Vec<u32>,
    val: Vec<f64>,
    /// The values in single precision, which the cycle uses (it only has to be close to A; the
    /// outer iteration uses `val`): 8 instead of 12 bytes per entry to read in the sweeps.
    val32: Vec<f32>,
    /// Slot of the diagonal in each row.
    diag: Vec<u32>,
    /// 1 / a_ii of the single-precision diagonal (a multiplication in the sweeps instead of a
    /// division).
    dinv: Vec<f64>,
    /// Whether each row holds its entries j < i before the diagonal and j > i after it (the
    /// finest level's layout).
    split: bool,
    /// The two row blocks, when the matrix has at least [`PAR_MIN`] rows.
    blocks: Option<Blocks>,
}

impl Csr {
    fn n(&self) -> usize {
        self.diag.len()
    }

    fn row(&self, i: usize) -> std::ops::Range<usize> {
        self.ptr[i] as usize..self.ptr[i + 1] as usize
    }

    /// Find the two row blocks (once the pattern is known).
    fn find_blocks(&mut self) {
        let n = self.n();
        if n < PAR_MIN {
            self.blocks = None;
            return;
        }
        let mid = n / 2;
        let (mut hi, mut lo, mut cross) = (mid, mid, mid);
        for i in 0..n {
            for &j in &self.col[self.row(i)] {
                let j = j as usize;
                if i < mid {
                    hi = hi.max(j + 1);
                } else if j < mid {
                    lo = lo.min(j);
                    cross = i + 1;
                }
            }
        }
        self.blocks = Some(Blocks { mid, hi, lo, cross });
    }

    /// y = A x in double precision (the outer iteration's).
    fn matvec(&self, x: &[f64], y: &mut [f64]) {
        self.matvec_with(&self.val, x, y);
    }

    /// y ≈ A x with the single-precision values (inside the cycle).
    fn matvec32(&self, x: &[f64], y: &mut [f64]) {
        self.matvec_with(&self.val32, x, y);
    }

    fn matvec_with<V: Copy + Into<f64> + Sync>(&self, val: &[V], x: &[f64], y: &mut [f64]) {
        match self.blocks {
            None => self.matvec_rows(val, 0, x, y),
            Some(b) => {
                let (y1, y2) = y.split_at_mut(b.mid);
                rayon::join(
                    || self.matvec_rows(val, 0, x, y1),
                    || self.matvec_rows(val, b.mid, x, y2),
                );
            }
        }
    }

    /// y = rows off.. of A x.
    fn matvec_rows<V: Copy + Into<f64>>(&self, val: &[V], off: usize, x: &[f64], y: &mut [f64]) {
        for (k, yi) in y.iter_mut().enumerate() {
            let r = self.row(off + k);
            *yi = self.col[r.clone()]
                .iter()
                .zip(&val[r])
                .map(|(&j, &a)| a.into() * x[j as usize])
                .sum();
        }
    }

    /// z = one forward Gauss–Seidel sweep on A z = b from z = 0 (by blocks on large levels:
    /// each block then starts with the other block's unknowns at 0).
    fn forward_from_zero(&self, b: &[f64], z: &mut [f64]) {
        z.iter_mut().for_each(|v| *v = 0.0);
        let sweep = |z: &mut [f64], off: usize| {
            if self.split {
                self.forward_lower_rows(b, z, off);
            } else {
                self.sweep_rows(b, z, off, &[], 0, true);
            }
        };
        match self.blocks {
            None => sweep(z, 0),
            Some(bl) => {
                let (z1, z2) = z.split_at_mut(bl.mid);
                rayon::join(|| sweep(z1, 0), || sweep(z2, bl.mid));
            }
        }
    }

    /// The forward sweep from z = 0 over rows off.. (z holds them) when the rows are split at
    /// the diagonal: the unknowns after row i, and those of the other block, are still 0, so only
    /// the entries left of the diagonal within the block count (half the matrix):
    /// z_i = (b_i − Σ_{off≤j<i} a_ij z_j) / a_ii.
    fn forward_lower_rows(&self, b: &[f64], z: &mut [f64], off: usize) {
        for li in 0..z.len() {
            let i = off + li;
            let lower = self.ptr[i] as usize..self.diag[i] as usize;
            let mut s = b[i];
            for (&j, &a) in self.col[lower.clone()].iter().zip(&self.val32[lower]) {
                if let Some(&zj) = (j as usize).checked_sub(off).and_then(|k| z.get(k)) {
                    s -= f64::from(a) * zj;
                }
            }
            z[li] = s * self.dinv[i];
        }
    }

    /// One backward Gauss–Seidel sweep on A z = b (by blocks on large levels, each reading the
    /// other's unknowns as they were before the sweep, kept in `halo`).
    fn backward(&self, b: &[f64], z: &mut [f64], halo: &mut Vec<f64>) {
        match self.blocks {
            None => self.sweep_rows(b, z, 0, &[], 0, false),
            Some(bl) => {
                halo.clear();
                halo.extend_from_slice(&z[bl.lo..bl.hi]);
                let (z1, z2) = z.split_at_mut(bl.mid);
                rayon::join(
                    || self.sweep_rows(b, z1, 0, halo, bl.lo, false),
                    || self.sweep_rows(b, z2, bl.mid, halo, bl.lo, false),
                );
            }
        }
    }

    /// Gauss–Seidel over the rows off..off + z.len() (z holds them), forward or backward; other
    /// unknowns are read from `halo` (unknowns from `halo_off` on) or are 0.
    fn sweep_rows(
        &self,
        b: &[f64],
        z: &mut [f64],
        off: usize,
        halo: &[f64],
        halo_off: usize,
        forward: bool,
    ) {
        let len = z.len();
        for k in 0..len {
            let li = if forward { k } else { len - 1 - k };
            let i = off + li;
            let r = self.row(i);
            let mut s = b[i];
            for (&j, &a) in self.col[r.clone()].iter().zip(&self.val32[r]) {
                let j = j as usize;
                let zj = if j.wrapping_sub(off) < len {
                    z[j - off]
                } else if j.wrapping_sub(halo_off) < halo.len() {
                    halo[j - halo_off]
                } else {
                    0.0
                };
                s -= f64::from(a) * zj;
            }
            z[li] += s * self.dinv[i];
        }
    }

    /// Refresh the single-precision values and 1 / a_ii after the values changed.
    fn refresh(&mut self) {
        self.val32.clear();
        self.val32.extend(self.val.iter().map(|&v| v as f32));
        for (d, &s) in self.dinv.iter_mut().zip(&self.diag) {
            *d = 1.0 / f64::from(self.val32[s as usize]);
        }
    }

    /// res = b − A z after [`Csr::forward_from_zero`]: each row's equation then holds with the
    /// later unknowns (and, in the second block, the first block's) at 0, so
    /// res_i = −Σ_{j>i} a_ij z_j (− Σ_{j<mid} a_ij z_j in the second block): about half a pass
    /// over the matrix when the rows are split at the diagonal, a full residual otherwise.
    fn residual_after_forward(&self, b: &[f64], z: &[f64], res: &mut [f64]) {
        if !self.split {
            self.matvec32(z, res);
            for (ri, bi) in res.iter_mut().zip(b) {
                *ri = bi - *ri;
            }
            return;
        }
        match self.blocks {
            None => self.upper_rows(0, 0, z, res),
            Some(bl) => {
                let (r1, r2) = res.split_at_mut(bl.mid);
                rayon::join(
                    || self.upper_rows(0, 0, z, r1),
                    || self.upper_rows(bl.mid, bl.cross, z, r2),
                );
            }
        }
    }

    /// res_i = −Σ_{j>i} a_ij z_j for the rows off.., and for rows below `cross` also
    /// −Σ_{j<off} a_ij z_j.
    fn upper_rows(&self, off: usize, cross: usize, z: &[f64], res: &mut [f64]) {
        for (k, ri) in res.iter_mut().enumerate() {
            let i = off + k;
            let d = self.diag[i] as usize;
            let up = d + 1..self.ptr[i + 1] as usize;
            let mut s: f64 = self.col[up.clone()]
                .iter()
                .zip(&self.val32[up])
                .map(|(&j, &a)| f64::from(a) * z[j as usize])
                .sum();
            if i < cross {
                let lower = self.ptr[i] as usize..d;
                for (&j, &a) in self.col[lower.clone()].iter().zip(&self.val32[lower]) {
                    if (j as usize) < off {
                        s += f64::from(a) * z[j as usize];
                    }
                }
            }
            *ri = -s;
        }
    }
}

/// One level of the hierarchy: its matrix, the aggregate of each unknown (u32::MAX when it stays
/// off the coarse level), where each of its entries adds into the coarse matrix, and work vectors.
struct Level {
    a: Csr,
    agg: Vec<u32>,
    to_coarse: Vec<u32>,
    res: Vec<f64>,
    /// The unknowns z[lo..hi] around the block split as they were before a backward sweep by
    /// blocks (each block reads the other's part of it).
    halo: Vec<f64>,
    rc: Vec<f64>,
    zc: Vec<f64>,
    /// K-cycle vectors of this level (used when it is solved by two flexible-CG steps).
    k: [Vec<f64>; 5],
}

/// The coarsest level's dense Cholesky factor (lower triangle, row-major).
struct Dense {
    n: usize,
    l: Vec<f64>,
}

impl Dense {
    fn factor(a: &Csr) -> Result<Dense> {
        let n = a.n();
        let mut l = vec![0.0; n * n];
        for i in 0..n {
            for s in a.row(i) {
                l[i * n + a.col[s] as usize] = a.val[s];
            }
        }
        for j in 0..n {
            let mut d = l[j * n + j];
            for k in 0..j {
                d -= l[j * n + k] * l[j * n + k];
            }
            if d.partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater) {
                return Err(Error::NotPositiveDefinite(format!(
                    "coarsest multigrid level, pivot {d} at {j}"
                )));
            }
            let d = d.sqrt();
            l[j * n + j] = d;
            for i in j + 1..n {
                let mut s = l[i * n + j];
                for k in 0..j {
                    s -= l[i * n + k] * l[j * n + k];
                }
                l[i * n + j] = s / d;
            }
        }
        Ok(Dense { n, l })
    }

    fn solve(&self, b: &[f64], x: &mut [f64]) {
        let (n, l) = (self.n, &self.l);
        for i in 0..n {
            let s: f64 = (0..i).map(|k| l[i * n + k] * x[k]).sum();
            x[i] = (b[i] - s) / l[i * n + i];
        }
        for i in (0..n).rev() {
            let s: f64 = (i + 1..n).map(|k| l[k * n + i] * x[k]).sum();
            x[i] = (x[i] - s) / l[i * n + i];
        }
    }
}

/// Aggregates of `a` by strong couplings: the aggregate of each unknown (u32::MAX off the coarse
/// level) and their number.
fn aggregate(a: &Csr, p: &AmgParams) -> (Vec<u32>, usize) {
    const NONE: u32 = u32::MAX;
    let n = a.n();
    let mut strong: Vec<Vec<u32>> = vec![Vec::new(); n];
    let mut free = vec![true; n];
    for (i, s) in strong.iter_mut().enumerate() {
        let r = a.row(i);
        let (mut off, mut max_neg) = (0.0f64, 0.0f64);
        for (&j, &v) in a.col[r.clone()].iter().zip(&a.val[r.clone()]) {
            if j as usize != i {
                off += v.abs();
                max_neg = max_neg.max(-v);
            }
        }
        if a.val[a.diag[i] as usize] >= p.dominance * off || max_neg <= 0.0 {
            free[i] = false;
            continue;
        }
        for (&j, &v) in a.col[r.clone()].iter().zip(&a.val[r]) {
            if j as usize != i && -v >= p.strength * max_neg {
                s.push(j);
            }
        }
    }
    let mut agg = vec![NONE; n];
    let mut count = 0u32;
    // Roots whose strong neighbours are all unassigned take them all.
    for i in 0..n {
        if !free[i] || agg[i] != NONE {
            continue;
        }
        let nb = &strong[i];
        if nb
            .iter()
            .all(|&j| agg[j as usize] == NONE || !free[j as usize])
        {
            agg[i] = count;
            for &j in nb {
                if free[j as usize] {
                    agg[j as usize] = count;
                }
            }
            count += 1;
        }
    }
    // The rest join the aggregate of their strongest assigned neighbour, or start their own.
    for i in 0..n {
        if !free[i] || agg[i] != NONE {
            continue;
        }
        let r = a.row(i);
        let best = a.col[r.clone()]
            .iter()
            .zip(&a.val[r])
            .filter(|(&j, _)| j as usize != i && agg[j as usize] != NONE)
            .min_by(|x, y| x.1.total_cmp(y.1))
            .map(|(&j, _)| agg[j as usize]);
        agg[i] = best.unwrap_or_else(|| {
            count += 1;
            count - 1
        });
    }
    (agg, count as usize)
}

/// The coarse pattern Pᵀ A P of `a` for aggregates `agg` (nc of them) and, for each entry of
/// `a`, its slot in the coarse matrix (u32::MAX when an end is off the coarse level).
fn coarse_pattern(a: &Csr, agg: &[u32], nc: usize) -> (Csr, Vec<u32>) {
    let mut members: Vec<Vec<u32>> = vec![Vec::new(); nc];
    for (i, &g) in agg.iter().enumerate() {
        if g != u32::MAX {
            members[g as usize].push(i as u32);
        }
    }
    let mut to_coarse = vec![u32::MAX; a.col.len()];
    let (mut ptr, mut col, mut diag) = (vec![0u32], Vec::new(), Vec::with_capacity(nc));
    let mut slot_of = vec![u32::MAX; nc];
    for (g, m) in members.iter().enumerate() {
        let start = col.len();
        for &i in m {
            for s in a.row(i as usize) {
                let h = agg[a.col[s] as usize];
                if h == u32::MAX {
                    continue;
                }
                if slot_of[h as usize] == u32::MAX {
                    slot_of[h as usize] = col.len() as u32;
                    col.push(h);
                }
                to_coarse[s] = slot_of[h as usize];
            }
        }
        diag.push(slot_of[g]);
        for &h in &col[start..] {
            slot_of[h as usize] = u32::MAX;
        }
        ptr.push(col.len() as u32);
    }
    let val = vec![0.0; col.len()];
    (
        Csr {
            ptr,
            col,
            val,
            val32: Vec::new(),
            dinv: vec![0.0; nc],
            diag,
            split: false,
            blocks: None,
        },
        to_coarse,
    )
}

/// The multigrid-preconditioned flexible-CG solver for one sparsity pattern.
pub struct AmgSolver {
    /// For each slot of the finest level's full rows, the slot of the caller's lower CSC values.
    from_lower: Vec<u32>,
    levels: Vec<Level>,
    coarsest: Option<Dense>,
    built: bool,
    params: AmgParams,
    /// The values the hierarchy was last set up for.
    factored: Vec<f64>,
    work: [Vec<f64>; 5],
    /// Hierarchy set-ups done (one per change of the matrix).
    pub setups: usize,
    /// Solves done.
    pub solves: usize,
    /// Outer iterations done.
    pub iterations: usize,
    /// Largest outer iteration count of one solve.
    pub max_iterations: usize,
}

impl AmgSolver {
    /// A solver for the n × n pattern (lower triangle, CSC, diagonal first in each column).
    pub fn new(n: usize, col_ptr: &[usize], row_idx: &[usize], params: AmgParams) -> Self {
        assert!(
            2 * row_idx.len() < u32::MAX as usize,
            "pattern too large for 32-bit indices"
        );
        // The finest level's rows are split at the diagonal (entries j < i, the diagonal, then
        // j > i) only if each column lists its diagonal first and then rows below it.
        for c in 0..n {
            let rows = &row_idx[col_ptr[c]..col_ptr[c + 1]];
            assert!(
                rows.first() == Some(&c) && rows[1..].iter().all(|&r| r > c),
                "column {c}: not a lower triangle with the diagonal first"
            );
        }
        let mut count = vec![0u32; n + 1];
        for c in 0..n {
            for &r in &row_idx[col_ptr[c]..col_ptr[c + 1]] {
                count[c + 1] += 1;
                if r != c {
                    count[r + 1] += 1;
                }
            }
        }
        for i in 0..n {
            count[i + 1] += count[i];
        }
        let nnz = count[n] as usize;
        let (mut col, mut from_lower, mut diag) = (vec![0u32; nnz], vec![0u32; nnz], vec![0u32; n]);
        let mut next = count.clone();
        for c in 0..n {
            for (s, &r) in row_idx
                .iter()
                .enumerate()
                .take(col_ptr[c + 1])
                .skip(col_ptr[c])
            {
                let k = next[c] as usize;
                col[k] = r as u32;
                from_lower[k] = s as u32;
                if r == c {
                    diag[c] = k as u32;
                }
                next[c] += 1;
                if r != c {
                    let k = next[r] as usize;
                    col[k] = c as u32;
                    from_lower[k] = s as u32;
                    next[r] += 1;
                }
            }
        }
        let a = Csr {
            ptr: count,
            col,
            val: vec![0.0; nnz],
            val32: Vec::new(),
            dinv: vec![0.0; n],
            diag,
            split: true,
            blocks: None,
        };
        AmgSolver {
            from_lower,
            levels: vec![level(a)],
            coarsest: None,
            built: false,
            params,
            factored: vec![f64::NAN; row_idx.len()],
            work: std::array::from_fn(|_| vec![0.0; n]),
            setups: 0,
            solves: 0,
            iterations: 0,
            max_iterations: 0,
        }
    }

    /// Number of levels (the finest included) and unknowns on each.
    pub fn level_sizes(&self) -> Vec<usize> {
        self.levels.iter().map(|l| l.a.n()).collect()
    }

    /// Set the hierarchy up for the values `vals` (choosing the aggregates the first time).
    fn setup(&mut self, vals: &[f64]) -> Result<()> {
        let fine = &mut self.levels[0].a;
        for (v, &s) in fine.val.iter_mut().zip(&self.from_lower) {
            *v = vals[s as usize];
        }
        if !self.built {
            // The aggregates of each level are chosen from its values: built level by level.
            while self.levels.last().expect("finest level").a.n() > self.params.coarse_size {
                let last = self.levels.last_mut().expect("finest level");
                let (mut agg, mut nc) = aggregate(&last.a, &self.params);
                for _ in 1..self.params.passes {
                    // Aggregate the aggregates (their coarse matrix's strong couplings).
                    let (mut ac, t) = coarse_pattern(&last.a, &agg, nc);
                    sum_into(&t, &last.a.val, &mut ac.val);
                    let (mut agg2, mut nc2) = aggregate(&ac, &self.params);
                    for g in agg2.iter_mut().filter(|g| **g == u32::MAX) {
                        *g = nc2 as u32;
                        nc2 += 1;
                    }
                    for g in agg.iter_mut().filter(|g| **g != u32::MAX) {
                        *g = agg2[*g as usize];
                    }
                    nc = nc2;
                }
                if nc == 0 || nc * 10 > last.a.n() * 9 {
                    break;
                }
                let (ac, to_coarse) = coarse_pattern(&last.a, &agg, nc);
                last.agg = agg;
                last.to_coarse = to_coarse;
                last.rc = vec![0.0; nc];
                last.zc = vec![0.0; nc];
                self.levels.push(level(ac));
                let l = self.levels.len() - 2;
                self.restrict_matrix(l);
            }
            self.built = true;
        } else {
            for l in 0..self.levels.len() - 1 {
                self.restrict_matrix(l);
            }
        }
        for l in &mut self.levels {
            l.a.refresh();
        }
        self.coarsest = Some(Dense::factor(&self.levels.last().expect("a level").a)?);
        self.factored.copy_from_slice(vals);
        self.setups += 1;
        Ok(())
    }

    /// Level l + 1's matrix from level l's: (A_c)_IJ = Σ_{i∈I, j∈J} a_ij.
    fn restrict_matrix(&mut self, l: usize) {
        let (lo, hi) = self.levels.split_at_mut(l + 1);
        let (f, c) = (&lo[l], &mut hi[0].a);
        c.val.iter_mut().for_each(|v| *v = 0.0);
        sum_into(&f.to_coarse, &f.a.val, &mut c.val);
    }

    /// Solve A x = rhs in place (x starts from 0); `vals` is A's lower triangle in the pattern's
    /// CSC order.
    pub fn solve(&mut self, vals: &[f64], rhs: &mut [f64]) -> Result<()> {
        self.solve_with(vals, rhs, None)
    }

    /// [`AmgSolver::solve`] that also stops once max_k w_k |r_k| ≤ `bound` (the residual in the
    /// units the caller's own convergence test uses), as the incomplete-factor solver's
    /// `solve_step` does.
    pub fn solve_step(
        &mut self,
        vals: &[f64],
        rhs: &mut [f64],
        w: &[f64],
        bound: f64,
    ) -> Result<()> {
        self.solve_with(vals, rhs, Some((w, bound)))
    }

    fn solve_with(
        &mut self,
        vals: &[f64],
        rhs: &mut [f64],
        scaled: Option<(&[f64], f64)>,
    ) -> Result<()> {
        if self.factored != vals {
            self.setup(vals)?;
        }
        self.solves += 1;
        let b_norm = dot(rhs, rhs).sqrt();
        if b_norm == 0.0 {
            return Ok(());
        }
        let [mut x, mut z, mut p, mut q, mut zq] = std::mem::take(&mut self.work);
        let coarsest = self.coarsest.as_ref().expect("set up");
        let r = rhs;
        x.iter_mut().for_each(|v| *v = 0.0);
        let (mut done, mut it, mut pq) = (false, 0, 0.0);
        while it < self.params.max_iter {
            cycle(&mut self.levels, coarsest, r, &mut z);
            if it == 0 {
                p.copy_from_slice(&z);
            } else {
                // Flexible CG: the new direction A-orthogonal to the previous one.
                let beta = -dot(&z, &zq) / pq;
                for (pk, zk) in p.iter_mut().zip(&z) {
                    *pk = zk + beta * *pk;
                }
            }
            self.levels[0].a.matvec(&p, &mut q);
            pq = dot(&p, &q);
            let alpha = dot(&p, r) / pq;
            let (r2, scaled_max) = update(alpha, &p, &q, &mut x, r, scaled.map(|(w, _)| w));
            zq.copy_from_slice(&q);
            it += 1;
            let r_norm = r2.sqrt();
            if super::cg_stops(r_norm, self.params.rel_tol * b_norm, scaled_max, scaled) {
                done = true;
                break;
            }
        }
        self.iterations += it;
        self.max_iterations = self.max_iterations.max(it);
        r.copy_from_slice(&x);
        self.work = [x, z, p, q, zq];
        if done {
            Ok(())
        } else {
            Err(Error::Method(format!(
                "multigrid conjugate gradients: no convergence in {it} iterations"
            )))
        }
    }
}

/// Add each fine entry into its coarse slot (`to_coarse`, u32::MAX: none): (A_c)_IJ += a_ij.
fn sum_into(to_coarse: &[u32], fine: &[f64], coarse: &mut [f64]) {
    for (&t, &v) in to_coarse.iter().zip(fine) {
        if t != u32::MAX {
            coarse[t as usize] += v;
        }
    }
}

fn level(mut a: Csr) -> Level {
    a.find_blocks();
    let n = a.n();
    Level {
        agg: Vec::new(),
        to_coarse: Vec::new(),
        res: vec![0.0; n],
        halo: Vec::new(),
        rc: Vec::new(),
        zc: Vec::new(),
        k: std::array::from_fn(|_| vec![0.0; n]),
        a,
    }
}

/// a · b (the two halves on two threads for long vectors, added in a fixed order).
fn dot(a: &[f64], b: &[f64]) -> f64 {
    let part = |a: &[f64], b: &[f64]| a.iter().zip(b).map(|(x, y)| x * y).sum::<f64>();
    if a.len() < PAR_MIN {
        return part(a, b);
    }
    let mid = a.len() / 2;
    let (s1, s2) = rayon::join(|| part(&a[..mid], &b[..mid]), || part(&a[mid..], &b[mid..]));
    s1 + s2
}

/// x += α p, r −= α q; returns ‖r‖₂² and max_k w_k |r_k| (0 without w), the halves on two
/// threads for long vectors.
fn update(
    alpha: f64,
    p: &[f64],
    q: &[f64],
    x: &mut [f64],
    r: &mut [f64],
    w: Option<&[f64]>,
) -> (f64, f64) {
    let part = |off: usize, x: &mut [f64], r: &mut [f64]| {
        let (mut r2, mut scaled_max) = (0.0, 0.0f64);
        for (k, (xk, rk)) in x.iter_mut().zip(r.iter_mut()).enumerate() {
            *xk += alpha * p[off + k];
            *rk -= alpha * q[off + k];
            r2 += *rk * *rk;
            if let Some(w) = w {
                scaled_max = scaled_max.max((w[off + k] * *rk).abs());
            }
        }
        (r2, scaled_max)
    };
    if x.len() < PAR_MIN {
        return part(0, x, r);
    }
    let mid = x.len() / 2;
    let ((xa, xb), (ra, rb)) = (x.split_at_mut(mid), r.split_at_mut(mid));
    let (a, b) = rayon::join(|| part(0, xa, ra), || part(mid, xb, rb));
    (a.0 + b.0, a.1.max(b.1))
}

/// z ≈ A⁻¹ r on the first of `levels` by one cycle (z overwritten).
fn cycle(levels: &mut [Level], coarsest: &Dense, r: &[f64], z: &mut [f64]) {
    let (cur, rest) = levels.split_first_mut().expect("a level");
    if rest.is_empty() {
        coarsest.solve(r, z);
        return;
    }
    cur.a.forward_from_zero(r, z);
    cur.a.residual_after_forward(r, z, &mut cur.res);
    cur.rc.iter_mut().for_each(|v| *v = 0.0);
    for (&res, &g) in cur.res.iter().zip(&cur.agg) {
        if g != u32::MAX {
            cur.rc[g as usize] += res;
        }
    }
    if rest.len() == 1 {
        coarsest.solve(&cur.rc, &mut cur.zc);
    } else {
        k_cycle(rest, coarsest, &cur.rc, &mut cur.zc);
    }
    for (zi, &g) in z.iter_mut().zip(&cur.agg) {
        if g != u32::MAX {
            *zi += cur.zc[g as usize];
        }
    }
    cur.a.backward(r, z, &mut cur.halo);
}

/// x ≈ A⁻¹ r on the first of `levels` by two flexible-CG steps preconditioned by [`cycle`]
/// (Notay & Vassilevski 2008, Algorithm 2.1 with two inner iterations).
fn k_cycle(levels: &mut [Level], coarsest: &Dense, r: &[f64], x: &mut [f64]) {
    let [mut c1, mut v1, mut c2, mut v2, mut rt] = std::mem::take(&mut levels[0].k);
    cycle(levels, coarsest, r, &mut c1);
    levels[0].a.matvec32(&c1, &mut v1);
    let rho1 = dot(&c1, &v1);
    let a1 = dot(&c1, r);
    if rho1 <= 0.0 {
        x.iter_mut().for_each(|v| *v = 0.0);
        levels[0].k = [c1, v1, c2, v2, rt];
        return;
    }
    for k in 0..rt.len() {
        rt[k] = r[k] - a1 / rho1 * v1[k];
    }
    if dot(&rt, &rt) <= 0.0625 * dot(r, r) {
        for (xk, ck) in x.iter_mut().zip(&c1) {
            *xk = a1 / rho1 * ck;
        }
    } else {
        cycle(levels, coarsest, &rt, &mut c2);
        levels[0].a.matvec32(&c2, &mut v2);
        let gamma = dot(&c2, &v1);
        let beta = dot(&c2, &v2);
        let a2 = dot(&c2, &rt);
        let rho2 = beta - gamma * gamma / rho1;
        let (w1, w2) = if rho2 > 0.0 {
            (a1 / rho1 - gamma * a2 / (rho1 * rho2), a2 / rho2)
        } else {
            (a1 / rho1, 0.0)
        };
        for k in 0..x.len() {
            x[k] = w1 * c1[k] + w2 * c2[k];
        }
    }
    levels[0].k = [c1, v1, c2, v2, rt];
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The 7-point Laplacian of an m³ grid with diagonal 6 + 1e-3 (lower CSC: column pointers,
    /// row indices, values).
    fn laplacian_3d(m: usize) -> (Vec<usize>, Vec<usize>, Vec<f64>) {
        let n = m * m * m;
        let (mut cp, mut ri, mut v) = (vec![0], Vec::new(), Vec::new());
        for c in 0..n {
            let (i, j, k) = (c % m, (c / m) % m, c / (m * m));
            ri.push(c);
            v.push(6.0 + 1e-3);
            for (ok, d) in [(i + 1 < m, 1), (j + 1 < m, m), (k + 1 < m, m * m)] {
                if ok {
                    ri.push(c + d);
                    v.push(-1.0);
                }
            }
            cp.push(ri.len());
        }
        (cp, ri, v)
    }

    /// A x through the lower triangle in CSC.
    fn lower_matvec(cp: &[usize], ri: &[usize], v: &[f64], x: &[f64]) -> Vec<f64> {
        let mut y = vec![0.0; x.len()];
        for c in 0..x.len() {
            for s in cp[c]..cp[c + 1] {
                y[ri[s]] += v[s] * x[c];
                if ri[s] != c {
                    y[c] += v[s] * x[ri[s]];
                }
            }
        }
        y
    }

    /// A 3D Laplacian with a small mass term on an m³ grid (lower CSC), the kind of matrix a
    /// backward-Euler step of small cells gives: A x = A 1 is solved to the tolerance, and the
    /// outer iteration count stays nearly the same when the grid is refined (the point of the
    /// multigrid cycle).
    #[test]
    fn solves_grid_laplacians_in_a_nearly_constant_iteration_count() {
        let mut its = Vec::new();
        for m in [12usize, 24] {
            let n = m * m * m;
            let (cp, ri, v) = laplacian_3d(m);
            let mut s = AmgSolver::new(n, &cp, &ri, AmgParams::default());
            let mut b = lower_matvec(&cp, &ri, &v, &vec![1.0; n]);
            s.solve(&v, &mut b).unwrap();
            assert!(b.iter().all(|x| (x - 1.0).abs() < 1e-6), "m {m}");
            assert!(s.level_sizes().len() >= 2, "{:?}", s.level_sizes());
            its.push(s.iterations);
        }
        assert!(its[1] <= its[0] + 4, "iterations {its:?}");
    }

    /// After one forward Gauss–Seidel sweep from zero, the half-pass residual of the finest
    /// level (−Σ_{j>i} a_ij z_j) equals b − A z computed in full.
    #[test]
    fn half_pass_residual_equals_the_full_one() {
        // One block (6³ rows) and two blocks (20³ rows, at least PAR_MIN).
        for m in [6, 20] {
            let n = m * m * m;
            let (cp, ri, v) = laplacian_3d(m);
            let mut s = AmgSolver::new(n, &cp, &ri, AmgParams::default());
            s.setup(&v).unwrap();
            let a = &s.levels[0].a;
            assert!(a.split);
            assert_eq!(a.blocks.is_some(), n >= PAR_MIN);
            let b: Vec<f64> = (0..n).map(|k| ((k * 5) % 11) as f64 - 5.0).collect();
            let mut z = vec![0.0; n];
            a.forward_from_zero(&b, &mut z);
            let mut half = vec![0.0; n];
            a.residual_after_forward(&b, &z, &mut half);
            // The residual with the single-precision values the cycle uses.
            let v32: Vec<f64> = v.iter().map(|&x| f64::from(x as f32)).collect();
            let az = lower_matvec(&cp, &ri, &v32, &z);
            for k in 0..n {
                assert!((half[k] - (b[k] - az[k])).abs() < 1e-9, "m {m}, row {k}");
            }
        }
    }

    /// The backward sweep by blocks reads the other block's unknowns as they were before the
    /// sweep: it equals two independent sweeps on copies of z.
    #[test]
    fn block_sweep_reads_the_other_block_from_before() {
        let m = 20;
        let n = m * m * m;
        let (cp, ri, v) = laplacian_3d(m);
        let mut s = AmgSolver::new(n, &cp, &ri, AmgParams::default());
        s.setup(&v).unwrap();
        let a = &s.levels[0].a;
        let bl = a.blocks.expect("two blocks");
        let b: Vec<f64> = (0..n).map(|k| ((k * 3) % 7) as f64 - 3.0).collect();
        let z0: Vec<f64> = (0..n).map(|k| ((k * 11) % 5) as f64 * 0.1).collect();
        let mut z = z0.clone();
        a.backward(&b, &mut z, &mut Vec::new());
        // Reference: each block on its own full copy, the other block frozen.
        for (lo, hi) in [(0, bl.mid), (bl.mid, n)] {
            let mut r = z0.clone();
            for i in (lo..hi).rev() {
                let mut t = b[i];
                for slot in a.row(i) {
                    t -= f64::from(a.val32[slot]) * r[a.col[slot] as usize];
                }
                r[i] += t * a.dinv[i];
            }
            for i in lo..hi {
                assert!((z[i] - r[i]).abs() < 1e-12, "row {i}");
            }
        }
    }

    /// A Newton correction solved only as far as asked, as the incomplete-factor solver's test
    /// of the same name: `solve_step` returns once max_k w_k |r_k| (recomputed here) is at most
    /// the bound, in fewer iterations than the full solve.
    #[test]
    fn solve_step_stops_at_the_weighted_bound() {
        let m = 16;
        let n = m * m * m;
        let (cp, ri, v) = laplacian_3d(m);
        let mut s = AmgSolver::new(n, &cp, &ri, AmgParams::default());
        let b: Vec<f64> = (0..n).map(|k| ((k * 7) % 13) as f64 - 6.0).collect();
        let w: Vec<f64> = (0..n).map(|k| 0.5 + (k % 3) as f64).collect();
        let max_w = |x: &[f64]| {
            let ax = lower_matvec(&cp, &ri, &v, x);
            (0..n)
                .map(|k| (w[k] * (b[k] - ax[k])).abs())
                .fold(0.0, f64::max)
        };
        let bound = 1e-3 * (0..n).map(|k| (w[k] * b[k]).abs()).fold(0.0, f64::max);
        let mut x = b.clone();
        s.solve_step(&v, &mut x, &w, bound).unwrap();
        let partial = s.iterations;
        let reached = max_w(&x);
        assert!(reached <= bound * (1.0 + 1e-9), "{reached} > {bound}");
        let mut full = b.clone();
        s.solve(&v, &mut full).unwrap();
        assert!(
            partial < s.iterations - partial,
            "{partial} vs {}",
            s.iterations - partial
        );
        assert!(max_w(&full) < 1e-3 * bound);
    }

    /// Results depend on the matrix only: a solve gives the same bits in a one-thread and a
    /// two-thread pool (the block split, the block sweeps and the order of partial sums are fixed
    /// by the matrix). 32³ unknowns, so the finest and the first coarse level run by blocks.
    /// Also: the forward sweep from zero over half the matrix (entries left of the diagonal)
    /// gives the same bits as the full sweep, whose other entries multiply zeros.
    #[test]
    fn results_do_not_depend_on_the_thread_count() {
        let m = 32;
        let n = m * m * m;
        let (cp, ri, v) = laplacian_3d(m);
        let b: Vec<f64> = (0..n).map(|k| ((k * 7) % 13) as f64 - 6.0).collect();
        let solve = |threads: usize| {
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .unwrap();
            pool.install(|| {
                let mut s = AmgSolver::new(n, &cp, &ri, AmgParams::default());
                let mut x = b.clone();
                s.solve(&v, &mut x).unwrap();
                let blocked: Vec<bool> = s.levels.iter().map(|l| l.a.blocks.is_some()).collect();
                (x, s.iterations, blocked)
            })
        };
        let (x1, it1, blocked) = solve(1);
        let (x2, it2, _) = solve(2);
        assert!(blocked[0] && blocked[1], "levels by blocks: {blocked:?}");
        assert_eq!(it1, it2);
        assert!(x1.iter().zip(&x2).all(|(a, b)| a.to_bits() == b.to_bits()));

        let mut s = AmgSolver::new(n, &cp, &ri, AmgParams::default());
        s.setup(&v).unwrap();
        let a = &s.levels[0].a;
        let mut half = vec![0.0; n];
        a.forward_from_zero(&b, &mut half);
        let mid = a.blocks.expect("blocks").mid;
        let mut full = vec![0.0; n];
        let (fa, fb) = full.split_at_mut(mid);
        a.sweep_rows(&b, fa, 0, &[], 0, true);
        a.sweep_rows(&b, fb, mid, &[], 0, true);
        assert!(half
            .iter()
            .zip(&full)
            .all(|(x, y)| x.to_bits() == y.to_bits()));
    }
}
