//! Soil thermal properties from dry density, water content and quartz fraction (Johansen 1975),
//! and the volumetric heat capacities and latent heat of a moist soil.
//!
//! Johansen (1975; CRREL Draft Translation 637, 1977): k = (k_sat − k_dry) Ke + k_dry with
//! - k_dry = (0.135 ρd + 64.7)/(2700 − 0.947 ρd) (ρd in kg/m³),
//! - k_sat,u = k_s^(1−n) k_w^n, k_sat,f = k_s^(1−n) k_i^n (no unfrozen water), n = 1 − ρd/2700,
//! - k_s = k_q^q k_o^(1−q), k_q = 7.7, k_o = 2.0 (3.0 for coarse soils with q ≤ 0.2),
//! - Kersten number Ke: unfrozen coarse 0.7 log₁₀Sr + 1, unfrozen fine log₁₀Sr + 1, frozen Sr;
//!   k_w = 0.57, k_i = 2.2 W/(m·K).
//!
//! Heat capacity and latent heat (TM 5-852-6 in SI form): C_u = ρd (c_s + 4190 w),
//! C_f = ρd (c_s + 2050 w), L = ρd w · 333.7 kJ/kg, with w the gravimetric water content
//! (fraction) and c_s = 710 J/(kg·K) for the mineral solids.
use crate::physics::material::Material;

/// Texture class for the Kersten number.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Deserialize, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Texture {
    /// Sands and gravels.
    Coarse,
    /// Silts and clays.
    Fine,
}

impl Texture {
    /// The texture in words, for printed output.
    pub fn label(self) -> &'static str {
        match self {
            Texture::Coarse => "coarse (sands and gravels)",
            Texture::Fine => "fine (silts and clays)",
        }
    }
}

/// Index properties of a soil.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SoilIndex {
    /// Dry density, kg/m³.
    pub dry_density: f64,
    /// Gravimetric water content, fraction of dry mass.
    pub water_content: f64,
    /// Quartz fraction of the solids, 0–1.
    pub quartz: f64,
    /// Texture class.
    pub texture: Texture,
}

/// Specific heat of the mineral solids, J/(kg·K).
pub const C_SOLIDS: f64 = 710.0;
/// Latent heat of fusion of water, J/kg.
pub const L_WATER: f64 = 333.7e3;

impl SoilIndex {
    /// Porosity n = 1 − ρd/2700.
    pub fn porosity(&self) -> f64 {
        1.0 - self.dry_density / 2700.0
    }
    /// Degree of saturation Sr = w ρd /(ρ_w n), ρ_w = 1000 kg/m³, capped at 1.
    pub fn saturation(&self) -> f64 {
        (self.water_content * self.dry_density / (1000.0 * self.porosity())).min(1.0)
    }
    /// Kersten (1949) (unfrozen, frozen) conductivities, W/(m·K), in the SI form with ρd in Mg/m³
    /// and w in % (Farouki 1981): silt-clay ("fine") unfrozen 0.1442(0.9 log w − 0.2)·10^(0.6243 ρd)
    /// (w ≥ 7 %), frozen 0.001442·10^(1.373 ρd) + 0.01226·10^(0.4994 ρd)·w; sand ("coarse")
    /// unfrozen 0.1442(0.7 log w + 0.4)·10^(0.6243 ρd) (w ≥ 1 %), frozen
    /// 0.01096·10^(0.8116 ρd) + 0.004614·10^(0.9115 ρd)·w. `None` outside the water-content range
    /// of the fits.
    pub fn kersten(&self) -> Option<(f64, f64)> {
        let rd = self.dry_density / 1000.0;
        let w = 100.0 * self.water_content;
        match self.texture {
            Texture::Fine if w >= 7.0 => Some((
                0.1442 * (0.9 * w.log10() - 0.2) * 10f64.powf(0.6243 * rd),
                0.001442 * 10f64.powf(1.373 * rd) + 0.01226 * 10f64.powf(0.4994 * rd) * w,
            )),
            Texture::Coarse if w >= 1.0 => Some((
                0.1442 * (0.7 * w.log10() + 0.4) * 10f64.powf(0.6243 * rd),
                0.01096 * 10f64.powf(0.8116 * rd) + 0.004614 * 10f64.powf(0.9115 * rd) * w,
            )),
            _ => None,
        }
    }

