//! `frostline uncertainty` and `frostline merge`: a design with no spread reproduces the single
//! run; with one sampled input the probability of frost in the protected zone agrees with a
//! bisection on that input; sharded and merged equals unsharded exactly; the case's
//! `[uncertainty]` table is validated.
use crate::cli::{bin, scratch};
use crate::common::{read_json, run_ok, single_run};
use frostline::case::parse_case;
use serde_json::Value;
use std::path::{Path, PathBuf};

fn demo() -> String {
    std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/kettle-hollow-house.toml"),
    )
    .unwrap()
}

/// The demo with an `[uncertainty]` table.
fn with_table(table: &str) -> String {
    format!("{}\n{table}", demo())
}

/// `frostline uncertainty CASE --out OUT --mesh coarse --quiet` plus `extra`.
fn spread(dir: &Path, name: &str, src: &str, extra: &[&str]) -> PathBuf {
    let case = dir.join(format!("{name}.toml"));
    std::fs::write(&case, src).unwrap();
    let out = dir.join(name);
    let mut args: Vec<std::ffi::OsString> = vec![
        "uncertainty".into(),
        case.into(),
        "--out".into(),
        out.clone().into(),
        "--mesh".into(),
        "coarse".into(),
        "--quiet".into(),
    ];
    args.extend(extra.iter().map(std::ffi::OsString::from));
    run_ok(&args);
    out
}

/// samples.csv without its wall-time column (the only figure that differs between runs).
fn samples_without_times(dir: &Path) -> String {
    let text = std::fs::read_to_string(dir.join("samples.csv")).unwrap();
    let mut lines = text.lines();
    let head: Vec<&str> = lines.next().unwrap().split(',').collect();
    let t = head.iter().position(|h| *h == "run_s").unwrap();
    std::iter::once(text.lines().next().unwrap().to_string())
        .chain(lines.map(|l| {
            l.split(',')
                .enumerate()
                .filter(|(k, _)| *k != t)
                .map(|(_, v)| v)
                .collect::<Vec<_>>()
                .join(",")
        }))
        .collect::<Vec<_>>()
        .join("\n")
}

/// With no spread (sd = 0) every sample is the case itself: its frost margin, frost depths and
/// heat losses equal those of `frostline run` on the same mesh to the last digit, and P(frost in
/// the zone) is 0 or 1 as the single run's margin says.
#[test]
fn no_spread_reproduces_the_single_run() {
    let dir = scratch("spread-zero");
    let src = with_table(
        "[uncertainty]\nsamples = 2\n[[uncertainty.input]]\nkey = \"climate.mean_c\"\ndistribution = \"normal\"\nmean = 3.0\nsd = 0.0\n",
    );
    let out = spread(&dir, "zero", &src, &[]);
    let case = dir.join("zero.toml");
    let s = single_run(&case, &dir.join("single"));
    let u = read_json(&out.join("uncertainty.json"));
    let st = &u["stats"];
    for (k, sk) in [
        ("frost_margin_m", "frost_margin_m"),
        ("frost_depth_under_footing_m", "frost_depth_under_footing_m"),
        ("annual_heat_loss_kwh", "annual_heat_loss_kwh"),
        ("peak_heat_loss_w", "peak_heat_loss_w"),
    ] {
        let want = s[sk].as_f64().unwrap();
        for p in ["min", "p50", "max"] {
            assert_eq!(st[k][p].as_f64().unwrap(), want, "{k}.{p}");
        }
    }
    let frost = s["frost_margin_m"].as_f64().unwrap() < 0.0;
    assert_eq!(
        st["p_frost_in_zone"].as_f64().unwrap(),
        if frost { 1.0 } else { 0.0 }
    );
    assert_eq!(st["samples_run"], 2);
}

