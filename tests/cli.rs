//! The command-line interface: exit codes, error messages for bad input, help text.
use crate::common::run_ok;
use std::path::PathBuf;
use std::process::Command;

pub fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_frostline"))
}

pub fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("frostline-test-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

const VALID: &str = r#"name = "test house"
[building]
floor_area_m2 = 100.0
exposed_perimeter_m = 40.0
indoor_temperature_c = 20.0
[slab]
thickness_m = 0.1
top_above_ground_m = 0.1
[wall]
thickness_m = 0.2
height_above_ground_m = 0.3
[footing]
width_m = 0.4
thickness_m = 0.2
base_depth_m = 0.6
[[insulation]]
kind = "wing"
thickness_m = 0.05
material = "xps"
depth_m = 0.3
width_m = 1.0
[[soil]]
library = "sand"
[climate]
mean_c = 3.0
amplitude_k = 14.0
coldest_day = 20
"#;

/// Write `src` as a case file, run `frostline check` on it; (exit code, stderr).
fn check(name: &str, src: &str) -> (i32, String, PathBuf) {
    let dir = scratch(name);
    let path = dir.join("case.toml");
    std::fs::write(&path, src).unwrap();
    let out = bin().arg("check").arg(&path).output().unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stderr).to_string(),
        path,
    )
}

fn expect_input_error(name: &str, src: &str, line: usize, key: &str, words: &[&str]) {
    assert_ne!(src, VALID, "{name}: the mutation did not apply");
    let (code, err, path) = check(name, src);
    assert_eq!(code, 2, "{name}: exit code {code}, stderr {err}");
    let loc = format!("{}:{line}:", path.display());
    assert!(
        err.contains(&loc),
        "{name}: expected location {loc} in: {err}"
    );
    assert!(err.contains(key), "{name}: expected key {key} in: {err}");
    for w in words {
        assert!(err.contains(w), "{name}: expected '{w}' in: {err}");
    }
    assert!(!err.contains("panicked"), "{name}: {err}");
}

#[test]
fn valid_case_checks_and_prints_mesh() {
    let (code, _, path) = check("valid", VALID);
    assert_eq!(code, 0);
    let out = bin().arg("check").arg(&path).output().unwrap();
    let s = String::from_utf8_lossy(&out.stdout);
    assert!(
        s.contains("solid cells") && s.contains("B' = 5.000 m") && s.contains("ISO 13370"),
        "{s}"
    );
}

#[test]
fn misspelt_key() {
    let src = VALID.replace("thickness_m = 0.1\ntop", "thicknes_m = 0.1\ntop");
    expect_input_error(
        "misspelt",
        &src,
        7,
        "slab.thicknes_m",
        &["unknown field", "thickness_m"],
    );
}

/// A number where an integer belongs: the key is named, not the value (hardening finding 7).
#[test]
fn fractional_count_names_its_key() {
    let src = VALID.replace(
        "name = \"test house\"\n",
        "name = \"test house\"\n[simulation]\nmax_spin_up_years = 2.5\n",
    );
    let (code, err, _) = check("fraction", &src);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("simulation.max_spin_up_years"), "{err}");
    assert!(!err.contains("simulation.2.5"), "{err}");
}

