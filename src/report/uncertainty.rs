//! The printed summary of `frostline uncertainty` and `frostline merge`, from `uncertainty.json`.
use crate::files::uncertainty::UncertaintyFile;
use crate::uncertainty::Spread;

/// One result's row: percentiles with `d` decimals.
fn row(label: &str, unit: &str, s: &Option<Spread>, d: usize) -> String {
    match s {
        Some(s) => format!(
            "    {label:<34}{unit:>5}  {:>9.d$} {:>9.d$} {:>9.d$} {:>9.d$} {:>9.d$}\n",
            s.p05, s.p25, s.p50, s.p75, s.p95
        ),
        None => format!("    {label:<34}{unit:>5}  (no sample ran)\n"),
    }
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
        t += &format!("    {:<34} {:?}\n", i.key, i.distribution);
    }
    t += &format!(
        "\n  Results of {} samples run{}                 5 %      25 %    median      75 %      95 %\n",
        st.samples_run,
        if st.samples_refused > 0 {
            format!(" ({} refused by the case rules)", st.samples_refused)
        } else {
            String::new()
        }
    );
    t += &row(
        "frost margin to the protected zone",
        "m",
        &st.frost_margin_m,
        3,
    );
    t += &row(
        "frost below the footing",
        "m",
        &st.frost_depth_under_footing_m,
        3,
    );
    t += &row(
        "frost at the footing's outer face",
        "m",
        &st.frost_depth_at_footing_face_m,
        3,
    );
    t += &row(
        "annual ground heat loss",
        "kWh",
        &st.annual_heat_loss_kwh,
        0,
    );
    t += &row("peak ground heat loss", "W", &st.peak_heat_loss_w, 1);
    t += &format!(
        "\n  P(frost in the protected zone) = {} / {} = {:.3}, 95 % interval {:.3} to {:.3}\n",
        st.frost_in_zone_count,
        st.samples_run,
        st.p_frost_in_zone,
        st.p_frost_in_zone_95ci[0],
        st.p_frost_in_zone_95ci[1]
    );
    t += "\n  Sensitivity (Spearman rank correlation)      with margin   with heat loss\n";
    let c = |v: Option<f64>| v.map_or("–".to_string(), |x| format!("{x:+.3}"));
    for s in &st.sensitivity {
        t += &format!(
            "    {:<40} {:>12} {:>16}\n",
            s.key,
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
