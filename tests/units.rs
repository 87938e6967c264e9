//! US customary units in the case file: the same building in SI and US units gives the same
//! results, errors name the user's key, value and allowed range in the user's unit, and a design
//! freezing index with a mean temperature (or a thawing index) is a climate.
use frostline::case::parse_case;
use serde_json::Value;
use std::path::Path;

fn example(name: &str) -> String {
    std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("examples")
            .join(name),
    )
    .unwrap()
}

/// Every number of `a` equals `b`'s to 1e-9 relative plus 1e-9 absolute (round-off: energy
/// balances of 1e-16, solver residuals), recursively; strings, the provenance and the wall-clock
/// time may differ.
fn same_numbers(a: &Value, b: &Value, path: &str, diffs: &mut Vec<String>) {
    match (a, b) {
        (Value::Number(x), Value::Number(y)) => {
            let (x, y) = (x.as_f64().unwrap(), y.as_f64().unwrap());
            if (x - y).abs() > 1e-9 * x.abs().max(y.abs()) + 1e-9 {
                diffs.push(format!("{path}: {x} vs {y}"));
            }
        }
        (Value::Object(x), Value::Object(y)) => {
            for (k, v) in x {
                if k != "provenance" && k != "wall_time_s" {
                    same_numbers(v, &y[k], &format!("{path}.{k}"), diffs);
                }
            }
        }
        (Value::Array(x), Value::Array(y)) if x.len() == y.len() => {
            for (k, (v, w)) in x.iter().zip(y).enumerate() {
                same_numbers(v, w, &format!("{path}[{k}]"), diffs);
            }
        }
        (Value::Array(_), Value::Array(_)) => diffs.push(format!("{path}: lengths differ")),
        _ => {}
    }
}

/// examples/tamarack-flats-house-us.toml and its SI twin (values converted by the exact
/// definitions of the inch, foot and degree Fahrenheit and NIST SP 811's R-value factor) give
/// the same summary.json numbers and the same daily.csv, to rounding.
#[test]
fn us_and_si_examples_give_the_same_results() {
    let mut summaries = Vec::new();
    let mut dailies = Vec::new();
    for f in ["us", "si"] {
        let out = crate::cli::scratch(&format!("units-{f}"));
        let case = Path::new(env!("CARGO_MANIFEST_DIR"))
            .join(format!("examples/tamarack-flats-house-{f}.toml"));
        summaries.push(crate::common::single_run(&case, &out));
        dailies.push(std::fs::read_to_string(out.join("daily.csv")).unwrap());
    }
    let mut diffs = Vec::new();
    same_numbers(&summaries[0], &summaries[1], "summary", &mut diffs);
    assert!(diffs.is_empty(), "{diffs:#?}");
    assert_eq!(dailies[0], dailies[1]);
    // The climate: 2,500 °F·d is 2500 × 5/9 = 1,388.9 °C·d (NIST SP 811: 1 °F = 5/9 K), and the
    // amplitude solved for it reproduces it through the sinusoid's closed-form index.
    for s in &summaries {
        let fi = s["design_winter"]["freezing_index_c_days"]
            .as_f64()
            .unwrap();
        assert!((fi - 2500.0 * 5.0 / 9.0).abs() < 1e-9, "{fi}");
        let fi = s["cross_check"]["freezing_index_c_days"].as_f64().unwrap();
        assert!((fi - 2500.0 * 5.0 / 9.0).abs() < 1e-6, "{fi}");
    }
}