/// A case file that does not exist is a usage error: exit 2 with the file named (hardening
/// finding 15).
#[test]
fn missing_case_file_exits_2() {
    let out = bin()
        .args(["check", "/nonexistent/case.toml"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("/nonexistent/case.toml"));
}

#[test]
fn wrong_type() {
    let src = VALID.replace("base_depth_m = 0.6", "base_depth_m = \"deep\"");
    expect_input_error(
        "type",
        &src,
        15,
        "footing.base_depth_m",
        &["invalid type", "\"deep\""],
    );
}

#[test]
fn zero_thickness() {
    let src = VALID.replace(
        "[footing]\nwidth_m = 0.4\nthickness_m = 0.2",
        "[footing]\nwidth_m = 0.4\nthickness_m = 0.0",
    );
    expect_input_error(
        "zero",
        &src,
        14,
        "footing.thickness_m",
        &["0 m is out of range", "greater than 0"],
    );
}

#[test]
fn negative_conductivity() {
    let src = VALID.replace("material = \"xps\"", "conductivity_w_per_mk = -0.03");
    expect_input_error(
        "negk",
        &src,
        19,
        "insulation[0].conductivity_w_per_mk",
        &["-0.03", "greater than 0"],
    );
}

#[test]
fn insulation_overlapping_the_slab() {
    let src = VALID.replace(
        "[[soil]]",
        "[[insulation]]\nkind = \"vertical_inside\"\nthickness_m = 0.05\nmaterial = \"xps\"\ntop_depth_m = -0.05\nbottom_depth_m = 0.5\n[[soil]]",
    );
    expect_input_error(
        "overlap",
        &src,
        26,
        "insulation[1].top_depth_m",
        &["overlaps the slab"],
    );
}

#[test]
fn insulation_leaving_the_domain() {
    let src = VALID.replace("width_m = 1.0", "width_m = 25.0");
    expect_input_error(
        "domain",
        &src,
        21,
        "insulation[0].width_m",
        &["25 m is out of range", "at most 19"],
    );
}

#[test]
fn footing_above_the_slab() {
    let src = VALID.replace("base_depth_m = 0.6", "base_depth_m = 0.0");
    expect_input_error(
        "footing",
        &src,
        15,
        "footing.base_depth_m",
        &["out of range"],
    );
    let src = VALID.replace("top_above_ground_m = 0.1", "top_above_ground_m = -0.5");
    expect_input_error(
        "footing2",
        &src,
        15,
        "footing.base_depth_m",
        &["above the slab's underside"],
    );
}

#[test]
fn amplitude_too_large() {
    let src = VALID.replace("amplitude_k = 14.0", "amplitude_k = 45.0");
    expect_input_error(
        "amp",
        &src,
        26,
        "climate.amplitude_k",
        &["45 K is out of range", "0 to 30 K"],
    );
}

/// `--error-format json`: one JSON object on stderr with the input error's file, line, column,
/// key, kind and allowed values, and the exit code; a usage error is one too.
#[test]
fn errors_as_json_for_tools() {
    let dir = scratch("error-json");
    let path = dir.join("case.toml");
    std::fs::write(
        &path,
        VALID.replace("amplitude_k = 14.0", "amplitude_k = 45.0"),
    )
    .unwrap();
    let o = bin()
        .args(["check".as_ref(), path.as_os_str()])
        .args(["--error-format", "json"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    let v: serde_json::Value = serde_json::from_slice(&o.stderr).expect("stderr is JSON");
    let e = &v["error"];
    assert_eq!(e["class"], "input");
    assert_eq!(e["file"], path.display().to_string());
    assert_eq!(e["line"], 26);
    assert!(e["column"].as_u64().unwrap() > 0);
    assert_eq!(e["key"], "climate.amplitude_k");
    assert_eq!(e["kind"], "out_of_range");
    assert_eq!(e["allowed"], "0 to 30 K");
    assert_eq!(v["exit_code"], 2);
    let o = bin()
        .args(["--error-format", "json", "chek"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    let v: serde_json::Value = serde_json::from_slice(&o.stderr).expect("stderr is JSON");
    assert_eq!(v["error"]["class"], "usage");
}

/// Independent input errors are reported together, in file order, one `error:` line each (and
/// as the `errors` list of `--error-format json`); a table that depends on a wrong one is checked
/// once that one is right (common practice for compilers and linters: report every error that
/// does not follow from another).
#[test]
fn independent_errors_reported_together() {
    let dir = scratch("errors-together");
    let path = dir.join("case.toml");
    let three = examples_text("kettle-hollow-house.toml")
        .replace("amplitude_k = 14.0 ", "amplitude_k = -14.0")
        .replace("library = \"silty-sand\"", "library = \"silty-sandy\"")
        .replace(
            "thickness_m = 0.10\nmaterial = \"concrete\"",
            "thickness_m = 5.0\nmaterial = \"concrete\"",
        );
    std::fs::write(&path, &three).unwrap();
    let o = bin()
        .args(["check".as_ref(), path.as_os_str()])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    let lines: Vec<&str> = err.lines().collect();
    assert_eq!(lines.len(), 3, "{err}");
    for (l, key) in lines
        .iter()
        .zip(["slab.thickness_m", "soil[0].library", "climate.amplitude_k"])
    {
        assert!(l.starts_with("error: ") && l.contains(key), "{l}");
    }
    let o = bin()
        .args(["check".as_ref(), path.as_os_str()])
        .args(["--error-format", "json"])
        .output()
        .unwrap();
    let v: serde_json::Value = serde_json::from_slice(&o.stderr).expect("stderr is JSON");
    let lines: Vec<u64> = v["errors"]
        .as_array()
        .unwrap()
        .iter()
        .map(|e| e["line"].as_u64().unwrap())
        .collect();
    assert_eq!(lines.len(), 3);
    assert!(lines.windows(2).all(|w| w[0] < w[1]), "{lines:?}");
    assert_eq!(v["error"]["key"], "slab.thickness_m");
    // With those right, two insulation pieces and a probe are wrong: all three again.
    let later = examples_text("kettle-hollow-house.toml")
        .replace(
            "material = \"xps\"\ntop_depth_m",
            "material = \"xpz\"\ntop_depth_m",
        )
        .replace("depth_m = 0.30 ", "depth_m = -0.3")
        .replace("x_m = 1.00\nz_m = 0.50", "x_m = 1.00\nz_m = -0.50");
    std::fs::write(&path, &later).unwrap();
    let o = bin()
        .args(["check".as_ref(), path.as_os_str()])
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&o.stderr);
    let keys = [
        "insulation[1].material",
        "insulation[2].depth_m",
        "probe[1].z_m",
    ];
    assert_eq!(err.lines().count(), 3, "{err}");
    for (l, key) in err.lines().zip(keys) {
        assert!(l.contains(key), "{l}");
    }
}

fn examples_text(name: &str) -> String {
    let p = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("examples")
        .join(name);
    std::fs::read_to_string(p).unwrap()
}

#[test]
fn permafrost_climate_rejected() {
    let src = VALID.replace("mean_c = 3.0", "mean_c = -4.0");
    expect_input_error("permafrost", &src, 25, "climate.mean_c", &["no permafrost"]);
}

#[test]
fn missing_soil_name() {
    let src = VALID.replace("library = \"sand\"", "library = \"moon-dust\"");
    expect_input_error(
        "soil",
        &src,
        23,
        "soil[0].library",
        &["moon-dust", "known: gravel, sand"],
    );
}

#[test]
fn garbage_never_panics() {
    for (k, junk) in [
        "",
        "[[[",
        "name = 3",
        "\u{0}\u{1}binary",
        "[building]\nfloor_area_m2 = 1e400",
    ]
    .iter()
    .enumerate()
    {
        let (code, err, _) = check(&format!("junk{k}"), junk);
        assert_eq!(code, 2, "{junk:?}: {err}");
        assert!(!err.contains("panicked"));
    }
}

#[test]
fn help_has_examples_and_usage_errors_exit_2() {
    for sub in ["run", "check"] {
        let out = bin().args([sub, "--help"]).output().unwrap();
        assert_eq!(out.status.code(), Some(0));
        assert!(String::from_utf8_lossy(&out.stdout).contains("Example"));
    }
    let out = bin().args(["run", "x.toml"]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    let out = bin().args(["frobnicate"]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
}

#[test]
fn soil_command_lists_and_derives() {
    let out = bin().args(["soil", "--list"]).output().unwrap();
    let s = String::from_utf8_lossy(&out.stdout);
    for n in [
        "gravel",
        "sand",
        "silty-sand",
        "silt",
        "lean-clay",
        "fat-clay",
        "glacial-till",
        "peat",
    ] {
        assert!(s.contains(n), "{n} in the list");
    }
    let out = bin()
        .args(["soil", "lean-clay", "--method", "kersten"])
        .output()
        .unwrap();
    let s = String::from_utf8_lossy(&out.stdout);
    assert!(
        s.contains("Kersten 1949") && s.contains("W/(m·K)") && s.contains("MJ/m³"),
        "{s}"
    );
    // lean clay 1500 kg/m³, w 25 %: Kersten silt-clay unfrozen 0.1442(0.9 log 25 − 0.2)·10^(0.6243·1.5).
    let k = 0.1442 * (0.9 * 25f64.log10() - 0.2) * 10f64.powf(0.6243 * 1.5);
    assert!(s.contains(&format!("unfrozen {k:.3} W/(m·K)")), "{s}");
    let out = bin().args(["soil", "moondust"]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    let out = bin()
        .args([
            "soil",
            "sand",
            "--water-content",
            "0.005",
            "--method",
            "kersten",
        ])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
}

#[test]
fn soil_file_and_method_in_a_case() {
    let dir = scratch("soilfile");
    std::fs::write(
        dir.join("site.toml"),
        "name = \"site clay\"\ndescription = \"d\"\nsource = \"site report\"\ndry_density_kg_per_m3 = 1480.0\nwater_content = 0.27\nquartz_fraction = 0.25\ntexture = \"fine\"\nfrost_susceptibility = \"F3\"\n",
    )
    .unwrap();
    let src = VALID.replace(
        "library = \"sand\"",
        "soil_file = \"site.toml\"\nmethod = \"kersten\"",
    );
    let path = dir.join("case.toml");
    std::fs::write(&path, &src).unwrap();
    let out = bin().arg("check").arg(&path).output().unwrap();
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    std::fs::write(dir.join("site.toml"), "name = \"x\"\n").unwrap();
    let out = bin().arg("check").arg(&path).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("site.toml"));
    // A range error inside the soil file names its line and column (hardening finding 14).
    std::fs::write(
        dir.join("site.toml"),
        "name = \"site clay\"\ndescription = \"d\"\nsource = \"site report\"\ndry_density_kg_per_m3 = 1480.0\n  water_content =  50.0\nquartz_fraction = 0.25\ntexture = \"fine\"\nfrost_susceptibility = \"F3\"\n",
    )
    .unwrap();
    let out = bin().arg("check").arg(&path).output().unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        err.contains("site.toml:5:20: water_content: 50 is out of range"),
        "{err}"
    );
}

#[test]
fn coarse_year_step_out_of_range() {
    let src = VALID.replace(
        "coldest_day = 20\n",
        "coldest_day = 20\n[simulation]\ncoarse_year_step_days = 45\n",
    );
    expect_input_error(
        "coarse",
        &src,
        29,
        "simulation.coarse_year_step_days",
        &["45 is out of range", "0 (none) to 30 days"],
    );
}

/// `run --format json` prints summary.json exactly as written and nothing else, so a pipe can
/// parse it (`frostline run case.toml --out o --format json | jq .frost_margin_m`).
#[test]
fn run_prints_json_for_pipes() {
    let out = scratch("format-json");
    let o = quick_demo_run(&out, &["--format", "json"]);
    let printed: serde_json::Value = serde_json::from_slice(&o.stdout).expect("stdout is JSON");
    let file: serde_json::Value = crate::common::read_json(&out.join("summary.json"));
    assert_eq!(printed, file);
    assert!(printed["annual_heat_loss_kwh"].is_number());
}

/// A run owns its output directory: a second run into it removes the files the first recorded in
/// manifest.json that it does not write again (a series run's winters chart, its field file of
/// another day), so the new report cannot embed stale figures; files it did not write stay.
#[test]
fn rerun_removes_its_own_stale_files_only() {
    let out = scratch("owned-dir");
    let ex = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples");
    let run = |case: &str| {
        let c = ex.join(case);
        let o = bin()
            .args([
                "run".as_ref(),
                c.as_os_str(),
                "--out".as_ref(),
                out.as_os_str(),
            ])
            .args(["--mesh", "coarse", "--quiet", "--max-spin-up-years", "2"])
            .output()
            .unwrap();
        assert!(
            matches!(o.status.code(), Some(0) | Some(3)),
            "{}",
            String::from_utf8_lossy(&o.stderr)
        );
    };
    run("kettle-hollow-series.toml");
    assert!(out.join("winters.csv").exists() && out.join("winters.png").exists());
    std::fs::write(out.join("my notes.txt"), "mine").unwrap();
    run("kettle-hollow-house.toml");
    assert!(!out.join("winters.csv").exists(), "stale winters.csv left");
    assert!(!out.join("winters.png").exists(), "stale winters.png left");
    assert!(
        out.join("my notes.txt").exists(),
        "a file frostline did not write was removed"
    );
    let report = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(
        !report.contains("fig-winters"),
        "the report embeds a stale chart"
    );
    let m: serde_json::Value = crate::common::read_json(&out.join("manifest.json"));
    let names: Vec<&str> = m["files"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_str().unwrap())
        .collect();
    assert!(names.contains(&"summary.json") && names.contains(&"report.html"));
    assert!(!names.contains(&"my notes.txt"));
    for n in names {
        assert!(out.join(n).exists(), "manifest lists {n}, which is missing");
    }
}

/// `plot --dpi 192` draws the same figures with twice the pixels in each direction (the layout is
/// made for 96 px per inch; PNG pHYs §11.3.5.3 carries the density), the SVG unchanged, and the
/// report shows each image at its layout width. A density outside 48–600 is refused (exit 2).
fn print_resolution(run: &std::path::Path, at96: &std::path::Path) {
    let sub = run.join("dpi192");
    let o = bin()
        .args([
            "plot".as_ref(),
            run.as_os_str(),
            "--day".as_ref(),
            "60".as_ref(),
        ])
        .args([
            "--dpi".as_ref(),
            "192".as_ref(),
            "--out".as_ref(),
            sub.as_os_str(),
        ])
        .output()
        .unwrap();
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    let size = |p: &std::path::Path| {
        let b = std::fs::read(p).unwrap();
        let be = |i: usize| u32::from_be_bytes(b[i..i + 4].try_into().unwrap());
        (be(16), be(20))
    };
    let report = std::fs::read_to_string(sub.join("report.html")).unwrap();
    for stem in [
        "soil_temperature",
        "soil_temperature_zoom",
        "frost_depth",
        "foundation_sketch",
    ] {
        let (w, h) = size(&at96.join(format!("{stem}.png")));
        assert_eq!(
            size(&sub.join(format!("{stem}.png"))),
            (2 * w, 2 * h),
            "{stem}"
        );
        assert_eq!(
            std::fs::read(sub.join(format!("{stem}.svg"))).unwrap(),
            std::fs::read(at96.join(format!("{stem}.svg"))).unwrap(),
            "{stem}"
        );
        assert!(
            report.contains(&format!("id=\"fig-{stem}\"><img width=\"{w}\"")),
            "{stem}"
        );
    }
    let o = bin()
        .args([
            "plot".as_ref(),
            run.as_os_str(),
            "--dpi".as_ref(),
            "1000".as_ref(),
        ])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
}

/// `plot --day N --out SUB` draws another day into its own directory: the run's figures stay as
/// they are, and the drawn day's field is written as CSV (one value per solid cell).
#[test]
fn plot_another_day_into_its_own_directory() {
    let out = scratch("plot-out");
    let case =
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/kettle-hollow-house.toml");
    let o = bin()
        .args([
            "run".as_ref(),
            case.as_os_str(),
            "--out".as_ref(),
            out.as_os_str(),
        ])
        .args(["--mesh", "coarse", "--quiet"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0));
    let before = std::fs::read(out.join("soil_temperature.png")).unwrap();
    let sub = out.join("day60");
    let o = bin()
        .args([
            "plot".as_ref(),
            out.as_os_str(),
            "--day".as_ref(),
            "60".as_ref(),
        ])
        .args(["--out".as_ref(), sub.as_os_str()])
        .output()
        .unwrap();
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    assert_eq!(
        std::fs::read(out.join("soil_temperature.png")).unwrap(),
        before
    );
    for f in [
        "soil_temperature.png",
        "frost_depth.png",
        "report.html",
        "frost_line_060.csv",
    ] {
        assert!(sub.join(f).exists(), "{f}");
    }
    let field = std::fs::read_to_string(sub.join("field_060.csv")).unwrap();
    assert_eq!(field.lines().next(), Some("x_m,z_m,temperature_c"));
    let summary: serde_json::Value = crate::common::read_json(&out.join("summary.json"));
    assert_eq!(
        field.lines().count() as u64 - 1,
        summary["cells"].as_u64().unwrap()
    );
    print_resolution(&out, &sub);
    damaged_run_directories_are_refused(&out);
    full_disk_names_the_file(&out);
    killed_plots_leave_no_damage(&out);
}

/// `plot --animate` killed (SIGKILL) at several instants (hardening finding 8): every image under
/// its final name is whole (PNG ends with IEND, PNG spec §11.2.5; SVG with `</svg>`; GIF with its
/// trailer 0x3B, GIF89a spec §27), and the next command into the directory removes the
/// temporaries the killed ones left.
fn killed_plots_leave_no_damage(run: &std::path::Path) {
    let out = scratch("killed-plot");
    for delay_ms in [30u64, 80, 150, 300, 600] {
        let mut child = bin()
            .arg("plot")
            .arg(run)
            .arg("--animate")
            .arg("--out")
            .arg(&out)
            .stdout(std::process::Stdio::null())
            .stderr(std::process::Stdio::null())
            .spawn()
            .unwrap();
        std::thread::sleep(std::time::Duration::from_millis(delay_ms));
        let _ = child.kill();
        let _ = child.wait();
        for e in std::fs::read_dir(&out).unwrap() {
            let p = e.unwrap().path();
            let name = p.file_name().unwrap().to_string_lossy().to_string();
            if name.starts_with('.') {
                continue;
            }
            let b = std::fs::read(&p).unwrap();
            let whole = match p.extension().and_then(|x| x.to_str()) {
                Some("png") => b.ends_with(&[0xAE, 0x42, 0x60, 0x82]),
                Some("svg") => String::from_utf8_lossy(&b).trim_end().ends_with("</svg>"),
                Some("gif") => b.last() == Some(&0x3B),
                _ => !b.is_empty(),
            };
            assert!(whole, "{name} damaged after a kill at {delay_ms} ms");
        }
    }
    // As a killed process leaves them (the window is short, so plant two), beside a file of
    // the user's that must stay.
    for n in [
        ".summary.json.999999.7.tmp",
        ".frost_depth.999999.8.tmp.png",
        ".keep",
    ] {
        std::fs::write(out.join(n), "x").unwrap();
    }
    let o = bin()
        .arg("plot")
        .arg(run)
        .arg("--out")
        .arg(&out)
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0));
    assert!(out.join(".keep").exists());
    let left: Vec<String> = std::fs::read_dir(&out)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().to_string())
        .filter(|n| n.contains(".tmp"))
        .collect();
    assert!(left.is_empty(), "{left:?}");
}

/// Copy the files of run directory `from` into a fresh scratch directory.
fn copy_run(from: &std::path::Path, name: &str) -> PathBuf {
    let to = scratch(name);
    for e in std::fs::read_dir(from).unwrap() {
        let p = e.unwrap().path();
        if p.is_file() {
            std::fs::copy(&p, to.join(p.file_name().unwrap())).unwrap();
        }
    }
    to
}

/// `plot` refuses a damaged run directory with exit 2 and the file's name, never panicking or
/// looping (hardening findings 4, 5 and 13): a truncated case copy (its hash differs from
/// summary.json's), days out of order in daily.csv, months out of order in monthly.csv,
/// monthly.csv with no data rows, daily.csv rows of two columns, section.json with `days = 0`.
fn damaged_run_directories_are_refused(run: &std::path::Path) {
    type Damage = fn(&str) -> String;
    let cases: [(&str, &str, Damage); 6] = [
        ("monthly.csv", "months", |t| {
            t.lines().next().unwrap().to_string()
        }),
        ("daily.csv", "missing field", |t| {
            t.lines()
                .map(|l| l.split(',').take(2).collect::<Vec<_>>().join(","))
                .collect::<Vec<_>>()
                .join("\n")
        }),
        ("section.json", "days", |t| {
            let mut v: serde_json::Value = serde_json::from_str(t).unwrap();
            v["days"] = 0.into();
            v.to_string()
        }),
        ("case.toml", "SHA-256", |t| t[..t.len() / 2].to_string()),
        ("daily.csv", "day_of_year", |t| {
            let mut lines: Vec<&str> = t.lines().collect();
            lines.swap(5, 6);
            lines.join("\n")
        }),
        ("monthly.csv", "month", |t| {
            let mut lines: Vec<&str> = t.lines().collect();
            lines.remove(3);
            lines.join("\n")
        }),
    ];
    for (file, word, damage) in cases {
        let dir = copy_run(run, &format!("damaged-{file}"));
        let text = std::fs::read_to_string(dir.join(file)).unwrap();
        std::fs::write(dir.join(file), damage(&text)).unwrap();
        let before = std::fs::read(dir.join("frost_depth.png")).unwrap();
        let o = bin().arg("plot").arg(&dir).output().unwrap();
        let err = String::from_utf8_lossy(&o.stderr);
        assert_eq!(o.status.code(), Some(2), "{file}: {err}");
        assert!(err.contains(file) && err.contains(word), "{file}: {err}");
        if file == "case.toml" {
            // Refused before drawing: the run's figure is untouched.
            assert_eq!(std::fs::read(dir.join("frost_depth.png")).unwrap(), before);
        }
    }
}

/// A full disk during `plot` (hardening finding 12; a 300 kB tmpfs, which needs root; skipped with a note where it
/// cannot be mounted) is an I/O error (exit 1) naming the file that did not fit, and leaves no
/// temporary or half-written image behind.
fn full_disk_names_the_file(run: &std::path::Path) {
    let mnt = scratch("full-disk");
    let mounted = Command::new("mount")
        .args(["-t", "tmpfs", "-o", "size=300k", "tmpfs"])
        .arg(&mnt)
        .status()
        .is_ok_and(|s| s.success());
    if !mounted {
        eprintln!("full-disk check skipped: cannot mount a tmpfs here");
        return;
    }
    let out = mnt.join("plots");
    let o = bin()
        .arg("plot")
        .arg(run)
        .arg("--out")
        .arg(&out)
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&o.stderr).to_string();
    let names: Vec<String> = std::fs::read_dir(&out)
        .map(|d| {
            d.filter_map(|e| e.ok())
                .map(|e| e.file_name().to_string_lossy().to_string())
                .collect()
        })
        .unwrap_or_default();
    // Every PNG that has its final name is whole (ends with the IEND chunk, PNG spec §11.2.5).
    let whole = names
        .iter()
        .filter(|n| n.ends_with(".png"))
        .all(|n| std::fs::read(out.join(n)).is_ok_and(|b| b.ends_with(&[0xAE, 0x42, 0x60, 0x82])));
    let _ = Command::new("umount").arg(&mnt).status();
    assert_eq!(o.status.code(), Some(1), "{err}");
    assert!(
        err.contains(&out.display().to_string()) && err.contains("No space left"),
        "{err}"
    );
    assert!(!names.iter().any(|n| n.contains(".tmp")), "{names:?}");
    assert!(whole, "{names:?}");
}

/// Shell completions and the manual page come from the command-line definition: every shell's
/// script and the roff page generate and name the subcommands.
#[test]
fn completions_and_man_page_generate() {
    for shell in ["bash", "zsh", "fish", "elvish", "powershell"] {
        let out = run_ok(&["completions", shell]);
        assert!(out.contains("frostline") && out.contains("size"), "{shell}");
    }
    let man = run_ok(&["man"]);
    assert!(
        man.starts_with(".ie") || man.contains(".TH frostline 1"),
        "{}",
        &man[..80.min(man.len())]
    );
    for sub in ["run", "plot", "climate", "soil", "size", "check"] {
        assert!(man.contains(sub), "{sub}");
    }
}

/// A perimeter so small that B′ runs away is refused by its bound, and a section grid beyond the
/// cell limit is refused with the count before anything is allocated (hardening finding 1: these
/// used to abort on a multi-terabyte allocation).
#[test]
fn runaway_b_prime_and_grid_are_refused_quickly() {
    let t0 = std::time::Instant::now();
    let src = VALID.replace("exposed_perimeter_m = 40.0", "exposed_perimeter_m = 0.001");
    let (code, err, _) = check("b-prime", &src);
    assert_eq!(code, 2, "{err}");
    assert!(
        err.contains("building.exposed_perimeter_m") && err.contains("at most 1000 m"),
        "{err}"
    );
    let src = VALID.replace("exposed_perimeter_m = 40.0", "exposed_perimeter_m = 0.21");
    let (code, err, _) = check("big-grid", &src);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("cells; the limit is 500000"), "{err}");
    assert!(t0.elapsed().as_secs_f64() < 10.0);
}

