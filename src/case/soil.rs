//! Validation of the `[[soil]]` strata (and of basement backfill, which is described the same
//! way): a library soil, a soil file, index properties (dry density, water content, quartz,
//! texture) with Johansen's or Kersten's conductivity, or explicit properties, each value
//! overriding what it is derived from.
use super::ctx::Ctx;
use super::model::Stratum;
use super::raw::{RawStratum, RawUnfrozenWater, S};
use crate::error::{InputKind, Result};
use crate::physics::library::{
    bundled_soil, parse_soil_file, soil_properties, KMethod, SoilFile, SoilProperties, SOILS,
};
use crate::physics::material::Material;
use crate::physics::soil::{SoilIndex, Texture};

/// The strata, top to bottom; every stratum but the last names its bottom depth.
pub fn strata(c: &Ctx, raw: &S<Vec<S<RawStratum>>>) -> Result<Vec<Stratum>> {
    let list = raw.get_ref();
    if list.is_empty() {
        return Err(c.err(
            raw.span(),
            "soil",
            InputKind::Missing,
            "no strata; allowed: one or more [[soil]] tables, top to bottom",
        ));
    }
    // Each stratum on its own: the errors of every stratum are reported together (a bottom
    // depth is checked against the last valid one above it).
    let mut strata = Vec::new();
    let mut last_bottom = 0.0;
    let mut g = crate::error::Gather::default();
    for (k, st) in list.iter().enumerate() {
        if let Some(s) = g.take(one_stratum(c, st, k, list.len(), &mut last_bottom)) {
            strata.push(s);
        }
    }
    g.finish()?;
    Ok(strata)
}

/// Stratum `k` of `n`, its bottom deeper than `last_bottom` (updated).
fn one_stratum(
    c: &Ctx,
    st: &S<RawStratum>,
    k: usize,
    n: usize,
    last_bottom: &mut f64,
) -> Result<Stratum> {
    let key = format!("soil[{k}]");
    let material = stratum(c, st, &key)?;
    let last = k + 1 == n;
    let bottom_m = match (&st.get_ref().bottom_depth_m, last) {
        (Some(v), false) => {
            *last_bottom = c.range(
                v,
                &format!("{key}.bottom_depth_m"),
                *last_bottom,
                500.0,
                "m",
            )?;
            *last_bottom
        }
        (Some(v), true) => return Err(c.err(
            v.span(),
            &format!("{key}.bottom_depth_m"),
            InputKind::Conflict,
            "the last stratum reaches the bottom of the domain; allowed: omit bottom_depth_m here",
        )),
        (None, false) => return Err(c.err(
            st.span(),
            &format!("{key}.bottom_depth_m"),
            InputKind::Missing,
            "missing; allowed: the depth (m) of this stratum's bottom, deeper than the one above",
        )),
        (None, true) => f64::INFINITY,
    };
    Ok(Stratum { bottom_m, material })
}

/// One soil description as a freezing material.
pub fn stratum(c: &Ctx, st: &S<RawStratum>, key: &str) -> Result<Material> {
    let r = st.get_ref();
    let lib = library(c, r, key)?;
    let method = method(c, r, key)?;
    let index = index(c, r, key, lib.as_ref())?;
    let derived = match &index {
        Some(ix) => Some(derived(c, st, key, (ix, method), lib.as_ref())?),
        None => None,
    };
    let m = explicit(c, st, key, derived, lib.map(|l| l.name))?;
    match &r.unfrozen_water {
        None => Ok(m),
        Some(u) => unfrozen_water(c, r, u, key, index.as_ref(), m),
    }
}

/// The library soil or soil file the stratum starts from, if any.
fn library(c: &Ctx, r: &RawStratum, key: &str) -> Result<Option<SoilFile>> {
    match (&r.library, &r.soil_file) {
        (Some(n), None) => bundled_soil(n.get_ref()).map(Some).ok_or_else(|| {
            let names: Vec<&str> = SOILS.iter().map(|(n, _)| *n).collect();
            c.err(
                n.span(),
                &format!("{key}.library"),
                InputKind::UnknownName,
                format!(
                    "no soil \"{}\" in the library; known: {}",
                    n.get_ref(),
                    names.join(", ")
                ),
            )
        }),
        (None, Some(p)) => {
            let path = super::case_dir(c.file).join(p.get_ref());
            let src = std::fs::read_to_string(&path).map_err(|e| {
                c.err(
                    p.span(),
                    &format!("{key}.soil_file"),
                    InputKind::Unreadable,
                    format!("cannot read {}: {e}", path.display()),
                )
            })?;
            parse_soil_file(&path.display().to_string(), &src).map(Some)
        }
        (Some(n), Some(_)) => Err(c.err(
            n.span(),
            &format!("{key}.library"),
            InputKind::Conflict,
            "give library or soil_file, not both",
        )),
        (None, None) => Ok(None),
    }
}

