//! US customary units in a case file. Every quantity key names its unit in its last part
//! (`thickness_m`, `mean_c`, `conductivity_w_per_mk`); the same key with a US unit part
//! (`thickness_in`, `mean_f`, `conductivity_btu_in_per_h_ft2_f`) gives the value in that unit.
//! Units may be mixed in one file, one unit per key: a key given in two units is refused.
//!
//! Before validation the file's text is rewritten to SI (keys renamed, numbers converted), with a
//! map back to the user's text: errors name the user's line, column and key, and range errors
//! state the value and the allowed range in the user's unit.
//!
//! Factors are exact where the unit is defined exactly (foot, inch, °F); the others are NIST
//! Special Publication 811 (2008), Appendix B.8/B.9, with the international-table Btu.
use crate::error::{Error, InputKind, Location, Result};
use std::ops::Range;

/// A US unit accepted in place of an SI unit: `si = us × scale + offset`.
#[derive(Debug, PartialEq)]
pub struct Unit {
    /// Key ending in this unit, e.g. `_in`.
    pub us: &'static str,
    /// The SI key ending it stands for, e.g. `_m`.
    pub si: &'static str,
    /// Multiplier to SI.
    pub scale: f64,
    /// Offset to SI (temperatures).
    pub offset: f64,
    /// The unit as printed.
    pub label: &'static str,
}

const F: f64 = 5.0 / 9.0;

/// The metre itself (for messages formatted like the US units' ones).
pub const METRE: Unit = Unit {
    us: "_m",
    si: "_m",
    scale: 1.0,
    offset: 0.0,
    label: "m",
};

/// The units, longest key ending first (so `_h_ft2_f_per_btu` is found before `_f`).
pub const UNITS: &[Unit] = &[
    // 1 °F·h·ft²/Btu_IT = 1.761 102 E−01 K·m²/W (NIST SP 811, B.9).
    Unit {
        us: "_h_ft2_f_per_btu",
        si: "_m2k_per_w",
        scale: 0.176_110_2,
        offset: 0.0,
        label: "h·ft²·°F/Btu",
    },
    // 1 Btu_IT·in/(h·ft²·°F) = 1.442 279 E−01 W/(m·K) (NIST SP 811, B.9).
    Unit {
        us: "_btu_in_per_h_ft2_f",
        si: "_w_per_mk",
        scale: 0.144_227_9,
        offset: 0.0,
        label: "Btu·in/(h·ft²·°F)",
    },
    // 1 Btu_IT/(ft³·°F) = 1055.055 852 62 J / (0.028 316 846 592 m³ × 5/9 K) = 6.706 611 E+04
    // J/(m³·K) (from the exact Btu_IT, foot and degree Fahrenheit of NIST SP 811, B.9).
    Unit {
        us: "_btu_per_ft3_f",
        si: "_j_per_m3k",
        scale: 67_066.11,
        offset: 0.0,
        label: "Btu/(ft³·°F)",
    },
    // 1 Btu_IT/ft³ = 3.725 895 E+04 J/m³ (NIST SP 811, B.9).
    Unit {
        us: "_btu_per_ft3",
        si: "_j_per_m3",
        scale: 37_258.95,
        offset: 0.0,
        label: "Btu/ft³",
    },
    // 1 lb/ft³ = 1.601 846 E+01 kg/m³ (NIST SP 811, B.9).
    Unit {
        us: "_lb_per_ft3",
        si: "_kg_per_m3",
        scale: 16.018_46,
        offset: 0.0,
        label: "lb/ft³",
    },
    // Freezing index: a sum of degree-days below freezing, a temperature difference × days.
    Unit {
        us: "_f_days",
        si: "_c_days",
        scale: F,
        offset: 0.0,
        label: "°F·d",
    },
    // 1 ft² = 0.092 903 04 m² exactly.
    Unit {
        us: "_ft2",
        si: "_m2",
        scale: 0.092_903_04,
        offset: 0.0,
        label: "ft²",
    },
    // 1 ft = 0.3048 m and 1 in = 0.0254 m exactly (international yard and pound, 1959).
    Unit {
        us: "_ft",
        si: "_m",
        scale: 0.3048,
        offset: 0.0,
        label: "ft",
    },
    Unit {
        us: "_in",
        si: "_m",
        scale: 0.0254,
        offset: 0.0,
        label: "in",
    },
    // A temperature: t/°C = (t/°F − 32) × 5/9 exactly.
    Unit {
        us: "_f",
        si: "_c",
        scale: F,
        offset: -32.0 * F,
        label: "°F",
    },
];

