//! Validation of `[climate]`: a sinusoid, a measured series, or a design year built from a
//! series' Gumbel design freezing index; n-factors, snow cover and the outdoor surface resistance.
use super::ctx::Ctx;
use super::model::{Climate, ClimateSource, DesignWinter, DesignYear, Stratum};
use super::raw::{RawClimate, S};
use crate::error::{Error, InputKind, Result};
use crate::physics::climate::{self as pc, DailySeries, FitMethod};

/// The outdoor temperature's source and the sinusoid (given, or fitted to the series).
struct Source {
    mean_c: f64,
    amplitude_k: f64,
    coldest_day: f64,
    source: ClimateSource,
    design_winter: Option<DesignWinter>,
    season: Option<i64>,
}

/// `[climate]`.
pub fn climate(c: &Ctx, cl: &RawClimate) -> Result<Climate> {
    let gap = c.int_opt(
        &cl.max_gap_days,
        "climate.max_gap_days",
        (0, 30),
        "0 to 30 days",
        3,
    )?;
    let s = source(c, cl, gap)?;
    if cl.series.is_none() {
        c.unused(
            &cl.season,
            "climate.season",
            "only used with series (one season of a measured series)",
        )?;
    }
    if cl.design_from_series.is_none() {
        c.unused(
            &cl.return_period_years,
            "climate.return_period_years",
            "only used with design_from_series",
        )?;
    }
    Ok(Climate {
        mean_c: s.mean_c,
        amplitude_k: s.amplitude_k,
        coldest_day: s.coldest_day,
        source: s.source,
        design_winter: s.design_winter,
        season: s.season,
        r_se: c.opt(
            &cl.surface_resistance_m2k_per_w,
            "climate.surface_resistance_m2k_per_w",
            (0.0, 5.0),
            "m²·K/W",
            0.04,
        )?,
        n_freezing: c.opt(
            &cl.n_factor_freezing,
            "climate.n_factor_freezing",
            (0.1, 1.5),
            "",
            1.0,
        )?,
        n_thawing: c.opt(
            &cl.n_factor_thawing,
            "climate.n_factor_thawing",
            (0.1, 2.5),
            "",
            1.0,
        )?,
        snow_depth_m: snow(c, cl)?,
        snow_k: c.opt(
            &cl.snow_conductivity_w_per_mk,
            "climate.snow_conductivity_w_per_mk",
            (0.02, 1.0),
            "W/(m·K)",
            0.2,
        )?,
    })
}

/// Exactly one of: sinusoid, series, design year from a series.
fn source(c: &Ctx, cl: &RawClimate, max_gap_days: usize) -> Result<Source> {
    let sinus_given = cl.mean_c.is_some()
        || cl.amplitude_k.is_some()
        || cl.coldest_day.is_some()
        || cl.thawing_index_c_days.is_some()
        || (cl.design_freezing_index_c_days.is_some()
            && cl.series.is_none()
            && cl.design_from_series.is_none());
    let kinds = usize::from(sinus_given)
        + usize::from(cl.series.is_some())
        + usize::from(cl.design_from_series.is_some());
    if kinds != 1 {
        return Err(c.err_file(
            "climate",
            InputKind::Conflict,
            "give exactly one of: a sinusoid (mean_c + amplitude_k [+ coldest_day], or design_freezing_index_c_days with mean_c or thawing_index_c_days), series = \"file.csv\" (a measured series), or design_from_series = \"file.csv\" (a design year)",
        ));
    }
    if sinus_given {
        return sinusoid(c, cl);
    }
    let (v, key) = match (&cl.series, &cl.design_from_series) {
        (Some(v), _) => (v, "climate.series"),
        (None, Some(v)) => (v, "climate.design_from_series"),
        (None, None) => unreachable!("one source given"),
    };
    let series = read(c, v, key, max_gap_days)?;
    let (m, a, d) = pc::annual_sinusoid(&series);
    if m <= 0.0 {
        return Err(c.err(
            v.span(),
            key,
            InputKind::OutOfScope,
            format!("the series' mean is {m:.2} °C; allowed: above 0 °C (no permafrost)"),
        ));
    }
    let coldest_day = d.clamp(1.0, 365.0);
    if cl.series.is_some() {
        let seasons = pc::seasons(series.first_day, series.values.len());
        if seasons.is_empty() {
            return Err(c.err(
                v.span(),
                key,
                InputKind::OutOfRange,
                "no complete season (1 July to 30 June) in the series; allowed: at least one",
            ));
        }
        let season = match &cl.season {
            Some(y) if !seasons.iter().any(|s| s.0 == *y.get_ref()) => {
                let (a, b) = (seasons[0].0, seasons[seasons.len() - 1].0);
                return Err(c.err(
                    y.span(),
                    "climate.season",
                    InputKind::OutOfRange,
                    format!(
                        "{} is not a complete season of the series (1 July {} to 30 June {}); allowed: {a} to {b} (the year of the season's 1 July)",
                        y.get_ref(),
                        y.get_ref(),
                        y.get_ref() + 1
                    ),
                ));
            }
            Some(y) => Some(*y.get_ref()),
            None => None,
        };
        return Ok(Source {
            mean_c: m,
            amplitude_k: a,
            coldest_day,
            source: ClimateSource::Series(series),
            design_winter: None,
            season,
        });
    }
    let design = design_year(c, cl, v, key, &series)?;
    let design_winter = design_winter(
        c,
        v,
        key,
        (m, a),
        design.design_freezing_index_c_days,
        Some(design),
    )?;
    Ok(Source {
        mean_c: m,
        amplitude_k: a,
        coldest_day,
        source: ClimateSource::Sinusoid,
        design_winter: Some(design_winter),
        season: None,
    })
}