/// One sampled input, the design amplitude uniform on [15, 19] K: the margin falls as the
/// amplitude grows, so frost enters the zone exactly when the amplitude exceeds a*, found by
/// bisection (8 halvings of [15, 19]: ±0.016 K), and P = (19 − a*)/4. A one-input Latin
/// hypercube of n samples has one sample in each of the n equal-probability strata (McKay et al.
/// 1979), so its estimate k/n is within 1/n of P for a monotone response (plus the bisection's
/// 0.004).
#[test]
fn one_input_probability_agrees_with_bisection() {
    let dir = scratch("spread-one");
    let n = 16;
    let src = with_table(&format!(
        "[uncertainty]\nsamples = {n}\nseed = 5\n[[uncertainty.input]]\nkey = \"climate.amplitude_k\"\ndistribution = \"uniform\"\nmin = 15.0\nmax = 19.0\n"
    ));
    let out = spread(&dir, "one", &src, &[]);
    let p_hat = read_json(&out.join("uncertainty.json"))["stats"]["p_frost_in_zone"]
        .as_f64()
        .unwrap();
    let margin = |a: f64| {
        let text = demo().replace(
            "amplitude_k = 14.0               # K",
            &format!("amplitude_k = {a}"),
        );
        let mut c = parse_case("bisect.toml", &text).unwrap();
        c.simulation.mesh = frostline::case::Fineness::Coarse;
        let r = frostline::run::run(&c, &mut |_| {}).unwrap();
        frostline::run::headline(&c, &r).frost_margin_m
    };
    let (mut lo, mut hi) = (15.0, 19.0);
    assert!(
        margin(lo) >= 0.0 && margin(hi) < 0.0,
        "the margin must cross 0 in [15, 19]"
    );
    for _ in 0..8 {
        let mid = 0.5 * (lo + hi);
        if margin(mid) >= 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    let p = (19.0 - 0.5 * (lo + hi)) / 4.0;
    assert!(
        (p_hat - p).abs() <= 1.0 / n as f64 + 0.004,
        "P estimated {p_hat}, by bisection {p} (a* ≈ {})",
        0.5 * (lo + hi)
    );
}

/// Two shards (one from `--shard 1/2`, one from the Slurm array variables of a stepped array)
/// merged give the same samples.csv (run times aside) and the same statistics as the unsharded
/// run, an untruncated normal input included (its infinite bounds are `null` in the JSON); a
/// merge with a shard missing is refused.
#[test]
fn sharded_and_merged_equals_unsharded() {
    let dir = scratch("spread-shards");
    let src = with_table(
        "[uncertainty]\nsamples = 5\nseed = 11\n[[uncertainty.input]]\nkey = \"insulation[2].depth_m\"\ndistribution = \"uniform\"\nmin = 0.25\nmax = 0.35\n[[uncertainty.input]]\nkey = \"soil[0].water_content\"\ndistribution = \"triangular\"\nmin = 0.10\nmode = 0.15\nmax = 0.20\n[[uncertainty.input]]\nkey = \"climate.amplitude_k\"\ndistribution = \"normal\"\nmean = 14.0\nsd = 0.5\n",
    )
    .replace(
        "library = \"silty-sand\"",
        "library = \"silty-sand\"\nwater_content = 0.15",
    );
    let whole = spread(&dir, "case", &src, &[]);
    let parts = dir.join("parts");
    let case = dir.join("case.toml");
    let args = |extra: &[&str]| {
        let mut a: Vec<std::ffi::OsString> = vec![
            "uncertainty".into(),
            case.clone().into(),
            "--out".into(),
            parts.clone().into(),
            "--mesh".into(),
            "coarse".into(),
            "--quiet".into(),
        ];
        a.extend(extra.iter().map(std::ffi::OsString::from));
        a
    };
    run_ok(&args(&["--shard", "1/2"]));
    let o = bin()
        .args(args(&[]))
        .env("SLURM_ARRAY_TASK_ID", "9")
        .env("SLURM_ARRAY_TASK_MIN", "7")
        .env("SLURM_ARRAY_TASK_STEP", "2")
        .env("SLURM_ARRAY_TASK_COUNT", "2")
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let (s1, s2) = (parts.join("shard-1-of-2"), parts.join("shard-2-of-2"));
    assert!(s1.join("samples.csv").exists() && s2.join("samples.csv").exists());
    let merged = dir.join("merged");
    run_ok(&[
        "merge".as_ref(),
        s1.as_os_str(),
        s2.as_os_str(),
        "--out".as_ref(),
        merged.as_os_str(),
    ]);
    assert_eq!(
        samples_without_times(&merged),
        samples_without_times(&whole)
    );
    let stats = |d: &Path| -> Value { read_json(&d.join("uncertainty.json"))["stats"].clone() };
    assert_eq!(stats(&merged), stats(&whole));
    let report = std::fs::read_to_string(merged.join("report.html")).unwrap();
    assert!(report.contains("Caution.") && report.contains("fig-uncertainty_margin"));
    // A shard missing.
    let o = bin()
        .args([
            "merge".as_ref(),
            s1.as_os_str(),
            "--out".as_ref(),
            dir.join("half").as_os_str(),
        ])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("missing shards: [2]"));
}

