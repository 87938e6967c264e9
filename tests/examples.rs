//! Every bundled example runs (the large one shortened) with range assertions on its results.
use crate::cli::{bin, scratch};
use crate::common::{read_json, run_ok, run_written};
use serde_json::Value;
use std::path::Path;

const KEYS: &[&str] = &[
    "floor_area_m2",
    "exposed_perimeter_m",
    "characteristic_dimension_m",
    "annual_heat_loss_kwh",
    "mean_heat_loss_w",
    "peak_heat_loss_w",
    "heat_loss_per_perimeter_w_per_m",
    "ground_u_value_incl_junction_w_per_m2k",
    "frost_depth_open_ground_m",
    "frost_depth_under_footing_m",
    "footing_base_depth_m",
    "frost_margin_m",
    "design_day_of_year",
    "frost_depth_at_footing_face_m",
    "frost_depth_beside_wall_m",
    "energy_balance_error",
    "spin_up_years",
    "cells",
    "time_steps",
    "wall_time_s",
];

fn run_example(name: &str, extra: &[&str]) -> (Value, std::path::PathBuf, String) {
    let out = scratch(name);
    let case = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("examples")
        .join(format!("{name}.toml"));
    let mut args = vec![
        "run".into(),
        case.into_os_string(),
        "--out".into(),
        out.clone().into_os_string(),
    ];
    args.extend(extra.iter().map(std::ffi::OsString::from));
    // A shortened spin-up may end before the periodic year: results written, exit 3.
    let (stdout, code) = run_written(&args);
    assert!(
        code == 0 || extra.contains(&"--max-spin-up-years"),
        "{name}: exit {code}"
    );
    let s = read_json(&out.join("summary.json"));
    for k in KEYS {
        assert!(
            s[k].is_number(),
            "{name}: summary.json key {k} missing or not a number"
        );
    }
    for k in [
        "iso13370_u_value_w_per_m2k",
        "stefan_frost_depth_m",
        "modified_berggren_frost_depth_m",
    ] {
        assert!(s["cross_check"][k].is_number(), "{name}: cross_check.{k}");
    }
    // Provenance: the case as read, hashed; the report names it.
    let p = &s["provenance"];
    let case_text = std::fs::read(out.join("case.toml")).unwrap();
    use sha2::Digest;
    let digest: String = sha2::Sha256::digest(&case_text)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect();
    assert_eq!(p["case_sha256"].as_str().unwrap(), digest);
    assert!(p["tool"].as_str().unwrap().starts_with("frostline "));
    // Every CSV is one header row with units, then data (no comment lines: pandas.read_csv and
    // a spreadsheet open it without options); csv_notes.json carries the caution and what each
    // file holds.
    let notes = read_json(&out.join("csv_notes.json"));
    assert!(notes["caution"]
        .as_str()
        .unwrap()
        .contains("Results are engineering estimates"));
    for f in ["daily.csv", "monthly.csv", "probes.csv"] {
        let text = std::fs::read_to_string(out.join(f)).unwrap();
        assert!(
            !text.lines().any(|l| l.starts_with('#')),
            "{f} has comments"
        );
        let header = text.lines().next().unwrap();
        assert!(
            header.contains("_c") || header.contains("temperature"),
            "{f} header without units: {header}"
        );
        assert!(notes["files"][f].is_string(), "csv_notes.json lacks {f}");
        // Read back with the csv crate's default options: every row as long as the header.
        let mut r = csv::Reader::from_reader(text.as_bytes());
        let n = r.headers().unwrap().len();
        assert!(r.records().all(|rec| rec.unwrap().len() == n), "{f}");
        python_reads(&out.join(f));
    }
    let day = s["design_day_of_year"].as_u64().unwrap();
    let field = std::fs::read_to_string(out.join(format!("field_{day:03}.csv"))).unwrap();
    assert!(field.lines().any(|l| l == "x_m,z_m,temperature_c"));
    assert_eq!(
        field.lines().filter(|l| !l.starts_with('#')).count() as u64 - 1,
        s["cells"].as_u64().unwrap()
    );
    assert!(!std::fs::read_dir(&out).unwrap().any(|e| e
        .unwrap()
        .file_name()
        .to_string_lossy()
        .contains(".tmp")));
    assert!(stdout.contains("Caution"), "result table lacks the caution");
    (s, out, stdout)
}