    /// Johansen (unfrozen, frozen) conductivities, W/(m·K).
    pub fn johansen(&self) -> (f64, f64) {
        let rd = self.dry_density;
        let n = self.porosity();
        let sr = self.saturation();
        let k_dry = (0.135 * rd + 64.7) / (2700.0 - 0.947 * rd);
        let k_o: f64 = if self.texture == Texture::Coarse && self.quartz <= 0.2 {
            3.0
        } else {
            2.0
        };
        let k_s = 7.7f64.powf(self.quartz) * k_o.powf(1.0 - self.quartz);
        let k_sat_u = k_s.powf(1.0 - n) * 0.57f64.powf(n);
        let k_sat_f = k_s.powf(1.0 - n) * 2.2f64.powf(n);
        let ke_u = match self.texture {
            Texture::Coarse => (0.7 * sr.max(0.05).log10() + 1.0).max(0.0),
            Texture::Fine => (sr.max(0.1).log10() + 1.0).max(0.0),
        };
        let ke_f = sr;
        (
            (k_sat_u - k_dry) * ke_u + k_dry,
            (k_sat_f - k_dry) * ke_f + k_dry,
        )
    }
    /// (unfrozen, frozen) volumetric heat capacities, J/(m³·K).
    pub fn heat_capacities(&self) -> (f64, f64) {
        let rd = self.dry_density;
        (
            rd * (C_SOLIDS + 4190.0 * self.water_content),
            rd * (C_SOLIDS + 2050.0 * self.water_content),
        )
    }
    /// Volumetric latent heat, J/m³.
    pub fn latent_heat(&self) -> f64 {
        self.dry_density * self.water_content * L_WATER
    }
    /// A freezing material with these properties (Johansen conductivities).
    pub fn material(&self, name: &str, t_freeze: f64, interval: f64) -> Material {
        let (ku, kf) = self.johansen();
        let (cu, cf) = self.heat_capacities();
        Material {
            name: name.to_string(),
            k_unfrozen: ku,
            k_frozen: kf,
            c_unfrozen: cu,
            c_frozen: cf,
            latent: self.latent_heat(),
            t_freeze,
            freezing_interval: interval,
            curve: None,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Kersten check values [DERIVED from the published equations] of the project's methods notes
    /// (§6.1); tolerance = printed precision.
    #[test]
    fn kersten_check_values() {
        let rows = [
            (1500.0, 0.20, 1.209, 1.541, 1.633, 2.330),
            (1600.0, 0.15, 1.235, 1.385, 1.759, 2.207),
            (1800.0, 0.10, 1.342, 1.398, 2.109, 2.334),
        ];
        for (rd, w, fu, ff, su, sf) in rows {
            let fine = SoilIndex {
                dry_density: rd,
                water_content: w,
                quartz: 0.3,
                texture: Texture::Fine,
            };
            let coarse = SoilIndex {
                texture: Texture::Coarse,
                ..fine
            };
            let (a, b) = fine.kersten().unwrap();
            let (c, d) = coarse.kersten().unwrap();
            assert!(
                (a - fu).abs() < 1.5e-3 && (b - ff).abs() < 1.5e-3,
                "fine {rd} {w}: {a} {b}"
            );
            assert!(
                (c - su).abs() < 1.5e-3 && (d - sf).abs() < 1.5e-3,
                "coarse {rd} {w}: {c} {d}"
            );
        }
        let dry = SoilIndex {
            dry_density: 1500.0,
            water_content: 0.05,
            quartz: 0.3,
            texture: Texture::Fine,
        };
        assert!(dry.kersten().is_none(), "silt-clay fit valid from 7 % only");
    }

    /// Johansen check values [DERIVED from the published equations] of the project's methods notes
    /// (§6.2) and the heat-capacity/latent-heat values of §6.3; tolerance = printed precision.
    #[test]
    fn johansen_and_capacity_check_values() {
        let rows = [
            (1500.0, 0.25, 0.3, Texture::Fine, 1.343, 2.237),
            (1600.0, 0.20, 0.6, Texture::Coarse, 1.812, 2.688),
            (1800.0, 0.10, 0.6, Texture::Coarse, 1.892, 2.054),
            (1400.0, 0.30, 0.2, Texture::Fine, 1.193, 2.124),
        ];
        for (rd, w, q, tex, ku, kf) in rows {
            let s = SoilIndex {
                dry_density: rd,
                water_content: w,
                quartz: q,
                texture: tex,
            };
            let (u, f) = s.johansen();
            assert!(
                (u - ku).abs() < 1.5e-3 && (f - kf).abs() < 1.5e-3,
                "{rd} {w}: {u} {f}"
            );
        }
        let s = SoilIndex {
            dry_density: 1500.0,
            water_content: 0.25,
            quartz: 0.3,
            texture: Texture::Fine,
        };
        let (cu, cf) = s.heat_capacities();
        assert!((cu - 2.636e6).abs() < 1e3 && (cf - 1.834e6).abs() < 1e3);
        assert!((s.latent_heat() - 125.14e6).abs() < 0.01e6);
    }
}
