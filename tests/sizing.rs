//! Frost-protection sizing: the example, the chosen design re-run, a step smaller, a mild climate,
//! monotonicity, and an unheated building.
use crate::cli::scratch;
use crate::common::{read_json, run_ok, run_written};
use frostline::case::load_case;
use frostline::design::apply;
use frostline::run::run;
use serde_json::Value;
use std::path::Path;

fn example() -> std::path::PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/kettle-hollow-sizing.toml")
}

fn size(case: &Path, out: &Path, extra: &[&str]) -> Value {
    let mut args = vec![
        "size".into(),
        case.as_os_str().to_owned(),
        "--out".into(),
        out.as_os_str().to_owned(),
        "--quiet".into(),
    ];
    args.extend(extra.iter().map(std::ffi::OsString::from));
    let (text, _) = run_written(&args);
    assert!(text.contains("licensed engineer"), "{text}");
    let lower = text.to_lowercase();
    assert!(
        !lower.contains("from memory") && !lower.contains("verify"),
        "{text}"
    );
    let s: Value =
        serde_json::from_slice(&std::fs::read(out.join("sizing.json")).unwrap()).unwrap();
    assert!(
        text.contains("Corners are not computed") || text.contains("Corners were checked in 3D"),
        "{text}"
    );
    s
}

/// The sizing example (two dimensions, coarse mesh): a least-cost design that meets the margin,
/// which `frostline run` reproduces from chosen_case.toml; the next smaller thickness on the
/// trade-off fails (or the lower bound was reached); cross-checks and cautions present.
#[test]
fn sizing_example_and_its_chosen_design() {
    let out = scratch("sizing");
    let s = size(&example(), &out, &[]);
    let chosen = &s["chosen"];
    assert!(chosen.is_object(), "a design was chosen");
    let margin = s["margin_m"].as_f64().unwrap();
    assert!(chosen["frost_margin_m"].as_f64().unwrap() >= margin);
    assert!(
        chosen["heat_loss_change_kwh"].as_f64().unwrap() < 0.0,
        "the wing reduces heat loss"
    );
    assert!(
        s["runs"].as_u64().unwrap() <= 40,
        "bisection keeps the run count small"
    );
    assert!(s["corners"].as_str().unwrap().contains("not computed"));
    assert!(s["cross_check"]["modified_berggren_open_ground_frost_depth_m"].is_number());
    assert!(s["caution"].as_str().unwrap().contains("licensed engineer"));
    // Re-run the chosen design as a plain case.
    let rerun = out.join("rerun");
    let chosen_case = out.join("chosen_case.toml");
    run_ok(&[
        "run".as_ref(),
        chosen_case.as_os_str(),
        "--out".as_ref(),
        rerun.as_os_str(),
        "--quiet".as_ref(),
        "--no-plots".as_ref(),
    ]);
    let summary = read_json(&rerun.join("summary.json"));
    let m = summary["frost_margin_m"].as_f64().unwrap();
    assert!(
        (m - chosen["frost_margin_m"].as_f64().unwrap()).abs() < 1e-6 && m >= margin,
        "rerun margin {m}"
    );
    // A step smaller fails, unless the chosen value is the lower bound.
    let vals: Vec<f64> = chosen["values"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_f64().unwrap())
        .collect();
    let (min_t, step) = (0.025, 0.025);
    if vals[1] > min_t + 1e-9 {
        let smaller = s["designs"]
            .as_array()
            .unwrap()
            .iter()
            .find(|d| {
                let v = d["values"].as_array().unwrap();
                (v[0].as_f64().unwrap() - vals[0]).abs() < 1e-9
                    && (v[1].as_f64().unwrap() - (vals[1] - step)).abs() < 1e-9
            })
            .expect("the bisection evaluated the next smaller thickness");
        assert_eq!(smaller["feasible"], false);
    }
    assert!(std::fs::read_to_string(out.join("sizing.csv"))
        .unwrap()
        .contains("frost_margin_m"));
    // The chosen design's protected zone, read back from its saved field.
    crate::trust::check_zone_from_saved_field(&out, margin);
    // The trade-off chart is drawn, listed with its size, and embedded in the report.
    crate::plots::check_plots(&out, &read_json(&out.join("summary.json")));
    let index = read_json(&out.join("plots.json"));
    assert!(index["plots"]
        .as_array()
        .unwrap()
        .iter()
        .any(|p| p["file"] == "sizing_tradeoff.png"));
    assert!(std::fs::read_to_string(out.join("report.html"))
        .unwrap()
        .contains("fig-sizing_tradeoff"));
    // No hedged values in what a design note would carry (finding 6).
    for f in ["sizing.json", "sizing.csv", "report.html", "summary.json"] {
        let text = std::fs::read_to_string(out.join(f)).unwrap().to_lowercase();
        assert!(
            !text.contains("from memory") && !text.contains("verify"),
            "{f} carries a hedged value"
        );
    }
}

/// Mild climate: open-ground frost shallower than the footing base → "no insulation needed",
/// with the reason.
#[test]
fn mild_climate_needs_no_insulation() {
    let dir = scratch("sizing-mild");
    let src = std::fs::read_to_string(example()).unwrap().replace(
        "design_from_series = \"../climate/kettle-hollow.csv\"\nreturn_period_years = 50",
        "mean_c = 9.0\namplitude_k = 7.0\ncoldest_day = 20",
    );
    let case = dir.join("mild.toml");
    std::fs::write(&case, src).unwrap();
    let s = size(&case, &dir.join("out"), &[]);
    let why = s["no_insulation_needed"]
        .as_str()
        .expect("no insulation needed");
    assert!(why.contains("margin"), "{why}");
    assert!(s["chosen"].is_null());
}

