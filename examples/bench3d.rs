//! Benchmark of the 3D model's numerics on the Alder Bend 3D demo (invented building):
//!
//! - `steady`: the steady state at the annual means (the start of every run);
//! - `days N`: from that state, N daily steps of a cold spell (air −15 °C, snow-free), the kind
//!   of steps a winter is made of: time per step, Newton iterations and CG iterations per solve;
//! - `run`: a whole 3D design run (spin-up and reported year), as `frostline run --model 3d`.
//!
//! Add `coarse` or `fine` for another mesh, `amg` for the multigrid-preconditioned solver instead
//! of the incomplete factor (environment AMG_THETA, AMG_DOM, AMG_PASSES set its strength
//! threshold, dominance and aggregation passes; PCG_TOL the incomplete-factor solver's relative
//! tolerance; `omega X` and `omega_steady X` the incomplete factor's modification for steps and
//! for steady solves; `forcing X` the inexact Newton forcing term, 0 for full linear solves).
//! Run with
//! `cargo run --release --example bench3d -- days 20 coarse` and take medians of repeated runs
//! (the machine is noisy).
use frostline::case::{load_case, Fineness};
use frostline::run::{forcing, three, RunOptions};
use frostline::solver::pcg::PcgParams;
use frostline::solver::{Linear, Solver, SolverParams};

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let mut case = load_case(std::path::Path::new("examples/alder-bend-house-3d.toml"))
        .expect("the 3D demo case");
    if args.iter().any(|a| a == "coarse") {
        case.simulation.mesh = Fineness::Coarse;
    }
    if args.iter().any(|a| a == "fine") {
        case.simulation.mesh = Fineness::Fine;
    }
    let t0 = std::time::Instant::now();
    let (_q, mesh, net) = three::model3(&case);
    let g = &mesh.grid;
    println!(
        "mesh {:?}: {} × {} × {} cells, {} unknowns, built in {:.2} s",
        case.simulation.mesh,
        g.nx(),
        g.ny(),
        g.nz(),
        net.n,
        t0.elapsed().as_secs_f64()
    );
    // `omega X`, `omega_steady X`: the preconditioner's modification for steps and for steady
    // solves (default PcgParams's).
    let value = |key: &str, default: f64| {
        args.iter()
            .position(|a| a == key)
            .and_then(|k| args.get(k + 1))
            .and_then(|v| v.parse().ok())
            .unwrap_or(default)
    };
    let omega = value("omega", PcgParams::default().omega);
    let omega_steady = value("omega_steady", PcgParams::default().omega_steady);
    let linear = if args.iter().any(|a| a == "amg") {
        let env = |k: &str, d: f64| {
            std::env::var(k)
                .ok()
                .and_then(|v| v.parse().ok())
                .unwrap_or(d)
        };
        Linear::Multigrid(frostline::solver::amg::AmgParams {
            strength: env("AMG_THETA", 0.25),
            dominance: env("AMG_DOM", 5.0),
            passes: env("AMG_PASSES", 1.0) as usize,
            ..Default::default()
        })
    } else {
        Linear::Pcg(PcgParams {
            omega,
            omega_steady,
            rel_tol: std::env::var("PCG_TOL")
                .ok()
                .and_then(|v| v.parse().ok())
                .unwrap_or(1e-8),
            ..PcgParams::default()
        })
    };
    let params = SolverParams {
        linear,
        newton_forcing: value("forcing", SolverParams::default().newton_forcing),
        ..Default::default()
    };
    match args.get(1).map(String::as_str) {
        Some("run") => {
            let opts = RunOptions {
                solver: params,
                ..RunOptions::default()
            };
            let r = three::run3(&case, &opts, &mut |_| {}).expect("3D run");
            let s = &r.stats;
            println!(
                "run: {:.1} s, {} steps, {:.2} Newton/step, {:.1} CG/solve (max {}), {} set-ups, {} halvings",
                r.wall_time_s,
                r.time_steps,
                s.newton_iterations as f64 / s.steps as f64,
                s.cg_iterations as f64 / s.solves.max(1) as f64,
                s.max_cg_iterations,
                s.factorizations,
                s.halvings
            );
        }
        mode => {
            let mut solver = Solver::new(&net, params).expect("solver");
            let zt = forcing::zone_temps(&case, 20.0, case.climate.mean_c);
            let t1 = std::time::Instant::now();
            let st = solver.steady(&zt, None).expect("steady");
            let s0 = solver.stats();
            println!(
                "steady: {:.2} s, {} Picard, {:.1} CG/solve",
                t1.elapsed().as_secs_f64(),
                st.iterations,
                s0.cg_iterations as f64 / s0.solves.max(1) as f64
            );
            if mode == Some("days") {
                let n: usize = args.get(2).and_then(|v| v.parse().ok()).unwrap_or(20);
                let mut h = net.enthalpies(&st.t);
                let zt = forcing::zone_temps(&case, 20.0, -15.0);
                let before = solver.stats();
                let t2 = std::time::Instant::now();
                for d in 0..n {
                    solver
                        .step(&mut h, &zt, 86400.0, d as f64 * 86400.0)
                        .expect("step");
                }
                let s = solver.stats();
                let solves = (s.solves - before.solves).max(1);
                println!(
                    "days: {:.3} s/step, {:.2} Newton/step, {:.1} CG/solve, {} halvings",
                    t2.elapsed().as_secs_f64() / n as f64,
                    (s.newton_iterations - before.newton_iterations) as f64 / n as f64,
                    (s.cg_iterations - before.cg_iterations) as f64 / solves as f64,
                    s.halvings - before.halvings,
                );
            }
        }
    }
}
