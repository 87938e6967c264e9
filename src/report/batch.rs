//! The terminal summary of a batch: one line per case with its status and design answers.
use crate::files::batch::{BatchFile, CaseRow};
use crate::files::us::figure;
use crate::files::CAUTION;

/// The batch's table.
pub fn text(f: &BatchFile, rows: &[CaseRow]) -> String {
    let shard = if f.shard.count > 1 {
        format!(" (shard {} of {})", f.shard.index, f.shard.count)
    } else {
        String::new()
    };
    let mut t = format!(
        "Batch {}{shard}: {} case(s) listed, {} run here, {} met every criterion, {} not run\n\n",
        f.list_file,
        f.cases.len(),
        f.cases_run,
        f.cases_ok,
        f.cases_not_run
    );
    t += &format!(
        "  {:>4}  {:<28} {:>5} {:>9} {:>9} {:>9} {:>9}  {}\n",
        "case", "name", "model", "margin", "frost", "annual", "U", "status"
    );
    let unit = |si: &'static str| figure(f.units, si, 0.0, 0).0;
    t += &format!(
        "  {:>4}  {:<28} {:>5} {:>9} {:>9} {:>9} {:>9}\n",
        "",
        "",
        "",
        unit("m"),
        format!("footing {}", unit("m")),
        unit("kWh"),
        unit("W/(m²K)")
    );
    let mut rows: Vec<&CaseRow> = rows.iter().collect();
    rows.sort_by_key(|r| r.case);
    let num = |si: &str, v: f64, d: usize| {
        let (_, v, d) = figure(f.units, si, v, d);
        if v.is_finite() {
            format!("{v:.d$}")
        } else {
            "–".into()
        }
    };
    for r in rows {
        let name: String = if r.case_name.is_empty() {
            r.case_file.chars().take(28).collect()
        } else {
            r.case_name.chars().take(28).collect()
        };
        let status = match &r.error {
            Some(e) => format!("{}: {}", r.status, e.lines().next().unwrap_or("")),
            None => r.status.clone(),
        };
        t += &format!(
            "  {:>4}  {name:<28} {:>5} {:>9} {:>9} {:>9} {:>9}  {status}\n",
            r.case,
            r.model,
            num("m", r.frost_margin_m, 2),
            num("m", r.frost_depth_under_footing_m, 2),
            num("kWh", r.annual_heat_loss_kwh, 0),
            num("W/(m²K)", r.ground_u_value_w_per_m2k, 3),
        );
    }
    t += "\n  margin: frost margin to the protected zone (3D cases: the least anywhere round the building); frost footing: frost depth below the footing's bearing level; annual: ground heat loss; U: H_g/A with the junction. Each case's full results are in its directory (batch.csv: dir).\n";
    t += &format!(
        "  {:.1} s in all on {} thread(s)\n\n  Caution: {CAUTION}\n",
        f.wall_time_s, f.threads
    );
    t
}
