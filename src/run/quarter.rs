//! What the 3D quarter observes each day: the frost measures of the section at every station
//! along both walls and at the corner, their extremes over the period, the deepest frost of
//! every plan column, the worst point and the field of the design (least-margin) day.
//!
//! Stations and bins. With u = X − a and v = Y − b (outward from the two exterior faces) and x₀
//! the footing's inner edge (section x), a plan point belongs to
//!
//! ```text
//! the corner            if min(u, v) ≥ x₀,
//! the wall X = a        if u ≥ v (station: the grid row j holding Y),
//! the wall Y = b        otherwise (station: the grid column i holding X).
//! ```
//!
//! A station's frost measures are the section's ([`super::frost`]) on its own grid line: the
//! depth at the footing's outer face column, under the footing from the base, beside the wall
//! (section x in (0, 0.5] m); the corner's are those of the diagonal column at the face and of
//! the footing's corner square. The frost margin uses the protected zone of the section with
//! s = max(u, v) as its x: the zone's plan outline then has square corners, and s ≤ the true
//! distance from the faces in the corner quadrant, so the corner's margin is conservative
//! (never larger than the distance to a zone spreading round the corner at the same angle).
//! Frost points are the frost line's crossings of the grid lines joining cell centres (in x, y
//! and z, linear in the frost scalar) and the frozen cell centres, as in 2D.
use super::driver::Observer;
use super::frost::{frost_line_c, FrostMeasures, ProtectedZone};
use crate::analysis::{column_depth, column_top, frost_scalar};
use crate::case::Case;
use crate::geometry3d::Quarter;
use crate::mesh::Cell;
use crate::mesh3::{Grid3, Mesh3};
use crate::solver::Network;
use ndarray::{Array2, Array3};

/// Which perimeter bin a plan point belongs to.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Bin {
    /// The wall X = a, station row j.
    East(usize),
    /// The wall Y = b, station column i.
    North(usize),
    /// The outside corner.
    Corner,
}

/// A station's frost extremes over a period, m.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct StationYear {
    /// Deepest frost at the footing's outer face.
    pub face_m: f64,
    /// Deepest frost below the footing base.
    pub under_footing_m: f64,
    /// Deepest frost within 0.5 m outside the wall.
    pub beside_wall_m: f64,
    /// Least frost margin to the protected zone.
    pub margin_m: f64,
    /// Day of year of the least margin.
    pub margin_day: usize,
}

impl StationYear {
    fn new() -> Self {
        StationYear {
            face_m: 0.0,
            under_footing_m: 0.0,
            beside_wall_m: 0.0,
            margin_m: f64::INFINITY,
            margin_day: 0,
        }
    }
}

/// The point of least frost margin, plan and depth, m.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct WorstPoint {
    /// X, m.
    pub x_m: f64,
    /// Y, m.
    pub y_m: f64,
    /// Depth, m.
    pub z_m: f64,
    /// Its margin, m.
    pub margin_m: f64,
    /// Day of year.
    pub day_of_year: usize,
}

/// What the quarter keeps of a period.
#[derive(Debug, Clone)]
pub struct QuarterYear {
    /// Stations along the wall X = a, by grid row j (Y from the centre to the corner).
    pub east: Vec<(f64, StationYear)>,
    /// Stations along the wall Y = b, by grid column i (X from the centre to the corner).
    pub north: Vec<(f64, StationYear)>,
    /// The corner.
    pub corner: StationYear,
    /// Deepest frost of every plan column over the period (ny × nx), m below ground (0: none).
    pub plan_frost_m: Array2<f64>,
    /// The worst point.
    pub worst: Option<WorstPoint>,
    /// Day of year of the design field.
    pub design_day: usize,
    /// The design day's field (nz × ny × nx), °C, NaN for air.
    pub design_field: Array3<f32>,
}

/// Columns measured at one station (grid ids of the top cell's column: j·nx + i).
#[derive(Debug, Clone, Default)]
struct Columns {
    face: usize,
    footing: Vec<usize>,
    beside: Vec<usize>,
}

