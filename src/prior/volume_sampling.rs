//! Reading a gridded input volume at arbitrary points (for drift values).

use crate::grid::SurveyGrid;

/// Value of a trace-major volume (inline by inline, crossline fastest, depth
/// fastest of all) at world point (x, y) and depth z (m TVDSS): bilinear in the
/// map, linear in depth, clamped to the volume's outer nodes. `None` outside the
/// grid's outline.
pub fn sample_volume(grid: &SurveyGrid, data: &[f32], x: f64, y: f64, z: f64) -> Option<f64> {
    if !grid.contains_xy(x, y) {
        return None;
    }
    let (fi, fj) = grid.xy_to_ij(x, y);
    let ni = grid.inline_count;
    let nj = grid.xline_count;
    let fi = fi.clamp(0.0, (ni - 1) as f64);
    let fj = fj.clamp(0.0, (nj - 1) as f64);
    let i0 = (fi.floor() as usize).min(ni - 2);
    let j0 = (fj.floor() as usize).min(nj - 2);
    let (ti, tj) = (fi - i0 as f64, fj - j0 as f64);
    let mut v = 0.0;
    for (di, wi) in [(0, 1.0 - ti), (1, ti)] {
        for (dj, wj) in [(0, 1.0 - tj), (1, tj)] {
            let w = wi * wj;
            if w != 0.0 {
                v += w * trace_at_depth(grid, data, i0 + di, j0 + dj, z)?;
            }
        }
    }
    Some(v)
}

/// Value of trace (i, j) at depth z, linear between samples, clamped at the ends.
pub fn trace_at_depth(grid: &SurveyGrid, data: &[f32], i: usize, j: usize, z: f64) -> Option<f64> {
    let nz = grid.z_count;
    let t = grid.trace_index(i, j);
    let tr = data.get(t * nz..(t + 1) * nz)?;
    let fk = ((z - grid.z0) / grid.dz).clamp(0.0, (nz - 1) as f64);
    let k0 = (fk.floor() as usize).min(nz - 2);
    let f = fk - k0 as f64;
    Some(f64::from(tr[k0]) * (1.0 - f) + f64::from(tr[k0 + 1]) * f)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn linear_field_is_reproduced() {
        // A field linear in x, y and z is reproduced exactly by trilinear interpolation.
        let g = SurveyGrid {
            x0: 100.0,
            y0: 200.0,
            azimuth: 20.0,
            inline_spacing: 10.0,
            xline_spacing: 20.0,
            inline_first: 1,
            inline_count: 4,
            xline_first: 1,
            xline_count: 5,
            z0: 1000.0,
            dz: 5.0,
            z_count: 6,
        };
        let f = |x: f64, y: f64, z: f64| 0.5 * x - 0.25 * y + 2.0 * z;
        let mut data = Vec::new();
        for i in 0..4 {
            for j in 0..5 {
                let (x, y) = g.node_xy(i as f64, j as f64);
                for k in 0..6 {
                    data.push(f(x, y, g.z_at(k)) as f32);
                }
            }
        }
        let (x, y) = g.node_xy(1.3, 2.6);
        let v = sample_volume(&g, &data, x, y, 1012.5).unwrap();
        // f32 storage of values near 2000 rounds to about 1e-4
        assert!((v - f(x, y, 1012.5)).abs() < 1e-3, "{v}");
        assert!(sample_volume(&g, &data, 0.0, 0.0, 1000.0).is_none());
    }
}
