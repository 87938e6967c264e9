//! Measured climate series: reading and its errors, statistics against their definitions, the
//! Gumbel design index, and runs on series and design years.
use crate::cli::scratch;
use crate::common::{read_json, run_ok, run_written};
use frostline::physics::climate::{
    annual_sinusoid, days_from_civil, freezing_indices, read_series, read_series_from, summarize,
    FitMethod, Gumbel, ReadOptions,
};
use std::f64::consts::PI;

fn sinusoid_csv(mean: f64, amp: f64, coldest_doy: f64, years: i64) -> String {
    let mut s = String::from("# synthetic\ndate,temperature_c\n");
    let d0 = days_from_civil(2001, 1, 1);
    for d in d0..days_from_civil(2001 + years, 1, 1) {
        // Daily mean of θ = mean − A cos(2π(t − t_min)/365.25) over the day (t in days).
        let w = 2.0 * PI / 365.25;
        let t_min = d0 as f64 + coldest_doy - 0.5;
        let (a, b) = (d as f64 - t_min, d as f64 + 1.0 - t_min);
        let v = mean - amp * ((w * b).sin() - (w * a).sin()) / w;
        s += &format!("{},{v:.4}\n", frostline::physics::climate::iso_date(d));
    }
    s
}

/// A pure sinusoid written as a daily series gives back its mean, amplitude and phase, and each
/// winter's freezing index equals the closed form F = (P/π)(A sin θ₀ − θ_m θ₀) (methods notes
/// §4.4, with P = 365.25 d for this calendar): within 1 % (the issue's requirement).
#[test]
fn sinusoid_series_gives_back_its_parameters() {
    let (mean, amp, coldest) = (3.0, 14.0, 20.0);
    let s = read_series_from(
        sinusoid_csv(mean, amp, coldest, 10).as_bytes(),
        "sin.csv",
        &ReadOptions::default(),
    )
    .unwrap();
    let (m, a, d) = annual_sinusoid(&s);
    assert!((m / mean - 1.0).abs() < 0.01, "mean {m}");
    assert!((a / amp - 1.0).abs() < 0.01, "amplitude {a}");
    assert!((d - coldest).abs() < 0.01 * 365.0, "coldest day {d}");
    let th0 = (mean / amp).acos();
    let f = 365.25 / PI * (amp * th0.sin() - mean * th0);
    let fi = freezing_indices(&s);
    assert_eq!(fi.len(), 9);
    for w in &fi {
        assert!(
            (w.value / f - 1.0).abs() < 0.01,
            "winter {}: {} vs {f}",
            w.winter,
            w.value
        );
    }
}

/// Hourly values are averaged to daily means; °F converts to °C.
#[test]
fn hourly_and_fahrenheit() {
    let mut text = String::from("datetime,temperature_f\n");
    for d in 0..400 {
        let date = frostline::physics::climate::iso_date(days_from_civil(2010, 1, 1) + d);
        for h in 0..24 {
            // 32 °F ± 9 °F within the day: the daily mean is 0 °C.
            let f = 32.0 + 9.0 * (2.0 * PI * h as f64 / 24.0).sin();
            text += &format!("{date}T{h:02}:00,{f:.6}\n");
        }
    }
    let s = read_series_from(text.as_bytes(), "h.csv", &ReadOptions::default()).unwrap();
    assert_eq!(s.values.len(), 400);
    assert_eq!(s.rows, 9600);
    assert!(s.values.iter().all(|v| v.abs() < 1e-6));
}

/// 50 years of hourly data stream through the reader (only daily means are kept).
#[test]
fn fifty_years_of_hourly_data() {
    let dir = scratch("hourly50");
    let path = dir.join("h.csv");
    let mut f = std::io::BufWriter::new(std::fs::File::create(&path).unwrap());
    use std::io::Write;
    writeln!(f, "date,temperature_c").unwrap();
    let d0 = days_from_civil(1970, 1, 1);
    for d in d0..days_from_civil(2020, 1, 1) {
        let date = frostline::physics::climate::iso_date(d);
        for h in 0..24 {
            writeln!(
                f,
                "{date} {h:02}:00:00,{:.1}",
                5.0 - 12.0 * (2.0 * PI * (d - d0) as f64 / 365.25).cos()
            )
            .unwrap();
        }
    }
    drop(f);
    let s = read_series(&path, &ReadOptions::default()).unwrap();
    assert_eq!(s.values.len() as i64, days_from_civil(2020, 1, 1) - d0);
    assert_eq!(s.rows, s.values.len() * 24);
}