/// The 3D quarter's observer.
pub struct Quarter3<'a> {
    mesh: &'a Mesh3,
    q: &'a Quarter,
    zone: ProtectedZone,
    t_line: f64,
    east: Vec<Columns>,
    north: Vec<Columns>,
    corner: Columns,
    open: usize,
    probes: Vec<(usize, usize, usize)>,
    scalar: Vec<f64>,
    year: Option<QuarterYear>,
    pending: Option<Today>,
}

impl<'a> Quarter3<'a> {
    /// The observer of `case` on the quarter `q` and its mesh.
    pub fn new(mesh: &'a Mesh3, q: &'a Quarter, case: &Case) -> Self {
        let g = &mesh.grid;
        let zone = ProtectedZone::of(case);
        let xs = centres(&g.xe);
        let ys = centres(&g.ye);
        let face_s = face_s(mesh, q, case);
        let nx = g.nx();
        // Stations: the grid lines short of the corner bin; the measured columns of a station
        // along the other axis, at the same section x on every line.
        let (n_e, n_n) = (
            ys.iter().take_while(|&&y| y - q.b < zone.x0).count(),
            xs.iter().take_while(|&&x| x - q.a < zone.x0).count(),
        );
        let along = |other: &[f64], other_face: f64| {
            let sx = |o: usize| other[o] - other_face;
            (
                nearest(other, other_face + face_s),
                (0..other.len())
                    .filter(|&o| (zone.x0..=zone.x1).contains(&sx(o)))
                    .collect::<Vec<_>>(),
                (0..other.len())
                    .filter(|&o| sx(o) > 0.0 && sx(o) <= 0.5)
                    .collect::<Vec<_>>(),
            )
        };
        let line = |(face, foot, beside): &(usize, Vec<usize>, Vec<usize>),
                    id: &dyn Fn(usize) -> usize| Columns {
            face: id(*face),
            footing: foot.iter().map(|&o| id(o)).collect(),
            beside: beside.iter().map(|&o| id(o)).collect(),
        };
        let (ax, ay) = (along(&xs, q.a), along(&ys, q.b));
        let east: Vec<Columns> = (0..n_e).map(|j| line(&ax, &|i| j * nx + i)).collect();
        let north: Vec<Columns> = (0..n_n).map(|i| line(&ay, &|j| j * nx + i)).collect();
        let (ifc, jfc) = (nearest(&xs, q.a + face_s), nearest(&ys, q.b + face_s));
        let in_square = |c: f64, f: f64| (zone.x0..=zone.x1).contains(&(c - f));
        let mut corner = Columns {
            face: jfc * nx + ifc,
            ..Default::default()
        };
        for j in 0..ys.len() {
            for i in 0..xs.len() {
                let (u, v) = (xs[i] - q.a, ys[j] - q.b);
                if u.min(v) < zone.x0 {
                    continue;
                }
                if in_square(xs[i], q.a) && in_square(ys[j], q.b) {
                    corner.footing.push(j * nx + i);
                }
                let s = u.max(v);
                if s > 0.0 && s <= 0.5 {
                    corner.beside.push(j * nx + i);
                }
            }
        }
        let probes = case
            .probes
            .iter()
            .map(|p| {
                // On the wall Y = b at the building's centre line X = 0 (mid-wall).
                let k = g.ze.partition_point(|&e| e <= p.z_m).clamp(1, g.nz()) - 1;
                let j = g.ye.partition_point(|&e| e <= q.b + p.x_m).clamp(1, g.ny()) - 1;
                (0, j, k)
            })
            .collect();
        Quarter3 {
            mesh,
            q,
            zone,
            t_line: frost_line_c(case),
            east,
            north,
            corner,
            open: (g.ny() - 1) * nx,
            probes,
            scalar: vec![f64::NAN; g.len()],
            year: None,
            pending: None,
        }
    }

    /// The bin of plan point (X, Y).
    pub fn bin(&self, x: f64, y: f64) -> Bin {
        let g = &self.mesh.grid;
        let (u, v) = (x - self.q.a, y - self.q.b);
        if u.min(v) >= self.zone.x0 {
            Bin::Corner
        } else if u >= v {
            Bin::East(g.ye.partition_point(|&e| e <= y).clamp(1, g.ny()) - 1)
        } else {
            Bin::North(g.xe.partition_point(|&e| e <= x).clamp(1, g.nx()) - 1)
        }
    }