/// A value given in a US unit: where it sits in the SI text, its key ending and unit, and the
/// user's text of it.
#[derive(Debug)]
pub struct Given {
    /// Byte range of the converted value in the SI text.
    pub si_span: Range<usize>,
    /// The unit.
    pub unit: &'static Unit,
    /// The value as the user wrote it.
    pub text: String,
}

/// A case text rewritten to SI units, with the map back to the user's text.
#[derive(Debug, Default)]
pub struct Rewritten {
    /// The text with SI keys and values.
    pub si: String,
    /// Replaced ranges: (range in the user's text, range in the SI text), in order.
    edits: Vec<(Range<usize>, Range<usize>)>,
    /// The values given in US units.
    pub given: Vec<Given>,
}

impl Rewritten {
    /// The user's text offset of SI-text offset `off`.
    pub fn user_offset(&self, off: usize) -> usize {
        let mut shift: isize = 0;
        for (u, s) in &self.edits {
            if off < s.start {
                break;
            }
            if off < s.end {
                return u.start + (off - s.start).min(u.len().saturating_sub(1));
            }
            shift = u.end as isize - s.end as isize;
        }
        (off as isize + shift).max(0) as usize
    }

    /// The US-unit value whose SI text starts at `off`, if any.
    pub fn given_at(&self, off: usize) -> Option<&Given> {
        self.given.iter().find(|g| g.si_span.start == off)
    }

    /// True when the file used no US unit.
    pub fn is_si(&self) -> bool {
        self.edits.is_empty()
    }
}

/// A temperature difference in °F (an amplitude, a freezing interval): 1 °F = 5/9 K exactly.
pub const DIFFERENCE_F: Unit = Unit {
    us: "_f",
    si: "_k",
    scale: F,
    offset: 0.0,
    label: "°F",
};

/// Keys whose SI unit is K, a temperature difference: `amplitude_f` is an amplitude in °F.
const DIFFERENCES: [&str; 2] = ["amplitude", "freezing_interval"];

/// The US unit a key ends in, and the SI key it stands for.
pub fn us_key(key: &str) -> Option<(&'static Unit, String)> {
    if let Some(stem) = key.strip_suffix("_f") {
        if DIFFERENCES.contains(&stem) {
            return Some((&DIFFERENCE_F, format!("{stem}_k")));
        }
    }
    UNITS.iter().find_map(|u| {
        let stem = key.strip_suffix(u.us)?;
        (!stem.is_empty()).then(|| (u, format!("{stem}{}", u.si)))
    })
}

/// The US-unit names of SI key `si_key` (`thickness_m` → `thickness_ft`, `thickness_in`).
pub fn us_names(si_key: &str) -> Vec<String> {
    let mut v: Vec<String> = UNITS
        .iter()
        .filter_map(|u| {
            let stem = si_key.strip_suffix(u.si)?;
            (!stem.is_empty()).then(|| format!("{stem}{}", u.us))
        })
        .collect();
    if let Some(stem) = si_key.strip_suffix("_k") {
        if DIFFERENCES.contains(&stem) {
            v.push(format!("{stem}_f"));
        }
    }
    // Only names that map back to this key (`x_m` is not `x_c`).
    v.retain(|n| us_key(n).is_some_and(|(_, s)| s == si_key));
    v
}

