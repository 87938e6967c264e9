//! Steady and transient solvers on a [`Network`].
//!
//! # Transient scheme (backward Euler, Newton in the enthalpy state)
//! For every unknown p with volume V_p (m³/m), the residual of step n → n+1 is
//!
//! ```text
//! R_p(H) = V_p (H_p − H_pⁿ)/Δt + Σ_faces G_f (T_p − T_q) + Σ_bfaces G_b (T_p − T_zone)     (W/m)
//! ```
//!
//! with T = β(H) from the material's enthalpy curve and the conductances G from the conductivities
//! at the start of the step (lagged one step; the same G on both sides of a face keeps the scheme
//! conservative). Each Newton iteration evaluates T_k = β(H_k) and the segment capacity
//! C_k = 1/β′(H_k) from the enthalpy state, solves the symmetric positive-definite system
//!
//! ```text
//! (diag(V C_k / Δt) + K) δT = −R(H_k)
//! ```
//!
//! and updates H_{k+1} = H_k + C_k ∘ δT (never T directly). Writing δT = β′ δH makes this exactly
//! Newton's method in H, so latent heat is neither lost nor created: the energy error of a step is
//! Σ R_p Δt at the converged state. Stopping test: max_p |R_p| Δt /(V_p C_p) < `tol_k` (a
//! temperature-equivalent residual, K). A step that fails to converge, or whose residual is not
//! finite, is halved (recursively). With the iterative (CG) solvers the correction is solved
//! only as far as the next iterate needs (inexact Newton, [`SolverParams::newton_forcing`]); the
//! stopping test is the same.
//! References: Swaminathan & Voller (1992); Nedjar (2002); see DEVELOPERS.md.
//!
//! # Steady state
//! K(T) T = b with conductivities updated by Picard iteration until max |ΔT| < `tol_k`.
pub mod amg;
pub mod linsys;
pub mod network;
pub mod pcg;

use crate::error::{Error, Result};
use linsys::SpdSolver;
pub use network::Network;

/// Solver parameters.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SolverParams {
    /// Convergence tolerance on the temperature-equivalent residual, K. Default 1e-6 K.
    pub tol_k: f64,
    /// Newton iterations per step before the step is halved. Default 20.
    pub max_newton: usize,
    /// Maximum recursive halvings of one step. Default 8.
    pub max_halvings: usize,
    /// Forcing term η of the inexact Newton iteration with the iterative solvers
    /// ([`Linear::Pcg`], [`Linear::Multigrid`]; the direct one ignores it): conjugate gradients
    /// solve each correction until its temperature-equivalent residual is at most
    /// max(0.1 `tol_k`, η × the current Newton residual), since the next iterate is tested in
    /// that measure anyway (inexact Newton: Dembo, Eisenstat & Steihaug 1982, SIAM J. Numer.
    /// Anal. 19:400–408, from memory). From half of `max_newton` on, corrections are solved
    /// fully again. The converged state meets
    /// `tol_k` as before. Default 1e-3 (the 3D demo's cold-spell steps, `examples/bench3d.rs`:
    /// incomplete factor, normal 0.273 → 0.173 s and fine 4.75 → 2.59 s per step; multigrid,
    /// normal 0.578 → 0.404 s; Newton iterations rise, CG iterations per step fall more); 0
    /// solves every correction to the relative tolerance.
    pub newton_forcing: f64,
    /// Picard iterations for the steady state. Default 100.
    pub max_picard: usize,
    /// Reuse a nearby factor as a conjugate-gradient preconditioner when the matrix changed in at
    /// most this many unknowns (0 = always refactor). Default 4: on the demo mesh a triangular
    /// solve costs about a quarter of a factorisation, so only small changes pay (measured with
    /// `cargo bench --bench engine`: 0 → 2.60 s, 4 → 2.35 s, 8 → 2.80 s medians).
    pub near_factor_cells: usize,
    /// Factor and solve the two halves of the first nested-dissection bisection side by side
    /// (two threads of rayon's pool; inside a pool already busy with other runs they share it).
    /// Default true (false for A/B benchmarks through `simulate::run_with`; results agree to
    /// rounding either way).
    pub split_halves: bool,
    /// The linear solver: sparse Cholesky (2D sections) or preconditioned conjugate gradients
    /// (3D models). Default Cholesky.
    pub linear: Linear,
}

