//! The construction of a case as rectangles in the user's coordinates (x outward from the wall's
//! exterior face, z down from ground level), and the check that pieces neither overlap nor leave
//! the domain. The mesh is built from these rectangles (`geometry`); validation and the sizing
//! use the check.
use super::model::{Case, InsulationKind};

/// What a rectangle is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Part {
    /// Floor slab.
    Slab,
    /// Foundation wall.
    Wall,
    /// Footing.
    Footing,
    /// Granular fill under the slab.
    Fill,
    /// Backfill beside a basement wall.
    Backfill,
    /// Insulation piece k of the case.
    Insulation(usize),
}

/// An axis-aligned rectangle [x0, x1] × [z0, z1], m.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Rect {
    /// Left x, m.
    pub x0: f64,
    /// Right x, m.
    pub x1: f64,
    /// Top z, m.
    pub z0: f64,
    /// Bottom z, m.
    pub z1: f64,
    /// What it is.
    pub part: Part,
}

impl Rect {
    /// True if the interiors of the two rectangles overlap (touching edges do not count).
    pub fn overlaps(&self, o: &Rect) -> bool {
        let e = 1e-9;
        self.x0 < o.x1 - e && o.x0 < self.x1 - e && self.z0 < o.z1 - e && o.z0 < self.z1 - e
    }
}

/// The extent of the half-section: from the building's centre line to the far edge of open
/// ground, from the top of the wall (or the floor, if higher) to the domain bottom, m.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Extent {
    /// Symmetry line (building centre), x = −(w + B′/2), m.
    pub x_min: f64,
    /// Far edge in open ground, m.
    pub x_max: f64,
    /// Top of the section, m.
    pub z_top: f64,
    /// Bottom of the section, m.
    pub z_bottom: f64,
}

/// Why a layout cannot be built: which insulation piece, and what it runs into.
#[derive(Debug, Clone, PartialEq)]
pub struct LayoutProblem {
    /// Index of the insulation piece.
    pub piece: usize,
    /// What is wrong, e.g. "overlaps the footing".
    pub what: String,
}

impl Case {
    /// The extent of the half-section.
    pub fn extent(&self) -> Extent {
        Extent {
            x_min: -(self.wall.thickness_m + 0.5 * self.building.b_prime_m),
            x_max: self.simulation.domain_width_m,
            z_top: self.section_top_z(),
            z_bottom: self.simulation.domain_depth_m,
        }
    }

    /// The top of the section, m: the wall's cut (`wall.height_above_ground_m`), or higher so that
    /// the wall reaches `simulation.wall_extension_m` above the floor (or above ground level when
    /// the floor is below it). The 2D flow at the wall/floor junction is then not truncated by
    /// the adiabatic cut (ISO 10211 places cut-off planes at least 1 m from the junction, as
    /// quoted in secondary sources); the wall above the stated cut continues as it is at the cut.
    pub fn section_top_z(&self) -> f64 {
        let floor_or_ground = self.floor_z().min(0.0);
        (-self.wall.height_above_ground_m)
            .min(floor_or_ground - self.simulation.wall_extension_m)
            .min(self.floor_z())
    }

    /// z of a vertical piece's top in the section: a piece reaching the stated cut continues to
    /// the section's top.
    fn vertical_top(&self, top_m: f64) -> f64 {
        if top_m <= -self.wall.height_above_ground_m + 1e-9 {
            self.section_top_z()
        } else {
            top_m
        }
    }

    /// The case with the section cut at the floor (or at ground level, if higher) and no wall
    /// above it: the floor-only model whose steady coupling is the floor's part of the ISO 10211
    /// split of a wall/floor junction. Insulation above the new cut is clipped or dropped.
    pub fn floor_only(&self) -> Case {
        let mut c = self.clone();
        let cut = self.slab.top_above_ground_m.max(0.0);
        c.wall.height_above_ground_m = cut;
        c.simulation.wall_extension_m = 0.0;
        c.insulation.retain_mut(|ins| match &mut ins.kind {
            InsulationKind::VerticalOutside { top_m, bottom_m }
            | InsulationKind::VerticalInside { top_m, bottom_m } => {
                *top_m = top_m.max(-cut);
                *bottom_m > *top_m + 1e-9
            }
            _ => true,
        });
        c
    }

    /// The rectangle of insulation piece `k`.
    pub fn insulation_rect(&self, k: usize) -> Rect {
        let ins = &self.insulation[k];
        let (w, t, slab_bot) = (self.wall.thickness_m, ins.thickness_m, self.slab_bottom_z());
        let part = Part::Insulation(k);
        match ins.kind {
            InsulationKind::UnderSlab { band_width_m } => Rect {
                x0: band_width_m.map_or(self.extent().x_min, |b| -w - b),
                x1: -w,
                z0: slab_bot,
                z1: slab_bot + t,
                part,
            },
            InsulationKind::VerticalOutside { top_m, bottom_m } => Rect {
                x0: 0.0,
                x1: t,
                z0: self.vertical_top(top_m),
                z1: bottom_m,
                part,
            },
            InsulationKind::VerticalInside { top_m, bottom_m } => Rect {
                x0: -w - t,
                x1: -w,
                z0: self.vertical_top(top_m),
                z1: bottom_m,
                part,
            },
            InsulationKind::Wing {
                depth_m,
                x_start_m,
                width_m,
            } => Rect {
                x0: x_start_m,
                x1: width_m,
                z0: depth_m,
                z1: depth_m + t,
                part,
            },
            InsulationKind::UnderFooting { x0_m, x1_m } => Rect {
                x0: x0_m,
                x1: x1_m,
                z0: self.footing.base_depth_m,
                z1: self.footing.base_depth_m + t,
                part,
            },
        }
    }