/// Output files are written through new, uniquely named temporaries: a link planted at the old
/// fixed temporary name is never followed (hardening finding 9), and no temporary is left.
#[test]
fn planted_links_are_not_followed() {
    let out = scratch("planted-link");
    let outside = scratch("planted-target").join("outside.txt");
    std::fs::write(&outside, "untouched").unwrap();
    for name in [".summary.json.tmp", ".daily.csv.tmp", ".report.html.tmp"] {
        std::os::unix::fs::symlink(&outside, out.join(name)).unwrap();
    }
    let case =
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/kettle-hollow-house.toml");
    let o = bin()
        .args([
            "run".as_ref(),
            case.as_os_str(),
            "--out".as_ref(),
            out.as_os_str(),
        ])
        .args(["--mesh", "coarse", "--quiet"])
        .output()
        .unwrap();
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    assert_eq!(std::fs::read_to_string(&outside).unwrap(), "untouched");
    let left: Vec<String> = std::fs::read_dir(&out)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().to_string())
        .filter(|n| {
            n.contains(".tmp")
                && !n.ends_with(".json.tmp")
                && !n.ends_with(".csv.tmp")
                && !n.ends_with(".html.tmp")
        })
        .collect();
    assert!(left.is_empty(), "temporaries left: {left:?}");
}

