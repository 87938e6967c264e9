//! The printed summary of `frostline uncertainty` and `frostline merge`, from `uncertainty.json`.
use crate::files::uncertainty::UncertaintyFile;
use crate::files::us::figure;
use crate::uncertainty::Spread;

/// A distribution in words: "normal, mean 0.15, sd 0.03, truncated to [0.05, 0.3]".
pub fn describe(d: &crate::case::Distribution) -> String {
    use crate::case::Distribution as D;
    let cut = |lo: f64, hi: f64| match (lo.is_finite(), hi.is_finite()) {
        (false, false) => String::new(),
        (true, false) => format!(", at least {lo}"),
        (false, true) => format!(", at most {hi}"),
        (true, true) => format!(", truncated to [{lo}, {hi}]"),
    };
    match *d {
        D::Seasons { ref years, .. } => format!(
            "each of the series' {} complete seasons ({}–{}) equally likely, run once after the normal year",
            years.len(),
            years.iter().min().copied().unwrap_or(0),
            years.iter().max().copied().unwrap_or(0)
        ),
        D::Normal { mean, sd, min, max } => {
            format!("normal, mean {mean}, sd {sd}{}", cut(min, max))
        }
        D::Lognormal { mean, sd, min, max } => {
            format!("lognormal, mean {mean}, sd {sd}{}", cut(min, max))
        }
        D::Uniform { min, max } => format!("uniform on [{min}, {max}]"),
        D::Triangular { min, mode, max } => format!("triangular on [{min}, {max}], mode {mode}"),
    }
}

/// The results' rows in the report's units: label, unit, the 5/25/50/75/95 % percentiles (None:
/// no sample ran) and decimals.
fn results(f: &UncertaintyFile) -> Vec<(&'static str, &'static str, Option<[f64; 5]>, usize)> {
    let st = &f.stats;
    [
        (
            "frost margin to the protected zone",
            "m",
            &st.frost_margin_m,
            3,
        ),
        (
            "frost below the footing",
            "m",
            &st.frost_depth_under_footing_m,
            3,
        ),
        (
            "frost at the footing's outer face",
            "m",
            &st.frost_depth_at_footing_face_m,
            3,
        ),
        (
            "annual ground heat loss",
            "kWh",
            &st.annual_heat_loss_kwh,
            0,
        ),
        ("peak ground heat loss", "W", &st.peak_heat_loss_w, 1),
    ]
    .into_iter()
    .map(|(label, unit, s, d): (_, _, &Option<Spread>, _)| {
        let (u, _, d) = figure(f.units, unit, 0.0, d);
        let v = s
            .as_ref()
            .map(|s| [s.p05, s.p25, s.p50, s.p75, s.p95].map(|x| figure(f.units, unit, x, d).1));
        (label, u, v, d)
    })
    .collect()
}

/// The warning for samples whose spin-up did not reach a periodic year.
pub fn not_periodic(st: &crate::uncertainty::Stats) -> String {
    format!(
        "{} of the {} samples run did not reach a periodic year within simulation.max_spin_up_years (samples.csv: periodic = false): their results still drift from year to year; raise simulation.max_spin_up_years",
        st.samples_not_periodic, st.samples_run
    )
}

/// The bound that samples which did not run put on P: counted as frost in the zone (they are
/// often the severe ones, e.g. frost down to the domain's bottom).
fn not_run(st: &crate::uncertainty::Stats) -> String {
    let (k, n, f) = (st.frost_in_zone_count, st.samples_run, st.samples_refused);
    format!(
        "P counts only the samples that ran; counting the {f} that did not as frost in the zone: ({k} + {f}) / ({n} + {f}) = {:.3}",
        (k + f) as f64 / (n + f) as f64
    )
}

/// The printed summary.
pub fn text(f: &UncertaintyFile) -> String {
    let st = &f.stats;
    let mut t = format!(
        "{} — uncertainty: {} Latin-hypercube samples (seed {}), mesh {}{}\n",
        f.case_name,
        f.design.samples,
        f.design.seed,
        f.mesh,
        if f.shard.count > 1 {
            format!(", shard {} of {}", f.shard.index, f.shard.count)
        } else {
            String::new()
        }
    );
    t += "  Sampled inputs (the case's keys, in their own units):\n";
    for i in &f.design.inputs {
        t += &format!("    {:<34} {}\n", i.key, describe(&i.distribution));
    }
    if st.samples_refused > 0 {
        t += &format!(
            "\n  {} sample(s) refused by the case rules or failed in their run (samples.csv: refused_because)\n",
            st.samples_refused
        );
    }
    if st.samples_not_periodic > 0 {
        t += &format!("\n  {}\n", not_periodic(st));
    }
    let head = format!("Results of {} samples run", st.samples_run);
    t += &format!(
        "\n  {head:<43}{:>9} {:>9} {:>9} {:>9} {:>9}\n",
        "5 %", "25 %", "median", "75 %", "95 %"
    );
    for (label, unit, v, d) in results(f) {
        t += &match v {
            Some(v) => format!(
                "    {label:<34}{unit:>5}  {:>9.d$} {:>9.d$} {:>9.d$} {:>9.d$} {:>9.d$}\n",
                v[0], v[1], v[2], v[3], v[4]
            ),
            None => format!("    {label:<34}{unit:>5}  (no sample ran)\n"),
        };
    }
    t += &format!(
        "\n  P(frost in the protected zone) = {} / {} = {:.3}, 95 % interval {:.3} to {:.3}\n",
        st.frost_in_zone_count,
        st.samples_run,
        st.p_frost_in_zone.unwrap_or(f64::NAN),
        st.p_frost_in_zone_95ci[0],
        st.p_frost_in_zone_95ci[1]
    );
    if st.samples_refused > 0 {
        t += &format!("  {}\n", not_run(st));
    }
    t += "\n  Sensitivity (Spearman rank correlation)      with margin   with heat loss\n";
    let c = |v: Option<f64>| v.map_or("–".to_string(), |x| format!("{x:+.3}"));
    for s in &st.sensitivity {
        t += &format!(
            "    {:<40} {:>12} {:>16}\n",
            s.label(),
            c(s.rank_correlation_margin),
            c(s.rank_correlation_heat_loss)
        );
    }
    t += &format!(
        "\n  {} samples, median {:.2} s per sample, {:.1} s in all on {} thread(s)\n",
        st.samples_run + st.samples_refused,
        f.median_sample_s,
        f.wall_time_s,
        f.threads
    );
    for n in &f.notes {
        t += &format!("  Note: {n}\n");
    }
    t += &format!("\n  Caution: {}\n", f.caution);
    t
}