    /// The rectangles of slab, wall and footing: (footing, wall, slab).
    pub fn concrete_rects(&self) -> [Rect; 3] {
        let w = self.wall.thickness_m;
        let (fx0, fx1) = self.footing_x();
        let ext = self.extent();
        [
            Rect {
                x0: fx0,
                x1: fx1,
                z0: self.footing_top_z(),
                z1: self.footing.base_depth_m,
                part: Part::Footing,
            },
            Rect {
                x0: -w,
                x1: 0.0,
                z0: ext.z_top,
                z1: self.footing_top_z(),
                part: Part::Wall,
            },
            Rect {
                x0: ext.x_min,
                x1: -w,
                z0: self.floor_z(),
                z1: self.slab_bottom_z(),
                part: Part::Slab,
            },
        ]
    }

    /// Every construction rectangle, in painting order (later ones over earlier ones, all over
    /// soil and air): fill, backfill, footing, wall, slab, insulation pieces.
    pub fn parts(&self) -> Vec<Rect> {
        let ext = self.extent();
        let w = self.wall.thickness_m;
        let slab_bot = self.slab_bottom_z();
        // Fill under the slab (and under whole-floor insulation), and up to ground level when the
        // floor is above ground.
        let under = self
            .insulation
            .iter()
            .filter(|i| matches!(i.kind, InsulationKind::UnderSlab { band_width_m: None }))
            .map(|i| slab_bot + i.thickness_m)
            .next_back()
            .unwrap_or(slab_bot);
        let fill_bot = under + self.fill.as_ref().map_or(0.0, |f| f.thickness_m);
        let mut rects = Vec::new();
        let fill = |z0, z1| Rect {
            x0: ext.x_min,
            x1: -w,
            z0,
            z1,
            part: Part::Fill,
        };
        if slab_bot < 0.0 {
            rects.push(fill(slab_bot, 0.0));
        }
        if fill_bot > under {
            rects.push(fill(under, fill_bot));
        }
        if let Some(b) = self.basement.as_ref().and_then(|b| b.backfill.as_ref()) {
            rects.push(Rect {
                x0: 0.0,
                x1: b.width_m,
                z0: 0.0,
                z1: b.depth_m,
                part: Part::Backfill,
            });
        }
        rects.extend(self.concrete_rects());
        rects.extend((0..self.insulation.len()).map(|k| self.insulation_rect(k)));
        rects
    }

    /// The first insulation piece that overlaps concrete or another piece, or leaves the domain.
    pub fn layout_problem(&self) -> Option<LayoutProblem> {
        let ext = self.extent();
        let concrete = self.concrete_rects();
        let ins: Vec<Rect> = (0..self.insulation.len())
            .map(|k| self.insulation_rect(k))
            .collect();
        for (k, r) in ins.iter().enumerate() {
            let hit = |what: String| Some(LayoutProblem { piece: k, what });
            for c in &concrete {
                if r.overlaps(c) {
                    return hit(format!("overlaps the {}", part_name(c.part)));
                }
            }
            if let Some(j) = (k + 1..ins.len()).find(|&j| r.overlaps(&ins[j])) {
                return hit(format!("overlaps insulation[{j}]"));
            }
            // A board under the footing lies on the footing's bearing soil: not inside the fill
            // under the slab or a basement's backfill (the other pieces may replace fill).
            if matches!(self.insulation[k].kind, InsulationKind::UnderFooting { .. }) {
                let grounds = self
                    .parts()
                    .into_iter()
                    .filter(|p| matches!(p.part, Part::Fill | Part::Backfill));
                for g in grounds {
                    if r.overlaps(&g) {
                        return hit(format!(
                            "lies in the {} (z = {:.3} to {:.3} m); allowed: the board below it, on the bearing soil",
                            part_name(g.part),
                            g.z0,
                            g.z1
                        ));
                    }
                }
            }
            if r.x1 > ext.x_max - 1e-9 || r.z1 > ext.z_bottom - 1e-9 {
                return hit("leaves the domain".into());
            }
        }
        None
    }
}

/// A part's name in messages.
pub fn part_name(p: Part) -> String {
    match p {
        Part::Slab => "slab".into(),
        Part::Wall => "wall".into(),
        Part::Footing => "footing".into(),
        Part::Fill => "fill".into(),
        Part::Backfill => "backfill".into(),
        Part::Insulation(k) => format!("insulation[{k}]"),
    }
}