/// The sinusoidal year: `mean_c`, `amplitude_k` and `coldest_day`, with an optional design air
/// freezing index. Given the design freezing index, the amplitude may be left out (the repeated
/// year is then the design year itself: ground as cold as after design winter after design
/// winter, the conservative reading of a design index with a mean temperature), the mean may come
/// from a thawing index instead (over a year ∫θ dt = I_T − I_F, so θ_m = (I_T − I_F)/365 d), and
/// the coldest day defaults to 15 January (common practice: January is the coldest month of
/// northern mid-latitude climates; only the dates of the results depend on it).
fn sinusoid(c: &Ctx, cl: &RawClimate) -> Result<Source> {
    let key = "climate.design_freezing_index_c_days";
    let fi = match &cl.design_freezing_index_c_days {
        None => None,
        Some(f) => Some((f, c.range(f, key, 0.0, 10_000.0, "°C·d")?)),
    };
    let missing = |k: &str, why: &str| c.err_file(&format!("climate.{k}"), InputKind::Missing, why);
    let mean_c = match (&cl.mean_c, &cl.thawing_index_c_days, fi) {
        (Some(m), None, _) => c.range_incl(m, "climate.mean_c", 0.1, 30.0, "°C").map_err(|e| {
            let Error::Input { location, key, message, .. } = e else { return e };
            Error::input(location, &key, InputKind::OutOfScope, format!(
                "{message} (the model assumes ground that thaws every year: no permafrost)"))
        })?,
        (None, Some(t), Some((_, fi))) => {
            let ti = c.range(t, "climate.thawing_index_c_days", 0.0, 20_000.0, "°C·d")?;
            let m = (ti - fi) / 365.0;
            if !(0.1..=30.0).contains(&m) {
                return Err(c.err(t.span(), "climate.thawing_index_c_days", InputKind::OutOfScope, format!(
                    "with the design freezing index it gives a mean of {m:.2} °C; allowed: a mean of 0.1 to 30 °C (no permafrost)")));
            }
            m
        }
        (Some(_), Some(t), _) => {
            return Err(c.err(t.span(), "climate.thawing_index_c_days", InputKind::Conflict,
                "given with mean_c; allowed: one of mean_c and thawing_index_c_days"))
        }
        (None, Some(t), None) => {
            return Err(c.err(t.span(), "climate.thawing_index_c_days", InputKind::Missing,
                "a thawing index sets the mean only with design_freezing_index_c_days; allowed: mean_c, or both indices"))
        }
        (None, None, _) => return Err(missing("mean_c", "missing; a sinusoid needs mean_c (or a thawing index with a design freezing index)")),
    };
    let amplitude_k = match (&cl.amplitude_k, fi) {
        (Some(a), _) => c.range_incl(a, "climate.amplitude_k", 0.0, 30.0, "K")?,
        (None, Some((f, fi))) => {
            // The same bound as a given amplitude.
            let a = pc::amplitude_for_freezing_index(mean_c, fi);
            if a > 30.0 {
                return Err(c.err(f.span(), key, InputKind::OutOfRange, format!(
                    "with a mean of {mean_c:.2} °C this index needs an annual amplitude of {a:.2} K; allowed: an index that gives at most 30 K (or give amplitude_k)")));
            }
            a
        }
        (None, None) => {
            return Err(missing(
                "amplitude_k",
                "missing; a sinusoid needs amplitude_k (or a design freezing index)",
            ))
        }
    };
    let design_winter = match fi {
        None => None,
        Some((f, fi)) => Some(design_winter(c, f, key, (mean_c, amplitude_k), fi, None)?),
    };
    Ok(Source {
        mean_c,
        amplitude_k,
        coldest_day: match &cl.coldest_day {
            Some(d) => c.range_incl(d, "climate.coldest_day", 1.0, 365.0, "day of year")?,
            None => 15.0,
        },
        source: ClimateSource::Sinusoid,
        design_winter,
        season: None,
    })
}