/// The conductivity method (Johansen by default).
fn method(c: &Ctx, r: &RawStratum, key: &str) -> Result<KMethod> {
    Ok(match r.method.as_ref().map(|m| (m, m.get_ref().as_str())) {
        None | Some((_, "johansen")) => KMethod::Johansen,
        Some((_, "kersten")) => KMethod::Kersten,
        Some((m, other)) => {
            return Err(c.err(
                m.span(),
                &format!("{key}.method"),
                InputKind::UnknownName,
                format!("\"{other}\" is not a conductivity method; allowed: johansen, kersten"),
            ))
        }
    })
}

/// Index properties: the library's, with any given ones overriding; or given ones alone (dry
/// density and water content both needed).
fn index(c: &Ctx, r: &RawStratum, key: &str, lib: Option<&SoilFile>) -> Result<Option<SoilIndex>> {
    let rd = r
        .dry_density_kg_per_m3
        .as_ref()
        .map(|v| {
            c.range(
                v,
                &format!("{key}.dry_density_kg_per_m3"),
                100.0,
                2700.0,
                "kg/m³",
            )
        })
        .transpose()?;
    let w = r
        .water_content
        .as_ref()
        .map(|v| {
            c.range_incl(
                v,
                &format!("{key}.water_content"),
                0.0,
                5.0,
                "(fraction of dry mass)",
            )
        })
        .transpose()?;
    let q = r
        .quartz_fraction
        .as_ref()
        .map(|v| c.range_incl(v, &format!("{key}.quartz_fraction"), 0.0, 1.0, "(fraction)"))
        .transpose()?;
    Ok(match (lib.map(SoilFile::index), rd, w) {
        (Some(b), _, _) => Some(SoilIndex {
            dry_density: rd.unwrap_or(b.dry_density),
            water_content: w.unwrap_or(b.water_content),
            quartz: q.unwrap_or(b.quartz),
            texture: r.texture.unwrap_or(b.texture),
        }),
        (None, Some(rd), Some(w)) => Some(SoilIndex {
            dry_density: rd,
            water_content: w,
            quartz: q.unwrap_or(0.5),
            texture: r.texture.unwrap_or(Texture::Coarse),
        }),
        _ => None,
    })
}

/// Properties derived from the index properties. A library soil keeps its explicit properties
/// unless its index properties were changed.
fn derived(
    c: &Ctx,
    st: &S<RawStratum>,
    key: &str,
    (ix, method): (&SoilIndex, KMethod),
    lib: Option<&SoilFile>,
) -> Result<SoilProperties> {
    let r = st.get_ref();
    let changed = r.dry_density_kg_per_m3.is_some()
        || r.water_content.is_some()
        || r.quartz_fraction.is_some()
        || r.texture.is_some();
    let file = match lib {
        Some(l) if !changed => l.clone(),
        Some(l) => l.with_index(*ix),
        None => SoilFile::from_index(*ix),
    };
    soil_properties(&file, method).ok_or_else(|| {
        c.err(st.span(), &format!("{key}.method"), InputKind::OutOfRange, format!(
            "Kersten's fits hold for water contents of at least 7 % (fine) or 1 % (coarse); this soil has {:.1} %; allowed: method = \"johansen\", or explicit conductivities",
            100.0 * ix.water_content))
    })
}

