//! The 3D model against the 2D section: a long building's mid-wall reproduces the section on
//! the same grid sizes, and the whole building's loss against the equivalent strip.
use frostline::case::{parse_case, Case};
use frostline::run::split::split;
use frostline::run::three::{mid_wall_coupling, run3};
use frostline::run::{headline, model, run_with, RunOptions};
use frostline::solver::pcg::PcgParams;
use frostline::solver::{Linear, SolverParams};
use std::path::Path;

/// The Alder Bend example with its plan's length replaced by `length_m`.
fn alder_bend(length_m: f64) -> Case {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/alder-bend-house-3d.toml");
    let text = std::fs::read_to_string(&path)
        .unwrap()
        .replace("length_m = 12.4", &format!("length_m = {length_m}"));
    let mut c = parse_case(&path.display().to_string(), &text).unwrap();
    // Without the corner boards: their edges would add grid planes the section does not have.
    c.corners.clear();
    c
}

/// The same floor width as a 2D section: B′ = 9.0 m (the width between the walls' inside faces).
fn section_of(c: &Case) -> Case {
    let mut c2 = c.clone();
    c2.plan = None;
    c2.building.floor_area_m2 = 9.0 * 100.0;
    c2.building.exposed_perimeter_m = 200.0;
    c2.building.b_prime_m = 9.0;
    c2
}

/// Steady coupling per metre at mid-wall of buildings 9.4 m wide and 20 to 160 m long against
/// the 2D section of the same floor width, both on the 3D model's coarse sizes and a 20 m
/// domain. Reference: far from the ends a long building's wall is a 2D section (the
/// two-dimensional junction of ISO 10211:2017 and ISO 14683's Ψ). The 3D excess comes from the
/// ends and must fall with the length: within 1 % from 80 m, 0.1 % at 160 m.
#[test]
fn long_building_mid_wall_coupling_converges_to_the_section() {
    let params = SolverParams {
        linear: Linear::Pcg(PcgParams {
            rel_tol: 1e-10,
            ..Default::default()
        }),
        ..Default::default()
    };
    let mut last = f64::INFINITY;
    let mut msg = String::new();
    for length in [20.0, 40.0, 80.0, 160.0] {
        let mut c = alder_bend(length);
        c.simulation.mesh_sizes = Some((0.10, 1.4, 3.0));
        c.simulation.domain_width_m = 20.0;
        c.simulation.domain_depth_m = 20.0;
        let l3 = mid_wall_coupling(&c, params).unwrap();
        let c2 = section_of(&c);
        let (_, mesh, net) = model(&c2);
        let l2 = split(&c2, &mesh, &net).unwrap().l2d_w_per_mk;
        let dev = l3 / l2 - 1.0;
        msg += &format!(
            "{length} m: {l3:.4} vs {l2:.4} W/(m·K), {:+.3} %; ",
            100.0 * dev
        );
        assert!(dev.abs() < last, "{msg}");
        last = dev.abs();
        if length >= 80.0 {
            assert!(dev.abs() < 0.01, "{msg}");
        }
    }
    eprintln!("mid-wall coupling, 3D vs 2D: {msg}");
    assert!(last < 0.001, "{msg}");
}

/// A long building (40 m × 9.4 m) on the 3D model's coarse sizes, both models on the same sizes.
///
/// Check 1 (reference as above): at mid-wall the deepest frost at the footing face and the
/// frost margin over the reported year equal the 2D section's of the same floor width within
/// 1 %.
///
/// Check 2 (the equivalent strip, ISO 13370:2017 §8.1: the whole floor as a 2D strip of width B′
/// times the perimeter): the 3D / strip ratio of the annual loss is nearer 1 for the long
/// building than for the 12.4 m demo, as the four corners' share of the perimeter falls.
#[test]
fn long_building_mid_wall_frost_reproduces_the_section() {
    let sizes = (0.10, 1.4, 3.0);
    let mut c = alder_bend(40.0);
    c.simulation.mesh_sizes = Some(sizes);
    let opts = RunOptions::default();
    let r3 = run3(&c, &opts, &mut |_| {}).unwrap();
    let mid3 = r3.year().north[0].1;
    let c2 = section_of(&c);
    let r2 = run_with(&c2, &opts, &mut |_| {}).unwrap();
    let h2 = headline(&c2, &r2);
    eprintln!(
        "mid-wall: face frost {:.4} vs {:.4} m ({:+.3} %); margin {:.4} vs {:.4} m; 3D cells {}",
        mid3.face_m,
        h2.frost_depth_at_footing_face_m,
        100.0 * (mid3.face_m / h2.frost_depth_at_footing_face_m - 1.0),
        mid3.margin_m,
        h2.frost_margin_m,
        r3.mesh.grid.nx() * r3.mesh.grid.ny() * r3.mesh.grid.nz()
    );
    assert!(
        (mid3.margin_m / h2.frost_margin_m - 1.0).abs() < 0.01,
        "margin {} vs {}",
        mid3.margin_m,
        h2.frost_margin_m
    );
    assert!(
        (mid3.face_m / h2.frost_depth_at_footing_face_m - 1.0).abs() < 0.01,
        "face frost {} vs {}",
        mid3.face_m,
        h2.frost_depth_at_footing_face_m
    );
    // The whole building against its own equivalent strip (the run's 2D part, B' from A and P).
    let ratio = |r: &frostline::run::three::Run3Result, c: &Case| {
        let s3 = frostline::files::three::Summary3::new(c, r);
        s3.annual_heat_loss_ratio_3d_to_2d
    };
    let long = ratio(&r3, &c);
    let mut demo = alder_bend(12.4);
    demo.simulation.mesh_sizes = Some(sizes);
    let rd = run3(&demo, &opts, &mut |_| {}).unwrap();
    let short = ratio(&rd, &demo);
    eprintln!("3D / equivalent strip annual loss: long {long:.4}, demo {short:.4}");
    assert!(
        (long - 1.0).abs() < (short - 1.0).abs(),
        "{long} vs {short}"
    );
}