/// Where Python is present, its standard `csv` reader with default options (as pandas'
/// `read_csv` and a spreadsheet open a file: comma, one header row, no comment character) reads
/// the file: every row as long as the header, the header unique, and every value but dates and
/// names a number or empty. Without Python the check is skipped with a note.
fn python_reads(path: &std::path::Path) {
    const SCRIPT: &str = r#"
import csv, sys
rows = list(csv.reader(open(sys.argv[1], newline="")))
head, body = rows[0], rows[1:]
assert len(set(head)) == len(head), head
assert body and all(len(r) == len(head) for r in body)
for r in body:
    for h, v in zip(head, r):
        if h not in ("date", "name") and v != "":
            float(v)
print(len(body))
"#;
    match std::process::Command::new("python3")
        .args(["-c", SCRIPT])
        .arg(path)
        .output()
    {
        Ok(o) => assert!(
            o.status.success(),
            "{}: {}",
            path.display(),
            String::from_utf8_lossy(&o.stderr)
        ),
        Err(_) => eprintln!("note: no python3; {} not read by Python", path.display()),
    }
}

fn num(s: &Value, k: &str) -> f64 {
    s[k].as_f64().unwrap()
}

/// The small house on a frost-protected shallow footing (normal mesh, full spin-up).
/// Ranges: U between the ISO 13370 slab value without the wall/floor junction (0.196) and an
/// uninsulated slab (0.76); open-ground frost within ±15 % of modified Berggren (a sanity band:
/// ModBerg assumes a step change of surface temperature); no frost below the footing (the design
/// intent of the demo); energy balance within 0.1 % of the throughput.
#[test]
fn kettle_hollow_house() {
    let (s, out, stdout) = run_example("kettle-hollow-house", &["--quiet"]);
    let u = num(&s, "floor_u_value_w_per_m2k");
    assert!((0.196..0.76).contains(&u), "U {u}");
    let open = num(&s, "frost_depth_open_ground_m");
    let mb = s["cross_check"]["modified_berggren_frost_depth_m"]
        .as_f64()
        .unwrap();
    assert!(
        (open / mb - 1.0).abs() < 0.15,
        "open-ground frost {open} vs ModBerg {mb}"
    );
    assert!(num(&s, "frost_margin_m") > 0.0);
    assert!(num(&s, "energy_balance_error").abs() < 1e-3);
    assert!(s["spin_up_converged"].as_bool().unwrap());
    // Periodic year reached: the reported year's estimated heat-loss error against the periodic
    // year (RunResult::periodicity_heat_loss_kwh) is within the 0.5 % spin-up tolerance.
    let per = num(&s, "periodicity_error_heat_loss_kwh");
    assert!(per.abs() < 0.005 * num(&s, "annual_heat_loss_kwh"), "{per}");
    assert!(num(&s, "peak_heat_loss_w") > num(&s, "mean_heat_loss_w"));
    let kwh = num(&s, "annual_heat_loss_kwh");
    assert!((kwh - num(&s, "mean_heat_loss_w") * 8.76).abs() < 1e-6 * kwh);
    assert!((1..=365).contains(&(num(&s, "design_day_of_year") as i64)));
    // The design day as an ISO 8601 date without a year, the same in daily.csv's date column.
    let date = s["design_date"].as_str().unwrap();
    assert!(date.len() == 7 && date.starts_with("--"), "{date}");
    let daily_text = std::fs::read_to_string(out.join("daily.csv")).unwrap();
    let design_row = format!("{},{date},", num(&s, "design_day_of_year"));
    assert!(
        daily_text.lines().any(|l| l.starts_with(&design_row)),
        "{design_row}"
    );
    // Spring thaw starts at the surface (common practice): on some day the open ground's frozen
    // layer has thawed from the top (0 < top < bottom), as the frost-depth chart's band shows.
    let head: Vec<&str> = daily_text.lines().next().unwrap().split(',').collect();
    let col = |name: &str| head.iter().position(|h| *h == name).unwrap();
    let (top_c, bottom_c) = (
        col("frost_top_open_ground_m"),
        col("frost_depth_open_ground_m"),
    );
    assert!(daily_text.lines().skip(1).any(|l| {
        let v: Vec<&str> = l.split(',').collect();
        let top: f64 = v[top_c].parse().unwrap_or(f64::NAN);
        let bottom: f64 = v[bottom_c].parse().unwrap();
        top > 0.05 && bottom > top + 0.1
    }));
    // The monthly file sums to the annual loss.
    let monthly = std::fs::read_to_string(out.join("monthly.csv")).unwrap();
    let sum: f64 = monthly
        .lines()
        .filter(|l| !l.starts_with('#') && !l.starts_with("month"))
        .map(|l| l.split(',').nth(1).unwrap().parse::<f64>().unwrap())
        .sum();
    assert!(
        (sum - kwh).abs() < 0.01 * kwh,
        "monthly {sum} vs annual {kwh}"
    );
    // Probes: two columns of plausible ground temperatures.
    let probes = std::fs::read_to_string(out.join("probes.csv")).unwrap();
    let rows: Vec<&str> = probes.lines().filter(|l| !l.starts_with('#')).collect();
    assert_eq!(rows.len(), 366);
    assert!(rows[0].contains("below footing") && rows[0].contains("wing edge"));
    for r in &rows[1..] {
        for v in r.split(',').skip(1) {
            let t: f64 = v.parse().unwrap();
            assert!((-15.0..25.0).contains(&t), "probe {t}");
        }
    }
    assert!(stdout.contains("kWh") && stdout.contains("W/(m²K)"));
    crate::plots::check_plots(&out, &s);
    crate::plots::check_report(&out, &s);
    // The properties used, in summary.json and the report: every construction part, insulation
    // piece and soil stratum, the XPS at the library's 0.032 W/(m·K) and the soil freezing over
    // its interval.
    let mats = s["materials"].as_array().unwrap();
    let roles: Vec<&str> = mats.iter().map(|m| m["role"].as_str().unwrap()).collect();
    assert!(
        roles.contains(&"slab") && roles.contains(&"footing"),
        "{roles:?}"
    );
    assert!(roles.iter().any(|r| r.starts_with("soil 1")), "{roles:?}");
    let wing = mats
        .iter()
        .find(|m| m["role"] == "insulation[2] (wing)")
        .unwrap();
    assert_eq!(wing["k_unfrozen_w_per_mk"].as_f64(), Some(0.032));
    let soil = mats
        .iter()
        .find(|m| m["role"].as_str().unwrap().starts_with("soil 1"))
        .unwrap();
    assert!(soil["latent_heat_j_per_m3"].as_f64().unwrap() > 0.0);
    assert!(soil["freezing_interval_c"].is_array());
    let report = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(report.contains("Properties used") && report.contains("insulation[2] (wing)"));
    // The dimensioned sketch is drawn (check_plots validated every listed image) and embedded.
    let index = read_json(&out.join("plots.json"));
    assert!(index["plots"]
        .as_array()
        .unwrap()
        .iter()
        .any(|p| p["file"] == "foundation_sketch.svg"));
    assert!(report.contains("fig-foundation_sketch"));
    // Re-render from the saved results for another day and window, with the animation.
    let out_s = out.as_os_str();
    run_ok(&[
        "plot".as_ref(),
        out_s,
        "--day".as_ref(),
        "30".as_ref(),
        "--zoom".as_ref(),
        "-1.5,2.5,-0.3,2.2".as_ref(),
        "--animate".as_ref(),
    ]);
    let index = read_json(&out.join("plots.json"));
    assert_eq!(index["day_of_year"].as_u64(), Some(30));
    crate::plots::check_plots(&out, &s);
    assert!(out.join("soil_temperature.gif").exists());
    let res = bin()
        .args(["plot"])
        .arg(&out)
        .args(["--day", "400"])
        .output()
        .unwrap();
    assert_eq!(res.status.code(), Some(2));
}