/// Read the series file named by `v` (relative to the case file).
fn read(c: &Ctx, v: &S<String>, key: &str, max_gap_days: usize) -> Result<DailySeries> {
    let p = super::case_dir(c.file).join(v.get_ref());
    let opts = pc::ReadOptions {
        max_gap_days,
        ..Default::default()
    };
    pc::read_series(&p, &opts).map_err(|e| match e {
        Error::Io { source, .. } => c.err(
            v.span(),
            key,
            InputKind::Unreadable,
            format!("cannot read {}: {source}", p.display()),
        ),
        other => other,
    })
}

/// The return-period design freezing index of a series (Gumbel fit of its winters) and its
/// provenance.
fn design_year(
    c: &Ctx,
    cl: &RawClimate,
    v: &S<String>,
    key: &str,
    series: &DailySeries,
) -> Result<DesignYear> {
    let _ = key;
    let t = cl.return_period_years.as_ref().map_or(Ok(100.0), |v| {
        c.range(v, "climate.return_period_years", 1.0, 10_000.0, "years")
    })?;
    let method = match cl.fit.as_ref().map(|f| (f, f.get_ref().as_str())) {
        None | Some((_, "lmoments")) => FitMethod::LMoments,
        Some((_, "mle")) => FitMethod::MaximumLikelihood,
        Some((f, other)) => {
            return Err(c.err(
                f.span(),
                "climate.fit",
                InputKind::UnknownName,
                format!("\"{other}\" is not a fit method; allowed: lmoments, mle"),
            ))
        }
    };
    let s = pc::summarize(series, t, method)?;
    Ok(DesignYear {
        series: v.get_ref().clone(),
        return_period_years: t,
        design_freezing_index_c_days: s.design_freezing_index_c_days,
        fit_method: method,
    })
}

/// The design winter for the normal sinusoid (mean °C, amplitude K) and design air freezing
/// index `fi` (°C·d): the colder half's amplitude A_w that gives `fi`; a design winter milder
/// than the normal one is refused.
fn design_winter<T>(
    c: &Ctx,
    at: &S<T>,
    key: &str,
    (mean_c, amplitude_k): (f64, f64),
    fi: f64,
    from_series: Option<DesignYear>,
) -> Result<DesignWinter> {
    let normal_fi = crate::methods::sinusoid_freezing_index(mean_c, amplitude_k).0;
    // (An amplitude solved from `fi` reproduces it to rounding.)
    if fi < normal_fi * (1.0 - 1e-9) {
        return Err(c.err(at.span(), key, InputKind::OutOfRange, format!(
            "a design freezing index of {fi:.0} °C·d is below the normal climate's {normal_fi:.0} °C·d (mean {mean_c:.2} °C, amplitude {amplitude_k:.2} K); allowed: at least the normal winter's index")));
    }
    let a_w = pc::amplitude_for_freezing_index(mean_c, fi).max(amplitude_k);
    if a_w > 40.0 {
        return Err(c.err(
            at.span(),
            key,
            InputKind::OutOfScope,
            format!("the design winter needs an amplitude of {a_w:.1} K; allowed: at most 40 K"),
        ));
    }
    Ok(DesignWinter {
        freezing_index_c_days: fi,
        amplitude_k: a_w,
        from_series,
    })
}

/// Permafrost is out of scope: the mean ground temperature below the frozen layer, by the thermal
/// offset of the top stratum under the normal climate's surface indices (n-factors applied), must
/// be above 0 °C.
pub fn no_permafrost(c: &Ctx, cl: &Climate, strata: &[Stratum]) -> Result<()> {
    let m = &strata[0].material;
    let (i_f_air, _) = crate::methods::sinusoid_freezing_index(cl.mean_c, cl.amplitude_k);
    let i_t_air = i_f_air + cl.mean_c * 365.0;
    let t = crate::methods::thermal_offset_mean(
        m.k_unfrozen,
        m.k_frozen,
        cl.n_thawing * i_t_air,
        cl.n_freezing * i_f_air,
    );
    if m.freezes() && t <= 0.0 {
        return Err(c.err_file("climate", InputKind::OutOfScope, format!(
            "the normal climate (mean {:.2} °C, amplitude {:.2} K, n-factors {:.2}/{:.2}) over {} gives a mean ground temperature of {t:.2} °C below the frozen layer (thermal offset of freezing ground): permafrost; allowed: above 0 °C (frostline models ground that thaws every year)",
            cl.mean_c, cl.amplitude_k, cl.n_freezing, cl.n_thawing, m.name)));
    }
    Ok(())
}

/// Twelve monthly snow depths, January first (none by default).
fn snow(c: &Ctx, cl: &RawClimate) -> Result<[f64; 12]> {
    let Some(v) = &cl.snow_depth_m else {
        return Ok([0.0; 12]);
    };
    let d = v.get_ref();
    if d.len() != 12 || d.iter().any(|x| !(0.0..=3.0).contains(x)) {
        return Err(c.err(
            v.span(),
            "climate.snow_depth_m",
            InputKind::OutOfRange,
            "allowed: 12 monthly snow depths (January first), each 0 to 3 m",
        ));
    }
    let mut a = [0.0; 12];
    a.copy_from_slice(d);
    Ok(a)
}