/// A value in a US unit out of range is named as the user wrote it: key, value, allowed range
/// in that unit (1 m = 39.37 in; 0.1 °C = 32.18 °F, 30 °C = 86 °F by t/°F = 1.8 t/°C + 32), at
/// the user's line and column.
#[test]
fn us_errors_name_the_users_unit() {
    let src = example("tamarack-flats-house-us.toml");
    let bad = src.replace("[slab]\nthickness_in = 4.0", "[slab]\nthickness_in = 100");
    let line = bad.lines().position(|l| l == "thickness_in = 100").unwrap() + 1;
    let e = parse_case("us.toml", &bad).unwrap_err().to_string();
    assert_eq!(
        e,
        format!("us.toml:{line}:16: slab.thickness_in: 100 in is out of range; allowed: greater than 0 and at most 39.37 in")
    );
    let bad = src.replace("mean_f = 40.0 ", "mean_f = 20.0 ");
    let e = parse_case("us.toml", &bad).unwrap_err().to_string();
    assert!(
        e.contains("climate.mean_f: 20.0 °F is out of range; allowed: 32.18 to 86 °F"),
        "{e}"
    );
    // A missing quantity names its US keys too.
    let bad = src.replace("[slab]\nthickness_in = 4.0\n", "[slab]\n");
    let e = parse_case("us.toml", &bad).unwrap_err().to_string();
    assert!(
        e.contains("missing field `thickness_m` (or in US units: thickness_ft, thickness_in)"),
        "{e}"
    );
    // A misspelt US key is named as written.
    let bad = src.replace("[slab]\nthickness_in", "[slab]\nthicknes_in");
    let e = parse_case("us.toml", &bad).unwrap_err().to_string();
    assert!(
        e.contains("slab.thicknes_in: unknown field `thicknes_in`"),
        "{e}"
    );
    // A design index whose sinusoid needs more than the 30 K a given amplitude may have.
    let bad = src
        .replace("mean_f = 40.0 ", "mean_f = 45.0 ")
        .replace("_f_days = 2500.0", "_f_days = 6000.0");
    let e = parse_case("us.toml", &bad).unwrap_err().to_string();
    assert!(e.contains("needs an annual amplitude of 39.37 K"), "{e}");
    // One unit per key.
    let bad = src.replace("[wall]\n", "[wall]\nthickness_m = 0.2\n");
    let e = parse_case("us.toml", &bad).unwrap_err().to_string();
    assert!(e.contains("given in two units"), "{e}");
    // A syntax error after a converted value is still located in the user's text.
    let bad = src.replace("material = \"gravel\"", "material = gravel");
    let line = bad.lines().position(|l| l == "material = gravel").unwrap() + 1;
    let e = parse_case("us.toml", &bad).unwrap_err().to_string();
    assert!(e.starts_with(&format!("us.toml:{line}:")), "{e}");
}

/// A design freezing index with a mean temperature is a climate: the amplitude is the one whose
/// sinusoid has that index (closed form, methods::sinusoid_freezing_index); with a thawing index
/// instead of the mean, θ_m = (I_T − I_F)/365 d (∫θ dt over a year = I_T − I_F).
#[test]
fn design_freezing_index_climates() {
    let src = example("tamarack-flats-house-si.toml");
    let c = parse_case("si.toml", &src).unwrap();
    let (fi, _) =
        frostline::methods::sinusoid_freezing_index(c.climate.mean_c, c.climate.amplitude_k);
    assert!((fi - 2500.0 / 1.8).abs() < 1e-6, "{fi}");
    assert_eq!(c.climate.coldest_day, 15.0);
    let ti = 1388.888888888889 + 365.0 * 4.444444444444445;
    let by_ti = src.replace(
        "mean_c = 4.444444444444445 ",
        &format!("thawing_index_c_days = {ti} "),
    );
    let c2 = parse_case("si.toml", &by_ti).unwrap();
    assert!((c2.climate.mean_c - 4.444444444444445).abs() < 1e-9);
    assert!((c2.climate.amplitude_k - c.climate.amplitude_k).abs() < 1e-9);
    // Both the mean and a thawing index: refused.
    let both = src.replace(
        "mean_c = 4.444444444444445 ",
        &format!("thawing_index_c_days = {ti}\nmean_c = 4.444444444444445 "),
    );
    let e = parse_case("si.toml", &both).unwrap_err().to_string();
    assert!(e.contains("one of mean_c and thawing_index_c_days"), "{e}");
}