/// The material: explicit values where given, else the derived ones.
fn explicit(
    c: &Ctx,
    st: &S<RawStratum>,
    key: &str,
    derived: Option<SoilProperties>,
    lib_name: Option<String>,
) -> Result<Material> {
    let r = st.get_ref();
    let f =
        |v: &Option<S<f64>>, name: &str, (lo, hi): (f64, f64), unit: &str| -> Result<Option<f64>> {
            v.as_ref()
                .map(|v| c.range(v, &format!("{key}.{name}"), lo, hi, unit))
                .transpose()
        };
    let missing = |name: &str| {
        c.err(st.span(), &format!("{key}.{name}"), InputKind::Missing, format!(
            "missing; give library = \"<soil>\", or dry_density_kg_per_m3 and water_content, or explicit {name}"))
    };
    let d = derived;
    let ku = f(
        &r.k_unfrozen_w_per_mk,
        "k_unfrozen_w_per_mk",
        (0.0, 10.0),
        "W/(m·K)",
    )?
    .or(d.map(|d| d.k_unfrozen))
    .ok_or_else(|| missing("k_unfrozen_w_per_mk"))?;
    let kf = f(
        &r.k_frozen_w_per_mk,
        "k_frozen_w_per_mk",
        (0.0, 10.0),
        "W/(m·K)",
    )?
    .or(d.map(|d| d.k_frozen))
    .unwrap_or(ku);
    let cu = f(
        &r.c_unfrozen_j_per_m3k,
        "c_unfrozen_j_per_m3k",
        (1e5, 6e6),
        "J/(m³·K)",
    )?
    .or(d.map(|d| d.c_unfrozen))
    .ok_or_else(|| missing("c_unfrozen_j_per_m3k"))?;
    let cf = f(
        &r.c_frozen_j_per_m3k,
        "c_frozen_j_per_m3k",
        (1e5, 6e6),
        "J/(m³·K)",
    )?
    .or(d.map(|d| d.c_frozen))
    .unwrap_or(cu);
    let latent = match &r.latent_heat_j_per_m3 {
        Some(v) => c.range_incl(
            v,
            &format!("{key}.latent_heat_j_per_m3"),
            0.0,
            400e6,
            "J/m³",
        )?,
        None => d
            .map(|d| d.latent)
            .ok_or_else(|| missing("latent_heat_j_per_m3"))?,
    };
    Ok(Material {
        name: r
            .name
            .clone()
            .or(lib_name)
            .unwrap_or_else(|| format!("soil {key}")),
        k_unfrozen: ku,
        k_frozen: kf,
        c_unfrozen: cu,
        c_frozen: cf,
        latent,
        t_freeze: match &r.freezing_point_c {
            Some(v) => c.range_incl(v, &format!("{key}.freezing_point_c"), -5.0, 0.0, "°C")?,
            None => 0.0,
        },
        freezing_interval: f(
            &r.freezing_interval_k,
            "freezing_interval_k",
            (0.01, 5.0),
            "K",
        )?
        .unwrap_or(0.5),
        curve: None,
    })
}

/// The power-law unfrozen-water curve (Anderson & Tice type), replacing the freezing interval.
fn unfrozen_water(
    c: &Ctx,
    r: &RawStratum,
    u: &S<RawUnfrozenWater>,
    key: &str,
    index: Option<&SoilIndex>,
    m: Material,
) -> Result<Material> {
    let uw = u.get_ref();
    let w_total = index
        .map(|ix| ix.water_content)
        .filter(|w| *w > 0.0)
        .ok_or_else(|| {
            c.err(
                u.span(),
                &format!("{key}.unfrozen_water"),
                InputKind::Missing,
                "needs the water content: give water_content (or a library soil)",
            )
        })?;
    let valid = uw.alpha > 0.0 && uw.alpha <= 2.0 && uw.beta < 0.0 && uw.beta > -5.0;
    if !valid {
        return Err(c.err(
            u.span(),
            &format!("{key}.unfrozen_water"),
            InputKind::OutOfRange,
            format!("alpha {} and beta {}; allowed: alpha (fraction of dry mass at 1 K below freezing) in (0, 2], beta in (−5, 0)", uw.alpha, uw.beta),
        ));
    }
    if r.freezing_interval_k.is_some() {
        return Err(c.err(
            u.span(),
            &format!("{key}.freezing_interval_k"),
            InputKind::Conflict,
            "give freezing_interval_k or unfrozen_water, not both",
        ));
    }
    Ok(m.with_unfrozen_water(w_total, uw.alpha, uw.beta))
}
