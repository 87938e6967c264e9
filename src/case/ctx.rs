//! The validation context: the file's name and text, and the checks every table uses. Each error
//! names the file, line and column of the offending value, the key, the value and what is
//! allowed.
use super::raw::{RawMaterial, S};
use super::units::{from_si, Rewritten};
use crate::error::{Error, InputKind, Location, Result};
use crate::physics::library::{named_material, MATERIAL_NAMES};
use crate::physics::material::Material;
use std::ops::Range;

/// The case file being validated.
pub struct Ctx<'a> {
    /// File name as given by the user.
    pub file: &'a str,
    /// The file's text as the user wrote it.
    pub user: &'a str,
    /// The same text in SI units, the one parsed (spans refer to it), and the map back.
    pub units: &'a Rewritten,
}

impl Ctx<'_> {
    /// An error at byte range `span` of the SI text, located in the user's text; a key given
    /// in a US unit is named as the user wrote it.
    pub fn err(
        &self,
        span: Range<usize>,
        key: &str,
        kind: InputKind,
        msg: impl Into<String>,
    ) -> Error {
        // The key as written: its SI unit part replaced by the US one, or (a key whose SI
        // spelling has no unit part, such as a sizing bound `min` written `min_in`) the US unit
        // part added.
        let key = match self.units.given_at(span.start) {
            Some(g) => key.strip_suffix(g.unit.si).map_or_else(
                || format!("{key}{}", g.unit.us),
                |stem| format!("{stem}{}", g.unit.us),
            ),
            None => key.to_string(),
        };
        Error::input(
            Location::from_offset(self.file, self.user, self.units.user_offset(span.start)),
            &key,
            kind,
            msg,
        )
    }

    /// SI value `v` (unit `unit`) of the value at `span`, as text in the unit the user gave it in
    /// ("110 °F" for a key given in °F, else "43.3 °C").
    pub fn in_user_unit(&self, span: Range<usize>, v: f64, unit: &str) -> String {
        match self.units.given_at(span.start) {
            Some(g) => format!("{} {}", from_si(g.unit, v), g.unit.label),
            None => format!("{v} {unit}"),
        }
    }

    /// A length `v` (m) in a message about the value at `span`, to 4 significant digits: in the
    /// unit the user gave that value in, else in metres.
    pub fn len(&self, span: &Range<usize>, v: f64) -> String {
        match self.units.given_at(span.start) {
            Some(g) => format!("{} {}", from_si(g.unit, v), g.unit.label),
            None => format!("{} m", from_si(&super::units::METRE, v)),
        }
    }

    /// "V U is out of range; allowed: …" in the user's unit when `v` was given in a US unit;
    /// `bounds` formats the allowed range from two bound texts.
    fn out_of_range(
        &self,
        v: &S<f64>,
        (lo, hi): (f64, f64),
        unit: &str,
        bounds: impl Fn(&str, &str, &str) -> String,
    ) -> String {
        match self.units.given_at(v.span().start) {
            Some(g) => {
                let (a, b) = (from_si(g.unit, lo), from_si(g.unit, hi));
                format!(
                    "{} {} is out of range; allowed: {}",
                    g.text,
                    g.unit.label,
                    bounds(&a, &b, g.unit.label)
                )
            }
            None => format!(
                "{} {unit} is out of range; allowed: {}",
                v.get_ref(),
                bounds(&lo.to_string(), &hi.to_string(), unit)
            ),
        }
    }

    /// An error naming only the file (a key that is absent has no position).
    pub fn err_file(&self, key: &str, kind: InputKind, msg: impl Into<String>) -> Error {
        Error::in_file(self.file, key, kind, msg)
    }

    /// A key that is not used where it is given.
    pub fn unused<T>(&self, v: &Option<S<T>>, key: &str, why: &str) -> Result<()> {
        match v {
            Some(v) => Err(self.err(v.span(), key, InputKind::Conflict, why)),
            None => Ok(()),
        }
    }

    /// A value with `lo < v <= hi`, units in the message.
    pub fn range(&self, v: &S<f64>, key: &str, lo: f64, hi: f64, unit: &str) -> Result<f64> {
        let x = *v.get_ref();
        if !x.is_finite() || x <= lo || x > hi {
            let msg = self.out_of_range(v, (lo, hi), unit, |a, b, u| {
                format!("greater than {a} and at most {b} {u}")
            });
            return Err(self.err(v.span(), key, InputKind::OutOfRange, msg));
        }
        Ok(x)
    }

    /// A value with `lo <= v <= hi`.
    pub fn range_incl(&self, v: &S<f64>, key: &str, lo: f64, hi: f64, unit: &str) -> Result<f64> {
        let x = *v.get_ref();
        if !x.is_finite() || x < lo || x > hi {
            let msg = self.out_of_range(v, (lo, hi), unit, |a, b, u| format!("{a} to {b} {u}"));
            return Err(self.err(v.span(), key, InputKind::OutOfRange, msg));
        }
        Ok(x)
    }

    /// An optional whole number in `lo..=hi` (`default` when absent); `allowed` is the text
    /// after "allowed: " in the error.
    pub fn int_opt(
        &self,
        v: &Option<S<i64>>,
        key: &str,
        (lo, hi): (i64, i64),
        allowed: &str,
        default: usize,
    ) -> Result<usize> {
        match v {
            None => Ok(default),
            Some(v) if (lo..=hi).contains(v.get_ref()) => Ok(*v.get_ref() as usize),
            Some(v) => Err(self.err(
                v.span(),
                key,
                InputKind::OutOfRange,
                format!("{} is out of range; allowed: {allowed}", v.get_ref()),
            )),
        }
    }

    /// An optional value in `lo..=hi`, `default` when absent.
    pub fn opt(
        &self,
        v: &Option<S<f64>>,
        key: &str,
        (lo, hi): (f64, f64),
        unit: &str,
        default: f64,
    ) -> Result<f64> {
        v.as_ref()
            .map_or(Ok(default), |v| self.range_incl(v, key, lo, hi, unit))
    }

    /// A named material, or `default` when absent.
    pub fn named(&self, n: &S<String>, key: &str) -> Result<Material> {
        named_material(n.get_ref()).ok_or_else(|| {
            self.err(
                n.span(),
                key,
                InputKind::UnknownName,
                format!(
                    "unknown material \"{}\"; known: {}",
                    n.get_ref(),
                    MATERIAL_NAMES.join(", ")
                ),
            )
        })
    }

    /// A material by name or by explicit properties (`default` by name when absent).
    pub fn material(
        &self,
        m: &Option<S<RawMaterial>>,
        key: &str,
        default: &str,
    ) -> Result<Material> {
        let Some(m) = m else {
            return Ok(named_material(default).expect("default material exists"));
        };
        match m.get_ref() {
            RawMaterial::Named(n) => self.named(&S::new(m.span(), n.clone()), key),
            RawMaterial::Explicit(e) => {
                let check = |v: f64, (hi, hi_text): (f64, &str), name: &str, unit: &str| {
                    if v > 0.0 && v <= hi {
                        return Ok(v);
                    }
                    Err(self.err(
                        m.span(),
                        &format!("{key}.{name}"),
                        InputKind::OutOfRange,
                        format!("{v} {unit} is out of range; allowed: greater than 0 and at most {hi_text}"),
                    ))
                };
                let k = check(
                    e.conductivity_w_per_mk,
                    (500.0, "500"),
                    "conductivity_w_per_mk",
                    "W/(m·K)",
                )?;
                let c = check(
                    e.heat_capacity_j_per_m3k,
                    (1e7, "1e7"),
                    "heat_capacity_j_per_m3k",
                    "J/(m³·K)",
                )?;
                Ok(Material::inert(key, k, c))
            }
        }
    }
}
