//! Named construction materials and the bundled soil library.
//!
//! Construction materials (design values; ρc from density × specific heat):
//! - `concrete`: λ 2.0 W/(m·K), ρ 2400 kg/m³, c 1000 J/(kg·K) (ISO 10456 high-density concrete
//!   as tabulated in EDF's BuildSysPro material library; secondary).
//! - `xps`: λ 0.032 W/(m·K), long-term moist in-ground design value of extruded polystyrene
//!   Types IV–VII (ASCE/SEI 32-01 effective R 4.5 per inch, as reproduced in HUD's Revised
//!   Builder's Guide to Frost Protected Shallow Foundations, 2004), ρc 0.05 MJ/(m³·K)
//!   (35 kg/m³ × 1450 J/(kg·K), typical).
//! - `eps`: λ 0.045 W/(m·K), EPS Type IX in-ground design value (ASCE/SEI 32-01, R 3.2 per inch),
//!   ρc 0.04 MJ/(m³·K) (typical).
//! - `eps-ii`: λ 0.060 W/(m·K), EPS Type II in-ground design value (ASCE/SEI 32-01, R 2.4 per inch).
//! - `gravel`: drained granular fill, λ 2.0 W/(m·K) and ρc 2.0 MJ/(m³·K) (ISO 13370 ground
//!   category 2, sand or gravel), 5 % water at 2000 kg/m³ dry density → L = 33.4 MJ/m³
//!   (typical value, common practice for a drained base course).
use crate::physics::material::Material;
use crate::physics::soil::{SoilIndex, Texture};

/// A named construction material, or `None`.
pub fn named_material(name: &str) -> Option<Material> {
    let m = match name {
        "concrete" => Material::inert("concrete", 2.0, 2.4e6),
        "xps" => Material::inert("xps", 0.032, 0.05e6),
        "eps" => Material::inert("eps", 0.045, 0.04e6),
        "eps-ii" => Material::inert("eps-ii", 0.060, 0.04e6),
        "gravel" => Material {
            name: "gravel".into(),
            k_unfrozen: 2.0,
            k_frozen: 2.0,
            c_unfrozen: 2.0e6,
            c_frozen: 2.0e6 - 2000.0 * 0.05 * (4190.0 - 2050.0),
            latent: 2000.0 * 0.05 * 333.7e3,
            t_freeze: 0.0,
            freezing_interval: 0.5,
            curve: None,
        },
        _ => return None,
    };
    Some(m)
}

/// Names accepted by [`named_material`].
pub const MATERIAL_NAMES: &[&str] = &["concrete", "xps", "eps", "eps-ii", "gravel"];

/// A soil of the bundled library (`soils/*.toml`).
#[derive(Debug, Clone, PartialEq, serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SoilFile {
    /// Display name.
    pub name: String,
    /// What the soil is.
    pub description: String,
    /// Where the values come from.
    pub source: String,
    /// Dry density, kg/m³.
    pub dry_density_kg_per_m3: f64,
    /// Gravimetric water content, fraction of dry mass.
    pub water_content: f64,
    /// Quartz fraction of the solids.
    pub quartz_fraction: f64,
    /// Texture class (coarse or fine).
    pub texture: Texture,
    /// Frost-susceptibility class, with its basis.
    pub frost_susceptibility: String,
    /// Explicit properties overriding the derived ones (soils the correlations do not cover).
    #[serde(default)]
    pub k_unfrozen_w_per_mk: Option<f64>,
    /// Explicit frozen conductivity, W/(m·K).
    #[serde(default)]
    pub k_frozen_w_per_mk: Option<f64>,
    /// Explicit unfrozen volumetric heat capacity, J/(m³·K).
    #[serde(default)]
    pub c_unfrozen_j_per_m3k: Option<f64>,
    /// Explicit frozen volumetric heat capacity, J/(m³·K).
    #[serde(default)]
    pub c_frozen_j_per_m3k: Option<f64>,
    /// Explicit volumetric latent heat, J/m³.
    #[serde(default)]
    pub latent_heat_j_per_m3: Option<f64>,
}

impl SoilFile {
    /// The soil with new index properties: the explicit thermal properties are dropped, since
    /// they belonged to the old index properties and are derived afresh from the new ones.
    pub fn with_index(&self, ix: SoilIndex) -> SoilFile {
        SoilFile {
            dry_density_kg_per_m3: ix.dry_density,
            water_content: ix.water_content,
            quartz_fraction: ix.quartz,
            texture: ix.texture,
            k_unfrozen_w_per_mk: None,
            k_frozen_w_per_mk: None,
            c_unfrozen_j_per_m3k: None,
            c_frozen_j_per_m3k: None,
            latent_heat_j_per_m3: None,
            ..self.clone()
        }
    }