/// The large depot (whole-floor insulation, no wing, footing at 1.2 m), shortened to at most two
/// spin-up years. Ranges: U between 0.1 and 0.3 W/(m²·K) (ISO 13370 without junction 0.129);
/// open-ground frost within ±25 % of modified Berggren (wider: the shortened spin-up); frost stays
/// above the 1.2 m footing base; energy balance within 0.1 %.
#[test]
fn marrow_flats_depot_shortened() {
    let (s, _, _) = run_example(
        "marrow-flats-depot",
        &["--quiet", "--max-spin-up-years", "2"],
    );
    let u = num(&s, "floor_u_value_w_per_m2k");
    assert!((0.1..0.3).contains(&u), "U {u}");
    let open = num(&s, "frost_depth_open_ground_m");
    let mb = s["cross_check"]["modified_berggren_frost_depth_m"]
        .as_f64()
        .unwrap();
    assert!(
        (open / mb - 1.0).abs() < 0.25,
        "open-ground frost {open} vs ModBerg {mb}"
    );
    assert!(num(&s, "frost_margin_m") > 0.0);
    assert!(num(&s, "energy_balance_error").abs() < 1e-3);
    assert!(num(&s, "spin_up_years") <= 2.0);
}

/// The heated-basement demo (2.4 m, exterior insulation on the upper half), shortened to two
/// spin-up years. Ranges: effective U between the ISO 13370 value for the same inputs (0.33, with
/// the partly insulated wall taken as a height-weighted U) and twice it, since the model includes
/// the lower, uninsulated wall's bypass; wall loss above floor loss (the uninsulated lower wall);
/// frost beside the wall shallower than open ground (the building warms it); energy balance.
#[test]
fn birch_lane_basement_shortened() {
    let (s, out, stdout) = run_example(
        "birch-lane-basement",
        &["--quiet", "--max-spin-up-years", "2"],
    );
    for k in [
        "wall_heat_loss_kwh",
        "floor_heat_loss_kwh",
        "wall_u_value_w_per_m2k",
        "basement_floor_u_value_w_per_m2k",
        "effective_u_value_w_per_m2k",
        "frost_depth_beside_wall_m",
    ] {
        assert!(s[k].is_number(), "basement key {k}");
    }
    let iso = s["cross_check"]["basement"]["iso13370_effective_u_value_w_per_m2k"]
        .as_f64()
        .unwrap();
    let ue = num(&s, "effective_u_value_w_per_m2k");
    assert!(ue > iso && ue < 2.0 * iso, "effective U {ue} vs ISO {iso}");
    assert!(num(&s, "wall_heat_loss_kwh") > num(&s, "floor_heat_loss_kwh"));
    // Ground loss = floor + wall below ground + the junction at ground level (the wall above
    // ground's faces minus its 1D part): the junction is a small share.
    let below = num(&s, "wall_heat_loss_kwh") + num(&s, "floor_heat_loss_kwh");
    let annual = num(&s, "annual_heat_loss_kwh");
    assert!(
        (annual - below).abs() < 0.15 * annual,
        "junction part {} of {annual} kWh",
        annual - below
    );
    assert!(num(&s, "frost_depth_beside_wall_m") < num(&s, "frost_depth_open_ground_m"));
    assert!(num(&s, "energy_balance_error").abs() < 1e-3);
    assert!(stdout.contains("Heated basement"));
    crate::plots::check_plots(&out, &s);
    crate::plots::check_report(&out, &s);
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(html.contains("effective U-value") && html.contains("basement wall U-value"));
}