/// `report.html` of an uncertainty run: the caution, the design, the percentiles, the probability
/// of frost in the zone, the sensitivity ranking and the two plots (from the files in `dir`).
pub fn html(dir: &std::path::Path, f: &UncertaintyFile) -> crate::error::Result<String> {
    use super::html::{escape, figures, STYLE};
    let st = &f.stats;
    let mut h = format!(
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>frostline uncertainty: {}</title>\n{STYLE}</head>\n<body>\n<h1>{} — uncertainty</h1>\n",
        escape(&f.case_name),
        escape(&f.case_name)
    );
    h += &format!(
        "<p class=\"caution\"><strong>Caution.</strong> {}</p>\n",
        escape(&f.caution)
    );
    h += &format!(
        "<p>{} Latin-hypercube samples (seed {}), mesh {}, {} run, {} refused by the case rules; case file {}.</p>\n",
        f.design.samples,
        f.design.seed,
        escape(&f.mesh),
        st.samples_run,
        st.samples_refused,
        escape(&f.case_file)
    );
    h += "<h2>Sampled inputs</h2>\n<table>\n<tr><th>key (its own unit)</th><th>distribution</th></tr>\n";
    for i in &f.design.inputs {
        h += &format!(
            "<tr><td>{}</td><td>{}</td></tr>\n",
            escape(&i.key),
            escape(&describe(&i.distribution))
        );
    }
    h += "</table>\n<h2>Results</h2>\n<table>\n<tr><th>result</th><th>unit</th><th>5 %</th><th>25 %</th><th>median</th><th>75 %</th><th>95 %</th></tr>\n";
    for (label, unit, v, d) in results(f) {
        let cells = v.map_or("<td colspan=5>no sample ran</td>".to_string(), |v| {
            v.iter()
                .map(|v| format!("<td class=n>{v:.d$}</td>"))
                .collect()
        });
        h += &format!("<tr><td>{label}</td><td>{unit}</td>{cells}</tr>\n");
    }
    h += "</table>\n";
    h += &format!(
        "<p><strong>P(frost in the protected zone)</strong> = {} / {} = {:.3}; 95 % Wilson interval {:.3} to {:.3}.</p>\n",
        st.frost_in_zone_count, st.samples_run, st.p_frost_in_zone.unwrap_or(f64::NAN), st.p_frost_in_zone_95ci[0], st.p_frost_in_zone_95ci[1]
    );
    if st.samples_refused > 0 {
        h += &format!("<p class=\"caution\">{}</p>\n", escape(&not_run(st)));
    }
    if st.samples_not_periodic > 0 {
        h += &format!("<p class=\"caution\">{}</p>\n", escape(&not_periodic(st)));
    }
    h += "<h2>Sensitivity</h2>\n<table>\n<tr><th>input</th><th>rank correlation with the frost margin</th><th>with the annual heat loss</th></tr>\n";
    let c = |v: Option<f64>| v.map_or("–".to_string(), |x| format!("{x:+.3}"));
    for s in &st.sensitivity {
        h += &format!(
            "<tr><td>{}</td><td class=n>{}</td><td class=n>{}</td></tr>\n",
            escape(&s.label()),
            c(s.rank_correlation_margin),
            c(s.rank_correlation_heat_loss)
        );
    }
    h += "</table>\n";
    h += &figures(
        dir,
        &[
            ("uncertainty_margin", "The frost margin over the samples: histogram and the fraction of samples at or below each margin; red: 0, frost reaches the protected zone."),
            ("uncertainty_tornado", "Spearman rank correlation of each input with the frost margin (blue) and with the annual heat loss (orange)."),
        ],
        ("figures", "Figures"),
    )?;
    h += "<h2>Notes</h2>\n<ul>\n";
    for n in &f.notes {
        h += &format!("<li>{}</li>\n", escape(n));
    }
    h += "</ul>\n</body>\n</html>\n";
    Ok(h)
}
