//! Named construction materials and the bundled soil library.
//!
//! Construction materials (design values; ρc from density × specific heat):
//! - `concrete`: λ 2.0 W/(m·K), ρ 2400 kg/m³, c 1000 J/(kg·K) (ISO 10456:2007 Table 3, dense
//!   concrete 2400 kg/m³; value from memory, to be checked against the printed table).
//! - `xps`: λ 0.032 W/(m·K), long-term moist in-ground design value of extruded polystyrene
//!   (ASCE/SEI 32-01, R 4.5 per inch), ρc 0.05 MJ/(m³·K) (35 kg/m³ × 1450 J/(kg·K), typical).
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
}

impl SoilFile {
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
    ("sand", include_str!("../../soils/sand.toml")),
    ("silty-sand", include_str!("../../soils/silty-sand.toml")),
    ("silt", include_str!("../../soils/silt.toml")),
    ("lean-clay", include_str!("../../soils/lean-clay.toml")),
];

/// Look up a bundled soil by library name.
pub fn bundled_soil(name: &str) -> Option<SoilFile> {
    SOILS
        .iter()
        .find(|(n, _)| *n == name)
        .map(|(_, src)| toml::from_str(src).expect("bundled soil files parse (tested)"))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bundled_soils_parse_and_are_sane() {
        for (n, _) in SOILS {
            let s = bundled_soil(n).unwrap();
            let (ku, kf) = s.index().johansen();
            assert!(
                ku > 0.5 && ku < 3.5 && kf >= ku * 0.9 && kf < 4.0,
                "{n}: {ku} {kf}"
            );
        }
        for n in MATERIAL_NAMES {
            assert!(named_material(n).is_some());
        }
    }
}