    /// A soil described only by its index properties (no name, source or explicit values).
    pub fn from_index(ix: SoilIndex) -> SoilFile {
        SoilFile {
            name: String::new(),
            description: String::new(),
            source: String::new(),
            dry_density_kg_per_m3: ix.dry_density,
            water_content: ix.water_content,
            quartz_fraction: ix.quartz,
            texture: ix.texture,
            frost_susceptibility: String::new(),
            k_unfrozen_w_per_mk: None,
            k_frozen_w_per_mk: None,
            c_unfrozen_j_per_m3k: None,
            c_frozen_j_per_m3k: None,
            latent_heat_j_per_m3: None,
        }
    }

    /// The index properties.
    pub fn index(&self) -> SoilIndex {
        SoilIndex {
            dry_density: self.dry_density_kg_per_m3,
            water_content: self.water_content,
            quartz: self.quartz_fraction,
            texture: self.texture,
        }
    }
}

/// The bundled soil files, by library name.
pub const SOILS: &[(&str, &str)] = &[
    ("gravel", include_str!("../../soils/gravel.toml")),
    ("sand", include_str!("../../soils/sand.toml")),
    ("silty-sand", include_str!("../../soils/silty-sand.toml")),
    ("silt", include_str!("../../soils/silt.toml")),
    ("lean-clay", include_str!("../../soils/lean-clay.toml")),
    ("fat-clay", include_str!("../../soils/fat-clay.toml")),
    (
        "glacial-till",
        include_str!("../../soils/glacial-till.toml"),
    ),
    ("peat", include_str!("../../soils/peat.toml")),
    (
        "iso-clay-silt",
        include_str!("../../soils/iso-clay-silt.toml"),
    ),
    (
        "iso-sand-gravel",
        include_str!("../../soils/iso-sand-gravel.toml"),
    ),
    ("iso-rock", include_str!("../../soils/iso-rock.toml")),
];

/// Conductivity method for soils given by index properties.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum KMethod {
    /// Johansen (1975), the default.
    Johansen,
    /// Kersten (1949).
    Kersten,
}

/// Thermal properties of a soil.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct SoilProperties {
    /// Unfrozen conductivity, W/(m·K).
    pub k_unfrozen: f64,
    /// Frozen conductivity, W/(m·K).
    pub k_frozen: f64,
    /// Unfrozen volumetric heat capacity, J/(m³·K).
    pub c_unfrozen: f64,
    /// Frozen volumetric heat capacity, J/(m³·K).
    pub c_frozen: f64,
    /// Volumetric latent heat, J/m³.
    pub latent: f64,
}

/// Derived properties of a soil, explicit values of the file taking precedence; `None` if Kersten
/// is asked outside its water-content range.
pub fn soil_properties(s: &SoilFile, method: KMethod) -> Option<SoilProperties> {
    let ix = s.index();
    let (ku, kf) = match method {
        KMethod::Johansen => ix.johansen(),
        KMethod::Kersten => ix.kersten()?,
    };
    let (cu, cf) = ix.heat_capacities();
    Some(SoilProperties {
        k_unfrozen: s.k_unfrozen_w_per_mk.unwrap_or(ku),
        k_frozen: s.k_frozen_w_per_mk.unwrap_or(kf),
        c_unfrozen: s.c_unfrozen_j_per_m3k.unwrap_or(cu),
        c_frozen: s.c_frozen_j_per_m3k.unwrap_or(cf),
        latent: s.latent_heat_j_per_m3.unwrap_or(ix.latent_heat()),
    })
}

/// Parse and check a soil file's text (`name` for messages).
pub fn parse_soil_file(name: &str, src: &str) -> crate::error::Result<SoilFile> {
    use crate::error::{Error, InputKind, Location};
    let s: SoilFile = toml::from_str(src).map_err(|e| {
        Error::input(
            e.span().map_or(Location::file_only(name), |sp| {
                Location::from_offset(name, src, sp.start)
            }),
            e.message().split('`').nth(1).unwrap_or("(soil file)"),
            InputKind::Syntax,
            e.message(),
        )
    })?;
    // The error at the value of `key` (line and column), found as the line that assigns it.
    let bad = |key: &str, msg: String| {
        let mut offset = 0;
        let at = src.split_inclusive('\n').find_map(|line| {
            let start = offset;
            offset += line.len();
            let rest = line.trim_start().strip_prefix(key)?.trim_start();
            let value = rest.strip_prefix('=')?;
            let lead = line.len() - value.trim_start().len();
            Some(start + lead)
        });
        let loc = at.map_or(Location::file_only(name), |o| {
            Location::from_offset(name, src, o)
        });
        Error::input(loc, key, InputKind::OutOfRange, msg)
    };
    if !(100.0..=2700.0).contains(&s.dry_density_kg_per_m3) {
        return Err(bad(
            "dry_density_kg_per_m3",
            format!(
                "{} kg/m³ is out of range; allowed: 100 to 2700",
                s.dry_density_kg_per_m3
            ),
        ));
    }
    if !(0.0..=5.0).contains(&s.water_content) {
        return Err(bad(
            "water_content",
            format!(
                "{} is out of range; allowed: 0 to 5 (fraction of dry mass)",
                s.water_content
            ),
        ));
    }
    if !(0.0..=1.0).contains(&s.quartz_fraction) {
        return Err(bad(
            "quartz_fraction",
            format!("{} is out of range; allowed: 0 to 1", s.quartz_fraction),
        ));
    }
    for (k, v) in [
        ("k_unfrozen_w_per_mk", s.k_unfrozen_w_per_mk),
        ("k_frozen_w_per_mk", s.k_frozen_w_per_mk),
    ] {
        if let Some(v) = v.filter(|v| !(*v > 0.0 && *v <= 10.0)) {
            return Err(bad(
                k,
                format!("{v} W/(m·K) is out of range; allowed: greater than 0 and at most 10"),
            ));
        }
    }
    Ok(s)
}