/// The `[uncertainty]` table is checked like any other: an unknown key path, a distribution
/// without its parameters, an unknown distribution, a mode outside [min, max].
#[test]
fn uncertainty_table_is_validated() {
    let bad = |table: &str, want: &str| {
        let e = parse_case("u.toml", &with_table(table))
            .unwrap_err()
            .to_string();
        assert!(e.contains(want), "{want}: {e}");
    };
    bad(
        "[uncertainty]\n[[uncertainty.input]]\nkey = \"soil[3].water_content\"\ndistribution = \"uniform\"\nmin = 0.1\nmax = 0.2\n",
        "uncertainty.input[0].key: \"soil[3].water_content\" is not a number given in this case",
    );
    bad(
        "[uncertainty]\n[[uncertainty.input]]\nkey = \"climate.mean_c\"\ndistribution = \"normal\"\nmean = 3.0\n",
        "uncertainty.input[0].sd: missing (normal distribution)",
    );
    bad(
        "[uncertainty]\n[[uncertainty.input]]\nkey = \"climate.mean_c\"\ndistribution = \"weibull\"\n",
        "\"weibull\" is not a distribution; allowed: normal, lognormal, uniform, triangular",
    );
    bad(
        "[uncertainty]\n[[uncertainty.input]]\nkey = \"climate.mean_c\"\ndistribution = \"triangular\"\nmin = 1.0\nmode = 5.0\nmax = 4.0\n",
        "uncertainty.input[0].mode: outside [min, max]",
    );
    bad(
        "[uncertainty]\nsamples = 1\n[[uncertainty.input]]\nkey = \"climate.mean_c\"\ndistribution = \"uniform\"\nmin = 1.0\nmax = 4.0\n",
        "uncertainty.samples: 1 is out of range; allowed: 2 to 100000",
    );
    assert!(parse_case("u.toml", &with_table("[uncertainty]\n[[uncertainty.input]]\nkey = \"climate.mean_c\"\ndistribution = \"uniform\"\nmin = 1.0\nmax = 4.0\n")).is_ok());
}

/// The bundled example runs (cut to 4 samples on the coarse mesh): every output written, the four
/// inputs ranked, the percentiles ordered.
#[test]
fn bundled_example_runs() {
    let dir = scratch("spread-example");
    let case =
        Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/kettle-hollow-uncertainty.toml");
    let out = dir.join("out");
    let stdout = run_ok(&[
        "uncertainty".as_ref(),
        case.as_os_str(),
        "--out".as_ref(),
        out.as_os_str(),
        "--mesh".as_ref(),
        "coarse".as_ref(),
        "--samples".as_ref(),
        "4".as_ref(),
        "--quiet".as_ref(),
    ]);
    assert!(stdout.contains("P(frost in the protected zone)") && stdout.contains("Caution"));
    for f in [
        "samples.csv",
        "uncertainty.json",
        "uncertainty_margin.png",
        "uncertainty_tornado.svg",
        "report.html",
        "manifest.json",
    ] {
        assert!(out.join(f).exists(), "{f}");
    }
    let u = read_json(&out.join("uncertainty.json"));
    assert_eq!(u["stats"]["sensitivity"].as_array().unwrap().len(), 4);
    let m = &u["stats"]["frost_margin_m"];
    let p = |k: &str| m[k].as_f64().unwrap();
    assert!(
        p("min") <= p("p05")
            && p("p05") <= p("p50")
            && p("p50") <= p("p95")
            && p("p95") <= p("max")
    );
}

