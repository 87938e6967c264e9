//! Closed-form published methods, used as independent cross-checks beside every numerical result.
//!
//! - ISO 13370 slab-on-ground U-value and edge-insulation linear transmittance (steady state) and
//!   the periodic coefficients H_pi, α of an insulated half-space.
//! - Stefan's frost-depth formula, the Neumann two-phase solution (Carslaw & Jaeger 1959 §11.2),
//!   and the modified Berggren formula (Aldrich & Paynter 1953) with λ from the equal-property
//!   Neumann equation.
use crate::numerics::bisect_root;
use statrs::function::erf::{erf, erfc};
use std::f64::consts::PI;

/// ISO 13370 characteristic dimension B' = A / (0.5 P), m.
pub fn characteristic_dimension(area_m2: f64, exposed_perimeter_m: f64) -> f64 {
    area_m2 / (0.5 * exposed_perimeter_m)
}

/// ISO 13370 slab-on-ground total equivalent thickness d_t = w + λ (R_si + R_f + R_se), m.
pub fn equivalent_thickness(wall_m: f64, lambda: f64, r_si: f64, r_f: f64, r_se: f64) -> f64 {
    wall_m + lambda * (r_si + r_f + r_se)
}

/// ISO 13370 slab-on-ground U-value (W/(m²·K)) without edge insulation:
/// U = 2λ/(πB' + d_t) · ln(πB'/d_t + 1) for d_t < B', else U = λ/(0.457 B' + d_t).
pub fn iso13370_slab_u(lambda: f64, b_prime: f64, d_t: f64) -> f64 {
    if d_t < b_prime {
        2.0 * lambda / (PI * b_prime + d_t) * (PI * b_prime / d_t + 1.0).ln()
    } else {
        lambda / (0.457 * b_prime + d_t)
    }
}

/// Edge insulation for ISO 13370.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum EdgeInsulation {
    /// Horizontal band of width D (m) along the edge.
    Horizontal {
        /// Width D, m.
        width_m: f64,
    },
    /// Vertical insulation (or low-density foundation) to depth D (m) below ground.
    Vertical {
        /// Depth D, m.
        depth_m: f64,
    },
}

/// ISO 13370 edge-insulation linear thermal transmittance Ψ_ge, W/(m·K):
/// Ψ = −(λ/π)[ln(D/d_t + 1) − ln(D/(d_t + d′) + 1)], with d′ = R′λ, R′ = R_n − d_n/λ
/// (R_n, d_n: resistance and thickness of the insulation); D → 2D for vertical insulation.
pub fn iso13370_edge_psi(lambda: f64, d_t: f64, r_n: f64, d_n: f64, edge: EdgeInsulation) -> f64 {
    let d_prime = (r_n - d_n / lambda) * lambda;
    let d = match edge {
        EdgeInsulation::Horizontal { width_m } => width_m,
        EdgeInsulation::Vertical { depth_m } => 2.0 * depth_m,
    };
    -(lambda / PI) * ((d / d_t + 1.0).ln() - (d / (d_t + d_prime) + 1.0).ln())
}

/// ISO 13370 heated basement: floor U_bf, wall U_bw and effective U′ (W/(m²·K)) for a floor at
/// depth z (m) below ground, λ the ground conductivity, B′ the characteristic dimension, w the
/// wall thickness, R_f and R_w the floor and wall resistances (m²·K/W):
/// d_t = w + λ(R_si + R_f + R_se); U_bf = 2λ/(πB′ + d_t + z/2) ln(πB′/(d_t + z/2) + 1) if
/// d_t + z/2 < B′, else λ/(0.457B′ + d_t + z/2); d_w = λ(R_si + R_w + R_se);
/// U_bw = (2λ/(πz))(1 + ½ d_t/(d_t + z)) ln(z/d_w + 1);
/// U′ = (A U_bf + z P U_bw)/(A + z P). (R_si: the floor's 0.17 in d_t, the wall's 0.13 in d_w.)
#[allow(clippy::too_many_arguments)]
pub fn iso13370_basement(
    lambda: f64,
    area_m2: f64,
    perimeter_m: f64,
    wall_m: f64,
    depth_m: f64,
    r_f: f64,
    r_w: f64,
    r_si_floor: f64,
    r_si_wall: f64,
    r_se: f64,
) -> (f64, f64, f64) {
    let b = characteristic_dimension(area_m2, perimeter_m);
    let d_t = wall_m + lambda * (r_si_floor + r_f + r_se);
    let e = d_t + 0.5 * depth_m;
    let u_bf = if e < b {
        2.0 * lambda / (PI * b + e) * (PI * b / e + 1.0).ln()
    } else {
        lambda / (0.457 * b + e)
    };
    let d_w = lambda * (r_si_wall + r_w + r_se);
    let u_bw = 2.0 * lambda / (PI * depth_m)
        * (1.0 + 0.5 * d_t / (d_t + depth_m))
        * (depth_m / d_w + 1.0).ln();
    let u = (area_m2 * u_bf + depth_m * perimeter_m * u_bw) / (area_m2 + depth_m * perimeter_m);
    (u_bf, u_bw, u)
}

