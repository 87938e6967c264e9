//! Validation of `[uncertainty]`: the sample count and seed, and for every
//! `[[uncertainty.input]]` a key of the case (given in the file, with a number) and a
//! distribution with sound parameters, in the key's own unit.
use super::ctx::Ctx;
use super::model::{Climate, ClimateSource, Distribution, UncertainInput, Uncertainty};
use super::raw::{RawInput, RawUncertainty, S};
use crate::error::{InputKind, Result};

/// Most samples one `frostline uncertainty` run takes (a shard runs part of them).
pub const MAX_SAMPLES: i64 = 100_000;

/// `[uncertainty]`.
pub fn uncertainty(c: &Ctx, u: &S<RawUncertainty>, climate: &Climate) -> Result<Uncertainty> {
    let r = u.get_ref();
    let samples = match &r.samples {
        Some(n) if !(2..=MAX_SAMPLES).contains(n.get_ref()) => {
            return Err(c.err(
                n.span(),
                "uncertainty.samples",
                InputKind::OutOfRange,
                format!(
                    "{} is out of range; allowed: 2 to {MAX_SAMPLES}",
                    n.get_ref()
                ),
            ))
        }
        Some(n) => *n.get_ref() as usize,
        None => 100,
    };
    let seed = match &r.seed {
        Some(s) if *s.get_ref() < 0 => {
            return Err(c.err(
                s.span(),
                "uncertainty.seed",
                InputKind::OutOfRange,
                "negative; allowed: 0 or more",
            ))
        }
        Some(s) => *s.get_ref() as u64,
        None => 1,
    };
    if r.input.is_empty() {
        return Err(c.err(
            u.span(),
            "uncertainty.input",
            InputKind::Missing,
            "no [[uncertainty.input]]; allowed: one or more sampled inputs",
        ));
    }
    let doc: toml::Table = toml::from_str(c.user).unwrap_or_default();
    let mut inputs = Vec::new();
    for (k, i) in r.input.iter().enumerate() {
        let key = format!("uncertainty.input[{k}]");
        let input = input(c, i, &key, &doc, climate)?;
        if inputs.iter().any(|x: &UncertainInput| x.key == input.key) {
            return Err(c.err(
                i.get_ref().key.span(),
                &format!("{key}.key"),
                InputKind::Conflict,
                format!("{} is sampled twice; allowed: each key once", input.key),
            ));
        }
        inputs.push(input);
    }
    Ok(Uncertainty {
        samples,
        seed,
        inputs,
    })
}

/// One part of a key path: `name` or `name[index]` (None: malformed index).
pub fn path_part(part: &str) -> Option<(&str, Option<usize>)> {
    match part.split_once('[') {
        Some((name, rest)) => Some((name, Some(rest.strip_suffix(']')?.parse::<usize>().ok()?))),
        None => Some((part, None)),
    }
}

/// The value at a key path (`table.key`, `array[index].key`) of a TOML document.
pub fn lookup<'a>(doc: &'a toml::Table, path: &str) -> Option<&'a toml::Value> {
    let mut cur: Option<&toml::Value> = None;
    for (n, part) in path.split('.').enumerate() {
        let (name, index) = path_part(part)?;
        let v = if n == 0 {
            doc.get(name)?
        } else {
            cur?.as_table()?.get(name)?
        };
        cur = Some(match index {
            Some(i) => v.as_array()?.get(i)?,
            None => v,
        });
    }
    cur
}