/// Look up a bundled soil by library name.
pub fn bundled_soil(name: &str) -> Option<SoilFile> {
    SOILS
        .iter()
        .find(|(n, _)| *n == name)
        .map(|(n, src)| parse_soil_file(n, src).expect("bundled soil files parse (tested)"))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bundled_soils_parse_and_are_sane() {
        for (n, _) in SOILS {
            let s = bundled_soil(n).unwrap();
            let p = soil_properties(&s, KMethod::Johansen).unwrap();
            let (ku, kf, cu, cf, l) =
                (p.k_unfrozen, p.k_frozen, p.c_unfrozen, p.c_frozen, p.latent);
            assert!(
                ku > 0.3 && ku < 4.0 && kf >= ku * 0.9 && kf < 4.0,
                "{n}: {ku} {kf}"
            );
            assert!(
                cu > 1e6 && cf > 1e6 && cu < 5e6 && l >= 0.0,
                "{n}: {cu} {cf} {l}"
            );
            assert!(!s.source.is_empty() && !s.frost_susceptibility.is_empty());
        }
        for n in MATERIAL_NAMES {
            assert!(named_material(n).is_some());
        }
    }

    /// The boards' in-ground conductivities are ASCE/SEI 32-01's effective R per inch for long-term
    /// moist below-ground use (XPS 4.5, EPS Type IX 3.2, EPS Type II 2.4 h·ft²·°F/(Btu·in), as
    /// reproduced in HUD's Revised Builder's Guide to Frost Protected Shallow Foundations, 2004):
    /// λ = 0.0254 m / (R × 0.1761102 m²·K/W) (NIST SP 811, B.9), to the two significant figures
    /// the library keeps.
    #[test]
    fn boards_match_the_published_in_ground_r_per_inch() {
        for (name, r_per_inch) in [("xps", 4.5), ("eps", 3.2), ("eps-ii", 2.4)] {
            let k = named_material(name).unwrap().k_unfrozen;
            let published = 0.0254 / (r_per_inch * 0.176_110_2);
            assert!((k - published).abs() < 0.0005, "{name}: {k} vs {published}");
        }
    }

    /// ISO 13370 default ground categories (its Table 1, values from memory of the standard, as
    /// the methods notes record them): clay or silt λ 1.5, ρc 3.0 MJ/(m³·K); sand or gravel 2.0,
    /// 2.0; homogeneous rock 3.5, 2.0. The library's iso-* soils reproduce them exactly.
    #[test]
    fn iso13370_ground_categories() {
        for (n, k, c) in [
            ("iso-clay-silt", 1.5, 3.0e6),
            ("iso-sand-gravel", 2.0, 2.0e6),
            ("iso-rock", 3.5, 2.0e6),
        ] {
            let p = soil_properties(&bundled_soil(n).unwrap(), KMethod::Johansen).unwrap();
            assert_eq!((p.k_unfrozen, p.c_unfrozen), (k, c), "{n}");
        }
    }

    #[test]
    fn bad_soil_files_are_rejected() {
        let good = include_str!("../../soils/sand.toml");
        let e = parse_soil_file(
            "x.toml",
            &good.replace(
                "dry_density_kg_per_m3 = 1650.0",
                "dry_density_kg_per_m3 = 5000.0",
            ),
        )
        .unwrap_err();
        assert!(
            e.to_string().contains("dry_density_kg_per_m3")
                && e.to_string().contains("100 to 2700"),
            "{e}"
        );
        let e = parse_soil_file(
            "x.toml",
            &good.replace("texture = \"coarse\"", "texture = \"lumpy\""),
        )
        .unwrap_err();
        assert!(e.to_string().starts_with("x.toml:"), "{e}");
        let e = parse_soil_file("x.toml", &format!("{good}\ncolour = \"brown\"\n")).unwrap_err();
        assert!(e.to_string().contains("colour"), "{e}");
    }
}
