//! Case files: the TOML mirror ([`raw`]), validation (one function per table, each taking the
//! already-validated parts it depends on) and the validated [`Case`] in SI units ([`model`]).
//! Validation is the only place input errors arise; each names the file, line and column, the
//! key, the bad value and what is allowed.
//!
//! Coordinates: x horizontal, 0 at the exterior face of the foundation wall, positive outward
//! (negative under the building); z depth below finished ground level, positive down (negative
//! above ground).
mod building;
mod climate;
mod ctx;
mod insulation;
pub mod layout;
pub mod model;
pub mod raw;
mod simulation;
mod sizing;
mod soil;
pub mod uncertainty;
pub mod units;

pub use layout::{Part, Rect};
pub use model::*;

use crate::error::{Error, Gather, InputKind, Location, Result};
use ctx::Ctx;
use raw::RawCase;

/// Parse and validate the case text `src`, read from `file` (used in messages and to resolve
/// relative paths of climate and soil files).
pub fn parse_case(file: &str, src: &str) -> Result<Case> {
    let si = units::rewrite(file, src)?;
    let raw: RawCase = toml::from_str(&si.si).map_err(|e| toml_error(file, src, &si, &e))?;
    validate(
        &Ctx {
            file,
            user: src,
            units: &si,
        },
        raw,
    )
}

/// Read, parse and validate a case file.
pub fn load_case(path: &std::path::Path) -> Result<Case> {
    // A case file that cannot be read is a usage error (exit 2), not a runtime failure.
    let file = path.display().to_string();
    let bytes = std::fs::read(path).map_err(|e| {
        Error::in_file(
            &file,
            "(file)",
            InputKind::Unreadable,
            format!("cannot read the case file: {e}"),
        )
    })?;
    let src = match String::from_utf8(bytes) {
        Ok(s) => s,
        Err(e) => {
            // Locate the first byte that is not UTF-8 by the valid text before it.
            let good = e.utf8_error().valid_up_to();
            let text = String::from_utf8_lossy(&e.as_bytes()[..good]).into_owned();
            return Err(Error::input(
                Location::from_offset(&file, &text, good),
                "(file)",
                InputKind::Syntax,
                "not UTF-8 text here; allowed: a UTF-8 TOML file",
            ));
        }
    };
    parse_case(&file, &src)
}

/// A TOML syntax or type error, located, with the key it concerns: the first `quoted` name in the
/// message, else the key on the error's line, under the table the error sits in.
fn toml_error(file: &str, src: &str, si: &units::Rewritten, e: &toml::de::Error) -> Error {
    let msg = e.message().to_string();
    let (location, table, line_key) = match e.span().map(|sp| si.user_offset(sp.start)) {
        Some(at) => (
            Location::from_offset(file, src, at),
            table_at(src, at),
            key_on_line(src, at),
        ),
        None => (Location::file_only(file), String::new(), None),
    };
    // A `quoted` word names a key in "missing field `k`", "unknown field `k`" and "duplicate
    // key `k`"; in "invalid type: floating point `2.5`" it is the value, so the line's key wins.
    let mut quoted = msg.split('`').nth(1).map(str::to_string);
    // A key the user wrote in a US unit is named as written (`thicknes_in`, not `thicknes_m`).
    let mut msg = msg;
    if let (Some(q), Some(user)) = (&quoted, &line_key) {
        if q != user && units::us_key(user).is_some_and(|(_, s)| s == *q) {
            msg = msg.replacen(&format!("`{q}`"), &format!("`{user}`"), 1);
            quoted = Some(user.clone());
        }
    }
    // A missing quantity key may also be given in a US unit: say so.
    let us = quoted.as_deref().map(units::us_names).unwrap_or_default();
    let msg = if msg.starts_with("missing field") && !us.is_empty() {
        format!("{msg} (or in US units: {})", us.join(", "))
    } else {
        msg
    };
    let names_key = ["missing field", "unknown field", "duplicate key"]
        .iter()
        .any(|p| msg.starts_with(p));
    let named = if names_key {
        quoted.or(line_key)
    } else {
        line_key.or(quoted)
    };
    let key = match (named.as_deref(), table.is_empty()) {
        (Some(k), false) => format!("{table}.{k}"),
        (Some(k), true) => k.to_string(),
        (None, false) => table,
        (None, true) => "(syntax)".into(),
    };
    Error::input(location, &key, InputKind::Syntax, msg)
}

/// The `key` of a `key = value` line holding byte `offset`.
fn key_on_line(src: &str, offset: usize) -> Option<String> {
    let off = offset.min(src.len());
    let start = src[..off].rfind('\n').map_or(0, |k| k + 1);
    let line = src[start..].lines().next()?;
    let (k, _) = line.split_once('=')?;
    let k = k.trim();
    (!k.is_empty() && !k.starts_with('[')).then(|| k.to_string())
}