/// A sample whose run stops on its own terms (frost down to a 3 m domain's bottom in a severe
/// winter) is recorded as failed, the others still run and are reported, and the summary bounds
/// P by counting the failed ones as frost in the zone.
#[test]
fn failed_samples_are_recorded_and_bound_p() {
    let dir = scratch("spread-failed");
    let src = demo()
        .replace(
            "mean_c = 3.0                     # annual mean air temperature, °C",
            "mean_c = 2.5",
        )
        .replace("amplitude_k = 14.0               # K", "amplitude_k = 5.0")
        .replace("mesh = \"normal\"", "mesh = \"normal\"\ndomain_depth_m = 3.0")
        + "\n[uncertainty]\nsamples = 8\n[[uncertainty.input]]\nkey = \"climate.amplitude_k\"\ndistribution = \"uniform\"\nmin = 4.0\nmax = 30.0\n";
    let out = spread(&dir, "cold", &src, &[]);
    let csv = std::fs::read_to_string(out.join("samples.csv")).unwrap();
    let failed = csv.lines().filter(|l| l.contains("failed:")).count();
    let u = read_json(&out.join("uncertainty.json"));
    let st = &u["stats"];
    assert!(failed > 0 && failed < 8, "{failed} failed");
    assert_eq!(st["samples_refused"].as_u64().unwrap() as usize, failed);
    assert_eq!(st["samples_run"].as_u64().unwrap() as usize, 8 - failed);
    let report = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(report.contains("counting the") && report.contains("as frost in the zone"));
}

/// The first four calendar years of the invented Kettle Hollow series (complete seasons 1990,
/// 1991, 1992) beside the series demo case (at most 30 spin-up years: the fitted normal year of
/// this house needs 14), in `dir`; returns the case
/// text (its series `short.csv`).
fn short_series_case(dir: &Path) -> String {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let full = std::fs::read_to_string(root.join("climate/kettle-hollow.csv")).unwrap();
    let short: String = full
        .lines()
        .take_while(|l| !l.starts_with("1994-"))
        .map(|l| format!("{l}\n"))
        .collect();
    std::fs::write(dir.join("short.csv"), short).unwrap();
    let src = std::fs::read_to_string(root.join("examples/kettle-hollow-series.toml")).unwrap();
    assert!(src.contains("series = \"../climate/kettle-hollow.csv\""));
    src.replace("../climate/kettle-hollow.csv", "short.csv")
        .replace("max_spin_up_years = 10", "max_spin_up_years = 30")
}

/// Freezing index of the season from 1 July `y`, by ISO 13793 Annex A's definition computed here
/// on its own: the largest rise over the season of the cumulative sum of (0 °C − daily mean).
fn iso13793_freezing_index(csv: &str, y: i64) -> f64 {
    let (from, to) = (format!("{y}-07-01"), format!("{}-06-30", y + 1));
    let days: Vec<f64> = csv
        .lines()
        .filter(|l| l.starts_with(char::is_numeric))
        .filter_map(|l| l.split_once(','))
        .filter(|(d, _)| *d >= from.as_str() && *d <= to.as_str())
        .map(|(_, t)| t.trim().parse::<f64>().unwrap())
        .collect();
    assert_eq!(days.len(), if (y + 1) % 4 == 0 { 366 } else { 365 });
    let mut best = 0.0f64;
    for i in 0..days.len() {
        let mut s = 0.0;
        for t in &days[i..] {
            s -= t;
            best = best.max(s);
        }
    }
    best
}

