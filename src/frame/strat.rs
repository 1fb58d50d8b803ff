//! Stratigraphic coordinates: where a point sits within its zone.
//!
//! For a zone between horizons `z_top(x, y)` and `z_base(x, y)` (m TVDSS), the
//! stratigraphic coordinate `s` (m) of a point at depth `z` is, by layering rule:
//!
//! * proportional: `s = (z - z_top) / (z_base - z_top) * T_ref`, with `T_ref` the
//!   zone's reference thickness (its mean thickness over the survey), so layers
//!   divide the zone in fixed proportions and `s` runs from 0 to `T_ref`;
//! * parallel to top: `s = z - z_top` (layers parallel to the top, cut by the base);
//! * parallel to base: `s = z_base - z` (layers parallel to the base, cut by the top).
//!
//! Distances for geostatistics are measured in `(x, y, s)`. Layer `l` of a zone is
//! the stratigraphic cell `l * h <= s < (l + 1) * h`, `h` the zone's cell thickness.
//! These are the usual definitions of stratigraphic grids (e.g. Mallet 2002,
//! Geomodeling, ch. 8, on proportional, onlap and erosional layering).

use crate::grid::SurveyGrid;
use crate::project::{Layering, ZoneDef};
use serde::Serialize;

use super::gridding::Surface;
use super::horizons::thickness_stats;

/// The stratigraphic layering of one zone.
#[derive(Debug, Clone, Serialize)]
pub struct ZoneFrame {
    /// Index of the zone in the project.
    pub zone: usize,
    /// Zone name.
    pub name: String,
    /// Layering rule.
    pub layering: Layering,
    /// Stratigraphic cell thickness `h`, m.
    pub cell_thickness: f64,
    /// Reference thickness `T_ref` of proportional layering (mean thickness), m;
    /// for the parallel rules, the largest thickness.
    pub reference_thickness: f64,
    /// Number of layers.
    pub layers: usize,
}

impl ZoneFrame {
    /// Build the frame of a zone from its bounding surfaces.
    pub fn new(zone: usize, def: &ZoneDef, top: &Surface, base: &Surface) -> ZoneFrame {
        let (_, mean, max) = thickness_stats(top, base);
        let mean = if mean.is_finite() { mean } else { 0.0 };
        let max = if max.is_finite() { max } else { 0.0 };
        let reference_thickness = match def.layering {
            Layering::Proportional => mean,
            Layering::ParallelToTop | Layering::ParallelToBase => max,
        };
        let layers = ((reference_thickness / def.cell_thickness).ceil() as usize).max(1);
        ZoneFrame {
            zone,
            name: def.name.clone(),
            layering: def.layering,
            cell_thickness: def.cell_thickness,
            reference_thickness,
            layers,
        }
    }

    /// Stratigraphic coordinate of depth `z` between `z_top` and `z_base` (m).
    /// `None` when `z` is outside the zone there.
    pub fn s_at(&self, z: f64, z_top: f64, z_base: f64) -> Option<f64> {
        if !(z >= z_top && z < z_base) {
            return None;
        }
        Some(match self.layering {
            Layering::Proportional => (z - z_top) / (z_base - z_top) * self.reference_thickness,
            Layering::ParallelToTop => z - z_top,
            Layering::ParallelToBase => z_base - z,
        })
    }

    /// Depth of stratigraphic coordinate `s` in a column with the given top and
    /// base; `None` where that `s` does not exist in the column (cut by the
    /// other horizon, or a zone of zero thickness).
    pub fn z_of(&self, s: f64, z_top: f64, z_base: f64) -> Option<f64> {
        let t = z_base - z_top;
        if t.is_nan() || t <= 0.0 || s < 0.0 {
            return None;
        }
        let z = match self.layering {
            Layering::Proportional => {
                if self.reference_thickness <= 0.0 || s >= self.reference_thickness {
                    return None;
                }
                z_top + s / self.reference_thickness * t
            }
            Layering::ParallelToTop => z_top + s,
            Layering::ParallelToBase => z_base - s,
        };
        (z >= z_top && z < z_base).then_some(z)
    }

    /// Layer index of stratigraphic coordinate `s`.
    pub fn layer_of(&self, s: f64) -> usize {
        ((s / self.cell_thickness).floor().max(0.0) as usize).min(self.layers - 1)
    }

    /// Stratigraphic coordinate of the centre of layer `l`.
    pub fn layer_centre(&self, l: usize) -> f64 {
        (l as f64 + 0.5) * self.cell_thickness
    }
}

/// The stratigraphic frame of a study: one [`ZoneFrame`] per zone, with the
/// zone surfaces.
#[derive(Debug, Clone)]
pub struct StratFrame {
    /// Zones, in project order (shallow to deep).
    pub zones: Vec<ZoneFrame>,
    /// Top and base surfaces of each zone (clones of the study's horizons).
    pub bounds: Vec<(Surface, Surface)>,
}