/// `--units us`: summary.json and the CSV files stay in SI; summary_us.json and NAME_us.csv
/// beside them carry US keys and values (1 ft = 0.3048 m, 1 kWh = 3.412 142 kBtu, t/°F =
/// 1.8 t/°C + 32: NIST SP 811 B.9), and the terminal table and the report show US units with the
/// same figures.
#[test]
fn results_in_us_units() {
    let out = crate::cli::scratch("units-out");
    let case = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/tamarack-flats-house-us.toml");
    let stdout = crate::common::run_ok(&[
        "run".as_ref(),
        case.as_os_str(),
        "--out".as_ref(),
        out.as_os_str(),
        "--mesh".as_ref(),
        "coarse".as_ref(),
        "--quiet".as_ref(),
        "--units".as_ref(),
        "us".as_ref(),
    ]);
    let si = crate::common::read_json(&out.join("summary.json"));
    let us = crate::common::read_json(&out.join("summary_us.json"));
    let n = |v: &Value, k: &str| v[k].as_f64().unwrap_or_else(|| panic!("{k}"));
    let close = |a: f64, b: f64| (a - b).abs() <= 1e-9 * a.abs().max(1.0);
    assert!(close(
        n(&us, "frost_margin_ft"),
        n(&si, "frost_margin_m") / 0.3048
    ));
    // 1 kWh = 3.6 MJ / 1.055 055 852 62 kJ per Btu_IT = 3.412 142 kBtu (to 7 digits).
    let kbtu = n(&si, "annual_heat_loss_kwh") * 3.6e6 / 1_055_055.852_62;
    assert!((n(&us, "annual_heat_loss_kbtu") - kbtu).abs() < 1e-6 * kbtu);
    assert!(close(
        n(&us, "mean_outdoor_temperature_f"),
        n(&si, "mean_outdoor_temperature_c") * 1.8 + 32.0
    ));
    assert!(si.get("frost_margin_ft").is_none() && us.get("frost_margin_m").is_none());
    let daily = std::fs::read_to_string(out.join("daily_us.csv")).unwrap();
    let head = daily.lines().next().unwrap();
    assert!(head.contains("frost_depth_open_ground_ft") && head.contains("outdoor_temperature_f"));
    assert!(std::fs::read_to_string(out.join("daily.csv"))
        .unwrap()
        .starts_with("day_of_year,date,outdoor_temperature_c"));
    // The table: the footing base 16 in = 1.33 ft, the margin in ft as in summary_us.json.
    let base = stdout
        .lines()
        .find(|l| l.trim_start().starts_with("footing base"))
        .unwrap();
    assert!(
        base.contains(" ft ") && base.trim_end().ends_with("1.33"),
        "{base}"
    );
    let margin = format!("{:.2}", n(&us, "frost_margin_ft"));
    assert!(stdout
        .lines()
        .any(|l| l.contains("margin") && l.trim_end().ends_with(&margin)));
    assert!(stdout.contains("kBtu") && stdout.contains("Btu/(h·ft²·°F)"));
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(
        html.contains(&format!("<td class=n>{margin}</td>")),
        "report margin {margin}"
    );
    assert!(html.contains("<td>Btu/(h·ft²·°F)</td>"));
    assert!(html.contains("<th>ground heat loss (kBtu)</th>"));
    // The charts' axes in US units.
    let svg = |n: &str| std::fs::read_to_string(out.join(n)).unwrap();
    assert!(svg("frost_depth.svg").contains("frost depth below ground (ft)"));
    assert!(svg("frost_depth.svg").contains("footing base (1.33 ft)"));
    assert!(svg("heat_loss.svg").contains("ground heat loss (kBtu per month)"));
    assert!(svg("heat_loss.svg").contains("mean outdoor temperature (°F)"));
    // The field plots and the sketch: lengths in ft, temperatures in °F (the frost line at
    // −0.25 °C = 31.55 °F); nothing left in metres or °C.
    for name in ["soil_temperature.svg", "soil_temperature_zoom.svg"] {
        let s = svg(name);
        assert!(s.contains("depth z (ft) below ground") && s.contains("x (ft), 0 at the wall"));
        assert!(s.contains("frost line (31.55 °F)") && !s.contains("°C") && !s.contains("(m)"));
    }
    let sketch = svg("foundation_sketch.svg");
    assert!(sketch.contains("footing base 1.33 ft (16.0 in)"), "sketch");
    assert!(sketch.contains("z depth below ground (ft)") && !sketch.contains("(m)"));
    // The saved frost line stays in metres (a data file, SI like the other CSVs).
    let day = n(&si, "design_day_of_year") as usize;
    let line = std::fs::read_to_string(out.join(format!("frost_line_{day:03}.csv"))).unwrap();
    assert!(line.contains("x_m,z_m"));
    let deepest = line
        .lines()
        .skip(1)
        .filter_map(|l| l.split(',').nth(2)?.parse::<f64>().ok())
        .fold(0.0, f64::max);
    // The zoomed view's line: frozen ground, never deeper than open ground's frost (in feet it
    // would be 3.28 times deeper).
    let open = n(&si, "frost_depth_open_ground_m");
    assert!(
        deepest > 0.3 && deepest <= open + 0.01,
        "frost line {deepest} m vs {open} m"
    );
}