/// An output directory that cannot be written is found before solving (hardening finding 11): a
/// path under a regular file fails in well under the run's time, naming the path. (CI runs as
/// root, where a read-only directory would still be writable, so a file stands in for it.)
#[test]
fn unwritable_output_is_found_before_solving() {
    let dir = scratch("unwritable");
    let file = dir.join("plain-file");
    std::fs::write(&file, "x").unwrap();
    let out = file.join("sub");
    let case =
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/kettle-hollow-house.toml");
    let t0 = std::time::Instant::now();
    let o = bin()
        .args([
            "run".as_ref(),
            case.as_os_str(),
            "--out".as_ref(),
            out.as_os_str(),
            "--quiet".as_ref(),
        ])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&o.stderr).contains("plain-file"));
    // The solve alone takes over a second on any mesh of this case.
    assert!(t0.elapsed().as_secs_f64() < 1.0, "{:?}", t0.elapsed());
}

/// A second process writing into a directory another one is writing into fails at once (exit 1,
/// naming the directory) and writes nothing (hardening finding 10); the lock is the operating system's advisory lock on
/// `.frostline.lock`, here held by the test itself.
#[test]
fn a_directory_in_use_is_refused_at_once() {
    let out = scratch("locked");
    let lock = std::fs::File::create(out.join(".frostline.lock")).unwrap();
    lock.lock().unwrap();
    let case =
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/kettle-hollow-house.toml");
    let t0 = std::time::Instant::now();
    let o = bin()
        .args(["run".as_ref(), case.as_os_str(), "--out".as_ref()])
        .arg(&out)
        .arg("--quiet")
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&o.stderr);
    assert_eq!(o.status.code(), Some(1), "{err}");
    assert!(err.contains("another frostline process") && err.contains(&out.display().to_string()));
    assert!(t0.elapsed().as_secs_f64() < 1.0, "{:?}", t0.elapsed());
    assert_eq!(std::fs::read_dir(&out).unwrap().count(), 1);
    drop(lock);
    // Released (as when the other process ends, however it ends): the run proceeds.
    quick_demo_run(&out, &[]);
}