/// The measured-series demo (36 winters), on the coarse mesh: every winter in winters.csv, the
/// worst reported, frost depths in a plausible band around modified Berggren for the coldest
/// winter, energy balance.
#[test]
fn kettle_hollow_series_coarse() {
    let (s, out, _) = run_example(
        "kettle-hollow-series",
        &["--quiet", "--mesh", "coarse", "--max-spin-up-years", "3"],
    );
    let winters = s["winters"].as_array().unwrap();
    assert_eq!(winters.len(), 35);
    let worst = winters
        .iter()
        .map(|w| w["frost_depth_open_ground_m"].as_f64().unwrap())
        .fold(0.0, f64::max);
    let reported = num(&s, "frost_depth_open_ground_m");
    assert!(reported <= worst + 1e-9);
    let mb = s["cross_check"]["modified_berggren_frost_depth_m"]
        .as_f64()
        .unwrap();
    assert!(
        worst > 0.6 * mb && worst < 1.4 * mb,
        "worst winter {worst} vs ModBerg {mb} for the coldest winter"
    );
    assert!(num(&s, "energy_balance_error").abs() < 1e-3);
    assert!(out.join("winters.csv").exists() && out.join("winters.png").exists());
    // Measured days carry their calendar dates (ISO 8601 YYYY-MM-DD) in daily.csv, one day apart,
    // and the design date is the design day's date with its year.
    let daily = std::fs::read_to_string(out.join("daily.csv")).unwrap();
    let dates: Vec<i64> = daily
        .lines()
        .skip(1)
        .map(|l| {
            let d = l.split(',').nth(1).unwrap();
            assert_eq!(d.len(), 10, "{d}");
            frostline::physics::climate::calendar::parse_date(d).unwrap()
        })
        .collect();
    assert!(dates.windows(2).all(|w| w[1] == w[0] + 1));
    let design = s["design_date"].as_str().unwrap();
    let dn = frostline::physics::climate::calendar::parse_date(design).unwrap();
    assert!(dates.contains(&dn), "{design}");
    assert_eq!(
        frostline::physics::climate::day_of_year(dn) as f64,
        num(&s, "design_day_of_year")
    );
    crate::plots::check_plots(&out, &s);
}