/// The stopping test both CG solvers share: ‖r‖₂ at most `r_bound` (their relative tolerance
/// times ‖b‖₂), or, for a Newton correction (`scaled` = (w, bound)), the weighted residual
/// max_k w_k |r_k| = `scaled_max` at most the bound while ‖r‖₂ is finite.
fn cg_stops(r_norm: f64, r_bound: f64, scaled_max: f64, scaled: Option<(&[f64], f64)>) -> bool {
    r_norm <= r_bound
        || (r_norm.is_finite() && scaled.is_some_and(|(_, bound)| scaled_max <= bound))
}

/// Which linear solver a [`Solver`] uses.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Linear {
    /// Sparse Cholesky (faer) with a geometric nested-dissection order of an nx × nz grid.
    Cholesky,
    /// Conjugate gradients with a modified incomplete-Cholesky preconditioner.
    Pcg(pcg::PcgParams),
    /// Flexible conjugate gradients with an aggregation multigrid preconditioner.
    Multigrid(amg::AmgParams),
}

/// A linear solver of either kind.
enum Lin {
    Direct(Box<SpdSolver>),
    Iterative(Box<pcg::PcgSolver>),
    Multigrid(Box<amg::AmgSolver>),
}

impl Lin {
    fn solve(&mut self, vals: &[f64], rhs: &mut [f64]) -> Result<()> {
        match self {
            Lin::Direct(s) => s.solve(vals, rhs),
            Lin::Iterative(s) => s.solve(vals, rhs),
            Lin::Multigrid(s) => s.solve(vals, rhs),
        }
    }
    /// A steady matrix's solve (the incomplete factor's ω for matrices without a capacity term).
    fn solve_steady(&mut self, vals: &[f64], rhs: &mut [f64]) -> Result<()> {
        match self {
            Lin::Iterative(s) => s.solve_steady(vals, rhs),
            other => other.solve(vals, rhs),
        }
    }
    /// A Newton correction. With a `bound` the iterative solvers stop once
    /// max_k w_k |r_k| ≤ bound (inexact Newton); without one they solve to their relative
    /// tolerance. The direct solver always solves in full (by CG on a nearby factor when at most
    /// `max_touched` cells changed).
    fn solve_correction(
        &mut self,
        vals: &[f64],
        rhs: &mut [f64],
        w: &[f64],
        bound: Option<f64>,
        max_touched: usize,
    ) -> Result<()> {
        match (self, bound) {
            (Lin::Direct(s), _) => s.solve_near(vals, rhs, max_touched),
            (Lin::Iterative(s), Some(b)) => s.solve_step(vals, rhs, w, b),
            (Lin::Iterative(s), None) => s.solve(vals, rhs),
            (Lin::Multigrid(s), Some(b)) => s.solve_step(vals, rhs, w, b),
            (Lin::Multigrid(s), None) => s.solve(vals, rhs),
        }
    }
}

impl Default for SolverParams {
    fn default() -> Self {
        SolverParams {
            tol_k: 1e-6,
            max_newton: 20,
            max_halvings: 8,
            newton_forcing: 1e-3,
            max_picard: 100,
            near_factor_cells: 4,
            split_halves: true,
            linear: Linear::Cholesky,
        }
    }
}

/// Counters of the work done.
#[derive(Debug, Clone, Copy, Default, PartialEq, serde::Serialize)]
pub struct SolverStats {
    /// Time steps taken (as requested by the caller).
    pub steps: usize,
    /// Sub-steps after halvings.
    pub substeps: usize,
    /// Newton iterations (linear solves in the transient).
    pub newton_iterations: usize,
    /// Numeric Cholesky factorisations.
    pub factorizations: usize,
    /// Triangular solves.
    pub solves: usize,
    /// Linear solves done by conjugate gradients preconditioned with a nearby factor.
    pub near_factor_solves: usize,
    /// Conjugate-gradient iterations in those.
    pub cg_iterations: usize,
    /// Step halvings.
    pub halvings: usize,
    /// Largest iteration count of one conjugate-gradient solve (iterative solver).
    pub max_cg_iterations: usize,
    /// Largest temperature-equivalent residual accepted, K.
    pub max_residual_k: f64,
}