fn expect_err(name: &str, text: &str, words: &[&str]) {
    let e = read_series_from(text.as_bytes(), name, &ReadOptions::default())
        .unwrap_err()
        .to_string();
    for w in words {
        assert!(e.contains(w), "{name}: expected '{w}' in: {e}");
    }
    assert!(e.starts_with(name), "{name}: message names the file: {e}");
}

fn year_of(val: &str) -> String {
    let mut s = String::from("date,temperature_c\n");
    for d in 0..370 {
        s += &format!(
            "{},{val}\n",
            frostline::physics::climate::iso_date(days_from_civil(2020, 1, 1) + d)
        );
    }
    s
}

/// Bad series files: each error names the file and line (or the dates) and what is allowed.
#[test]
fn series_errors() {
    expect_err(
        "nohdr.csv",
        "day,temp\n2020-01-01,1\n",
        &["nohdr.csv:1:", "lacks the columns", "temperature_c"],
    );
    let bad = year_of("1.0").replacen("2020-01-05,1.0", "2020-01-05,warm", 1);
    expect_err("num.csv", &bad, &["num.csv:6:", "\"warm\" is not a number"]);
    let dup = year_of("1.0").replacen("2020-01-05,1.0\n", "2020-01-05,1.0\n2020-01-05,1.0\n", 1);
    expect_err("dup.csv", &dup, &["dup.csv:7:", "repeats line 6"]);
    let order = year_of("1.0").replacen("2020-01-05,1.0\n", "2020-01-05,1.0\n2020-01-02,1.0\n", 1);
    expect_err("order.csv", &order, &["order.csv:7:", "time order"]);
    let hot = year_of("1.0").replacen("2020-01-05,1.0", "2020-01-05,75.0", 1);
    expect_err("hot.csv", &hot, &["hot.csv:6:", "implausible", "-70 to 60"]);
    expect_err(
        "short.csv",
        &year_of("1.0")
            .lines()
            .take(200)
            .collect::<Vec<_>>()
            .join("\n"),
        &["at least one year"],
    );
    // A 5-day gap (default limit 3): error naming the dates.
    let gap: String = year_of("1.0")
        .lines()
        .filter(|l| {
            !(l.starts_with("2020-02-0")
                && ["1", "2", "3", "4", "5"]
                    .iter()
                    .any(|d| l.starts_with(&format!("2020-02-0{d}"))))
        })
        .map(|l| format!("{l}\n"))
        .collect();
    expect_err(
        "gap.csv",
        &gap,
        &[
            "5 missing day(s) from 2020-02-01 to 2020-02-05",
            "at most 3 days",
        ],
    );
    expect_err(
        "date.csv",
        &year_of("1.0").replacen("2020-01-05", "05/01/2020", 1),
        &["date.csv:6:", "ISO 8601"],
    );
}

/// Empty cells, NaN and short gaps are filled by linear interpolation and counted.
#[test]
fn short_gaps_are_filled_and_counted() {
    let mut text = year_of("2.0");
    text = text.replacen("2020-03-01,2.0", "2020-03-01,", 1).replacen(
        "2020-03-02,2.0",
        "2020-03-02,NaN",
        1,
    );
    text = text.replacen("2020-06-10,2.0\n", "", 1);
    let s = read_series_from(text.as_bytes(), "fill.csv", &ReadOptions::default()).unwrap();
    assert_eq!(s.filled_days, 3);
    assert!(s.values.iter().all(|v| (v - 2.0).abs() < 1e-12));
}

/// Gumbel fits recover known parameters within sampling error, and the return level is the
/// quantile F⁻¹(1 − 1/T) of the fitted distribution (cross-checked against statrs' Gumbel).
#[test]
fn gumbel_fit_and_return_level() {
    use statrs::distribution::{ContinuousCDF, Gumbel as SGumbel};
    let (mu, beta) = (800.0, 150.0);
    let truth = SGumbel::new(mu, beta).unwrap();
    // A deterministic "sample": the quantiles at Weibull plotting positions i/(n + 1).
    let n = 200;
    let x: Vec<f64> = (1..=n)
        .map(|i| truth.inverse_cdf(i as f64 / (n + 1) as f64))
        .collect();
    for method in [FitMethod::LMoments, FitMethod::MaximumLikelihood] {
        let g = Gumbel::fit(&x, method).unwrap();
        // Standard errors for n = 200: about 0.08 β for μ and 0.06 β for β.
        assert!(
            (g.location - mu).abs() < 0.08 * beta,
            "{method:?} μ {}",
            g.location
        );
        assert!(
            (g.scale - beta).abs() < 0.06 * beta,
            "{method:?} β {}",
            g.scale
        );
        let fitted = SGumbel::new(g.location, g.scale).unwrap();
        for t in [10.0, 50.0, 100.0] {
            let r = g.return_level(t);
            assert!((r - fitted.inverse_cdf(1.0 - 1.0 / t)).abs() < 1e-6 * r);
        }
        let (d, p) = g.ks(&x);
        assert!(d < 0.05 && p > 0.5, "KS {d} {p}");
    }
    // K_T of the methods notes: F_100 = x̄ + 3.1367 s for a moments fit; the L-moment fit of an
    // exact Gumbel sample lands close to it.
    assert!(Gumbel::fit(&[1.0, 1.0, 1.0], FitMethod::LMoments).is_none());
}