    /// The frost scalar of plan column `col` (j·nx + i) by layer k (None for air).
    fn column(&self, col: usize) -> impl Fn(usize) -> Option<f64> + '_ {
        let layer = self.mesh.grid.nx() * self.mesh.grid.ny();
        move |k| {
            let v = self.scalar[k * layer + col];
            (!v.is_nan()).then_some(v)
        }
    }

    /// Deepest frozen point of plan column `col` at or below `z_from`, m (the 2D column rule,
    /// [`crate::analysis::column_depth`]).
    fn depth(&self, col: usize, z_from: f64) -> Option<f64> {
        column_depth(&self.mesh.grid.ze, self.column(col), z_from, self.t_line)
    }

    /// Top of the frozen layer of plan column `col` below the ground surface, m (below ground
    /// thawed from the surface in spring; [`crate::analysis::column_top`]).
    fn top(&self, col: usize) -> Option<f64> {
        column_top(&self.mesh.grid.ze, self.column(col), 0.0, self.t_line)
    }

    /// The frost measures of one station's columns; `plan` holds every column's frost depth from
    /// the surface (0: none), so only the footing's columns are measured again, from the base.
    fn station(&self, c: &Columns, plan: &[f64]) -> (f64, f64, f64) {
        (
            plan[c.face],
            c.footing
                .iter()
                .filter_map(|&col| self.depth(col, self.zone.bearing_z()))
                .fold(0.0, f64::max),
            c.beside.iter().map(|&col| plan[col]).fold(0.0, f64::max),
        )
    }

    /// Every frost point (X, Y, z): the frost line's crossings of the lines joining neighbouring
    /// cell centres, and the frozen cell centres.
    fn frost_points(&self, mut f: impl FnMut(f64, f64, f64)) {
        let g = &self.mesh.grid;
        let (nx, ny, nz) = (g.nx(), g.ny(), g.nz());
        let c = |e: &[f64], i: usize| Grid3::centre(e, i);
        let tl = self.t_line;
        for k in 0..nz {
            for j in 0..ny {
                for i in 0..nx {
                    let id = g.id(i, j, k);
                    let a = self.scalar[id];
                    if a.is_nan() {
                        continue;
                    }
                    let (x, y, z) = (c(&g.xe, i), c(&g.ye, j), c(&g.ze, k));
                    if a <= tl {
                        f(x, y, z);
                    }
                    let mut cross = |nb: usize, to: (f64, f64, f64)| {
                        let b = self.scalar[nb];
                        if !b.is_nan() && (a <= tl) != (b <= tl) && a != b {
                            let r = (tl - a) / (b - a);
                            f(x + r * (to.0 - x), y + r * (to.1 - y), z + r * (to.2 - z));
                        }
                    };
                    if i + 1 < nx {
                        cross(g.id(i + 1, j, k), (c(&g.xe, i + 1), y, z));
                    }
                    if j + 1 < ny {
                        cross(g.id(i, j + 1, k), (x, c(&g.ye, j + 1), z));
                    }
                    if k + 1 < nz {
                        cross(g.id(i, j, k + 1), (x, y, c(&g.ze, k + 1)));
                    }
                }
            }
        }
    }
}

/// Cell centres of edges `e`.
fn centres(e: &[f64]) -> Vec<f64> {
    (0..e.len() - 1).map(|i| Grid3::centre(e, i)).collect()
}

/// Index of the centre nearest to `at`.
fn nearest(cs: &[f64], at: f64) -> usize {
    (0..cs.len())
        .min_by(|&p, &q| (cs[p] - at).abs().total_cmp(&(cs[q] - at).abs()))
        .unwrap_or(0)
}