/// Heat exchanged during one step, J per metre of section.
#[derive(Debug, Clone, PartialEq)]
pub struct StepEnergy {
    /// Heat into the solid from each zone, J/m.
    pub from_zone: Vec<f64>,
    /// Heat into the solid through the boundary faces of each reporting group, J/m.
    pub by_group: Vec<f64>,
    /// Increase of stored heat Σ V ΔH, J/m.
    pub stored: f64,
    /// Sum of the absolute heat flows through every boundary face, Σ_b |q_b| Δt, J/m (the
    /// throughput the energy balance is measured against).
    pub boundary_abs: f64,
    /// Step length, s.
    pub dt: f64,
}

/// Result of a steady solve.
#[derive(Debug, Clone)]
pub struct Steady {
    /// Temperatures of the unknowns, °C.
    pub t: Vec<f64>,
    /// Heat flow into the solid from each zone, W/m.
    pub from_zone: Vec<f64>,
    /// Heat flow into the solid through the boundary faces of each reporting group, W/m.
    pub by_group: Vec<f64>,
    /// Picard iterations used.
    pub iterations: usize,
    /// Relative imbalance Σ flows / Σ |flows|.
    pub balance_error: f64,
}

/// Solver working storage for one network.
pub struct Solver<'a> {
    /// The network.
    pub net: &'a Network,
    /// Parameters.
    pub params: SolverParams,
    lin: Lin,
    k: Vec<f64>,
    gf: Vec<f64>,
    gb: Vec<f64>,
    t: Vec<f64>,
    cap: Vec<f64>,
    vals: Vec<f64>,
    kvals: Vec<f64>,
    rhs: Vec<f64>,
    r: Vec<f64>,
    /// Weights Δt/(V C) of the temperature-equivalent residual.
    w: Vec<f64>,
    h_old: Vec<f64>,
    k_valid: bool,
    extra_r: Vec<f64>,
    /// Enthalpy change of the last accepted step and its length (predictor).
    dh_prev: Vec<f64>,
    dt_prev: f64,
    stats: SolverStats,
}

impl<'a> Solver<'a> {
    /// Set up (symbolic factorisation) for `net`.
    pub fn new(net: &'a Network, params: SolverParams) -> Result<Self> {
        let lin = match params.linear {
            Linear::Cholesky => {
                let (order, a, b) = linsys::nested_dissection_split(net.nx, net.nz, &net.unk_of);
                Lin::Direct(Box::new(SpdSolver::new(
                    net.n,
                    net.col_ptr.clone(),
                    net.row_idx.clone(),
                    Some(&order),
                    params.split_halves.then_some((a, b)),
                )?))
            }
            Linear::Pcg(p) => Lin::Iterative(Box::new(pcg::PcgSolver::new(
                net.n,
                net.col_ptr.clone(),
                net.row_idx.clone(),
                p,
            ))),
            Linear::Multigrid(p) => Lin::Multigrid(Box::new(amg::AmgSolver::new(
                net.n,
                &net.col_ptr,
                &net.row_idx,
                p,
            ))),
        };
        Ok(Solver {
            lin,
            k: vec![0.0; net.n],
            gf: vec![0.0; net.faces.len()],
            gb: vec![0.0; net.bfaces.len()],
            t: vec![0.0; net.n],
            cap: vec![0.0; net.n],
            vals: vec![0.0; net.row_idx.len()],
            kvals: vec![0.0; net.row_idx.len()],
            rhs: vec![0.0; net.n],
            r: vec![0.0; net.n],
            w: vec![0.0; net.n],
            h_old: vec![0.0; net.n],
            k_valid: false,
            extra_r: vec![0.0; net.bfaces.len()],
            dh_prev: vec![0.0; net.n],
            dt_prev: 0.0,
            stats: SolverStats::default(),
            net,
            params,
        })
    }

    /// Add resistance `r` (m²·K/W) to every horizontal boundary face of `zone` (for example a
    /// snow cover on the ground); takes effect from the next step.
    pub fn set_extra_horizontal_resistance(&mut self, zone: usize, r: f64) {
        use network::Side;
        for (b, bf) in self.net.bfaces.iter().enumerate() {
            if bf.zone == zone
                && matches!(bf.side, Side::Top | Side::Bottom)
                && self.extra_r[b] != r
            {
                self.extra_r[b] = r;
                self.k_valid = false;
            }
        }
    }