/// The winter drawn from a measured series (`climate.season`, distribution `seasons`): with as
/// many samples as seasons a one-input Latin hypercube runs each season exactly once (McKay et
/// al. 1979: one sample per equal-probability stratum); a sample equals `frostline run` of the
/// case with that `season` to the last digit; that run's freezing index is n × the season's index
/// by ISO 13793 Annex A's definition; the season is ranked by its freezing index; a season
/// outside the series, a season without a series and the seasons distribution on another key are
/// refused.
#[test]
fn winter_drawn_from_the_series() {
    let dir = scratch("spread-seasons");
    let case = short_series_case(&dir);
    let src = format!(
        "{case}\n[uncertainty]\nsamples = 3\nseed = 2\n[[uncertainty.input]]\nkey = \"climate.season\"\ndistribution = \"seasons\"\n"
    );
    let out = spread(&dir, "seasons", &src, &[]);
    let text = std::fs::read_to_string(out.join("samples.csv")).unwrap();
    let head: Vec<&str> = text.lines().next().unwrap().split(',').collect();
    let col = |name: &str| head.iter().position(|h| *h == name).unwrap();
    let rows: Vec<Vec<String>> = text
        .lines()
        .skip(1)
        .map(|l| l.split(',').map(String::from).collect())
        .collect();
    let mut seasons: Vec<i64> = rows
        .iter()
        .map(|r| r[col("climate.season")].parse().unwrap())
        .collect();
    seasons.sort();
    assert_eq!(seasons, [1990, 1991, 1992]);
    assert!(rows.iter().all(|r| r[col("periodic")] == "true"));
    let u = read_json(&out.join("uncertainty.json"));
    assert_eq!(
        u["stats"]["sensitivity"][0]["ranked_by"].as_str(),
        Some("freezing index")
    );

    // The sample of season 1991 against the single run of that season.
    let row = rows
        .iter()
        .find(|r| r[col("climate.season")] == "1991")
        .unwrap();
    let one = dir.join("one.toml");
    std::fs::write(
        &one,
        case.replace(
            "series = \"short.csv\"",
            "series = \"short.csv\"\nseason = 1991",
        ),
    )
    .unwrap();
    let s = single_run(&one, &dir.join("single"));
    for k in ["frost_margin_m", "annual_heat_loss_kwh", "peak_heat_loss_w"] {
        let sample: f64 = row[col(k)].parse().unwrap();
        assert_eq!(sample, s[k].as_f64().unwrap(), "{k}");
    }
    assert_eq!(s["climate"]["season"], 1991);
    let csv = std::fs::read_to_string(dir.join("short.csv")).unwrap();
    let fi = 0.9 * iso13793_freezing_index(&csv, 1991);
    let got = s["cross_check"]["freezing_index_c_days"].as_f64().unwrap();
    assert!((got - fi).abs() < 1e-9 * fi, "{got} {fi}");

    let bad = |text: &str, want: &str| {
        let e = parse_case(dir.join("bad.toml").to_str().unwrap(), text)
            .unwrap_err()
            .to_string();
        assert!(e.contains(want), "{want}: {e}");
    };
    bad(
        &case.replace("series = \"short.csv\"", "series = \"short.csv\"\nseason = 1993"),
        "climate.season: 1993 is not a complete season of the series (1 July 1993 to 30 June 1994); allowed: 1990 to 1992",
    );
    bad(
        &with_table("[uncertainty]\n[[uncertainty.input]]\nkey = \"climate.season\"\ndistribution = \"seasons\"\n"),
        "climate.season needs a measured series",
    );
    bad(
        &with_table("[uncertainty]\n[[uncertainty.input]]\nkey = \"climate.mean_c\"\ndistribution = \"seasons\"\n"),
        "\"climate.mean_c\" cannot take the seasons distribution",
    );
    bad(
        &demo().replace("[climate]", "[climate]\nseason = 1991"),
        "climate.season: only used with series",
    );
}

/// A 3D case's samples run in 3D: with no spread each sample equals `frostline run` of the 3D
/// case (its whole-building headline: least frost margin anywhere round the building, annual and
/// peak loss) to the last digit, not the 2D section's.
#[test]
fn three_d_samples_run_in_3d() {
    let dir = scratch("spread-3d");
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let src = std::fs::read_to_string(root.join("examples/alder-bend-house-3d.toml")).unwrap();
    let src = format!(
        "{src}\n[uncertainty]\nsamples = 2\n[[uncertainty.input]]\nkey = \"climate.amplitude_k\"\ndistribution = \"normal\"\nmean = 14.0\nsd = 0.0\n"
    );
    let out = spread(&dir, "three", &src, &[]);
    let s = single_run(&dir.join("three.toml"), &dir.join("single"));
    let st = &read_json(&out.join("uncertainty.json"))["stats"];
    let h = &s["three_d"]["headline"];
    for k in ["frost_margin_m", "annual_heat_loss_kwh", "peak_heat_loss_w"] {
        let want = h[k].as_f64().unwrap();
        assert_eq!(st[k]["min"].as_f64().unwrap(), want, "{k}");
        assert_eq!(st[k]["max"].as_f64().unwrap(), want, "{k}");
        assert_ne!(s[k].as_f64().unwrap(), want, "{k}: the 2D section's");
    }
}