/// The case file's 3D keys are validated before any solve: each mistake names its key and kind.
#[test]
fn plan_and_corner_keys_are_validated() {
    use frostline::error::{Error, InputKind};
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/alder-bend-house-3d.toml");
    let text = std::fs::read_to_string(&path).unwrap();
    let parse = |t: &str| parse_case("case.toml", t);
    let expect = |t: &str, key: &str, kind: InputKind| match parse(t) {
        Err(Error::Input {
            key: k, kind: kd, ..
        }) => {
            assert!(k.starts_with(key), "key {k}, expected {key}");
            assert_eq!(kd, kind, "{key}");
        }
        other => panic!(
            "{key}: expected an input error, got {:?}",
            other.map(|_| ())
        ),
    };
    // [plan] gives A and P: floor inside 0.2 m walls, 12.0 × 9.0 m.
    let c = parse(&text).unwrap();
    assert!((c.building.floor_area_m2 - 108.0).abs() < 1e-9);
    assert!((c.building.exposed_perimeter_m - 42.0).abs() < 1e-9);
    // The case without [plan] and [[corner]], the floor given by A and P instead.
    let (head, tail) = text.split_once("[plan]").unwrap();
    let rest = tail.split_once("[slab]").unwrap().1;
    let head = head.replace(
        "[building]\n",
        "[building]\nfloor_area_m2 = 108.0\nexposed_perimeter_m = 42.0\n",
    );
    expect(
        &format!("{head}[slab]{rest}"),
        "simulation.model",
        InputKind::Missing,
    );
    // Corner boards without a plan.
    let corner_only = format!(
        "{head}[[corner]]\nthickness_m = 0.10\nmaterial = \"xps\"\ndepth_m = 0.30\nwidth_m = 1.50\nlength_m = 1.50\n[slab]{rest}"
    )
    .replace("model = \"3d\"", "model = \"2d\"");
    expect(&corner_only, "corner[0]", InputKind::Missing);
    // A plan with the floor area given as well.
    expect(
        &text.replace("[building]\n", "[building]\nfloor_area_m2 = 108.0\n"),
        "building.floor_area_m2",
        InputKind::Conflict,
    );
    // A plan no wider than its walls.
    expect(
        &text.replace("width_m = 9.4", "width_m = 0.3"),
        "plan.width_m",
        InputKind::OutOfRange,
    );
    // Corner boards longer than half the shorter side.
    expect(
        &text.replace("length_m = 1.50", "length_m = 5.00"),
        "corner[0].length_m",
        InputKind::OutOfRange,
    );
    // The 3D corner check of a sizing: a known board dimension within the plan.
    let sizing = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/alder-bend-sizing-3d.toml"),
    )
    .unwrap();
    assert!(parse(&sizing).unwrap().sizing.unwrap().corner.is_some());
    expect(
        &sizing.replace(
            "dimension = \"width_m\"\nmin = 1.2",
            "dimension = \"depth_m\"\nmin = 1.2",
        ),
        "sizing.corner.dimension",
        InputKind::UnknownName,
    );
    expect(
        &sizing.replace(
            "dimension = \"width_m\"\nmin = 1.2\nmax = 2.4",
            "dimension = \"length_m\"\nmin = 1.2\nmax = 6.0",
        ),
        "sizing.corner.max",
        InputKind::OutOfRange,
    );
    expect(
        &sizing.replace("corner = 0\n", "corner = 3\n"),
        "sizing.corner.corner",
        InputKind::OutOfRange,
    );
    // An unknown model.
    expect(
        &text.replace("model = \"3d\"", "model = \"4d\""),
        "simulation.model",
        InputKind::UnknownName,
    );
}