/// The demo climates' summaries are self-consistent and written as JSON by the CLI.
#[test]
fn climate_command_writes_summary() {
    let out = scratch("climate");
    let csv = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("climate/kettle-hollow.csv");
    let out_s = out.as_os_str();
    run_ok(&[
        "climate".as_ref(),
        csv.as_os_str(),
        "--return-period".as_ref(),
        "50".as_ref(),
        "--out".as_ref(),
        out_s,
    ]);
    let s = read_json(&out.join("climate_summary.json"));
    for k in [
        "years",
        "mean_annual_temperature_c",
        "annual_amplitude_k",
        "coldest_day_of_year",
        "design_freezing_index_c_days",
        "return_period_years",
    ] {
        assert!(s[k].is_number(), "{k}");
    }
    assert_eq!(s["fit_method"], "l_moments");
    let winters = s["freezing_index_by_winter_c_days"].as_array().unwrap();
    assert!(winters.len() >= 30);
    assert!(winters[0]["winter"].is_number() && winters[0]["value"].is_number());
    // The 50-year index lies above the mean of the three coldest of 35 winters' … typical order.
    let d50 = s["design_freezing_index_c_days"].as_f64().unwrap();
    assert!(d50 > s["mean_of_three_coldest_c_days"].as_f64().unwrap() * 0.9);
    let series = read_series(&csv, &ReadOptions::default()).unwrap();
    let a = summarize(&series, 10.0, FitMethod::LMoments)
        .unwrap()
        .design_freezing_index_c_days;
    let b = summarize(&series, 100.0, FitMethod::LMoments)
        .unwrap()
        .design_freezing_index_c_days;
    assert!(b > a, "a longer return period gives a larger design index");
}

fn run_case(dir: &std::path::Path, name: &str, climate: &str) -> serde_json::Value {
    let src = format!(
        r#"name = "{name}"
[building]
floor_area_m2 = 110.0
exposed_perimeter_m = 44.0
indoor_temperature_c = 20.0
[slab]
thickness_m = 0.10
top_above_ground_m = 0.20
[wall]
thickness_m = 0.20
[footing]
width_m = 0.40
thickness_m = 0.20
base_depth_m = 0.45
outer_projection_m = 0.0
[[insulation]]
kind = "vertical_outside"
thickness_m = 0.05
material = "xps"
top_depth_m = -0.30
bottom_depth_m = 0.45
[[soil]]
library = "silty-sand"
[climate]
{climate}
[simulation]
mesh = "coarse"
max_spin_up_years = 2
"#
    );
    let case = dir.join(format!("{name}.toml"));
    std::fs::write(&case, src).unwrap();
    let out = dir.join(name);
    // Two spin-up years may not reach the periodic state (exit 3, results written).
    run_written(&[
        "run".as_ref(),
        case.as_os_str(),
        "--out".as_ref(),
        out.as_os_str(),
        "--quiet".as_ref(),
        "--no-plots".as_ref(),
    ]);
    read_json(&out.join("summary.json"))
}

