//! Engine benchmark: the demo case end to end, the steady solve, and the cost per time step.
//! Run with `cargo bench --bench engine` (release profile). Prints medians over repeated runs; the
//! machine is shared and noisy, so compare medians and ratios, not single runs.
use frostline::case::load_case;
use frostline::geometry::Section;
use frostline::run;
use frostline::solver::{Network, Solver, SolverParams};
use std::time::Instant;

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(|a, b| a.total_cmp(b));
    v[v.len() / 2]
}

/// Time `with` and `without` alternately `runs` times each and print both medians and their ratio.
fn alternated(runs: usize, what: &str, mut with: impl FnMut(), mut without: impl FnMut()) {
    let (mut a, mut b) = (Vec::new(), Vec::new());
    for _ in 0..runs {
        let t0 = Instant::now();
        with();
        a.push(t0.elapsed().as_secs_f64());
        let t0 = Instant::now();
        without();
        b.push(t0.elapsed().as_secs_f64());
    }
    let (a, b) = (median(a), median(b));
    println!(
        "  {what}: median {a:.2} s with, {b:.2} s without (ratio {:.2}, alternated runs)",
        a / b
    );
}

fn main() {
    let path =
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/kettle-hollow-house.toml");
    let case = load_case(&path).expect("demo case");
    let runs: usize = std::env::var("BENCH_RUNS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(5);

    // Steady solve: mesh and symbolic analysis outside the timer, then assembly + factor + solve.
    let mesh = Section::from_case(&case).mesh(&case);
    let net = Network::new(&mesh);
    let mut steady = Vec::new();
    let mut setup = Vec::new();
    for _ in 0..20 {
        let t0 = Instant::now();
        let mut s = Solver::new(&net, SolverParams::default()).unwrap();
        let t1 = Instant::now();
        s.steady(&[20.0, 3.0], None).unwrap();
        steady.push(t1.elapsed().as_secs_f64());
        setup.push((t1 - t0).as_secs_f64());
    }
    println!(
        "steady solve ({} cells): median {:.1} ms (symbolic set-up {:.1} ms)",
        net.n,
        1e3 * median(steady),
        1e3 * median(setup)
    );

    // Per step A/B, split factorisation (two halves side by side) against the whole one: 60 daily
    // steps of freezing from the steady state (surface −10 °C), runs alternated.
    let steps_ab = |split: bool| {
        let params = SolverParams {
            split_halves: split,
            ..SolverParams::default()
        };
        let mut s = Solver::new(&net, params).unwrap();
        let st = s.steady(&[20.0, 3.0], None).unwrap();
        let mut h = net.enthalpies(&st.t);
        let f0 = s.stats().factorizations;
        let t0 = Instant::now();
        for k in 0..60 {
            s.step(&mut h, &[20.0, -10.0], 86400.0, k as f64 * 86400.0)
                .unwrap();
        }
        let dt = t0.elapsed().as_secs_f64() / 60.0;
        (dt, s.stats().factorizations - f0, h)
    };
    let (mut split_t, mut whole_t) = (Vec::new(), Vec::new());
    let mut facts = (0, 0);
    let mut max_dh: f64 = 0.0;
    for _ in 0..runs.max(5) {
        let (a, fa, ha) = steps_ab(true);
        let (b, fb, hb) = steps_ab(false);
        split_t.push(a);
        whole_t.push(b);
        facts = (fa, fb);
        max_dh = ha
            .iter()
            .zip(&hb)
            .map(|(x, y)| (x - y).abs())
            .fold(max_dh, f64::max);
    }
    let (a, b) = (median(split_t), median(whole_t));
    println!(
        "freezing steps: split {:.2} ms, whole {:.2} ms per step (ratio {:.2}; {} / {} factorisations; max |ΔH| {:.1e} J/m³)",
        1e3 * a,
        1e3 * b,
        a / b,
        facts.0,
        facts.1,
        max_dh
    );

    let mut total = Vec::new();
    let mut per_step = Vec::new();
    let mut last = None;
    for _ in 0..runs {
        let t0 = Instant::now();
        let r = run::run(&case, &mut |_| {}).unwrap();
        let dt = t0.elapsed().as_secs_f64();
        total.push(dt);
        per_step.push(dt / r.time_steps as f64);
        last = Some(r);
    }
    let r = last.unwrap();
    println!(
        "demo end to end: median {:.2} s over {runs} runs (min {:.2}, max {:.2})",
        median(total.clone()),
        total.iter().cloned().fold(f64::INFINITY, f64::min),
        total.iter().cloned().fold(0.0, f64::max)
    );
    println!(
        "  cells {}, steps {}, spin-up years {}, Newton iterations/step {:.2}, factorisations {}, solves {}",
        r.mesh.solid_cells(),
        r.time_steps,
        r.spin_up_years(),
        r.stats.newton_iterations as f64 / r.time_steps as f64,
        r.stats.factorizations,
        r.stats.solves
    );
    println!("  per time step: median {:.2} ms", 1e3 * median(per_step));

    // A/B: the same case without the 5-day first spin-up year, runs alternated with the default.
    let mut plain_case = case.clone();
    plain_case.simulation.coarse_year_step_days = 0;
    alternated(
        runs,
        "5-day first spin-up year",
        || {
            run::run(&case, &mut |_| {}).unwrap();
        },
        || {
            run::run(&plain_case, &mut |_| {}).unwrap();
        },
    );

    // A/B: the demo with the split factorisation against the whole one, runs alternated.
    let whole = run::RunOptions {
        solver: SolverParams {
            split_halves: false,
            ..SolverParams::default()
        },
        ..Default::default()
    };
    alternated(
        runs,
        "split factorisation",
        || {
            run::run(&case, &mut |_| {}).unwrap();
        },
        || {
            run::run_with(&case, &whole, &mut |_| {}).unwrap();
        },
    );

    // Sizing of the sizing demo (two varied dimensions, coarse mesh, rayon over the first).
    let spath =
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/kettle-hollow-sizing.toml");
    let scase = load_case(&spath).expect("sizing demo");
    let mut walls = Vec::new();
    let mut last = None;
    for _ in 0..runs.min(3) {
        let r = frostline::design::size(&scase, &|_| {}).unwrap();
        walls.push(r.wall_time_s);
        last = Some(r);
    }
    let r = last.unwrap();
    println!(
        "sizing demo: median {:.2} s over {} sizings; {} model runs each, median {:.2} s per run ({} threads)",
        median(walls),
        runs.min(3),
        r.runs,
        r.median_run_s,
        rayon::current_num_threads()
    );
}