/// Periodic penetration depth δ = sqrt(λ t_p /(π ρc)), m, for a period t_p (s).
pub fn periodic_penetration_depth(lambda: f64, rho_c: f64, period_s: f64) -> f64 {
    (lambda * period_s / (PI * rho_c)).sqrt()
}

/// ISO 13370 internal periodic coefficient per unit floor area H_pi/A (W/(m²·K)) and its phase lead
/// α (months) for a slab without edge insulation:
/// H_pi/A = (λ/d_t) sqrt(2/((1 + δ/d_t)² + 1)), α = 1.5 − (12/2π) arctan(d_t/(d_t + δ)).
pub fn iso13370_periodic_internal(lambda: f64, d_t: f64, delta: f64) -> (f64, f64) {
    let h = lambda / d_t * (2.0 / ((1.0 + delta / d_t).powi(2) + 1.0)).sqrt();
    let alpha = 1.5 - 12.0 / (2.0 * PI) * (d_t / (d_t + delta)).atan();
    (h, alpha)
}

/// Stefan frost depth X = sqrt(2 k_f I / L), m, for a surface freezing index I (°C·d), frozen
/// conductivity k_f (W/(m·K)) and volumetric latent heat L (J/m³).
pub fn stefan_depth(k_frozen: f64, freezing_index_c_days: f64, latent: f64) -> f64 {
    (2.0 * k_frozen * freezing_index_c_days * 86400.0 / latent).sqrt()
}

/// Inputs of the Neumann two-phase problem (Carslaw & Jaeger 1959 §11.2).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Neumann {
    /// Surface temperature, °C (< t_freeze).
    pub t_surface: f64,
    /// Initial temperature, °C (≥ t_freeze).
    pub t_initial: f64,
    /// Freezing temperature, °C.
    pub t_freeze: f64,
    /// Frozen conductivity, W/(m·K).
    pub k_frozen: f64,
    /// Frozen volumetric heat capacity, J/(m³·K).
    pub c_frozen: f64,
    /// Unfrozen conductivity, W/(m·K).
    pub k_unfrozen: f64,
    /// Unfrozen volumetric heat capacity, J/(m³·K).
    pub c_unfrozen: f64,
    /// Volumetric latent heat, J/m³.
    pub latent: f64,
}

impl Neumann {
    /// Root ξ of e^{−ξ²}/erf ξ − (k₂/k₁) ν ((T₀−T_f)/(T_f−T_s)) e^{−ν²ξ²}/erfc(νξ) = ξ√π/St,
    /// ν = sqrt(a₁/a₂), St = C₁(T_f − T_s)/L; found by bisection.
    pub fn xi(&self) -> f64 {
        let a1 = self.k_frozen / self.c_frozen;
        let a2 = self.k_unfrozen / self.c_unfrozen;
        let nu = (a1 / a2).sqrt();
        let st = self.c_frozen * (self.t_freeze - self.t_surface) / self.latent;
        let ratio = (self.t_initial - self.t_freeze) / (self.t_freeze - self.t_surface);
        let f = |x: f64| {
            (-x * x).exp() / erf(x)
                - self.k_unfrozen / self.k_frozen * nu * ratio * (-nu * nu * x * x).exp()
                    / erfc(nu * x)
                - x * PI.sqrt() / st
        };
        bisect_root(f, 1e-8, 10.0, 1e-14)
    }

    /// Front depth X(t) = 2ξ sqrt(a₁ t), m, at time `t_s` (s).
    pub fn front_depth(&self, t_s: f64) -> f64 {
        2.0 * self.xi() * (self.k_frozen / self.c_frozen * t_s).sqrt()
    }
}