/// The Kettle Hollow demo on the coarse mesh without plots into `out`, with `extra` flags; it
/// must succeed.
fn quick_demo_run(out: &std::path::Path, extra: &[&str]) -> std::process::Output {
    let case =
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/kettle-hollow-house.toml");
    let o = bin()
        .args(["run".as_ref(), case.as_os_str(), "--out".as_ref()])
        .arg(out)
        .args(["--quiet", "--mesh", "coarse", "--no-plots"])
        .args(extra)
        .output()
        .unwrap();
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    o
}

/// The probe count is bounded (1000) and checked in linear time (hardening finding 16: 40,000
/// probes took 6 s in a quadratic duplicate check).
#[test]
fn probe_count_is_bounded() {
    let probes: String = (0..1001)
        .map(|k| format!("\n[[probe]]\nname = \"p{k}\"\nx_m = 1.0\nz_m = 0.5\n"))
        .collect();
    let (code, err, _) = check("many-probes", &format!("{VALID}{probes}"));
    assert_eq!(code, 2, "{err}");
    assert!(
        err.contains("probe[1000]") && err.contains("at most 1000"),
        "{err}"
    );
    let probes: String = (0..3)
        .map(|k| format!("\n[[probe]]\nname = \"same\"\nx_m = 1.0\nz_m = 0.{k}\n"))
        .collect();
    let (code, err, _) = check("duplicate-probes", &format!("{VALID}{probes}"));
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("probe[1].name"), "{err}");
}

/// A case file that is not UTF-8 is located by line and column of its first bad byte (hardening
/// finding 14).
#[test]
fn non_utf8_case_is_located() {
    let dir = scratch("non-utf8");
    let path = dir.join("case.toml");
    std::fs::write(
        &path,
        b"name = \"x\"\n[building]\nfloor_area_m2 = 1\xff00.0\n",
    )
    .unwrap();
    let out = bin().arg("check").arg(&path).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains(&format!("{}:3:18:", path.display())), "{err}");
}
