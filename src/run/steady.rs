//! Steady heat flows of a case's section for constant indoor and outdoor temperatures: the
//! quantities the ISO 13370 steady-state method gives, for verification and estimates.
use super::{forcing, model};
use crate::case::Case;
use crate::error::Result;
use crate::geometry::INDOOR;
use crate::solver::{Solver, SolverParams};

/// Steady heat flow from the indoor air into the ground per metre of section (W/m) with constant
/// indoor and outdoor temperatures (°C), of the floor-only model (the section cut at the floor or
/// at ground level, whichever is higher: `Case::floor_only`): the ISO 13370 steady-state quantity
/// Q' = U B'/2 ΔT.
pub fn steady_heat_flow(case: &Case, indoor_c: f64, outdoor_c: f64) -> Result<f64> {
    Ok(steady_flows(case, indoor_c, outdoor_c)?.iter().sum())
}

/// Steady indoor heat flows per metre of section (W/m) of the floor-only model, split into
/// [other, floor, wall below ground, wall above ground] (see [`super::GROUP_FLOOR`] …).
pub fn steady_flows(case: &Case, indoor_c: f64, outdoor_c: f64) -> Result<[f64; 4]> {
    let case = &case.floor_only();
    let (_, _, net) = model(case);
    let mut solver = Solver::new(&net, SolverParams::default())?;
    let st = solver.steady(&forcing::zone_temps(case, indoor_c, outdoor_c), None)?;
    let mut out = [0.0; 4];
    for (g, v) in st.by_group.iter().enumerate().take(4) {
        out[g] = *v;
    }
    // Group 0 also holds the other zones' faces: keep only the indoor total there.
    out[0] = st.from_zone[INDOOR] - out[1] - out[2] - out[3];
    Ok(out)
}
