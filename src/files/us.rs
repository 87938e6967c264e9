//! Results in US customary units (`--units us`). Every result key and CSV column names its unit in
//! its last part (`frost_depth_open_ground_m`, `annual_heat_loss_kwh`); the US form renames that
//! part and converts the value: `_ft`, `_kbtu`, `_btu_per_h`, `_f`, ... summary.json and the CSV
//! files stay in SI; `summary_us.json` and `NAME_us.csv` are written beside them, and the
//! terminal table and the report show US units.
//!
//! Factors: the exact foot and degree Fahrenheit, and NIST Special Publication 811 (2008),
//! Appendix B.9, with the international-table Btu (1 Btu_IT/h = 0.293 071 1 W).
use serde_json::Value;

/// Output units.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Units {
    /// SI (the default).
    #[default]
    Si,
    /// US customary.
    Us,
}

/// One SI unit and its US counterpart: `us = (si − offset) / scale`.
struct Pair {
    si_key: &'static str,
    us_key: &'static str,
    si_label: &'static str,
    us_label: &'static str,
    /// SI value of one US unit.
    scale: f64,
    offset: f64,
    /// Extra decimals the US figure needs (its numbers are smaller).
    more: usize,
}

/// W per Btu_IT/h: 1 Btu_IT = 1 055.055 852 62 J exactly (NIST SP 811 B.8), over 3600 s
/// (0.293 071 1 W, NIST SP 811 B.9).
const BTU_H: f64 = 1_055.055_852_62 / 3600.0;
const F: f64 = 5.0 / 9.0;

/// Longest key endings first (so `_w_per_m2k` is found before `_w`).
const PAIRS: &[Pair] = &[
    // 1 Btu_IT/(h·ft²·°F) = 5.678 263 W/(m²·K) (NIST SP 811 B.9).
    Pair {
        si_key: "_w_per_m2k",
        us_key: "_btu_per_h_ft2_f",
        si_label: "W/(m²K)",
        us_label: "Btu/(h·ft²·°F)",
        scale: 5.678_263,
        offset: 0.0,
        more: 1,
    },
    // 1 h·ft²·°F/Btu_IT = 0.176 110 2 m²·K/W (NIST SP 811 B.9).
    Pair {
        si_key: "_m2k_per_w",
        us_key: "_h_ft2_f_per_btu",
        si_label: "m²K/W",
        us_label: "h·ft²·°F/Btu",
        scale: 0.176_110_2,
        offset: 0.0,
        more: 0,
    },
    // Conductivity: 1 Btu_IT·in/(h·ft²·°F) = 0.144 227 9 W/(m·K); a linear transmittance (Ψ,
    // coupling per length): 1 Btu_IT/(h·ft·°F) = 1.730 735 W/(m·K) (NIST SP 811 B.9). The key
    // tells them apart (see `pair`).
    Pair {
        si_key: "_w_per_mk",
        us_key: "_btu_per_h_ft_f",
        si_label: "W/(mK)",
        us_label: "Btu/(h·ft·°F)",
        scale: 1.730_735,
        offset: 0.0,
        more: 0,
    },
    // 1 Btu_IT/(ft³·°F) = 6.706 611 E+04 J/(m³·K) (from the exact Btu_IT, foot and °F).
    Pair {
        si_key: "_j_per_m3k",
        us_key: "_btu_per_ft3_f",
        si_label: "J/(m³K)",
        us_label: "Btu/(ft³·°F)",
        scale: 67_066.11,
        offset: 0.0,
        more: 0,
    },
    // 1 Btu_IT/ft³ = 3.725 895 E+04 J/m³ (NIST SP 811 B.9).
    Pair {
        si_key: "_j_per_m3",
        us_key: "_btu_per_ft3",
        si_label: "J/m³",
        us_label: "Btu/ft³",
        scale: 37_258.95,
        offset: 0.0,
        more: 0,
    },
    // 1 Btu_IT/(h·ft) = 0.293 071 1 W / 0.3048 m = 0.961 520 W/m.
    Pair {
        si_key: "_w_per_m",
        us_key: "_btu_per_h_ft",
        si_label: "W/m",
        us_label: "Btu/(h·ft)",
        scale: BTU_H / 0.3048,
        offset: 0.0,
        more: 0,
    },
    // A thermal coupling: 1 Btu_IT/(h·°F) = 0.293 071 1 W / (5/9 K) = 0.527 528 W/K.
    Pair {
        si_key: "_w_per_k",
        us_key: "_btu_per_h_f",
        si_label: "W/K",
        us_label: "Btu/(h·°F)",
        scale: BTU_H / F,
        offset: 0.0,
        more: 0,
    },
    // 1 kBtu_IT = 1.055 056 MJ = 0.293 071 1 kWh.
    Pair {
        si_key: "_kwh",
        us_key: "_kbtu",
        si_label: "kWh",
        us_label: "kBtu",
        scale: BTU_H,
        offset: 0.0,
        more: 0,
    },
    Pair {
        si_key: "_w",
        us_key: "_btu_per_h",
        si_label: "W",
        us_label: "Btu/h",
        scale: BTU_H,
        offset: 0.0,
        more: 0,
    },
    Pair {
        si_key: "_c_days",
        us_key: "_f_days",
        si_label: "°C·d",
        us_label: "°F·d",
        scale: F,
        offset: 0.0,
        more: 0,
    },
    Pair {
        si_key: "_m2",
        us_key: "_ft2",
        si_label: "m²",
        us_label: "ft²",
        scale: 0.092_903_04,
        offset: 0.0,
        more: 0,
    },
    Pair {
        si_key: "_m",
        us_key: "_ft",
        si_label: "m",
        us_label: "ft",
        scale: 0.3048,
        offset: 0.0,
        more: 0,
    },
    Pair {
        si_key: "_c",
        us_key: "_f",
        si_label: "°C",
        us_label: "°F",
        scale: F,
        offset: -32.0 * F,
        more: 0,
    },
    // A temperature difference.
    Pair {
        si_key: "_k",
        us_key: "_delta_f",
        si_label: "K",
        us_label: "°F",
        scale: F,
        offset: 0.0,
        more: 0,
    },
];

