//! Horizon surfaces, stratigraphic order and zone thickness.
//!
//! Horizons are listed shallow to deep. Gridding and tying each horizon on its own
//! can make a deeper horizon come out above a shallower one where the two are close
//! (pinch-outs, sparse picks, extrapolation). [`enforce_order`] removes such
//! crossings; [`thickness_stats`] summarises the zone between two horizons.

use crate::frame::gridding::{NodeLocation, Surface};
use crate::grid::SurveyGrid;

/// Crossings found and removed between two consecutive horizons.
#[derive(Debug, Clone, serde::Serialize)]
pub struct CrossingReport {
    /// The shallower horizon.
    pub upper: String,
    /// The deeper horizon (the one that was clipped).
    pub lower: String,
    /// Nodes where the deeper horizon was above the shallower one and was clipped.
    pub nodes_clipped: usize,
    /// Largest overlap `z_upper - z_lower` before clipping, m (0 when none).
    pub max_overlap: f64,
    /// Node of the largest overlap (`None` when nothing was clipped).
    pub max_overlap_at: Option<NodeLocation>,
}

/// Put `surfaces` (given shallow to deep) in stratigraphic order: a deeper horizon
/// is never above a shallower one.
///
/// Rule (erosional truncation of the deeper horizon, common practice in building
/// structural frames): going down the list, at every node where the deeper horizon
/// is above the one just above it (`z_lower < z_upper`, z TVDSS positive down), the
/// deeper one is set to the shallower one's depth, so the zone between them has zero
/// thickness there (a pinch-out):
///
/// ```text
/// z_k(i, j) <- max(z_k(i, j), z_{k-1}(i, j))   for k = 1, 2, ... in order
/// ```
///
/// The shallower horizon is never moved, so the first horizon (and any tie of it to
/// well tops) is kept as it is; a deeper horizon's tie can be undone where it is
/// clipped. Because the pairs are processed in order against the already clipped
/// horizon above, the whole stack ends up ordered, and each pair's report counts the
/// overlap against the clipped horizon above. Nodes where either depth is not a
/// finite number are left alone. Surfaces of a shape other than the grid's are
/// compared over the nodes they share.
///
/// Returns one report per consecutive pair, shallow to deep.
pub fn enforce_order(surfaces: &mut [Surface], grid: &SurveyGrid) -> Vec<CrossingReport> {
    let mut reports = Vec::new();
    for k in 1..surfaces.len() {
        let (head, tail) = surfaces.split_at_mut(k);
        let (Some(upper), Some(lower)) = (head.last(), tail.first_mut()) else {
            continue;
        };
        let ni = upper.z.nrows().min(lower.z.nrows());
        let nj = upper.z.ncols().min(lower.z.ncols());
        let mut clipped = 0usize;
        let mut max_overlap = 0.0f64;
        let mut at = None;
        for i in 0..ni {
            for j in 0..nj {
                let (Some(&zu), Some(zl)) = (upper.z.get((i, j)), lower.z.get_mut((i, j))) else {
                    continue;
                };
                if zu.is_finite() && zl.is_finite() && *zl < zu {
                    let overlap = zu - *zl;
                    clipped += 1;
                    if at.is_none() || overlap > max_overlap {
                        max_overlap = overlap;
                        at = Some((i, j));
                    }
                    *zl = zu;
                }
            }
        }
        reports.push(CrossingReport {
            upper: upper.name.clone(),
            lower: lower.name.clone(),
            nodes_clipped: clipped,
            max_overlap,
            max_overlap_at: at.map(|(i, j)| NodeLocation::of_node(grid, i, j)),
        });
    }
    reports
}

/// Thickness of the zone between `top` and `base`: `(min, mean, max)` of
/// `z_base - z_top` over the nodes (m; vertical thickness, z TVDSS positive down).
///
/// Nodes where either depth is not finite are skipped; surfaces of different shapes
/// are compared over the nodes they share. When no node is left all three are NaN.
pub fn thickness_stats(top: &Surface, base: &Surface) -> (f64, f64, f64) {
    let ni = top.z.nrows().min(base.z.nrows());
    let nj = top.z.ncols().min(base.z.ncols());
    let (mut min, mut max, mut sum, mut n) = (f64::INFINITY, f64::NEG_INFINITY, 0.0, 0usize);
    for i in 0..ni {
        for j in 0..nj {
            if let (Some(zt), Some(zb)) = (top.z_at_node(i, j), base.z_at_node(i, j)) {
                if zt.is_finite() && zb.is_finite() {
                    let h = zb - zt;
                    min = min.min(h);
                    max = max.max(h);
                    sum += h;
                    n += 1;
                }
            }
        }
    }
    if n == 0 {
        (f64::NAN, f64::NAN, f64::NAN)
    } else {
        (min, sum / n as f64, max)
    }
}