/// One `[[uncertainty.input]]`.
fn input(
    c: &Ctx,
    i: &S<RawInput>,
    key: &str,
    doc: &toml::Table,
    climate: &Climate,
) -> Result<UncertainInput> {
    let r = i.get_ref();
    let path = r.key.get_ref().trim().to_string();
    if r.distribution.get_ref() == "seasons" || path == "climate.season" {
        return seasons(c, i, key, &path, climate);
    }
    let nominal =
        lookup(doc, &path).and_then(|v| v.as_float().or_else(|| v.as_integer().map(|x| x as f64)));
    if nominal.is_none() || path.starts_with("uncertainty") || path.starts_with("sizing") {
        return Err(c.err(
            r.key.span(),
            &format!("{key}.key"),
            InputKind::UnknownName,
            format!(
                "\"{path}\" is not a number given in this case; allowed: the path of a numeric key the case file gives (its nominal value), e.g. soil[0].water_content, climate.mean_c, insulation[1].thickness_m"
            ),
        ));
    }
    let num = |v: &Option<S<f64>>, name: &str| -> Result<Option<f64>> {
        match v {
            Some(x) if !x.get_ref().is_finite() => Err(c.err(
                x.span(),
                &format!("{key}.{name}"),
                InputKind::OutOfRange,
                "not a finite number",
            )),
            Some(x) => Ok(Some(*x.get_ref())),
            None => Ok(None),
        }
    };
    let (mean, sd, min, max, mode) = (
        num(&r.mean, "mean")?,
        num(&r.sd, "sd")?,
        num(&r.min, "min")?,
        num(&r.max, "max")?,
        num(&r.mode, "mode")?,
    );
    let kind = r.distribution.get_ref().as_str();
    let bad = |name: &str, why: &str| {
        let span = match name {
            "mean" => r.mean.as_ref().map(|v| v.span()),
            "sd" => r.sd.as_ref().map(|v| v.span()),
            "min" => r.min.as_ref().map(|v| v.span()),
            "max" => r.max.as_ref().map(|v| v.span()),
            "mode" => r.mode.as_ref().map(|v| v.span()),
            _ => None,
        }
        .unwrap_or(i.span());
        c.err(
            span,
            &format!("{key}.{name}"),
            InputKind::OutOfRange,
            format!("{why} ({kind} distribution)"),
        )
    };
    let lo = min.unwrap_or(f64::NEG_INFINITY);
    let hi = max.unwrap_or(f64::INFINITY);
    if lo > hi {
        return Err(bad("max", "less than min; allowed: at least min"));
    }
    let forbid = |v: Option<f64>, name: &str| match v {
        Some(_) => Err(bad(name, "not used; remove it")),
        None => Ok(()),
    };
    let distribution = match kind {
        "normal" | "lognormal" => {
            forbid(mode, "mode")?;
            let mean = mean.ok_or_else(|| bad("mean", "missing"))?;
            let sd = sd.ok_or_else(|| bad("sd", "missing"))?;
            if sd < 0.0 {
                return Err(bad("sd", "negative; allowed: 0 or more"));
            }
            if mean < lo || mean > hi {
                return Err(bad("mean", "outside [min, max]; allowed: within the truncation"));
            }
            if kind == "normal" {
                Distribution::Normal {
                    mean,
                    sd,
                    min: lo,
                    max: hi,
                }
            } else {
                if mean <= 0.0 {
                    return Err(bad("mean", "not positive; allowed: greater than 0"));
                }
                Distribution::Lognormal {
                    mean,
                    sd,
                    min: lo,
                    max: hi,
                }
            }
        }
        "uniform" | "triangular" => {
            forbid(mean, "mean")?;
            forbid(sd, "sd")?;
            let min = min.ok_or_else(|| bad("min", "missing"))?;
            let max = max.ok_or_else(|| bad("max", "missing"))?;
            if kind == "uniform" {
                forbid(mode, "mode")?;
                Distribution::Uniform { min, max }
            } else {
                let mode = mode.ok_or_else(|| bad("mode", "missing"))?;
                if mode < min || mode > max {
                    return Err(bad("mode", "outside [min, max]"));
                }
                Distribution::Triangular { min, mode, max }
            }
        }
        other => {
            return Err(c.err(
                r.distribution.span(),
                &format!("{key}.distribution"),
                InputKind::UnknownName,
                format!(
                    "\"{other}\" is not a distribution; allowed: normal, lognormal, uniform, triangular (or seasons, with key climate.season)"
                ),
            ))
        }
    };
    Ok(UncertainInput {
        key: path,
        distribution,
    })
}

/// A `[[uncertainty.input]]` drawing the winter from the measured series: key `climate.season`,
/// distribution `seasons`, the case's climate a `series`; every complete season equally likely.
fn seasons(
    c: &Ctx,
    i: &S<RawInput>,
    key: &str,
    path: &str,
    climate: &Climate,
) -> Result<UncertainInput> {
    let r = i.get_ref();
    if path != "climate.season" {
        return Err(c.err(
            r.key.span(),
            &format!("{key}.key"),
            InputKind::Conflict,
            format!("\"{path}\" cannot take the seasons distribution; allowed: key = \"climate.season\""),
        ));
    }
    if r.distribution.get_ref() != "seasons" {
        return Err(c.err(
            r.distribution.span(),
            &format!("{key}.distribution"),
            InputKind::Conflict,
            format!(
                "\"{}\" for climate.season; allowed: \"seasons\" (each complete season of the series equally likely)",
                r.distribution.get_ref()
            ),
        ));
    }
    for (v, name) in [
        (&r.mean, "mean"),
        (&r.sd, "sd"),
        (&r.min, "min"),
        (&r.max, "max"),
        (&r.mode, "mode"),
    ] {
        if let Some(v) = v {
            return Err(c.err(
                v.span(),
                &format!("{key}.{name}"),
                InputKind::Conflict,
                "not used; remove it (seasons distribution: the series' complete seasons, equally likely)",
            ));
        }
    }
    let series =
        match &climate.source {
            ClimateSource::Series(s) => s,
            ClimateSource::Sinusoid => return Err(c.err(
                r.key.span(),
                &format!("{key}.key"),
                InputKind::Conflict,
                "climate.season needs a measured series; allowed: [climate] series = \"file.csv\"",
            )),
        };
    let mut fi = crate::physics::climate::freezing_indices(series);
    // In order of severity (ties by year): the order the strata draw them in.
    fi.sort_by(|a, b| a.value.total_cmp(&b.value).then(a.winter.cmp(&b.winter)));
    if fi.len() < 2 {
        return Err(c.err(
            r.key.span(),
            &format!("{key}.key"),
            InputKind::OutOfRange,
            format!(
                "the series has {} complete season(s); allowed: at least 2 to draw from",
                fi.len()
            ),
        ));
    }
    Ok(UncertainInput {
        key: path.into(),
        distribution: Distribution::Seasons {
            years: fi.iter().map(|w| w.winter).collect(),
            freezing_index_c_days: fi.iter().map(|w| w.value).collect(),
        },
    })
}