/// A conductivity among the W/(m·K) keys (not a linear transmittance).
fn is_conductivity(key: &str) -> bool {
    key.starts_with("k_") || key.contains("lambda") || key.contains("conductivity")
}

/// The US key and value of SI key `key` with value `v`, if the key names a unit.
pub fn convert(key: &str, v: f64) -> Option<(String, f64)> {
    let p = PAIRS
        .iter()
        .find(|p| key.ends_with(p.si_key) && key.len() > p.si_key.len())?;
    let stem = &key[..key.len() - p.si_key.len()];
    if p.si_key == "_w_per_mk" && is_conductivity(key) {
        // 1 Btu_IT·in/(h·ft²·°F) = 0.144 227 9 W/(m·K) (NIST SP 811 B.9).
        return Some((format!("{stem}_btu_in_per_h_ft2_f"), v / 0.144_227_9));
    }
    Some((format!("{stem}{}", p.us_key), (v - p.offset) / p.scale))
}

/// A JSON document in US units: every numeric value (or array of numbers) under a key naming an
/// SI unit renamed and converted; the rest as it is.
pub fn json(v: &Value) -> Value {
    match v {
        Value::Object(m) => Value::Object(m.iter().map(|(k, x)| entry(k, x)).collect()),
        Value::Array(a) => Value::Array(a.iter().map(json).collect()),
        other => other.clone(),
    }
}

/// One key and value of an object in US units: a number or an array of numbers under a key
/// naming a unit converted, anything else recursed into.
fn entry(k: &str, x: &Value) -> (String, Value) {
    let us = |n: &Value| convert(k, n.as_f64().unwrap_or(f64::NAN));
    let numbers = match x {
        Value::Number(_) => true,
        Value::Array(a) => !a.is_empty() && a.iter().all(Value::is_number),
        _ => false,
    };
    match (numbers, convert(k, 0.0)) {
        (true, Some((uk, _))) => {
            let v = match x {
                Value::Array(a) => Value::Array(
                    a.iter()
                        .map(|n| number(us(n).map_or(f64::NAN, |c| c.1)))
                        .collect(),
                ),
                n => number(us(n).map_or(f64::NAN, |c| c.1)),
            };
            (uk, v)
        }
        (true, None) => (k.to_string(), x.clone()),
        (false, _) => (k.to_string(), json(x)),
    }
}

fn number(x: f64) -> Value {
    serde_json::Number::from_f64(x).map_or(Value::Null, Value::Number)
}

/// A CSV file (one header row, comma-separated, no quoting of numbers) in US units: each column
/// whose header names an SI unit renamed and its numbers converted (to 6 significant digits);
/// other columns and empty cells as they are.
pub fn csv(text: &str) -> crate::error::Result<String> {
    let mut r = ::csv::ReaderBuilder::new().from_reader(text.as_bytes());
    let head = r
        .headers()
        .map_err(|e| crate::error::Error::Output(format!("csv: {e}")))?
        .clone();
    let conv: Vec<Option<String>> = head.iter().map(|h| convert(h, 0.0).map(|c| c.0)).collect();
    let mut w = ::csv::Writer::from_writer(Vec::new());
    let out_err = |e: ::csv::Error| crate::error::Error::Output(format!("csv: {e}"));
    w.write_record(
        head.iter()
            .zip(&conv)
            .map(|(h, c)| c.as_deref().unwrap_or(h)),
    )
    .map_err(out_err)?;
    for rec in r.records() {
        let rec = rec.map_err(out_err)?;
        let cells: Vec<String> = rec
            .iter()
            .zip(head.iter())
            .zip(&conv)
            .map(|((cell, h), c)| match (c, cell.trim().parse::<f64>()) {
                (Some(_), Ok(x)) => {
                    let u = convert(h, x).map_or(x, |c| c.1);
                    format!("{}", sig6(u))
                }
                _ => cell.to_string(),
            })
            .collect();
        w.write_record(&cells).map_err(out_err)?;
    }
    let bytes = w
        .into_inner()
        .map_err(|e| crate::error::Error::Output(format!("csv: {e}")))?;
    Ok(String::from_utf8_lossy(&bytes).into_owned())
}

