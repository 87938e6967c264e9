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

/// A tabulated freezing curve (unfrozen water that varies with temperature): enthalpy H (J/m³)
/// and unfrozen fraction f at ascending temperatures T (°C), linear in between. Below the first
/// point H continues with the frozen-state capacity at that point; above the last (the freezing
/// point) with the unfrozen capacity.
#[derive(Debug, Clone, PartialEq)]
pub struct Curve {
    /// Temperatures, ascending, °C.
    pub t: Vec<f64>,
    /// Enthalpies, J/m³.
    pub h: Vec<f64>,
    /// Unfrozen fractions of the pore water, 0–1.
    pub f: Vec<f64>,
    /// Capacity below the first point, J/(m³·K).
    pub c_below: f64,
}

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
    /// A tabulated freezing curve replacing the linear interval (see [`Material::with_unfrozen_water`]).
    pub curve: Option<std::sync::Arc<Curve>>,
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
            curve: None,
        }
    }

    /// Replace the linear freezing interval by an unfrozen-water curve of the power-law form
    /// w_u = α θ^β (Anderson & Tice 1972; θ = kelvin below the freezing point, w_u and α as
    /// fractions of dry mass, β < 0), for a total water content `w` (fraction of dry mass).
    ///
    /// The unfrozen fraction is f(θ) = min(1, α θ^β / w): all water is liquid down to the onset
    /// θ₀ = (w/α)^(1/β). The curve is tabulated at θ₀ and at θ₀·1.35^k down to 25 K; between
    /// points H rises by c̄ ΔT + L Δf with c = C_f + (C_u − C_f) f, so the latent heat released
    /// equals L times the water frozen.
    pub fn with_unfrozen_water(mut self, w: f64, alpha: f64, beta: f64) -> Self {
        let f_of = |theta: f64| {
            if theta <= 0.0 {
                1.0
            } else {
                (alpha * theta.powf(beta) / w).min(1.0)
            }
        };
        let onset = (w / alpha).powf(1.0 / beta).clamp(1e-3, 20.0);
        let mut thetas = vec![25.0];
        let mut th = onset;
        let mut above = Vec::new();
        while th < 25.0 {
            above.push(th);
            th *= 1.35;
        }
        above.reverse();
        thetas.extend(above.iter().copied().filter(|&x| x < 25.0 - 1e-9));
        thetas.push(0.0);
        let t: Vec<f64> = thetas.iter().map(|th| self.t_freeze - th).collect();
        let f: Vec<f64> = thetas.iter().map(|&th| f_of(th)).collect();
        let c = |f: f64| self.c_frozen + (self.c_unfrozen - self.c_frozen) * f;
        let mut h = vec![0.0];
        for k in 1..t.len() {
            let dt = t[k] - t[k - 1];
            let dh = c(0.5 * (f[k] + f[k - 1])) * dt + self.latent * (f[k] - f[k - 1]);
            h.push(h[k - 1] + dh);
        }
        self.curve = Some(std::sync::Arc::new(Curve {
            c_below: c(f[0]),
            t,
            h,
            f,
        }));
        self.freezing_interval = onset.max(0.01);
        self
    }

    /// True when the material has latent heat or different frozen/unfrozen properties.
    pub fn freezes(&self) -> bool {
        self.latent > 0.0 || self.k_frozen != self.k_unfrozen || self.c_frozen != self.c_unfrozen
    }

    /// Lower end T_s of the freezing interval, °C (the first point of a tabulated curve).
    pub fn t_solidus(&self) -> f64 {
        match &self.curve {
            Some(c) => c.t[0],
            None => self.t_freeze - self.freezing_interval,
        }
    }

    /// The frost-line temperature: the midpoint of the freezing interval, °C (half the pore water
    /// frozen).
    pub fn t_frost_line(&self) -> f64 {
        match &self.curve {
            Some(c) => {
                let k = c.f.iter().position(|&f| f >= 0.5).unwrap_or(0).max(1);
                let (f0, f1) = (c.f[k - 1], c.f[k]);
                let s = if f1 > f0 { (0.5 - f0) / (f1 - f0) } else { 1.0 };
                c.t[k - 1] + s.clamp(0.0, 1.0) * (c.t[k] - c.t[k - 1])
            }
            None => self.t_freeze - 0.5 * self.freezing_interval,
        }
    }

    /// Apparent capacity inside the freezing interval C_m, J/(m³·K).
    fn c_mushy(&self) -> f64 {
        0.5 * (self.c_frozen + self.c_unfrozen) + self.latent / self.freezing_interval
    }

    /// Enthalpy H(T), J/m³, for temperature `t` in °C.
    pub fn enthalpy(&self, t: f64) -> f64 {
        if let Some(c) = &self.curve {
            let n = c.t.len();
            if t <= c.t[0] {
                return c.h[0] + c.c_below * (t - c.t[0]);
            }
            if t >= c.t[n - 1] {
                return c.h[n - 1] + self.c_unfrozen * (t - c.t[n - 1]);
            }
            let k = c.t.partition_point(|&x| x <= t).clamp(1, n - 1);
            let s = (t - c.t[k - 1]) / (c.t[k] - c.t[k - 1]);
            return c.h[k - 1] + s * (c.h[k] - c.h[k - 1]);
        }
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
        if let Some(c) = &self.curve {
            let n = c.t.len();
            if h <= c.h[0] {
                return (c.t[0] + (h - c.h[0]) / c.c_below, c.c_below);
            }
            if h >= c.h[n - 1] {
                return (
                    c.t[n - 1] + (h - c.h[n - 1]) / self.c_unfrozen,
                    self.c_unfrozen,
                );
            }
            let k = c.h.partition_point(|&x| x <= h).clamp(1, n - 1);
            let cap = (c.h[k] - c.h[k - 1]) / (c.t[k] - c.t[k - 1]);
            return (c.t[k - 1] + (h - c.h[k - 1]) / cap, cap);
        }
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
        if let Some(c) = &self.curve {
            let n = c.t.len();
            if t <= c.t[0] {
                return c.f[0];
            }
            if t >= c.t[n - 1] {
                return 1.0;
            }
            let k = c.t.partition_point(|&x| x <= t).clamp(1, n - 1);
            let s = (t - c.t[k - 1]) / (c.t[k] - c.t[k - 1]);
            return c.f[k - 1] + s * (c.f[k] - c.f[k - 1]);
        }
        ((t - self.t_solidus()) / self.freezing_interval).clamp(0.0, 1.0)
    }

    /// Conductivity k(T), W/(m·K): k_f frozen, k_u unfrozen, the mean inside the interval.
    pub fn conductivity(&self, t: f64) -> f64 {
        if let Some(c) = &self.curve {
            // Constant within each segment of the curve (its mean unfrozen fraction), so the
            // solver's matrix changes only when a cell changes segment.
            let n = c.t.len();
            let f = if t <= c.t[0] {
                c.f[0]
            } else if t >= c.t[n - 1] {
                1.0
            } else {
                let k = c.t.partition_point(|&x| x <= t).clamp(1, n - 1);
                0.5 * (c.f[k - 1] + c.f[k])
            };
            return self.k_frozen + f * (self.k_unfrozen - self.k_frozen);
        }
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
            curve: None,
        }
    }

    /// The unfrozen-water curve conserves latent heat: across the curve H rises by L times the
    /// water frozen plus the sensible heat, β(H(T)) = T everywhere, and f follows α θ^β / w.
    #[test]
    fn unfrozen_water_curve() {
        let (w, alpha, beta) = (0.25, 0.08, -0.6);
        let m = soil().with_unfrozen_water(w, alpha, beta);
        for &t in &[-30.0, -10.0, -2.0, -0.9, -0.2, -0.01, 0.0, 3.0] {
            let (tb, c) = m.temperature(m.enthalpy(t));
            assert!((tb - t).abs() < 1e-9 && c > 0.0, "{t} -> {tb}");
        }
        let onset = (w / alpha).powf(1.0 / beta);
        assert!((m.unfrozen_fraction(-onset) - 1.0).abs() < 1e-12);
        let th: f64 = 5.0;
        let exact = alpha * th.powf(beta) / w;
        assert!(
            (m.unfrozen_fraction(-th) - exact).abs() < 0.02,
            "{} vs {exact}",
            m.unfrozen_fraction(-th)
        );
        let c = m.curve.as_ref().unwrap();
        let latent_released = 125e6 * (1.0 - c.f[0]);
        let sensible_max = 2.6e6 * 25.0;
        let dh = m.enthalpy(0.0) - m.enthalpy(-25.0);
        assert!(dh > latent_released && dh < latent_released + sensible_max);
        assert!(m.t_frost_line() < -onset);
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