/// An unheated building: no heat-loss figures and none of the heated-floor cross-checks (ISO
/// 13370 covers heated floors: its U and Ψ_g are not shown), in the table or the report; the frost
/// rows and their open-ground cross-checks (Stefan, modified Berggren) stay.
#[test]
fn unheated_buildings_show_no_heated_floor_checks() {
    let out = crate::cli::scratch("unheated-table");
    let case = out.join("unheated.toml");
    std::fs::write(
        &case,
        example("kettle-hollow-house.toml").replace(
            "indoor_temperature_c = 20.0",
            "unheated = true\n# indoor_temperature_c = 20.0",
        ),
    )
    .unwrap();
    let o = crate::cli::bin()
        .args([
            "run".as_ref(),
            case.as_os_str(),
            "--out".as_ref(),
            out.as_os_str(),
        ])
        .args(["--mesh", "coarse", "--quiet"])
        .output()
        .unwrap();
    // Exit 0 or 3 (the unheated footing's frost criterion may fail); the table is printed either way.
    assert!(matches!(o.status.code(), Some(0 | 3)), "{o:?}");
    let stdout = String::from_utf8_lossy(&o.stdout);
    assert!(stdout.contains("Unheated building"), "{stdout}");
    assert!(
        !stdout.contains("model      ISO 13370") && !stdout.contains("floor U-value"),
        "{stdout}"
    );
    assert!(stdout.contains("mod. Berggren") && stdout.contains("open ground"));
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(!html.contains("floor U-value") && !html.contains("id=\"monthly\""));
    assert!(html.contains("Unheated building"));
}

/// A board given by its R-value: thickness = R λ (ISO 6946 §6.7.1, R = d/λ). R-10
/// (h·ft²·°F/Btu) of the library's XPS (λ 0.032 W/(m·K)) is 10 × 0.176 110 2 × 0.032 m; the
/// same case with that thickness validates to the same piece. Thickness and R together are
/// refused.
#[test]
fn boards_by_r_value() {
    let src = example("tamarack-flats-house-us.toml");
    let wing = "kind = \"wing\"\nthickness_in = 2.0";
    assert!(src.contains(wing));
    let by_r = src.replace(
        wing,
        "kind = \"wing\"\nthermal_resistance_h_ft2_f_per_btu = 10",
    );
    let c = parse_case("r.toml", &by_r).unwrap();
    let d = 10.0 * 0.176_110_2 * 0.032;
    assert!(
        (c.insulation[2].thickness_m - d).abs() < 1e-12,
        "{}",
        c.insulation[2].thickness_m
    );
    let by_d = src.replace(wing, &format!("kind = \"wing\"\nthickness_m = {d}"));
    let c2 = parse_case("d.toml", &by_d).unwrap();
    assert_eq!(
        format!("{:?}", c2.insulation),
        format!("{:?}", c.insulation)
    );
    let both = src.replace(wing, &format!("{wing}\nthermal_resistance_m2k_per_w = 1.0"));
    let e = parse_case("b.toml", &both).unwrap_err().to_string();
    assert!(e.contains("given with thermal_resistance_m2k_per_w"), "{e}");
}

/// A wing by the board's own width: `board_width_in = 38` behind 2 in of outside vertical
/// insulation ends where `width_in = 40` does (outer end 40 in from the wall's face); both keys
/// together are refused.
#[test]
fn wing_by_board_width() {
    let src = example("tamarack-flats-house-us.toml");
    let w = "width_in = 40.0 ";
    assert!(src.contains(w));
    let c = parse_case("a.toml", &src).unwrap();
    let c2 = parse_case("b.toml", &src.replace(w, "board_width_in = 38.0 ")).unwrap();
    assert_eq!(
        format!("{:?}", c.insulation),
        format!("{:?}", c2.insulation)
    );
    let both = src.replace(w, "board_width_in = 38.0\nwidth_in = 40.0 ");
    let e = parse_case("c.toml", &both).unwrap_err().to_string();
    assert!(e.contains("width_in: given with board_width_m"), "{e}");
}

/// Sizing sets a varied board's dimension in the case text: a wing given in inches, by R-value
/// or by its board width builds the same design as the SI case (the edited quantity replaces
/// every other spelling of it instead of colliding with it).
#[test]
fn sizing_edits_a_quantity_given_another_way() {
    let si = example("kettle-hollow-sizing.toml");
    let design = |src: &str| {
        let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/x.toml");
        let c = parse_case(&path.display().to_string(), src).unwrap();
        let vary = &c.sizing.as_ref().unwrap().vary;
        let values: Vec<f64> = vary.iter().map(|v| 0.5 * (v.min + v.max)).collect();
        let d = frostline::design::apply(&c, vary, &values).unwrap();
        format!("{:?}", d.insulation)
    };
    let want = design(&si);
    for (from, to) in [
        (
            "thickness_m = 0.05\nmaterial = \"xps\"\ndepth",
            "thickness_in = 2.0\nmaterial = \"xps\"\ndepth",
        ),
        (
            "thickness_m = 0.05\nmaterial = \"xps\"\ndepth",
            "thermal_resistance_m2k_per_w = 1.5\nmaterial = \"xps\"\ndepth",
        ),
        ("width_m = 1.00 ", "board_width_m = 0.95 "),
    ] {
        assert!(si.contains(from), "{from}");
        assert_eq!(design(&si.replace(from, to)), want, "{to}");
    }
}