/// Monotonicity (more insulation never lets frost go deeper): for seeded random pairs of wing
/// designs where one has at least the other's width and thickness, its frost margin is not
/// smaller (beyond 1 cm of numerical noise).
#[test]
fn more_insulation_never_deepens_frost() {
    let case = load_case(&example()).unwrap();
    let vary = case.sizing.as_ref().unwrap().vary.clone();
    let mut seed = 7u64;
    let mut rnd = |lo: f64, hi: f64| {
        seed = seed
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        lo + (hi - lo) * ((seed >> 11) as f64 / (1u64 << 53) as f64)
    };
    for _ in 0..3 {
        let (w1, t1) = (rnd(0.3, 1.2), rnd(0.01, 0.06));
        let (w2, t2) = (w1 + rnd(0.0, 0.4), t1 + rnd(0.0, 0.04));
        let margin = |w: f64, t: f64| {
            let c = apply(&case, &vary, &[w, t]).unwrap();
            let r = run(&c, &mut |_| {}).unwrap();
            frostline::run::headline(&c, &r).frost_margin_m
        };
        let (m1, m2) = (margin(w1, t1), margin(w2, t2));
        assert!(
            m2 + 0.01 >= m1,
            "({w1:.2}, {t1:.3}) margin {m1:.3} but more insulation ({w2:.2}, {t2:.3}) {m2:.3}"
        );
    }
}

/// An unheated building (indoor air follows the outdoor air) with insulation under the whole
/// footprint and a wing: the sizing runs and reports a result either way.
#[test]
fn unheated_building_sizing_runs() {
    let dir = scratch("sizing-unheated");
    let csv = Path::new(env!("CARGO_MANIFEST_DIR")).join("climate/kettle-hollow.csv");
    let src = std::fs::read_to_string(example())
        .unwrap()
        .replace("indoor_temperature_c = 20.0", "unheated = true")
        .replace(
            "\"../climate/kettle-hollow.csv\"",
            &format!("\"{}\"", csv.display()),
        );
    let src = src.replace(
        "[[sizing.vary]]                  # first: the wing's outer end (m from the wall face)\ninsulation = 2\ndimension = \"width_m\"\nmin = 1.0\nmax = 2.2\nstep = 0.3\n\n",
        "",
    );
    let case = dir.join("unheated.toml");
    std::fs::write(&case, src).unwrap();
    let s = size(&case, &dir.join("out"), &[]);
    assert_eq!(s["dimensions"].as_array().unwrap().len(), 1);
    assert!(s["baseline_without_varied_insulation"]["frost_margin_m"].is_number());
    assert!(s["runs"].as_u64().unwrap() >= 2);
}

/// The 3D corner check (`[sizing.corner]`, coarse mesh): the wing is sized in 2D, then the corner
/// boards' outer end in 3D. The criterion is the 2D sizing's (the issue: the corner meets the
/// same criterion as the mid-wall section): the chosen board is the least value in the range
/// whose least frost margin anywhere round the building is at least the required margin; every
/// evaluated smaller value fails, margins never fall as the board widens (monotonicity, checked
/// in the code to 1 cm), the chosen design's 3D results are the files written beside, and
/// chosen_case.toml carries the board.
#[test]
fn corner_boards_sized_in_3d() {
    let out = scratch("sizing-3d");
    let case = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/alder-bend-sizing-3d.toml");
    let s = size(&case, &out, &[]);
    let margin = s["margin_m"].as_f64().unwrap();
    assert!(s["chosen"].is_object(), "the 2D sizing chose a wing");
    let c = &s["corner_check"];
    let designs = c["designs"].as_array().unwrap();
    let chosen = c["chosen"]["value_m"].as_f64().expect("a board was chosen");
    let least = |d: &Value| d["least_margin_m"].as_f64().unwrap_or(f64::INFINITY);
    for d in designs {
        let v = d["value_m"].as_f64().unwrap();
        assert_eq!(d["feasible"].as_bool().unwrap(), least(d) >= margin - 1e-9);
        if v < chosen - 1e-9 {
            assert!(
                !d["feasible"].as_bool().unwrap(),
                "{v} m passes below the chosen {chosen} m"
            );
        }
    }
    for w in designs.windows(2) {
        assert!(least(&w[1]) >= least(&w[0]) - 0.01, "{w:?}");
    }
    assert!(least(&c["chosen"]) >= margin);
    // The corner is where the margin is least: the mid-wall keeps more.
    let mid = c["chosen"]["mid_wall_margin_m"].as_f64().unwrap();
    assert!(mid >= least(&c["chosen"]) - 1e-9);
    // The files beside are the chosen design's 3D run.
    let summary = read_json(&out.join("summary.json"));
    let w = summary["three_d"]["worst_point"]["margin_m"]
        .as_f64()
        .unwrap();
    assert!((w - least(&c["chosen"])).abs() < 1e-9, "{w}");
    let toml = std::fs::read_to_string(out.join("chosen_case.toml")).unwrap();
    let case = frostline::case::parse_case("chosen_case.toml", &toml).unwrap();
    match case.corners[0].piece.kind {
        frostline::case::InsulationKind::Wing { width_m, .. } => {
            assert!((width_m - chosen).abs() < 1e-9)
        }
        _ => panic!("the corner board is a wing"),
    }
}