/// Modified Berggren frost depth (m): X = λ sqrt(2 k nF·86400 / L), with k the mean of frozen and
/// unfrozen conductivity, C the mean volumetric heat capacity, thermal ratio α = (MAAT − T_f)/V_s,
/// V_s = nF/t_season, fusion parameter μ = C V_s / L, and λ(α, μ) = ξ sqrt(2/μ) from the
/// equal-property Neumann equation e^{−ξ²}/erf ξ − α e^{−ξ²}/erfc ξ = ξ√π/μ.
pub fn modified_berggren_depth(
    surface_freezing_index_c_days: f64,
    season_days: f64,
    mean_annual_c: f64,
    k_mean: f64,
    c_mean: f64,
    latent: f64,
) -> f64 {
    let nf = surface_freezing_index_c_days;
    if nf <= 0.0 || season_days <= 0.0 {
        return 0.0;
    }
    let vs = nf / season_days;
    let alpha = (mean_annual_c / vs).max(0.0);
    let mu = c_mean * vs / latent;
    let lam = berggren_lambda(alpha, mu);
    lam * (2.0 * k_mean * nf * 86400.0 / latent).sqrt()
}

/// The modified Berggren coefficient λ(α, μ) (dimensionless).
pub fn berggren_lambda(alpha: f64, mu: f64) -> f64 {
    let f =
        |x: f64| (-x * x).exp() / erf(x) - alpha * (-x * x).exp() / erfc(x) - x * PI.sqrt() / mu;
    bisect_root(f, 1e-9, 10.0, 1e-14) * (2.0 / mu).sqrt()
}

/// Design-year sinusoid θ(t) = θ_m − A cos(2πt/365): air freezing index F (°C·d) and freezing
/// season length (d). F = (P/π)(A sin θ₀ − θ_m θ₀), θ₀ = arccos(θ_m/A), season = Pθ₀/π.
pub fn sinusoid_freezing_index(mean_c: f64, amplitude_k: f64) -> (f64, f64) {
    let p = 365.0;
    if amplitude_k <= mean_c {
        return (0.0, 0.0);
    }
    if mean_c <= -amplitude_k {
        return (-mean_c * p, p);
    }
    let th0 = (mean_c / amplitude_k).acos();
    (
        p / PI * (amplitude_k * th0.sin() - mean_c * th0),
        p * th0 / PI,
    )
}

/// Mean annual temperature below the seasonally frozen layer by the thermal offset of freezing
/// ground (the TTOP model), °C: T = (k_t I_t − k_f I_f)/(k_t P) with the surface thawing and
/// freezing indices I_t, I_f (°C·d, n-factors applied), the thawed and frozen conductivities k_t,
/// k_f (W/(m·K)) and P = 365 d. Frozen ground conducts better, so the ground below the frost
/// is colder on average than the surface; at T ≤ 0 °C the ground stays frozen (permafrost).
pub fn thermal_offset_mean(
    k_thawed: f64,
    k_frozen: f64,
    thawing_index: f64,
    freezing_index: f64,
) -> f64 {
    (k_thawed * thawing_index - k_frozen * freezing_index) / (k_thawed * 365.0)
}

#[cfg(test)]
mod tests {
    //! Check values are the [DERIVED] figures of the project's methods notes, each computed there
    //! from the published formula; tolerances are set by the printed precision.
    use super::*;

    #[test]
    fn iso13370_slab_u_check_values() {
        // ISO 13370 slab formula; (A, P, λ, R_f) → U, Rsi 0.17, Rse 0.04, w 0.3 m.
        let cases = [
            (100.0, 40.0, 2.0, 0.0, 0.7615),
            (100.0, 40.0, 1.5, 0.0, 0.6026),
            (200.0, 60.0, 2.0, 0.0, 0.6285),
            (1200.0, 140.0, 2.0, 0.0, 0.3172),
            (100.0, 40.0, 2.0, 2.0, 0.2869),
            (100.0, 40.0, 2.0, 3.0, 0.2221),
            (100.0, 40.0, 2.0, 5.0, 0.1538),
        ];
        for (a, p, l, rf, u) in cases {
            let b = characteristic_dimension(a, p);
            let dt = equivalent_thickness(0.3, l, 0.17, rf, 0.04);
            assert!(
                (iso13370_slab_u(l, b, dt) - u).abs() < 6e-5,
                "{a} {p} {l} {rf}"
            );
        }
        // The two branches nearly coincide at d_t = B' (0.274499 vs 0.274537).
        let lo = 2.0 * 2.0 / (PI * 5.0 + 5.0) * (PI + 1.0).ln();
        assert!((lo - 0.274499).abs() < 1e-6);
        assert!((iso13370_slab_u(2.0, 5.0, 5.0) - 0.274537).abs() < 1e-6);
    }