/// A plan whose 3D grid would exceed the cell limit is refused before anything is solved or
/// allocated for it, naming the cell count and the limit (memory target of the issue: < 4 GB).
#[test]
fn oversized_3d_grid_is_refused_first() {
    use frostline::error::{Error, InputKind};
    use frostline::run::three::MAX_CELLS_3D;
    let mut c = alder_bend(12.4);
    c.plan = Some(frostline::case::Plan {
        length_m: 1000.0,
        width_m: 1000.0,
    });
    let t0 = std::time::Instant::now();
    match run3(&c, &RunOptions::default(), &mut |_| {}) {
        Err(Error::Input {
            key, kind, message, ..
        }) => {
            assert_eq!(key, "simulation.mesh");
            assert_eq!(kind, InputKind::OutOfScope);
            assert!(message.contains(&MAX_CELLS_3D.to_string()), "{message}");
        }
        other => panic!("expected a refusal, got {:?}", other.map(|_| ())),
    }
    assert!(t0.elapsed().as_secs_f64() < 5.0, "refused before solving");
}

/// `simulation.solver_3d = "multigrid"` gives the default solver's results: both iterate each
/// step's Newton system until the temperature-equivalent residual is below the same 1e-6 K
/// (and both stop their corrections by the same inexact-Newton rule), so the two converged
/// states differ by about that residual, far below the printed digits. Required: annual loss
/// within 1e-6 relative (a 1e-6 K difference over the ~20 K between floor and ground is 5e-8),
/// frost depths and margins at the corner and mid-wall within 1e-5 m (a thousandth of the fine
/// mesh's smallest cell). The Alder Bend demo on sizes coarser than the coarse mesh (20 cm at
/// the edges, growth 1.5, at most 4 m; over 4,096 unknowns, so the multigrid's two-thread
/// path runs) with one spin-up year, shortened for the test suite.
#[test]
fn multigrid_solver_gives_the_default_results() {
    use frostline::case::Solver3d;
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/alder-bend-house-3d.toml");
    let text = std::fs::read_to_string(&path).unwrap();
    let mut c = parse_case("case.toml", &text).unwrap();
    assert_eq!(c.simulation.solver_3d, Solver3d::IncompleteCholesky);
    c.simulation.mesh_sizes = Some((0.2, 1.5, 4.0));
    c.simulation.max_spin_up_years = 1;
    let opts = RunOptions::default();
    let a = run3(&c, &opts, &mut |_| {}).unwrap();
    let mg = parse_case(
        "case.toml",
        &text.replace(
            "model = \"3d\"",
            "model = \"3d\"\nsolver_3d = \"multigrid\"",
        ),
    )
    .unwrap();
    assert_eq!(mg.simulation.solver_3d, Solver3d::Multigrid);
    c.simulation.solver_3d = mg.simulation.solver_3d;
    let b = run3(&c, &opts, &mut |_| {}).unwrap();
    assert_eq!(a.solver_3d, Solver3d::IncompleteCholesky);
    assert_eq!(b.solver_3d, Solver3d::Multigrid);
    let (ka, kb) = (
        a.headline(&c).annual_heat_loss_kwh,
        b.headline(&c).annual_heat_loss_kwh,
    );
    let (ya, yb) = (a.year(), b.year());
    let depths = |y: &frostline::run::quarter::QuarterYear| {
        let mid = y.north[0].1;
        [
            y.corner.face_m,
            y.corner.under_footing_m,
            y.corner.margin_m,
            mid.face_m,
            mid.margin_m,
        ]
    };
    let (da, db) = (depths(ya), depths(yb));
    eprintln!(
        "annual loss {ka} vs {kb} kWh ({:.1e} relative); corner and mid-wall depths {da:?} vs {db:?}; CG per solve {:.1} vs {:.1}",
        (kb - ka) / ka,
        a.stats.cg_iterations as f64 / a.stats.solves as f64,
        b.stats.cg_iterations as f64 / b.stats.solves as f64
    );
    assert!(b.unknowns >= 4096, "{} unknowns", b.unknowns);
    assert!(((kb - ka) / ka).abs() < 1e-6, "{ka} vs {kb}");
    for (x, y) in da.iter().zip(&db) {
        assert!((x - y).abs() < 1e-5, "{da:?} vs {db:?}");
    }
    // An unknown solver name is refused, naming the key.
    match parse_case(
        "case.toml",
        &text.replace("model = \"3d\"", "model = \"3d\"\nsolver_3d = \"amg\""),
    ) {
        Err(frostline::error::Error::Input { key, kind, .. }) => {
            assert_eq!(key, "simulation.solver_3d");
            assert_eq!(kind, frostline::error::InputKind::UnknownName);
        }
        other => panic!("expected an input error, got {:?}", other.map(|_| ())),
    }
}
