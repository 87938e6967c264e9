//! Helpers shared by the integration tests.
#![allow(dead_code)]
use frostline::mesh::{EdgeBc, Grid, Mesh, Zone};
use frostline::physics::material::Material;

/// A one-cell-wide vertical column with the given z edges, material, and a surface zone on top
/// (zone 0) with surface resistance `r_top`; adiabatic sides and bottom.
pub fn column(ze: Vec<f64>, m: Material, r_top: f64) -> Mesh {
    let grid = Grid {
        xe: vec![0.0, 1.0],
        ze,
    };
    let mut mesh = Mesh::uniform(grid, m);
    let z = mesh.add_zone(Zone {
        name: "surface".into(),
        r_horizontal: r_top,
        r_vertical: r_top,
    });
    mesh.top = vec![EdgeBc::Zone { zone: z, r: r_top }];
    mesh
}

/// Linear interpolation of column temperatures `t` (one per cell, top to bottom) at depth z.
pub fn column_value(ze: &[f64], t: &[f64], z: f64) -> f64 {
    let zc: Vec<f64> = ze.windows(2).map(|w| 0.5 * (w[0] + w[1])).collect();
    let k = zc.partition_point(|&c| c <= z).clamp(1, zc.len() - 1);
    let f = (z - zc[k - 1]) / (zc[k] - zc[k - 1]);
    t[k - 1] + f * (t[k] - t[k - 1])
}

/// Run the frostline binary with `args`; assert exit code 0 (showing stderr otherwise) and return
/// its stdout.
pub fn run_ok<S: AsRef<std::ffi::OsStr>>(args: &[S]) -> String {
    let out = crate::cli::bin().args(args).output().unwrap();
    assert_eq!(
        out.status.code(),
        Some(0),
        "frostline {:?}: {}",
        args.iter()
            .map(|a| a.as_ref().to_owned())
            .collect::<Vec<_>>(),
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8_lossy(&out.stdout).into_owned()
}

/// Run the frostline binary with `args`; assert that it wrote its results (exit code 0, or 3 when
/// a stated criterion is not met) and return its stdout and exit code.
pub fn run_written<S: AsRef<std::ffi::OsStr>>(args: &[S]) -> (String, i32) {
    let out = crate::cli::bin().args(args).output().unwrap();
    let code = out.status.code().unwrap_or(-1);
    assert!(
        code == 0 || code == 3,
        "frostline {:?} exit {code}: {}",
        args.iter()
            .map(|a| a.as_ref().to_owned())
            .collect::<Vec<_>>(),
        String::from_utf8_lossy(&out.stderr)
    );
    (String::from_utf8_lossy(&out.stdout).into_owned(), code)
}

/// Parse the JSON file at `path`.
pub fn read_json(path: &std::path::Path) -> serde_json::Value {
    serde_json::from_slice(&std::fs::read(path).unwrap()).unwrap()
}

/// The ground part of the ISO 13370-style test cases: wall (0.3 m) and footing given the ground's
/// properties (λ 2 W/(m·K), C 2 MJ/(m³·K)), so that the wall thickness acts as ground as in d_t;
/// `extra` (insulation pieces) after the footing; one stratum of the same ground without latent
/// heat; a sinusoidal climate (only its mean matters for the steady solves).
pub fn iso_ground(footing_base_m: f64, extra: &str) -> String {
    format!(
        r#"[wall]
thickness_m = 0.3
material = {{ conductivity_w_per_mk = 2.0, heat_capacity_j_per_m3k = 2.0e6 }}
height_above_ground_m = 0.0
[footing]
width_m = 0.3
thickness_m = 0.2
base_depth_m = {footing_base_m}
material = {{ conductivity_w_per_mk = 2.0, heat_capacity_j_per_m3k = 2.0e6 }}
{extra}
[[soil]]
k_unfrozen_w_per_mk = 2.0
c_unfrozen_j_per_m3k = 2.0e6
latent_heat_j_per_m3 = 0.0
[climate]
mean_c = 5.0
amplitude_k = 10.0
coldest_day = 20
"#
    )
}

/// `frostline run CASE --out OUT --mesh coarse` (no plots): its summary.json.
pub fn single_run(case: &std::path::Path, out: &std::path::Path) -> serde_json::Value {
    run_ok(&[
        "run".as_ref(),
        case.as_os_str(),
        "--out".as_ref(),
        out.as_os_str(),
        "--mesh".as_ref(),
        "coarse".as_ref(),
        "--quiet".as_ref(),
        "--no-plots".as_ref(),
    ]);
    read_json(&out.join("summary.json"))
}