/// A run on a measured series and the same case on the series' fitted sinusoid give open-ground
/// frost depths in the same range (the sinusoid, an average year, falls within the spread of the
/// series' winters, ±20 %); winters.csv lists every season; the worst is reported.
#[test]
fn series_run_and_its_sinusoid_agree_in_range() {
    let dir = scratch("series-run");
    let full = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("climate/kettle-hollow.csv"),
    )
    .unwrap();
    // Six years, 1990–1995.
    let part: String = full
        .lines()
        .filter(|l| {
            l.starts_with('#')
                || l.starts_with("date")
                || l.as_bytes().get(3).is_some_and(|c| *c <= b'5') && l.starts_with("199")
        })
        .map(|l| format!("{l}\n"))
        .collect();
    std::fs::write(dir.join("six.csv"), &part).unwrap();
    let series = read_series(&dir.join("six.csv"), &ReadOptions::default()).unwrap();
    let (m, a, d) = annual_sinusoid(&series);
    let s_series = run_case(&dir, "series", "series = \"six.csv\"");
    let s_sin = run_case(
        &dir,
        "sinusoid",
        &format!(
            "mean_c = {m:.3}\namplitude_k = {a:.3}\ncoldest_day = {:.0}",
            d.round()
        ),
    );
    let winters = s_series["winters"].as_array().unwrap();
    assert_eq!(winters.len(), 5);
    let depths: Vec<f64> = winters
        .iter()
        .map(|w| w["frost_depth_open_ground_m"].as_f64().unwrap())
        .collect();
    let (lo, hi) = depths
        .iter()
        .fold((f64::MAX, f64::MIN), |(l, h), &v| (l.min(v), h.max(v)));
    let sin = s_sin["frost_depth_open_ground_m"].as_f64().unwrap();
    assert!(
        sin >= 0.8 * lo && sin <= 1.2 * hi,
        "sinusoid {sin} vs winters {depths:?}"
    );
    // The reported winter is the one with the least frost margin.
    let least = winters
        .iter()
        .map(|w| w["frost_margin_m"].as_f64().unwrap())
        .fold(f64::INFINITY, f64::min);
    assert!((s_series["frost_margin_m"].as_f64().unwrap() - least).abs() < 1e-9);
    assert!(dir.join("series/winters.csv").exists());
    assert!(s_series["energy_balance_error"].as_f64().unwrap().abs() < 1e-3);
    // The periodicity estimate is for a repeated design year only.
    assert!(s_series["periodicity_error_heat_loss_kwh"].is_null());
}

/// A design winter for a longer return period is colder, so its frost never goes shallower
/// (monotonicity of the design freezing index and of conduction).
#[test]
fn colder_return_period_never_shallower() {
    let dir = scratch("design-years");
    let csv = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("climate/kettle-hollow.csv");
    let mut last = (0.0, 0.0);
    for t in [5.0, 50.0, 500.0] {
        let s = run_case(
            &dir,
            &format!("t{t}"),
            &format!(
                "design_from_series = \"{}\"\nreturn_period_years = {t}",
                csv.display()
            ),
        );
        let fi = s["design_winter"]["freezing_index_c_days"]
            .as_f64()
            .unwrap();
        let depth = s["frost_depth_open_ground_m"].as_f64().unwrap();
        assert!(
            fi > last.0 && depth >= last.1,
            "T {t}: index {fi} depth {depth} after {last:?}"
        );
        last = (fi, depth);
    }
}

/// Surface conditions: a freezing n-factor of 0.5 halves the surface freezing index used by the
/// closed-form cross-checks (n = surface/air index, its definition) and makes the frost shallower;
/// a winter snow cover (an added surface resistance) does too. Both only reduce frost (common
/// practice: snow and low n-factors insulate).
#[test]
fn n_factor_and_snow_reduce_frost() {
    let dir = scratch("surface");
    let base = "mean_c = 3.0\namplitude_k = 14.0\ncoldest_day = 20";
    let bare = run_case(&dir, "bare", base);
    let half = run_case(&dir, "nf", &format!("{base}\nn_factor_freezing = 0.5"));
    let snow = run_case(&dir, "snow", &format!("{base}\nsnow_depth_m = [0.3, 0.35, 0.3, 0.1, 0, 0, 0, 0, 0, 0, 0.05, 0.2]\nsnow_conductivity_w_per_mk = 0.2"));
    let fi = |s: &serde_json::Value| s["cross_check"]["freezing_index_c_days"].as_f64().unwrap();
    let depth = |s: &serde_json::Value| s["frost_depth_open_ground_m"].as_f64().unwrap();
    assert!((fi(&half) / fi(&bare) - 0.5).abs() < 1e-9);
    assert!(
        depth(&half) < 0.85 * depth(&bare),
        "n 0.5: {} vs {}",
        depth(&half),
        depth(&bare)
    );
    assert!(
        depth(&snow) < 0.9 * depth(&bare),
        "snow: {} vs {}",
        depth(&snow),
        depth(&bare)
    );
}

/// A series whose dates span thousands of years, or a file without end, is refused with its
/// bound before memory is spent on it (hardening findings 2 and 3: these used to abort on
/// allocation after reading gigabytes).
#[test]
fn series_bounds_are_checked_first() {
    let dir = scratch("series-bounds");
    let f = dir.join("span.csv");
    std::fs::write(&f, "date,temperature_c\n2030-01-01,1.0\n99999-01-01,2.0\n").unwrap();
    let o = crate::cli::bin().arg("climate").arg(&f).output().unwrap();
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("at most 73200 days"));
    if std::path::Path::new("/dev/zero").exists() {
        let t0 = std::time::Instant::now();
        let o = crate::cli::bin()
            .args(["climate", "/dev/zero"])
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(2));
        assert!(String::from_utf8_lossy(&o.stderr).contains("larger than 256 MB"));
        assert!(t0.elapsed().as_secs_f64() < 20.0);
    }
}
