//! Materials with optional freezing: conductivity, volumetric heat capacity and latent heat, and the
//! enthalpy curve H(T) that the transient solver uses as its state.
//!
//! # Enthalpy curve
//! Phase change happens over a freezing interval [T_s, T_f] with T_s = T_f − ε (ε > 0 K). With the
//! reference H = 0 J/m³ at T_s (fully frozen):
//!
//! ```text
//! H(T) = C_f (T − T_s)                               T ≤ T_s          (frozen)
//! H(T) = C_m (T − T_s),   C_m = (C_f + C_u)/2 + L/ε   T_s < T < T_f    (freezing interval)
//! H(T) = C_m ε + C_u (T − T_f)                       T ≥ T_f          (unfrozen)
//! ```
//! H is piecewise linear and strictly increasing, so T = β(H) is Lipschitz and has the slope
//! 1/C_k in segment k; C_k (J/(m³·K)) is the "segment capacity" the Newton iteration uses. A material
//! without water (concrete, insulation) has L = 0, C_f = C_u, k_f = k_u, and one straight line.
//!
//! The liquid (unfrozen) fraction is f = (T − T_s)/ε clamped to [0, 1]. The conductivity is k_f
//! in the frozen segment, k_u in the unfrozen one and their mean inside the freezing interval: it
//! changes only when a cell changes segment, so the solver's matrix stays the same (and its factor
//! reusable) while no cell crosses a segment boundary. For a narrow interval this differs from a
//! conductivity linear in f only inside the few cells at the front.

/// Thermal properties of one material (SI units).
#[derive(Debug, Clone, PartialEq)]
pub struct Material {
    /// Name as the user gave it (for reports and errors).
    pub name: String,
    /// Unfrozen thermal conductivity, W/(m·K).
    pub k_unfrozen: f64,
    /// Frozen thermal conductivity, W/(m·K).
    pub k_frozen: f64,
    /// Unfrozen volumetric heat capacity, J/(m³·K).
    pub c_unfrozen: f64,
    /// Frozen volumetric heat capacity, J/(m³·K).
    pub c_frozen: f64,
    /// Volumetric latent heat of the pore water, J/m³ (0 for materials that do not freeze).
    pub latent: f64,
    /// Upper end of the freezing interval (start of freezing), °C.
    pub t_freeze: f64,
    /// Width ε of the freezing interval, K (> 0).
    pub freezing_interval: f64,
}

impl Material {
    /// A material that does not freeze: one conductivity, one heat capacity.
    pub fn inert(name: &str, k: f64, c: f64) -> Self {
        Material {
            name: name.to_string(),
            k_unfrozen: k,
            k_frozen: k,
            c_unfrozen: c,
            c_frozen: c,
            latent: 0.0,
            t_freeze: 0.0,
            freezing_interval: 0.1,
        }
    }

    /// True when the material has latent heat or different frozen/unfrozen properties.
    pub fn freezes(&self) -> bool {
        self.latent > 0.0 || self.k_frozen != self.k_unfrozen || self.c_frozen != self.c_unfrozen
    }

    /// Lower end T_s of the freezing interval, °C.
    pub fn t_solidus(&self) -> f64 {
        self.t_freeze - self.freezing_interval
    }

    /// The frost-line temperature: the midpoint of the freezing interval, °C (half the pore water
    /// frozen).
    pub fn t_frost_line(&self) -> f64 {
        self.t_freeze - 0.5 * self.freezing_interval
    }

    /// Apparent capacity inside the freezing interval C_m, J/(m³·K).
    fn c_mushy(&self) -> f64 {
        0.5 * (self.c_frozen + self.c_unfrozen) + self.latent / self.freezing_interval
    }

    /// Enthalpy H(T), J/m³, for temperature `t` in °C.
    pub fn enthalpy(&self, t: f64) -> f64 {
        let ts = self.t_solidus();
        if t <= ts {
            self.c_frozen * (t - ts)
        } else if t < self.t_freeze {
            self.c_mushy() * (t - ts)
        } else {
            self.c_mushy() * self.freezing_interval + self.c_unfrozen * (t - self.t_freeze)
        }
    }

    /// Temperature β(H) in °C and segment capacity C_k = dH/dT in J/(m³·K) for enthalpy `h` (J/m³).
    pub fn temperature(&self, h: f64) -> (f64, f64) {
        let ts = self.t_solidus();
        let hl = self.c_mushy() * self.freezing_interval;
        if h <= 0.0 {
            (ts + h / self.c_frozen, self.c_frozen)
        } else if h < hl {
            let cm = self.c_mushy();
            (ts + h / cm, cm)
        } else {
            (self.t_freeze + (h - hl) / self.c_unfrozen, self.c_unfrozen)
        }
    }

    /// Unfrozen fraction f ∈ [0, 1] at temperature `t` (°C).
    pub fn unfrozen_fraction(&self, t: f64) -> f64 {
        ((t - self.t_solidus()) / self.freezing_interval).clamp(0.0, 1.0)
    }

    /// Conductivity k(T), W/(m·K): k_f frozen, k_u unfrozen, the mean inside the interval.
    pub fn conductivity(&self, t: f64) -> f64 {
        if t <= self.t_solidus() {
            self.k_frozen
        } else if t >= self.t_freeze {
            self.k_unfrozen
        } else {
            0.5 * (self.k_frozen + self.k_unfrozen)
        }
    }

    /// Thermal diffusivity of the unfrozen material, m²/s.
    pub fn diffusivity_unfrozen(&self) -> f64 {
        self.k_unfrozen / self.c_unfrozen
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn soil() -> Material {
        Material {
            name: "s".into(),
            k_unfrozen: 1.5,
            k_frozen: 2.0,
            c_unfrozen: 2.6e6,
            c_frozen: 1.8e6,
            latent: 125e6,
            t_freeze: 0.0,
            freezing_interval: 0.5,
        }
    }

    #[test]
    fn enthalpy_roundtrip_and_latent_heat() {
        let m = soil();
        for &t in &[-10.0, -0.4, -0.25, -0.01, 0.0, 0.3, 12.0] {
            let (tb, _) = m.temperature(m.enthalpy(t));
            assert!((tb - t).abs() < 1e-12, "{t} -> {tb}");
        }
        // Across the interval the curve holds L plus the sensible heat of the mean capacity.
        let dh = m.enthalpy(0.0) - m.enthalpy(-0.5);
        assert!((dh - (125e6 + 0.5 * 2.2e6)).abs() < 1e-6);
    }

    #[test]
    fn inert_material_is_one_line() {
        let m = Material::inert("c", 1.15, 2.0e6);
        assert!(!m.freezes());
        assert!((m.enthalpy(5.0) - m.enthalpy(-5.0) - 2.0e7).abs() < 1e-6);
        assert_eq!(m.temperature(m.enthalpy(-3.0)).1, 2.0e6);
    }
}