/// Name of the TOML table whose header precedes byte `offset` (e.g. `slab`, `insulation`).
fn table_at(src: &str, offset: usize) -> String {
    let end = src[offset.min(src.len())..]
        .find('\n')
        .map_or(src.len(), |k| offset + k);
    let upto = &src[..end];
    upto.lines()
        .filter_map(|l| {
            let l = l.trim();
            l.starts_with('[')
                .then(|| l.trim_matches(|c| c == '[' || c == ']').trim().to_string())
        })
        .next_back()
        .unwrap_or_default()
}

/// The directory that relative paths in a case file are resolved against.
fn case_dir(file: &str) -> std::path::PathBuf {
    std::path::Path::new(file)
        .parent()
        .map(|p| p.to_path_buf())
        .unwrap_or_default()
}

/// Validate every table in dependency order. The errors of tables that do not depend on each
/// other are reported together, in file order: first the construction, building, climate, soil,
/// fill and simulation tables; when those hold, the basement, insulation pieces, corner boards,
/// probes and sizing.
fn validate(c: &Ctx, raw: RawCase) -> Result<Case> {
    let mut g = Gather::default();
    let cons = g.take(building::construction(c, &raw));
    let climate = g.take(climate::climate(c, &raw.climate));
    let strata = g.take(soil::strata(c, &raw.soil));
    let fill = g.take(insulation::fill(c, raw.fill.as_ref()));
    let bp = cons.as_ref().and_then(|cons| {
        g.take(building::building(
            c,
            &raw.building,
            raw.plan.as_ref(),
            cons.wall.thickness_m,
        ))
    });
    let simulation = match (&cons, &bp) {
        (Some(cons), Some((building, _))) => g.take(simulation::simulation(
            c,
            &raw.simulation,
            building.b_prime_m,
            cons.basement_depth_m,
        )),
        _ => None,
    };
    g.finish()?;
    let (
        Some(cons),
        Some(climate),
        Some(strata),
        Some(fill),
        Some((building, plan)),
        Some(simulation),
    ) = (cons, climate, strata, fill, bp, simulation)
    else {
        unreachable!("every table above validated (Gather::finish returned Ok)");
    };
    let mut g = Gather::default();
    g.take(climate::no_permafrost(c, &climate, &strata));
    let basement = g.take(building::basement(
        c,
        raw.basement.as_ref(),
        &cons,
        &simulation,
    ));
    let parts = insulation::Parts {
        building: &building,
        cons: &cons,
        simulation: &simulation,
    };
    let insulation = g.take(insulation::insulation(c, &raw.insulation, &parts));
    let corners = g.take(insulation::corner_pieces(
        c,
        &raw.corner,
        &parts,
        &raw.insulation,
    ));
    g.take(building::footing_in_domain(
        c,
        &raw.footing,
        &cons.footing,
        &simulation,
    ));
    let probes = g.take(simulation::probes(
        c,
        &raw.probe,
        &building,
        &cons.wall,
        &simulation,
    ));
    let sizing = match (&raw.sizing, &insulation, &corners) {
        (Some(s), Some(insulation), Some(corners)) => g
            .take(sizing::sizing(c, s, insulation, (corners, plan.as_ref())))
            .map(Some),
        (None, ..) => Some(None),
        _ => None,
    };
    let spread = match &raw.uncertainty {
        Some(u) => g.take(uncertainty::uncertainty(c, u, &climate)).map(Some),
        None => Some(None),
    };
    g.finish()?;
    let (
        Some(basement),
        Some(insulation),
        Some(corners),
        Some(probes),
        Some(sizing),
        Some(uncertainty),
    ) = (basement, insulation, corners, probes, sizing, spread)
    else {
        unreachable!("every table above validated (Gather::finish returned Ok)");
    };
    let case = Case {
        sizing,
        uncertainty,
        plan,
        corners,
        file: c.file.to_string(),
        source: c.user.to_string(),
        name: raw.name,
        building,
        slab: cons.slab,
        wall: cons.wall,
        footing: cons.footing,
        basement,
        insulation,
        fill,
        strata,
        climate,
        simulation,
        probes,
    };
    insulation::check_layout(c, &raw.insulation, &case)?;
    insulation::check_corners(c, &raw.corner, &case)?;
    simulation::model_needs_plan(c, &raw.simulation, &case)?;
    Ok(case)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn toml_errors_name_table_and_key() {
        let src = "name = \"x\"\n[slab]\nthickness_m = \"thick\"\n";
        let e = parse_case("c.toml", src).unwrap_err();
        match e {
            Error::Input {
                location,
                key,
                kind,
                ..
            } => {
                assert_eq!((location.line, kind), (3, InputKind::Syntax));
                assert_eq!(key, "slab.thickness_m");
            }
            other => panic!("{other}"),
        }
    }

    #[test]
    fn helpers_find_tables_and_keys() {
        let src = "a = 1\n[[insulation]]\nkind = \"wing\"\n";
        let off = src.find("wing").unwrap();
        assert_eq!(table_at(src, off), "insulation");
        assert_eq!(key_on_line(src, off).as_deref(), Some("kind"));
        assert_eq!(
            case_dir("examples/x.toml"),
            std::path::PathBuf::from("examples")
        );
    }
}