/// The 3D demo (Alder Bend house, corner boards) on the coarse mesh, every 3D file and plot.
/// Checks: the 2D keys as for every example; energy balance and periodic state of the 3D run;
/// the corner's frost at the footing face at least the mid-wall's (a convex corner loses heat
/// through two faces: the reason the issue asks for the corner check); the whole-building loss
/// against the ISO 13370 equivalent strip (2D × P) in [1.00, 1.06]. The band is ours, not a
/// published one: corners add heat flow, so the ratio exceeds 1 (tests/three_d.rs shows the
/// excess falling as the corners' share of the perimeter falls); 6 % is about 1.5 times the
/// largest excess measured on this demo (coarse 2.2 %, normal 2.8 %, without corner boards
/// 4.1 %).
#[test]
fn alder_bend_house_3d_coarse() {
    let (s, out, stdout) = run_example("alder-bend-house-3d", &["--quiet", "--mesh", "coarse"]);
    let t = &s["three_d"];
    let n = |v: &Value| v.as_f64().unwrap();
    let ratio = n(&t["annual_heat_loss_ratio_3d_to_2d"]);
    assert!((1.0..1.06).contains(&ratio), "3D / strip {ratio}");
    assert!(n(&t["energy_balance_error"]).abs() < 1e-6);
    assert!(t["spin_up_converged"].as_bool().unwrap());
    assert!(n(&t["corner"]["face_m"]) >= n(&t["mid_long_wall"]["face_m"]));
    assert!(n(&t["corner"]["face_m"]) >= n(&t["mid_short_wall"]["face_m"]));
    let kwh = n(&t["headline"]["annual_heat_loss_kwh"]);
    assert!((kwh - n(&t["headline"]["mean_heat_loss_w"]) * 8.76).abs() < 1e-6 * kwh);
    assert!(stdout.contains("3D model"), "terminal lacks the 3D block");
    for f in [
        "daily_3d.csv",
        "monthly_3d.csv",
        "perimeter.csv",
        "plan_frost.csv",
        "three_d.json",
        "plan_frost.png",
        "perimeter_frost.png",
        "section_mid_wall.png",
        "section_corner_diagonal.png",
    ] {
        assert!(out.join(f).exists(), "{f} missing");
    }
    // The perimeter file runs from mid long wall through the corner to mid short wall.
    let per = std::fs::read_to_string(out.join("perimeter.csv")).unwrap();
    let walls: Vec<&str> = per
        .lines()
        .filter(|l| !l.starts_with('#') && !l.starts_with("wall"))
        .map(|l| l.split(',').next().unwrap())
        .collect();
    assert_eq!(walls.first(), Some(&"long"));
    assert_eq!(walls.last(), Some(&"short"));
    assert_eq!(walls.iter().filter(|w| **w == "corner").count(), 1);
    let report = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(report.contains("id=\"three-d\"") && report.contains("fig-plan_frost"));

    // The frozen layer's top (ground thawing from the surface in spring): recorded in 3D as in
    // 2D, never below the layer's bottom, and in open ground (one-dimensional far from the
    // building: both models solve the same column) within 0.15 m of the 2D section's on the
    // same day. Not closer: the 3D grid is one fineness step coarser, and the two open-ground
    // depths differ by up to 0.29 m on the same day (measured; tops by up to 0.12 m, late in
    // the thaw when the top moves 2-4 cm a day).
    let rows = |name: &str| -> Vec<Vec<String>> {
        std::fs::read_to_string(out.join(name))
            .unwrap()
            .lines()
            .filter(|l| !l.starts_with('#') && !l.starts_with("day_of_year"))
            .map(|l| l.split(',').map(String::from).collect())
            .collect()
    };
    let (d3, d2) = (rows("daily_3d.csv"), rows("daily.csv"));
    let opt = |v: &str| (!v.is_empty()).then(|| v.parse::<f64>().unwrap());
    let mut thawed_from_above = 0;
    for r in &d3 {
        for (depth, top) in [(5, 11), (6, 12)] {
            let d: f64 = r[depth].parse().unwrap();
            match opt(&r[top]) {
                Some(t) => assert!(d > 0.0 && (0.0..=d).contains(&t), "{r:?}"),
                None => assert_eq!(d, 0.0, "{r:?}"),
            }
        }
        if let Some(t) = opt(&r[11]).filter(|&t| t > 0.1) {
            let two = d2
                .iter()
                .find(|x| x[0] == r[0])
                .expect("the same day in 2D");
            // (The 2D ground, frozen less deep, may have thawed through already.)
            if let Some(t2) = opt(&two[11]) {
                assert!((t - t2).abs() < 0.15, "day {}: 3D {t} 2D {t2}", r[0]);
                thawed_from_above += 1;
            }
        }
    }
    assert!(thawed_from_above > 10, "{thawed_from_above}");

    // The linear solver is recorded and reported; a summary.json written before the record
    // existed reads as the only solver then (incomplete Cholesky) and still re-renders.
    assert_eq!(t["solver_3d"], "incomplete_cholesky");
    assert!(report.contains("linear solver incomplete_cholesky"));
    let old = crate::cli::scratch("alder-3d-old-summary");
    copy_files(&out, &old);
    let mut sv: Value =
        serde_json::from_str(&std::fs::read_to_string(old.join("summary.json")).unwrap()).unwrap();
    sv["three_d"].as_object_mut().unwrap().remove("solver_3d");
    std::fs::write(old.join("summary.json"), sv.to_string()).unwrap();
    crate::common::run_ok(&["plot".as_ref(), old.as_os_str()]);
    let report_old = std::fs::read_to_string(old.join("report.html")).unwrap();
    assert!(report_old.contains("linear solver incomplete_cholesky"));

    // The same results as a US-units run would show them: `plot` re-renders from the saved
    // files in the units summary.json records (1 ft = 0.3048 m, °F = 1.8 °C + 32).
    let us = crate::cli::scratch("alder-3d-us");
    copy_files(&out, &us);
    let summary = std::fs::read_to_string(us.join("summary.json")).unwrap();
    let summary = summary.replacen("\"units\": \"si\"", "\"units\": \"us\"", 1);
    assert!(summary.contains("\"units\": \"us\""));
    std::fs::write(us.join("summary.json"), summary).unwrap();
    crate::common::run_ok(&["plot".as_ref(), us.as_os_str()]);
    let svg = |n: &str| std::fs::read_to_string(us.join(n)).unwrap();
    let plan = svg("plan_frost.svg");
    assert!(plan.contains("X (ft) along the length") && plan.contains("depth below ground (ft)"));
    let base_ft = format!("({:.2} ft)", num(&s, "footing_base_depth_m") / 0.3048);
    assert!(plan.contains(&base_ft), "{base_ft}");
    let per = svg("perimeter_frost.svg");
    assert!(per.contains("frost margin (ft)") && !per.contains("(m)"));
    for name in ["section_mid_wall.svg", "section_corner_diagonal.svg"] {
        let sec = svg(name);
        assert!(
            sec.contains("depth z (ft) below ground") && sec.contains("°F") && !sec.contains("°C")
        );
    }
    let html = std::fs::read_to_string(us.join("report.html")).unwrap();
    assert!(html.contains("<td>ft</td>") && html.contains("Btu/(h·°F)"));

    // The bearing level: the footing base here (no board under the footing). A footing bearing
    // on a board is drawn at the board's underside (the top of the protected zone, as the 3D
    // margin measures it): re-rendered from the saved files with a 0.10 m board recorded.
    let tj = std::fs::read_to_string(out.join("three_d.json")).unwrap();
    let v: Value = serde_json::from_str(&tj).unwrap();
    let base = num(&s, "footing_base_depth_m");
    assert_eq!(v["bearing_depth_m"].as_f64(), Some(base));
    let plan = std::fs::read_to_string(out.join("plan_frost.svg")).unwrap();
    assert!(plan.contains(&format!("frost as deep as the footing base ({base:.2} m)")));
    let board = crate::cli::scratch("alder-3d-board");
    for e in std::fs::read_dir(&out).unwrap() {
        let p = e.unwrap().path();
        if p.is_file() {
            std::fs::copy(&p, board.join(p.file_name().unwrap())).unwrap();
        }
    }
    let mut v = v;
    // (The demo's deepest frost passes 0.10 m below its footing base, so the plan has this
    // contour.)
    v["bearing_depth_m"] = (base + 0.10).into();
    std::fs::write(board.join("three_d.json"), v.to_string()).unwrap();
    crate::common::run_ok(&["plot".as_ref(), board.as_os_str()]);
    let level = format!("({:.2} m)", base + 0.10);
    let plan = std::fs::read_to_string(board.join("plan_frost.svg")).unwrap();
    assert!(plan.contains(&format!(
        "frost as deep as the bearing level, under the board {level}"
    )));
    let per = std::fs::read_to_string(board.join("perimeter_frost.svg")).unwrap();
    assert!(per.contains(&format!("bearing level, under the board {level}")));
    assert!(per.contains(&format!("footing base ({base:.2} m)")));
    // A three_d.json written before the bearing level was recorded reads as the footing base.
    v.as_object_mut().unwrap().remove("bearing_depth_m");
    std::fs::write(board.join("three_d.json"), v.to_string()).unwrap();
    crate::common::run_ok(&["plot".as_ref(), board.as_os_str()]);
    let plan = std::fs::read_to_string(board.join("plan_frost.svg")).unwrap();
    assert!(plan.contains(&format!("frost as deep as the footing base ({base:.2} m)")));
    let per = std::fs::read_to_string(board.join("perimeter_frost.svg")).unwrap();
    assert!(!per.contains("bearing level"));
}

/// Copy the files (not the folders) of `from` into `to`.
fn copy_files(from: &Path, to: &Path) {
    for e in std::fs::read_dir(from).unwrap() {
        let p = e.unwrap().path();
        if p.is_file() {
            std::fs::copy(&p, to.join(p.file_name().unwrap())).unwrap();
        }
    }
}