/// The design freezing index's return period sampled (`climate.return_period_years` of a
/// `design_from_series` case, uniform on [10, 200] years): a longer return period gives a larger
/// Gumbel design index (the return level grows with T, Gumbel 1958) and so a colder design winter:
/// the frost margin falls and the peak loss rises with it in every sample (rank correlations −1
/// and +1 over 4 samples), and the annual loss of the normal year does not change.
#[test]
fn return_period_sampled() {
    let dir = scratch("spread-return");
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let src = std::fs::read_to_string(root.join("examples/kettle-hollow-series.toml"))
        .unwrap()
        .replace(
            "series = \"../climate/kettle-hollow.csv\"",
            &format!(
                "design_from_series = \"{}\"\nreturn_period_years = 50",
                root.join("climate/kettle-hollow.csv").display()
            ),
        )
        .replace("max_spin_up_years = 10", "max_spin_up_years = 30");
    let src = format!(
        "{src}\n[uncertainty]\nsamples = 4\nseed = 9\n[[uncertainty.input]]\nkey = \"climate.return_period_years\"\ndistribution = \"uniform\"\nmin = 10.0\nmax = 200.0\n"
    );
    let out = spread(&dir, "return", &src, &[]);
    let u = read_json(&out.join("uncertainty.json"));
    let sens = &u["stats"]["sensitivity"][0];
    assert_eq!(sens["rank_correlation_margin"].as_f64(), Some(-1.0));
    let heat = &u["stats"]["annual_heat_loss_kwh"];
    assert_eq!(heat["min"], heat["max"]);
    let text = std::fs::read_to_string(out.join("samples.csv")).unwrap();
    let head: Vec<&str> = text.lines().next().unwrap().split(',').collect();
    let col = |name: &str| head.iter().position(|h| *h == name).unwrap();
    let mut rows: Vec<(f64, f64)> = text
        .lines()
        .skip(1)
        .map(|l| {
            let f: Vec<&str> = l.split(',').collect();
            (
                f[col("climate.return_period_years")].parse().unwrap(),
                f[col("peak_heat_loss_w")].parse().unwrap(),
            )
        })
        .collect();
    rows.sort_by(|a, b| a.0.total_cmp(&b.0));
    assert!(rows.windows(2).all(|w| w[1].1 > w[0].1), "{rows:?}");
}

/// `--units us` (here on a merge of a whole run): the printed percentiles are the SI ones
/// converted by NIST SP 811's factors (1 ft = 0.3048 m, 1 kWh = 3 412.142 Btu, 1 W =
/// 3.412 142 Btu/h), the margin plot's axis is in feet, and uncertainty.json keeps SI.
#[test]
fn uncertainty_outputs_in_us_units() {
    let dir = scratch("spread-us");
    let src = with_table(
        "[uncertainty]\nsamples = 3\n[[uncertainty.input]]\nkey = \"climate.amplitude_k\"\ndistribution = \"uniform\"\nmin = 13.0\nmax = 15.0\n",
    );
    let out = spread(&dir, "si", &src, &[]);
    let us = dir.join("us");
    let text = run_ok(&[
        "merge".as_ref(),
        out.as_os_str(),
        "--out".as_ref(),
        us.as_os_str(),
        "--units".as_ref(),
        "us".as_ref(),
    ]);
    let si = read_json(&out.join("uncertainty.json"))["stats"].clone();
    assert_eq!(read_json(&us.join("uncertainty.json"))["stats"], si);
    let printed = |label: &str, unit: &str| -> f64 {
        let line = text
            .lines()
            .find(|l| l.trim_start().starts_with(label))
            .unwrap_or_else(|| panic!("{label} not printed:\n{text}"));
        let f: Vec<&str> = line[label.len() + 4..].split_whitespace().collect();
        assert_eq!(f[0], unit, "{line}");
        f[3].parse().unwrap()
    };
    let median = |k: &str| si[k]["p50"].as_f64().unwrap();
    let m = printed("frost margin to the protected zone", "ft");
    assert!(
        (m - median("frost_margin_m") / 0.3048).abs() <= 0.0005,
        "{m}"
    );
    let e = printed("annual ground heat loss", "kBtu");
    assert!(
        (e - median("annual_heat_loss_kwh") * 3.412_142).abs() <= 0.5,
        "{e}"
    );
    let w = printed("peak ground heat loss", "Btu/h");
    assert!(
        (w - median("peak_heat_loss_w") * 3.412_142).abs() <= 0.05,
        "{w}"
    );
    let svg = std::fs::read_to_string(us.join("uncertainty_margin.svg")).unwrap();
    assert!(svg.contains("frost margin to the protected zone (ft)"));
}