    /// Work counters so far.
    pub fn stats(&self) -> SolverStats {
        let mut s = self.stats;
        match &self.lin {
            Lin::Direct(l) => {
                s.factorizations = l.factorizations;
                s.solves = l.solves;
                s.near_factor_solves = l.near_solves;
                s.cg_iterations = l.cg_iterations;
            }
            Lin::Multigrid(l) => {
                s.factorizations = l.setups;
                s.solves = l.solves;
                s.cg_iterations = l.iterations;
                s.max_cg_iterations = l.max_iterations;
            }
            Lin::Iterative(l) => {
                s.factorizations = l.setups;
                s.solves = l.solves;
                s.cg_iterations = l.iterations;
                s.max_cg_iterations = l.max_iterations;
            }
        }
        s
    }

    /// Conductivities at temperatures `t` and the face conductances from them; the faces are
    /// recomputed only when some conductivity changed.
    fn update_conductances(&mut self, t: &[f64]) {
        let mut changed = !self.k_valid;
        for p in 0..self.net.n {
            let k = self.net.materials[self.net.mat[p]].conductivity(t[p]);
            if k != self.k[p] {
                self.k[p] = k;
                changed = true;
            }
        }
        if changed {
            self.net.face_conductances(&self.k, &mut self.gf);
            self.net.boundary_conductances(&self.k, &mut self.gb);
            for (b, bf) in self.net.bfaces.iter().enumerate() {
                if self.extra_r[b] > 0.0 {
                    self.gb[b] = bf.conductance(self.k[bf.p], self.extra_r[b]);
                }
            }
            self.assemble_k();
            self.k_valid = true;
        }
    }

    /// Fill `kvals` with the conductance matrix K from the face conductances.
    fn assemble_k(&mut self) {
        let net = self.net;
        let kv = &mut self.kvals;
        kv.iter_mut().for_each(|v| *v = 0.0);
        for (f, face) in net.faces.iter().enumerate() {
            let g = self.gf[f];
            kv[net.diag_slot[face.p]] += g;
            kv[net.diag_slot[face.q]] += g;
            kv[net.face_slot[f]] = -g;
        }
        for (b, bf) in net.bfaces.iter().enumerate() {
            kv[net.diag_slot[bf.p]] += self.gb[b];
        }
    }

    /// Fill `vals` with K + diag(extra) (K assembled once per change of the conductances).
    fn assemble(&mut self, extra_diag: impl Fn(usize) -> f64) {
        let net = self.net;
        self.vals.copy_from_slice(&self.kvals);
        for (p, &slot) in net.diag_slot.iter().enumerate() {
            self.vals[slot] += extra_diag(p);
        }
    }

    /// Steady temperatures (°C) for zone temperatures `zone_t` with the conductivities of the
    /// state `t`: one linear solve K T = Σ_b G_b T_zone.
    fn steady_linear(&mut self, zone_t: &[f64], t: &[f64]) -> Result<Vec<f64>> {
        self.update_conductances(t);
        self.assemble(|_| 0.0);
        let mut rhs = vec![0.0; self.net.n];
        for (b, bf) in self.net.bfaces.iter().enumerate() {
            rhs[bf.p] += self.gb[b] * zone_t[bf.zone];
        }
        self.lin.solve_steady(&self.vals, &mut rhs)?;
        Ok(rhs)
    }

    /// Zone weights ψ: the steady temperatures with zone `zone` at 1 and every other zone at 0, with
    /// the conductances of the state `t` (°C). ψ_p is the fraction of heat released in unknown p
    /// that eventually leaves through the faces of `zone` (harmonic measure of the zone).
    pub fn zone_weights(&mut self, t: &[f64], zone: usize) -> Result<Vec<f64>> {
        let unit: Vec<f64> = (0..self.net.n_zones)
            .map(|z| if z == zone { 1.0 } else { 0.0 })
            .collect();
        self.steady_linear(&unit, t)
    }