    #[test]
    fn iso13370_edge_psi_check_values() {
        let rn = 0.05 / 0.035;
        let h = |d| {
            iso13370_edge_psi(
                2.0,
                0.72,
                rn,
                0.05,
                EdgeInsulation::Horizontal { width_m: d },
            )
        };
        let v = |d| iso13370_edge_psi(2.0, 0.72, rn, 0.05, EdgeInsulation::Vertical { depth_m: d });
        assert!((h(0.5) + 0.2513).abs() < 1e-4);
        assert!((v(0.5) + 0.3955).abs() < 1e-4);
        assert!((h(1.0) + 0.3955).abs() < 1e-4);
        assert!((v(1.0) + 0.5602).abs() < 1e-4);
    }

    #[test]
    fn iso13370_basement_check_values() {
        // A 100, P 40, z 2, w 0.3, λ 2 (methods notes §1.4, derived from the formulas), with
        // R_si 0.17 in d_t and 0.13 in d_w: d_t 0.72, d_w 0.34.
        let (f, w, u) = iso13370_basement(2.0, 100.0, 40.0, 0.3, 2.0, 0.0, 0.0, 0.17, 0.13, 0.04);
        assert!(
            (f - 0.5315).abs() < 1e-4 && (w - 1.3905).abs() < 1e-4 && (u - 0.9133).abs() < 1e-4,
            "{f} {w} {u}"
        );
        let (f, w, u) = iso13370_basement(2.0, 100.0, 40.0, 0.3, 2.0, 2.0, 2.0, 0.17, 0.13, 0.04);
        assert!(
            (f - 0.2498).abs() < 1e-4 && (w - 0.3260).abs() < 1e-4 && (u - 0.2837).abs() < 1e-4,
            "{f} {w} {u}"
        );
    }

    #[test]
    fn periodic_coefficients_check_values() {
        let delta = periodic_penetration_depth(2.0, 2.0e6, 3.1536e7);
        assert!((delta - 3.1683).abs() < 1e-4);
        let (h, a) = iso13370_periodic_internal(2.0, 0.72, delta);
        assert!((100.0 * h - 71.526).abs() < 2e-3);
        assert!((a - 1.1503).abs() < 1e-4);
    }

    #[test]
    fn neumann_and_stefan_check_values() {
        let n = Neumann {
            t_surface: -10.0,
            t_initial: 5.0,
            t_freeze: 0.0,
            k_frozen: 2.0,
            c_frozen: 1.8e6,
            k_unfrozen: 1.5,
            c_unfrozen: 2.6e6,
            latent: 125e6,
        };
        assert!((n.xi() - 0.235536).abs() < 2e-6);
        assert!((n.front_depth(100.0 * 86400.0) - 1.4596).abs() < 1e-4);
        let one_phase = Neumann {
            t_initial: 0.0,
            ..n
        };
        assert!((one_phase.xi() - 0.262221).abs() < 2e-6);
        let n3 = Neumann {
            t_surface: -5.0,
            t_initial: 3.0,
            k_frozen: 1.8,
            c_frozen: 2.0e6,
            k_unfrozen: 1.4,
            c_unfrozen: 2.8e6,
            latent: 100e6,
            ..n
        };
        assert!((n3.xi() - 0.198612).abs() < 2e-6);
        assert!((stefan_depth(2.0, 1000.0, 125e6) - 1.6628).abs() < 1e-4);
    }

    #[test]
    fn berggren_check_values() {
        // λ(α, μ) table points and the SI worked example (derived from the Neumann form).
        assert!((berggren_lambda(0.0, 0.5) - 0.930).abs() < 1e-3);
        assert!((berggren_lambda(1.0, 1.0) - 0.534).abs() < 1e-3);
        assert!((berggren_lambda(3.0, 0.2) - 0.538).abs() < 1e-3);
        let x = modified_berggren_depth(900.0, 140.0, 5.0, 1.75, 2.2e6, 125e6);
        assert!((x - 1.2759).abs() < 1e-3, "{x}");
    }

    #[test]
    fn sinusoid_freezing_index_check_values() {
        let (f, s) = sinusoid_freezing_index(5.0, 15.0);
        assert!((f - 927.99).abs() < 0.01 && (s - 143.0).abs() < 0.1);
        let (f, s) = sinusoid_freezing_index(2.0, 12.0);
        assert!((f - 1048.61).abs() < 0.01 && (s - 163.0).abs() < 0.1);
        let (f, _) = sinusoid_freezing_index(6.0, 10.0);
        assert!((f - 283.05).abs() < 0.01);
    }
}