/// Rewrite `src` (the case file `file`) to SI. A text that is not valid TOML is returned as it
/// is, for the parser to report.
pub fn rewrite(file: &str, src: &str) -> Result<Rewritten> {
    let Ok(doc) = toml::de::DeTable::parse(src) else {
        return Ok(Rewritten {
            si: src.to_string(),
            ..Default::default()
        });
    };
    let mut edits: Edits = Vec::new();
    walk(file, src, doc.get_ref(), &mut edits)?;
    edits.sort_by_key(|e| e.0.start);
    let mut out = Rewritten::default();
    let mut at = 0;
    for (range, text, given) in edits {
        out.si.push_str(&src[at..range.start]);
        let s = out.si.len()..out.si.len() + text.len();
        out.si.push_str(&text);
        if let Some((unit, user)) = given {
            out.given.push(Given {
                si_span: s.clone(),
                unit,
                text: user,
            });
        }
        out.edits.push((range.clone(), s));
        at = range.end;
    }
    out.si.push_str(&src[at..]);
    Ok(out)
}

type Edits = Vec<(Range<usize>, String, Option<(&'static Unit, String)>)>;

fn walk(file: &str, src: &str, t: &toml::de::DeTable, edits: &mut Edits) -> Result<()> {
    use toml::de::DeValue;
    let keys: Vec<&str> = t.keys().map(|k| k.get_ref().as_ref()).collect();
    for (k, v) in t.iter() {
        let name: &str = k.get_ref().as_ref();
        if let Some((unit, si_key)) = us_key(name) {
            // One unit per key: the SI key or another US unit of it is a conflict.
            if let Some(other) = keys.iter().find(|o| {
                **o != name && (**o == si_key || us_key(o).is_some_and(|(_, s)| s == si_key))
            }) {
                return Err(Error::input(
                    Location::from_offset(file, src, k.span().start),
                    name,
                    InputKind::Conflict,
                    format!("given in two units (also as {other}); allowed: one of them"),
                ));
            }
            let conv = convert(file, src, name, unit, v)?;
            edits.push((k.span(), si_key, None));
            edits.push((v.span(), conv, Some((unit, src[v.span()].to_string()))));
            continue;
        }
        match v.get_ref() {
            DeValue::Table(sub) => walk(file, src, sub, edits)?,
            DeValue::Array(a) => {
                for item in a.iter() {
                    if let DeValue::Table(sub) = item.get_ref() {
                        walk(file, src, sub, edits)?;
                    }
                }
            }
            _ => {}
        }
    }
    Ok(())
}

/// The SI text of value `v` (a number or an array of numbers) of key `name` in `unit`.
fn convert(
    file: &str,
    src: &str,
    name: &str,
    unit: &Unit,
    v: &serde_spanned::Spanned<toml::de::DeValue>,
) -> Result<String> {
    use toml::de::DeValue;
    let number = |x: &serde_spanned::Spanned<DeValue>| -> Result<String> {
        let text = src[x.span()].replace('_', "");
        match (x.get_ref(), text.parse::<f64>()) {
            (DeValue::Integer(_) | DeValue::Float(_), Ok(n)) if n.is_finite() => {
                Ok(format!("{:?}", n * unit.scale + unit.offset))
            }
            _ => Err(Error::input(
                Location::from_offset(file, src, x.span().start),
                name,
                InputKind::Syntax,
                format!(
                    "\"{}\" is not a number in {}; allowed: a number",
                    &src[x.span()],
                    unit.label
                ),
            )),
        }
    };
    match v.get_ref() {
        DeValue::Array(a) => {
            let items: Result<Vec<String>> = a.iter().map(number).collect();
            Ok(format!("[{}]", items?.join(", ")))
        }
        _ => number(v),
    }
}

/// `x` in SI as a number in the US unit, to four significant digits.
pub fn from_si(unit: &Unit, x: f64) -> String {
    let us = (x - unit.offset) / unit.scale;
    if us == 0.0 || !us.is_finite() {
        return format!("{us}");
    }
    let digits = (3 - us.abs().log10().floor() as i32).max(0) as usize;
    let s = format!("{us:.digits$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Exact definitions: 1 in = 0.0254 m, 1 ft = 0.3048 m, 1 ft² = 0.092 903 04 m², and
    /// t/°C = (t/°F − 32)·5/9 (NIST SP 811 B.8, B.9): 32 °F = 0 °C, 212 °F = 100 °C, −40 °F =
    /// −40 °C. A 2,500 °F·d freezing index is 1,388.9 °C·d.
    #[test]
    fn exact_definitions() {
        let r = rewrite(
            "c.toml",
            "[a]\nthickness_in = 4\nwidth_ft = 2.5\narea_ft2 = 1_000\nt_f = [32, 212, -40]\nfi_f_days = 2500\n",
        )
        .unwrap();
        let v: toml::Table = toml::from_str(&r.si).unwrap();
        let a = &v["a"];
        assert_eq!(a["thickness_m"].as_float(), Some(4.0 * 0.0254));
        assert_eq!(a["width_m"].as_float(), Some(2.5 * 0.3048));
        assert_eq!(a["area_m2"].as_float(), Some(92.90304));
        let t: Vec<f64> = a["t_c"]
            .as_array()
            .unwrap()
            .iter()
            .map(|x| x.as_float().unwrap())
            .collect();
        assert!(
            (t[0] - 0.0).abs() < 1e-12
                && (t[1] - 100.0).abs() < 1e-12
                && (t[2] + 40.0).abs() < 1e-12
        );
        assert!((a["fi_c_days"].as_float().unwrap() - 2500.0 / 1.8).abs() < 1e-9);
    }

    /// NIST SP 811 B.9 factors: R-1 (h·ft²·°F/Btu) = 0.176 110 2 m²·K/W; 1 Btu·in/(h·ft²·°F) =
    /// 0.144 227 9 W/(m·K); 1 lb/ft³ = 16.018 46 kg/m³; 1 Btu/ft³ = 37 258.95 J/m³.
    #[test]
    fn nist_factors() {
        let r = rewrite(
            "c.toml",
            "r_h_ft2_f_per_btu = 10\nk_btu_in_per_h_ft2_f = 0.2\nrho_lb_per_ft3 = 100\nl_btu_per_ft3 = 1\nc_btu_per_ft3_f = 1\namplitude_f = 9\n",
        )
        .unwrap();
        let v: toml::Table = toml::from_str(&r.si).unwrap();
        let f = |k: &str| v[k].as_float().unwrap();
        assert!((f("r_m2k_per_w") - 1.761102).abs() < 1e-9);
        assert!((f("k_w_per_mk") - 0.02884558).abs() < 1e-9);
        assert!((f("rho_kg_per_m3") - 1601.846).abs() < 1e-9);
        assert!((f("l_j_per_m3") - 37258.95).abs() < 1e-6);
        // Derived from the exact Btu_IT (1055.05585262 J), foot and °F.
        assert!((f("c_j_per_m3k") - 1055.05585262 / (0.3048f64.powi(3) * F)).abs() < 0.01);
        assert!((f("amplitude_k") - 5.0).abs() < 1e-12);
    }

    /// Offsets map back to the user's text; a key in two units is refused at its line.
    #[test]
    fn positions_and_conflicts() {
        let src = "[slab]\nthickness_in = 4\nmaterial = \"concrete\"\n";
        let r = rewrite("c.toml", src).unwrap();
        let si_mat = r.si.find("material").unwrap();
        assert_eq!(r.user_offset(si_mat), src.find("material").unwrap());
        let g = &r.given[0];
        assert_eq!(g.text, "4");
        assert_eq!(r.user_offset(g.si_span.start), src.find('4').unwrap());
        assert_eq!(
            r.user_offset(r.si.find("thickness_m").unwrap()),
            src.find("thickness_in").unwrap()
        );
        let e = rewrite("c.toml", "[slab]\nthickness_m = 0.1\nthickness_in = 4\n").unwrap_err();
        assert!(
            e.to_string()
                .starts_with("c.toml:3:1: thickness_in: given in two units"),
            "{e}"
        );
        assert_eq!(from_si(&UNITS[7], 0.3048), "1");
        assert_eq!(from_si(&UNITS[9], 0.0), "32");
        assert_eq!(us_names("thickness_m"), ["thickness_ft", "thickness_in"]);
        assert_eq!(us_names("amplitude_k"), ["amplitude_f"]);
        assert!(us_names("name").is_empty());
    }
}