/// `x` rounded to 6 significant digits.
fn sig6(x: f64) -> f64 {
    if x == 0.0 || !x.is_finite() {
        return x;
    }
    let e = 5 - x.abs().log10().floor() as i32;
    let p = 10f64.powi(e);
    (x * p).round() / p
}

/// A displayed figure in the chosen units: the unit label, the value and its decimals. An SI
/// label without a US counterpart (and every label in SI) is shown as it is.
pub fn figure(units: Units, label: &str, v: f64, prec: usize) -> (&str, f64, usize) {
    if units == Units::Si {
        return (label, v, prec);
    }
    let norm: String = label.replace('·', "");
    match PAIRS.iter().find(|p| p.si_label.replace('·', "") == norm) {
        Some(p) => (p.us_label, (v - p.offset) / p.scale, prec + p.more),
        None => (label, v, prec),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// NIST SP 811 B.9 check values: 1 kWh = 3 412.142 Btu_IT; 1 W = 3.412 142 Btu_IT/h; a U of
    /// 5.678 263 W/(m²K) is 1 Btu/(h·ft²·°F); 1 W/(m·K) = 6.933 47 Btu·in/(h·ft²·°F) as a
    /// conductivity and 0.577 789 Btu/(h·ft·°F) as a Ψ; 0 °C = 32 °F; 1 m = 3.280 84 ft.
    #[test]
    fn nist_check_values() {
        let c = |k: &str, v: f64| convert(k, v).unwrap();
        let (k, v) = c("annual_heat_loss_kwh", 1.0);
        assert_eq!(k, "annual_heat_loss_kbtu");
        assert!((v - 3.412_142).abs() < 1e-6);
        assert!((c("peak_heat_loss_w", 1.0).1 - 3.412_142).abs() < 1e-6);
        let (k, v) = c("floor_u_value_w_per_m2k", 5.678_263);
        assert_eq!(
            (k.as_str(), (v * 1e6).round() / 1e6),
            ("floor_u_value_btu_per_h_ft2_f", 1.0)
        );
        let (k, v) = c("k_frozen_w_per_mk", 1.0);
        assert_eq!(k, "k_frozen_btu_in_per_h_ft2_f");
        assert!((v - 6.933_47).abs() < 1e-4);
        let (k, v) = c("junction_psi_w_per_mk", 1.0);
        assert_eq!(k, "junction_psi_btu_per_h_ft_f");
        assert!((v - 0.577_789).abs() < 1e-6);
        assert_eq!(
            c("mean_outdoor_temperature_c", 0.0),
            ("mean_outdoor_temperature_f".into(), 32.0)
        );
        assert!((c("frost_margin_m", 1.0).1 - 3.280_84).abs() < 1e-5);
        assert!((c("freezing_index_c_days", 1000.0).1 - 1800.0).abs() < 1e-9);
        assert_eq!(convert("day_of_year", 3.0), None);
        // A coupling in W/K is not a temperature difference: 1 W/K = 1.895 634 Btu/(h·°F).
        let (k, v) = c("h_g_w_per_k", 1.0);
        assert_eq!(k, "h_g_btu_per_h_f");
        assert!((v - 1.895_634).abs() < 1e-6, "{v}");
    }

    /// CSV: converted headers and numbers, other columns and empty cells untouched.
    #[test]
    fn csv_columns() {
        let t = "day_of_year,date,outdoor_temperature_c,frost_depth_open_ground_m,frost_top_open_ground_m\n1,--01-01,-10.000,0.3048,\n";
        let u = csv(t).unwrap();
        assert_eq!(
            u,
            "day_of_year,date,outdoor_temperature_f,frost_depth_open_ground_ft,frost_top_open_ground_ft\n1,--01-01,14,1,\n"
        );
        assert_eq!(
            figure(Units::Us, "W/(m²K)", 0.29, 3),
            ("Btu/(h·ft²·°F)", 0.29 / 5.678_263, 4)
        );
        assert_eq!(figure(Units::Si, "m", 1.0, 2), ("m", 1.0, 2));
    }
}