/// Section x of the footing's face column: the first cell centre beyond the footing's outer face
/// whose cell just above the base (on the centre line Y = 0 of the wall X = a) is a freezing
/// material.
fn face_s(mesh: &Mesh3, q: &Quarter, case: &Case) -> f64 {
    let g = &mesh.grid;
    let x1 = case.footing_x().1;
    let k =
        g.ze.partition_point(|&e| e <= case.footing.base_depth_m - 1e-6) - 1;
    (0..g.nx())
        .map(|i| (i, Grid3::centre(&g.xe, i) - q.a))
        .filter(|&(_, s)| s > x1)
        .find(|&(i, _)| match mesh.cells[g.id(i, 0, k)] {
            Cell::Solid(m) => mesh.materials[m].freezes(),
            Cell::Zone(_) => false,
        })
        .map_or(q.d, |(_, s)| s)
}

impl Observer for Quarter3<'_> {
    type Kept = QuarterYear;

    fn t_line(&self) -> f64 {
        self.t_line
    }

    fn measure(&mut self, net: &Network, t: &[f64]) -> FrostMeasures {
        self.scalar.fill(f64::NAN);
        for (p, &id) in net.cell_of.iter().enumerate() {
            self.scalar[id] = frost_scalar(&net.materials[net.mat[p]], t[p]);
        }
        let g = &self.mesh.grid;
        // Margins by bin.
        let (ne, nn) = (self.east.len(), self.north.len());
        let mut margin_e = vec![f64::INFINITY; ne];
        let mut margin_n = vec![f64::INFINITY; nn];
        let mut margin_c = f64::INFINITY;
        let mut worst = (f64::INFINITY, 0.0, 0.0, 0.0);
        let mut corner_dist = f64::INFINITY;
        let zone = self.zone;
        self.frost_points(|x, y, z| {
            let s = self.q.s(x, y);
            let m = zone.signed_distance(s, z);
            corner_dist =
                corner_dist.min(((s - zone.x1).powi(2) + (z - zone.base_z).powi(2)).sqrt());
            if m < worst.0 {
                worst = (m, x, y, z);
            }
            match self.bin(x, y) {
                Bin::East(j) if j < ne => margin_e[j] = margin_e[j].min(m),
                Bin::North(i) if i < nn => margin_n[i] = margin_n[i].min(m),
                Bin::Corner => margin_c = margin_c.min(m),
                // Points under the building's interior beyond the stations' lines.
                Bin::East(_) | Bin::North(_) => {}
            }
        });
        let no_frost = zone.bearing_z();
        let fix = |m: f64| if m.is_finite() { m } else { no_frost };
        // Every plan column's depth once (row-major j·nx + i, the columns' ids).
        let mut plan = Array2::zeros((g.ny(), g.nx()));
        for j in 0..g.ny() {
            for i in 0..g.nx() {
                plan[[j, i]] = self.depth(j * g.nx() + i, 0.0).unwrap_or(0.0);
            }
        }
        let cols: Vec<f64> = plan.iter().copied().collect();
        let east: Vec<_> = self.east.iter().map(|c| self.station(c, &cols)).collect();
        let north: Vec<_> = self.north.iter().map(|c| self.station(c, &cols)).collect();
        let corner = self.station(&self.corner, &cols);
        let open = cols[self.open];
        let today = Today {
            east: east
                .iter()
                .zip(&margin_e)
                .map(|(s, m)| (*s, fix(*m)))
                .collect(),
            north: north
                .iter()
                .zip(&margin_n)
                .map(|(s, m)| (*s, fix(*m)))
                .collect(),
            corner: (corner, fix(margin_c)),
            plan,
            worst: worst.0.is_finite().then_some(worst),
        };
        let all = today
            .east
            .iter()
            .chain(&today.north)
            .chain(std::iter::once(&today.corner));
        // The frozen layer's top in open ground and at the station of deepest frost at the face.
        let deepest_face = self
            .east
            .iter()
            .chain(&self.north)
            .chain(std::iter::once(&self.corner))
            .map(|c| c.face)
            .max_by(|&a, &b| cols[a].total_cmp(&cols[b]));
        let mut fm = FrostMeasures {
            open_m: open,
            open_top_m: self.top(self.open).unwrap_or(f64::NAN),
            at_face_m: 0.0,
            at_face_top_m: deepest_face.and_then(|c| self.top(c)).unwrap_or(f64::NAN),
            under_footing_m: 0.0,
            beside_wall_m: 0.0,
            corner_distance_m: corner_dist,
            margin_m: fix(worst.0),
        };
        for ((face, under, beside), _) in all {
            fm.at_face_m = fm.at_face_m.max(*face);
            fm.under_footing_m = fm.under_footing_m.max(*under);
            fm.beside_wall_m = fm.beside_wall_m.max(*beside);
        }
        self.pending = Some(today);
        fm
    }

    fn probes(&self, net: &Network, t: &[f64], _zone_t: &[f64]) -> Vec<f64> {
        let g = &self.mesh.grid;
        self.probes
            .iter()
            .map(|&(i, j, k)| {
                let p = net.unk_of[g.id(i, j, k)];
                if p == usize::MAX {
                    f64::NAN
                } else {
                    t[p]
                }
            })
            .collect()
    }

    fn cell_bottom(&self, net: &Network, p: usize) -> (f64, bool) {
        let g = &self.mesh.grid;
        let k = net.cell_of[p] / (g.nx() * g.ny());
        (g.ze[k + 1], k + 1 == g.nz())
    }

    fn keep(
        &mut self,
        _d: usize,
        _days: usize,
        net: &Network,
        t: &[f64],
        design_day: bool,
        doy: usize,
    ) {
        let g = &self.mesh.grid;
        let Some(today) = self.pending.take() else {
            return;
        };
        let year = self.year.get_or_insert_with(|| empty_year(g));
        let fold = |sy: &mut StationYear, ((face, under, beside), m): ((f64, f64, f64), f64)| {
            sy.face_m = sy.face_m.max(face);
            sy.under_footing_m = sy.under_footing_m.max(under);
            sy.beside_wall_m = sy.beside_wall_m.max(beside);
            if m < sy.margin_m {
                sy.margin_m = m;
                sy.margin_day = doy;
            }
        };
        let line = |e: &[f64], n: usize| -> Vec<(f64, StationYear)> {
            (0..n)
                .map(|i| (Grid3::centre(e, i), StationYear::new()))
                .collect()
        };
        if year.east.is_empty() {
            year.east = line(&g.ye, today.east.len());
            year.north = line(&g.xe, today.north.len());
        }
        for (sy, v) in year.east.iter_mut().zip(today.east) {
            fold(&mut sy.1, v);
        }
        for (sy, v) in year.north.iter_mut().zip(today.north) {
            fold(&mut sy.1, v);
        }
        fold(&mut year.corner, today.corner);
        year.plan_frost_m
            .zip_mut_with(&today.plan, |a, b| *a = a.max(*b));
        if let Some((m, x, y, z)) = today.worst {
            if year.worst.is_none_or(|w| m < w.margin_m) {
                year.worst = Some(WorstPoint {
                    x_m: x,
                    y_m: y,
                    z_m: z,
                    margin_m: m,
                    day_of_year: doy,
                });
            }
        }
        if design_day || year.design_field.is_empty() {
            let mut f = Array3::from_elem((g.nz(), g.ny(), g.nx()), f32::NAN);
            if let Some(s) = f.as_slice_mut() {
                for (p, &id) in net.cell_of.iter().enumerate() {
                    s[id] = t[p] as f32;
                }
            }
            year.design_field = f;
            year.design_day = doy;
        }
    }

    fn finish(&mut self) -> QuarterYear {
        let g = &self.mesh.grid;
        self.year.take().unwrap_or_else(|| empty_year(g))
    }
}

/// A period with nothing kept yet.
fn empty_year(g: &Grid3) -> QuarterYear {
    QuarterYear {
        east: Vec::new(),
        north: Vec::new(),
        corner: StationYear::new(),
        plan_frost_m: Array2::zeros((g.ny(), g.nx())),
        worst: None,
        design_day: 0,
        design_field: Array3::zeros((0, 0, 0)),
    }
}

/// One day's measures, held from `measure` to `keep`.
struct Today {
    east: Vec<((f64, f64, f64), f64)>,
    north: Vec<((f64, f64, f64), f64)>,
    corner: ((f64, f64, f64), f64),
    plan: Array2<f64>,
    worst: Option<(f64, f64, f64, f64)>,
}