    /// Steady state for constant zone temperatures `zone_t` (°C), starting from `t0` (or a uniform
    /// field at the mean zone temperature).
    pub fn steady(&mut self, zone_t: &[f64], t0: Option<&[f64]>) -> Result<Steady> {
        let net = self.net;
        let mut t = match t0 {
            Some(t0) => t0.to_vec(),
            None => vec![zone_t.iter().sum::<f64>() / zone_t.len().max(1) as f64; net.n],
        };
        let mut iterations = 0;
        loop {
            iterations += 1;
            let rhs = self.steady_linear(zone_t, &t)?;
            let change = rhs
                .iter()
                .zip(&t)
                .map(|(a, b)| (a - b).abs())
                .fold(0.0, f64::max);
            t = rhs;
            if change < self.params.tol_k
                || !net.materials.iter().any(|m| m.k_frozen != m.k_unfrozen)
            {
                break;
            }
            if iterations >= self.params.max_picard {
                return Err(Error::SteadyNoConvergence {
                    iterations,
                    change_k: change,
                });
            }
        }
        let mut from_zone = vec![0.0; net.n_zones];
        let mut by_group = vec![0.0; net.n_groups()];
        for (b, bf) in net.bfaces.iter().enumerate() {
            let q = self.gb[b] * (zone_t[bf.zone] - t[bf.p]);
            from_zone[bf.zone] += q;
            by_group[bf.group] += q;
        }
        let sum: f64 = from_zone.iter().sum();
        let abs: f64 = from_zone.iter().map(|v| v.abs()).sum();
        Ok(Steady {
            t,
            from_zone,
            by_group,
            iterations,
            balance_error: if abs > 0.0 { sum / abs } else { 0.0 },
        })
    }

    /// Advance enthalpies `h` (J/m³) by `dt` seconds with zone temperatures `zone_t` (°C) held over
    /// the step. `time_s` is only used in error reports.
    pub fn step(
        &mut self,
        h: &mut [f64],
        zone_t: &[f64],
        dt: f64,
        time_s: f64,
    ) -> Result<StepEnergy> {
        let params = self.params;
        self.step_with(h, zone_t, dt, time_s, &params)
    }

    /// [`Solver::step`] with the iteration limits and tolerances of `params` for this step only
    /// (the split of the factorisation stays as set up).
    pub fn step_with(
        &mut self,
        h: &mut [f64],
        zone_t: &[f64],
        dt: f64,
        time_s: f64,
        params: &SolverParams,
    ) -> Result<StepEnergy> {
        self.stats.steps += 1;
        let mut e = StepEnergy {
            from_zone: vec![0.0; self.net.n_zones],
            by_group: vec![0.0; self.net.n_groups()],
            stored: 0.0,
            boundary_abs: 0.0,
            dt,
        };
        self.step_rec(h, zone_t, (dt, time_s), 0, &mut e, params)?;
        Ok(e)
    }

    fn step_rec(
        &mut self,
        h: &mut [f64],
        zone_t: &[f64],
        (dt, time_s): (f64, f64),
        depth: usize,
        e: &mut StepEnergy,
        params: &SolverParams,
    ) -> Result<()> {
        match self.try_step(h, zone_t, dt, e, params) {
            Ok(()) => Ok(()),
            Err((iters, res)) => {
                if depth >= params.max_halvings {
                    return Err(Error::NoConvergence {
                        step: self.stats.steps,
                        time_s,
                        iterations: iters,
                        residual_k: res,
                        halvings: depth,
                    });
                }
                self.stats.halvings += 1;
                self.step_rec(h, zone_t, (0.5 * dt, time_s), depth + 1, e, params)?;
                self.step_rec(
                    h,
                    zone_t,
                    (0.5 * dt, time_s + 0.5 * dt),
                    depth + 1,
                    e,
                    params,
                )
            }
        }
    }