/// Where a point is in the frame.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct StratPosition {
    /// Zone index.
    pub zone: usize,
    /// Stratigraphic coordinate, m.
    pub s: f64,
    /// Layer index.
    pub layer: usize,
}

impl StratFrame {
    /// Build the frame from zone definitions and horizon surfaces (indexed as in the project).
    pub fn new(zones: &[ZoneDef], surfaces: &[&Surface]) -> StratFrame {
        let mut zf = Vec::with_capacity(zones.len());
        let mut bounds = Vec::with_capacity(zones.len());
        for (k, z) in zones.iter().enumerate() {
            let (top, base) = (surfaces[z.top], surfaces[z.base]);
            zf.push(ZoneFrame::new(k, z, top, base));
            bounds.push((top.clone(), base.clone()));
        }
        StratFrame { zones: zf, bounds }
    }

    /// Zone and stratigraphic coordinate of world point (x, y, z); `None`
    /// outside every zone or outside the grid.
    pub fn locate(&self, grid: &SurveyGrid, x: f64, y: f64, z: f64) -> Option<StratPosition> {
        for (zf, (top, base)) in self.zones.iter().zip(&self.bounds) {
            let (Some(t), Some(b)) = (top.z_at_xy(grid, x, y), base.z_at_xy(grid, x, y)) else {
                continue;
            };
            if let Some(s) = zf.s_at(z, t, b) {
                return Some(StratPosition {
                    zone: zf.zone,
                    s,
                    layer: zf.layer_of(s),
                });
            }
        }
        None
    }

    /// Zone and stratigraphic coordinate of grid cell (i, j, k).
    pub fn locate_cell(
        &self,
        grid: &SurveyGrid,
        i: usize,
        j: usize,
        k: usize,
    ) -> Option<StratPosition> {
        let z = grid.z_at(k);
        for (zf, (top, base)) in self.zones.iter().zip(&self.bounds) {
            let (Some(t), Some(b)) = (top.z_at_node(i, j), base.z_at_node(i, j)) else {
                continue;
            };
            if let Some(s) = zf.s_at(z, t, b) {
                return Some(StratPosition {
                    zone: zf.zone,
                    s,
                    layer: zf.layer_of(s),
                });
            }
        }
        None
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::ZoneDef;

    fn zone(l: Layering) -> ZoneDef {
        ZoneDef {
            name: "Z".into(),
            top: 0,
            base: 1,
            layering: l,
            cell_thickness: 2.0,
        }
    }

    fn frame(l: Layering) -> ZoneFrame {
        let top = Surface::new("t", ndarray::Array2::from_elem((2, 2), 1000.0));
        let mut b = ndarray::Array2::from_elem((2, 2), 1040.0);
        b[[1, 1]] = 1080.0;
        let base = Surface::new("b", b);
        ZoneFrame::new(0, &zone(l), &top, &base)
    }

    #[test]
    fn definitions_of_the_three_rules() {
        // proportional: T_ref is the mean thickness (40, 40, 40, 80 -> 50 m)
        let f = frame(Layering::Proportional);
        assert!((f.reference_thickness - 50.0).abs() < 1e-12);
        assert_eq!(f.layers, 25);
        assert!((f.s_at(1020.0, 1000.0, 1040.0).unwrap() - 25.0).abs() < 1e-12);
        assert!((f.s_at(1040.0, 1000.0, 1080.0).unwrap() - 25.0).abs() < 1e-12);
        assert_eq!(f.s_at(1040.0, 1000.0, 1040.0), None);
        // parallel to top: s = z - z_top, layers up to the largest thickness
        let f = frame(Layering::ParallelToTop);
        assert_eq!(f.layers, 40);
        assert_eq!(f.s_at(1030.0, 1000.0, 1040.0), Some(30.0));
        // parallel to base: s = z_base - z
        let f = frame(Layering::ParallelToBase);
        assert_eq!(f.s_at(1030.0, 1000.0, 1040.0), Some(10.0));
    }

    #[test]
    fn z_of_inverts_s_at() {
        for l in [
            Layering::Proportional,
            Layering::ParallelToTop,
            Layering::ParallelToBase,
        ] {
            let f = frame(l);
            for z in [1000.0, 1003.5, 1039.0] {
                let s = f.s_at(z, 1000.0, 1040.0).unwrap();
                let z2 = f.z_of(s, 1000.0, 1040.0).unwrap();
                assert!((z - z2).abs() < 1e-9, "{l:?} {z} {z2}");
            }
        }
        // a layer cut by the base does not exist in a thin column
        let f = frame(Layering::ParallelToTop);
        assert_eq!(f.z_of(f.layer_centre(30), 1000.0, 1040.0), None);
    }
}