/// A board under the footing: its reach past the footing's edges in inches equals the same in
/// metres (1 in = 0.0254 m exactly), it spans the footing's base (top face at the base, the
/// footing's width plus both reaches), keys of other kinds are refused on it and its keys on
/// other kinds, and `size` may vary its outward reach.
#[test]
fn board_under_the_footing() {
    let src = example("sedge-point-storehouse.toml");
    let parse = |s: &str| parse_case("sedge.toml", s);
    let si = parse(&src).unwrap();
    let us = parse(
        &src.replace(
            "past_outer_edge_m = 1.20",
            "past_outer_edge_in = 47.244094488",
        )
        .replace(
            "past_inner_edge_m = 0.60",
            "past_inner_edge_ft = 1.968503937",
        ),
    )
    .unwrap();
    let rect = |c: &frostline::case::Case| c.insulation_rect(2);
    let (a, b) = (rect(&si), rect(&us));
    for (x, y) in [(a.x0, b.x0), (a.x1, b.x1), (a.z0, b.z0), (a.z1, b.z1)] {
        assert!((x - y).abs() < 1e-9, "{a:?} {b:?}");
    }
    // Footing x ∈ [−0.40, 0], base 0.40 m; the board 0.10 m thick, 0.60 m in and 1.20 m out.
    assert!((a.x0 + 1.0).abs() < 1e-12 && (a.x1 - 1.2).abs() < 1e-12);
    assert!((a.z0 - 0.40).abs() < 1e-12 && (a.z1 - 0.50).abs() < 1e-12);
    assert!((si.board_under_footing_m() - 0.10).abs() < 1e-12);

    let e = parse(&src.replace(
        "past_inner_edge_m = 0.60 ",
        "depth_m = 0.3\npast_inner_edge_m = 0.60 ",
    ))
    .unwrap_err()
    .to_string();
    assert!(
        e.contains("insulation[2].depth_m") && e.contains("not used by under_footing"),
        "{e}"
    );
    let e = parse(&src.replace(
        "bottom_depth_m = 0.40 ",
        "past_outer_edge_m = 0.5\nbottom_depth_m = 0.40 ",
    ))
    .unwrap_err()
    .to_string();
    assert!(e.contains("insulation[1].past_outer_edge_m"), "{e}");

    let sized = parse(&format!(
        "{src}\n[sizing]\nmargin_m = 0.0\n[[sizing.vary]]\ninsulation = 2\ndimension = \"past_outer_edge_m\"\nmin = 0.3\nmax = 1.5\nstep = 0.1\n"
    ))
    .unwrap();
    let vary = &sized.sizing.as_ref().unwrap().vary;
    let d = frostline::design::apply(&sized, vary, &[0.7]).unwrap();
    assert!((d.insulation_rect(2).x1 - 0.7).abs() < 1e-9);
    // Sizing bounds in inches, an error named as written.
    let e = parse(&format!(
        "{src}\n[sizing]\nmargin_m = 0.0\n[[sizing.vary]]\ninsulation = 2\ndimension = \"past_outer_edge_m\"\nmin_in = -1\nmax_ft = 5\nstep_in = 4\n"
    ))
    .unwrap_err()
    .to_string();
    assert!(
        e.contains("sizing.vary[0].min_in: -1 in is out of range"),
        "{e}"
    );
}

/// Errors that compare one quantity with others name every length in the unit the user wrote the
/// offending one in (1 in = 0.0254 m exactly): a footing narrower than the wall, a wall cut below
/// the floor surface.
#[test]
fn cross_field_errors_in_the_users_unit() {
    let src = example("tamarack-flats-house-us.toml");
    let e = parse_case("us.toml", &src.replace("width_in = 16.0", "width_in = 6.0"))
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("footing.width_in: 6 in is narrower than the wall (8 in)"),
        "{e}"
    );
    let e = parse_case(
        "us.toml",
        &src.replace(
            "height_above_ground_in = 12.0",
            "height_above_ground_ft = 0.25",
        ),
    )
    .unwrap_err()
    .to_string();
    assert!(
        e.contains("0.25 ft is below the floor surface (0.6667 ft above ground)"),
        "{e}"
    );
}
