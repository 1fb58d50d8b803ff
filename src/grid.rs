//! The survey grid: inline/crossline numbering, world coordinates, depth axis.
//!
//! Convention (design overview): node (i, j), inline index `i` and crossline
//! index `j` counted from 0, sits at
//!
//! ```text
//! (x, y) = (x0, y0) + j * xline_spacing * (sin az, cos az)
//!                   + i * inline_spacing * (cos az, -sin az)
//! ```
//!
//! where `az` is the bearing (degrees clockwise from grid north) along which the
//! crossline number grows on an inline. The inline number grows at bearing
//! `az + 90`. Depth samples are `z0 + k * dz`, TVDSS in metres, positive down.

use serde::{Deserialize, Serialize};

/// A regular 3-D survey grid in world coordinates (metres) and TVDSS depth (metres).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SurveyGrid {
    /// World x (easting) of node (first inline, first crossline), m.
    pub x0: f64,
    /// World y (northing) of node (first inline, first crossline), m.
    pub y0: f64,
    /// Bearing in degrees clockwise from grid north of increasing crossline number.
    pub azimuth: f64,
    /// Distance between neighbouring inlines, m.
    pub inline_spacing: f64,
    /// Distance between neighbouring crosslines along an inline, m.
    pub xline_spacing: f64,
    /// Number of the first inline.
    pub inline_first: i32,
    /// Number of inlines.
    pub inline_count: usize,
    /// Number of the first crossline.
    pub xline_first: i32,
    /// Number of crosslines.
    pub xline_count: usize,
    /// Depth of the first sample, m TVDSS.
    pub z0: f64,
    /// Depth sample interval, m.
    pub dz: f64,
    /// Number of depth samples.
    pub z_count: usize,
}

impl SurveyGrid {
    fn axes(&self) -> ((f64, f64), (f64, f64)) {
        let az = self.azimuth.to_radians();
        let (s, c) = az.sin_cos();
        // unit vector of growing crossline index j, and of growing inline index i
        ((s, c), (c, -s))
    }

    /// World (x, y) of node (i, j), possibly fractional or outside the grid.
    pub fn node_xy(&self, i: f64, j: f64) -> (f64, f64) {
        let ((jx, jy), (ix, iy)) = self.axes();
        (
            self.x0 + j * self.xline_spacing * jx + i * self.inline_spacing * ix,
            self.y0 + j * self.xline_spacing * jy + i * self.inline_spacing * iy,
        )
    }

    /// Fractional (i, j) grid indices of world point (x, y): the inverse of [`Self::node_xy`].
    pub fn xy_to_ij(&self, x: f64, y: f64) -> (f64, f64) {
        let ((jx, jy), (ix, iy)) = self.axes();
        let dx = x - self.x0;
        let dy = y - self.y0;
        // the axes are orthonormal, so projections invert the map
        let j = (dx * jx + dy * jy) / self.xline_spacing;
        let i = (dx * ix + dy * iy) / self.inline_spacing;
        (i, j)
    }

    /// Whether world point (x, y) lies inside the grid's outline, within half a
    /// cell beyond the outer nodes.
    pub fn contains_xy(&self, x: f64, y: f64) -> bool {
        let (i, j) = self.xy_to_ij(x, y);
        i >= -0.5
            && j >= -0.5
            && i <= self.inline_count as f64 - 0.5
            && j <= self.xline_count as f64 - 0.5
    }

    /// Inline number of index `i`.
    pub fn inline_number(&self, i: usize) -> i32 {
        self.inline_first + i as i32
    }

    /// Crossline number of index `j`.
    pub fn xline_number(&self, j: usize) -> i32 {
        self.xline_first + j as i32
    }

    /// Depth of sample `k`, m TVDSS.
    pub fn z_at(&self, k: usize) -> f64 {
        self.z0 + k as f64 * self.dz
    }

    /// Depth of the last sample, m TVDSS.
    pub fn z_last(&self) -> f64 {
        self.z_at(self.z_count.saturating_sub(1))
    }

    /// Number of map nodes (traces).
    pub fn trace_count(&self) -> usize {
        self.inline_count * self.xline_count
    }

    /// Flat index of node (i, j): traces are ordered inline by inline, crossline fastest.
    pub fn trace_index(&self, i: usize, j: usize) -> usize {
        i * self.xline_count + j
    }

    /// World coordinates of the four corner nodes, in the order
    /// (first il, first xl), (first il, last xl), (last il, last xl), (last il, first xl).
    pub fn corners(&self) -> [(f64, f64); 4] {
        let li = self.inline_count.saturating_sub(1) as f64;
        let lj = self.xline_count.saturating_sub(1) as f64;
        [
            self.node_xy(0.0, 0.0),
            self.node_xy(0.0, lj),
            self.node_xy(li, lj),
            self.node_xy(li, 0.0),
        ]
    }

    /// Check the grid's own numbers; returns what is wrong, if anything.
    pub fn validate(&self) -> std::result::Result<(), String> {
        let finite = [
            ("x0", self.x0),
            ("y0", self.y0),
            ("azimuth", self.azimuth),
            ("inline_spacing", self.inline_spacing),
            ("xline_spacing", self.xline_spacing),
            ("z0", self.z0),
            ("dz", self.dz),
        ];
        for (name, v) in finite {
            if !v.is_finite() {
                return Err(format!("{name} must be a finite number, got {v}"));
            }
        }
        for (name, v) in [
            ("inline_spacing", self.inline_spacing),
            ("xline_spacing", self.xline_spacing),
            ("dz", self.dz),
        ] {
            if v <= 0.0 {
                return Err(format!("{name} must be positive (metres), got {v}"));
            }
        }
        for (name, v) in [
            ("inline count", self.inline_count),
            ("crossline count", self.xline_count),
            ("depth sample count", self.z_count),
        ] {
            if v < 2 {
                return Err(format!("{name} must be at least 2, got {v}"));
            }
        }
        if self.z_count > 32767 {
            return Err(format!(
                "depth sample count {} exceeds the 32767 samples a SEG-Y rev 1 trace can hold",
                self.z_count
            ));
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn grid(az: f64) -> SurveyGrid {
        SurveyGrid {
            x0: 1000.0,
            y0: 2000.0,
            azimuth: az,
            inline_spacing: 25.0,
            xline_spacing: 12.5,
            inline_first: 100,
            inline_count: 11,
            xline_first: 200,
            xline_count: 21,
            z0: 0.0,
            dz: 10.0,
            z_count: 5,
        }
    }

    #[test]
    fn azimuth_zero_crosslines_grow_north_inlines_grow_east() {
        // Design overview convention: crossline grows at bearing az, inline at az + 90.
        let g = grid(0.0);
        let (x, y) = g.node_xy(0.0, 1.0);
        assert!((x - 1000.0).abs() < 1e-9 && (y - 2012.5).abs() < 1e-9);
        let (x, y) = g.node_xy(1.0, 0.0);
        assert!((x - 1025.0).abs() < 1e-9 && (y - 2000.0).abs() < 1e-9);
    }

    #[test]
    fn xy_to_ij_inverts_node_xy() {
        let g = grid(37.0);
        for &(i, j) in &[(0.0, 0.0), (3.5, 7.25), (10.0, 20.0), (-2.0, 4.0)] {
            let (x, y) = g.node_xy(i, j);
            let (i2, j2) = g.xy_to_ij(x, y);
            assert!((i - i2).abs() < 1e-9 && (j - j2).abs() < 1e-9);
        }
    }
}