    /// One backward-Euler step; on failure `h` is restored and (iterations, residual) returned.
    fn try_step(
        &mut self,
        h: &mut [f64],
        zone_t: &[f64],
        dt: f64,
        e: &mut StepEnergy,
        params: &SolverParams,
    ) -> std::result::Result<(), (usize, f64)> {
        let net = self.net;
        self.stats.substeps += 1;
        self.h_old.copy_from_slice(h);
        // Conductivities lagged: from the state at the start of the step.
        net.temperatures(h, &mut self.t);
        let t_start = std::mem::take(&mut self.t);
        self.update_conductances(&t_start);
        self.t = t_start;
        // Predictor: start Newton from the linear extrapolation of the last step's change, which
        // usually puts every cell in its final segment of the enthalpy curve, so one
        // factorisation suffices. It changes only the starting point, not the converged state.
        if self.dt_prev == dt {
            for p in 0..net.n {
                h[p] += self.dh_prev[p];
            }
        }
        for iter in 0..=params.max_newton {
            // T, C from the enthalpy state; residual (local slices: no reloads through `self`).
            let res = {
                let (t, cap, r, w) = (
                    &mut self.t[..],
                    &mut self.cap[..],
                    &mut self.r[..],
                    &mut self.w[..],
                );
                let (hold, vol, gf, gb) = (&self.h_old[..], &net.volume[..], &self.gf, &self.gb);
                // The cell-wise part in two halves side by side (as the factorisation).
                let cells = |off: usize, t: &mut [f64], cap: &mut [f64], r: &mut [f64]| {
                    for k in 0..t.len() {
                        let p = off + k;
                        let (tp, c) = net.materials[net.mat[p]].temperature(h[p]);
                        t[k] = tp;
                        cap[k] = c;
                        r[k] = vol[p] * (h[p] - hold[p]) / dt;
                    }
                };
                let mid = net.n / 2;
                let ((t0, t1), (c0, c1), (r0, r1)) = (
                    t.split_at_mut(mid),
                    cap.split_at_mut(mid),
                    r.split_at_mut(mid),
                );
                rayon::join(|| cells(0, t0, c0, r0), || cells(mid, t1, c1, r1));
                for (face, &g) in net.faces.iter().zip(gf) {
                    let q = g * (t[face.p] - t[face.q]);
                    r[face.p] += q;
                    r[face.q] -= q;
                }
                for (bf, &g) in net.bfaces.iter().zip(gb) {
                    r[bf.p] += g * (t[bf.p] - zone_t[bf.zone]);
                }
                // Weights Δt/(V C) of the temperature-equivalent residual (kept for the
                // inexact linear solve).
                for ((wp, v), c) in w.iter_mut().zip(vol).zip(cap.iter()) {
                    *wp = dt / (v * c);
                }
                r.iter()
                    .zip(w.iter())
                    .map(|(rp, wp)| (rp * wp).abs())
                    .fold(0.0, |m: f64, v| {
                        if v.is_nan() || m.is_nan() {
                            f64::NAN
                        } else {
                            m.max(v)
                        }
                    })
            };
            if res < params.tol_k {
                self.stats.max_residual_k = self.stats.max_residual_k.max(res);
                break;
            }
            if iter == params.max_newton || !res.is_finite() {
                h.copy_from_slice(&self.h_old);
                self.dt_prev = 0.0;
                return Err((iter, res));
            }
            // Newton step in H written in δT: (diag(V C/Δt) + K) δT = −R.
            let (vol, cap) = (&net.volume, std::mem::take(&mut self.cap));
            self.assemble(|p| vol[p] * cap[p] / dt);
            let mut rhs = std::mem::take(&mut self.rhs);
            for (x, v) in rhs.iter_mut().zip(&self.r) {
                *x = -v;
            }
            let bound = (params.newton_forcing > 0.0 && 2 * iter < params.max_newton)
                .then(|| (0.1 * params.tol_k).max(params.newton_forcing * res));
            let solved = self.lin.solve_correction(
                &self.vals,
                &mut rhs,
                &self.w,
                bound,
                params.near_factor_cells,
            );
            if solved.is_err() {
                h.copy_from_slice(&self.h_old);
                self.cap = cap;
                self.rhs = rhs;
                return Err((iter, f64::NAN));
            }
            for p in 0..net.n {
                h[p] += cap[p] * rhs[p];
            }
            self.cap = cap;
            self.rhs = rhs;
            self.stats.newton_iterations += 1;
        }
        for (b, bf) in net.bfaces.iter().enumerate() {
            let q = self.gb[b] * (zone_t[bf.zone] - self.t[bf.p]) * dt;
            e.from_zone[bf.zone] += q;
            e.by_group[bf.group] += q;
            e.boundary_abs += q.abs();
        }
        e.stored += (0..net.n)
            .map(|p| net.volume[p] * (h[p] - self.h_old[p]))
            .sum::<f64>();
        for p in 0..net.n {
            self.dh_prev[p] = h[p] - self.h_old[p];
        }
        self.dt_prev = dt;
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mesh::{EdgeBc, Grid, Mesh, Zone};
    use crate::physics::material::Material;

    /// Two cells side by side, widths 1 m and 2 m, height 1 m, conductivities 1 and 2 W/(m·K);
    /// the right edge faces zone 0 through R = 0.5 m²·K/W, everything else adiabatic.
    fn two_cells() -> Mesh {
        let grid = Grid {
            xe: vec![0.0, 1.0, 3.0],
            ze: vec![0.0, 1.0],
        };
        let mut mesh = Mesh::uniform(grid, Material::inert("a", 1.0, 1e6));
        let b = mesh.add_material(Material::inert("b", 2.0, 2e6));
        mesh.cells[1] = crate::mesh::Cell::Solid(b);
        let z = mesh.add_zone(Zone {
            name: "air".into(),
            r_horizontal: 0.5,
            r_vertical: 0.5,
        });
        mesh.right = vec![EdgeBc::Zone { zone: z, r: 0.5 }];
        mesh
    }

    /// The assembled stencil by hand: face G = A/(d_p/k_p + d_q/k_q) = 1/(0.5/1 + 1/2) = 1;
    /// boundary G_b = A/(d/k + R) = 1/(1/2 + 0.5) = 1; K = [[1, −1], [−1, 2]] (lower triangle
    /// stored), and with capacity V C/Δt added on the diagonal.
    #[test]
    fn two_cell_stencil() {
        let mesh = two_cells();
        let net = Network::new(&mesh);
        assert_eq!((net.n, net.faces.len(), net.bfaces.len()), (2, 1, 1));
        let mut s = Solver::new(&net, SolverParams::default()).unwrap();
        s.update_conductances(&[0.0, 0.0]);
        assert!((s.gf[0] - 1.0).abs() < 1e-15 && (s.gb[0] - 1.0).abs() < 1e-15);
        let k = |r: usize, c: usize| {
            (net.col_ptr[c]..net.col_ptr[c + 1])
                .find(|&slot| net.row_idx[slot] == r)
                .map_or(0.0, |slot| s.kvals[slot])
        };
        assert_eq!((k(0, 0), k(1, 0), k(1, 1)), (1.0, -1.0, 2.0));
        s.assemble(|p| net.volume[p] * [1e6, 2e6][p] / 100.0);
        let v = |r: usize, c: usize| {
            (net.col_ptr[c]..net.col_ptr[c + 1])
                .find(|&slot| net.row_idx[slot] == r)
                .map_or(0.0, |slot| s.vals[slot])
        };
        assert_eq!((v(0, 0), v(1, 0), v(1, 1)), (1.0 + 1e4, -1.0, 2.0 + 4e4));
    }

    /// Steady state of the two cells with the zone at 10 °C and no other exchange: uniform
    /// 10 °C, zero flow; a snow-like extra resistance changes only the boundary conductance.
    #[test]
    fn steady_and_extra_resistance() {
        let mesh = two_cells();
        let net = Network::new(&mesh);
        let mut s = Solver::new(&net, SolverParams::default()).unwrap();
        let st = s.steady(&[10.0], None).unwrap();
        assert!(st.t.iter().all(|t| (t - 10.0).abs() < 1e-12) && st.from_zone[0].abs() < 1e-12);
        s.set_extra_horizontal_resistance(0, 1.0);
        s.update_conductances(&st.t);
        assert!(
            (s.gb[0] - 1.0).abs() < 1e-15,
            "a vertical face keeps its conductance"
        );
    }

    /// One backward-Euler step of the two cells from 0 °C with the zone at 10 °C conserves energy:
    /// heat in from the zone = stored heat.
    #[test]
    fn one_step_conserves_energy() {
        let mesh = two_cells();
        let net = Network::new(&mesh);
        let mut s = Solver::new(&net, SolverParams::default()).unwrap();
        let mut h = net.enthalpies(&[0.0, 0.0]);
        let e = s.step(&mut h, &[10.0], 3600.0, 0.0).unwrap();
        assert!(e.from_zone[0] > 0.0);
        assert!((e.from_zone[0] - e.stored).abs() < 1e-9 * e.stored.abs());
    }
}
