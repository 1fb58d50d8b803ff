//! The truth sampled on the survey grid, the derived input volumes (a smooth
//! background Vp0 and a facies-label volume with realistic errors) (the `.npy`
//! writer lives in [`crate::formats::npy`]).

use super::basin::{horizons_uv, Basin, RegionLateral, HETEROLITHIC, SAND, SHALE};
use super::grf::{Grf, Ranges};
use rand::SeedableRng;
use rand_chacha::ChaCha20Rng;

/// The truth on the grid, trace-major (inline, crossline, depth), depth fastest.
#[derive(Debug, Clone)]
pub struct GridTruth {
    /// Vp0, m/s.
    pub vp: Vec<f64>,
    /// Vs, m/s.
    pub vs: Vec<f32>,
    /// Density, kg/m3.
    pub rho: Vec<f32>,
    /// Thomsen epsilon.
    pub eps: Vec<f32>,
    /// Thomsen delta.
    pub delta: Vec<f32>,
    /// Facies codes.
    pub facies: Vec<u8>,
    /// Zone index (0.., or -1 above / -2 below the zones).
    pub zone: Vec<i32>,
    /// Horizon depths per trace, m TVDSS, (inline, crossline) order.
    pub horizons: [Vec<f64>; 4],
}

/// Sample the truth at every grid node: each node's world (x, y) from the grid,
/// then exactly the function the well logs sample.
pub fn sample_truth(basin: &Basin) -> GridTruth {
    let g = basin.grid().clone();
    let n = g.trace_count() * g.z_count;
    let mut t = GridTruth {
        vp: Vec::with_capacity(n),
        vs: Vec::with_capacity(n),
        rho: Vec::with_capacity(n),
        eps: Vec::with_capacity(n),
        delta: Vec::with_capacity(n),
        facies: Vec::with_capacity(n),
        zone: Vec::with_capacity(n),
        horizons: Default::default(),
    };
    for i in 0..g.inline_count {
        for j in 0..g.xline_count {
            let (x, y) = g.node_xy(i as f64, j as f64);
            let (u, v) = basin.local(x, y);
            let h = horizons_uv(u, v);
            for (k, hk) in h.iter().enumerate() {
                t.horizons[k].push(*hk);
            }
            let mut cache: [Option<RegionLateral>; 5] = Default::default();
            for k in 0..g.z_count {
                let z = g.z_at(k);
                let zone = Basin::zone_of(z, &h);
                let r = Basin::region_index(zone);
                let lat = cache[r].get_or_insert_with(|| basin.lateral(r, u, v));
                let rock = basin.rock_with(u, v, z, &h, zone, lat);
                t.vp.push(rock.vp);
                t.vs.push(rock.vs as f32);
                t.rho.push(rock.rho as f32);
                t.eps.push(rock.eps as f32);
                t.delta.push(rock.delta as f32);
                t.facies.push(rock.facies);
                t.zone.push(rock.zone);
            }
        }
    }
    t
}

/// Lateral and vertical smoothing of the background model: Gaussian standard
/// deviations in m.
pub const BACKGROUND_SIGMA: (f64, f64) = (300.0, 40.0);
/// Standard deviation of the smooth relative error of the background model.
pub const BACKGROUND_ERROR: f64 = 0.03;

/// Normalised Gaussian smoothing along one axis of a 3-D array (dims
/// `[n0, n1, n2]`, last fastest), kernel `exp(-d^2 / (2 sigma^2))` truncated at
/// 3 sigma (in samples) and renormalised where it leaves the array (common practice).
fn smooth_axis(data: &[f64], dims: [usize; 3], axis: usize, sigma: f64) -> Vec<f64> {
    let half = (3.0 * sigma).ceil() as isize;
    let w: Vec<f64> = (-half..=half)
        .map(|d| libm::exp(-((d * d) as f64) / (2.0 * sigma * sigma)))
        .collect();
    let stride = match axis {
        0 => dims[1] * dims[2],
        1 => dims[2],
        _ => 1,
    };
    let len = dims[axis] as isize;
    let mut out = vec![0.0; data.len()];
    for (idx, o) in out.iter_mut().enumerate() {
        let pos = ((idx / stride) % dims[axis]) as isize;
        let base = idx as isize - pos * stride as isize;
        let (mut s, mut ws) = (0.0, 0.0);
        for (q, wq) in w.iter().enumerate() {
            let p = pos + q as isize - half;
            if p >= 0 && p < len {
                s += wq * data[(base + p * stride as isize) as usize];
                ws += wq;
            }
        }
        *o = s / ws;
    }
    out
}

/// A starting model as FWI would get it: the truth Vp0 low-passed (Gaussian,
/// [`BACKGROUND_SIGMA`]) and multiplied by `1 + 0.03 E` with `E` a smooth
/// unit-variance random field (ranges 2500 x 1800 m laterally, 400 m vertically).
pub fn background_vp0(basin: &Basin, truth: &GridTruth, seed: u64) -> Vec<f32> {
    let g = basin.grid();
    let dims = [g.inline_count, g.xline_count, g.z_count];
    let a = smooth_axis(&truth.vp, dims, 0, BACKGROUND_SIGMA.0 / g.inline_spacing);
    let b = smooth_axis(&a, dims, 1, BACKGROUND_SIGMA.0 / g.xline_spacing);
    let c = smooth_axis(&b, dims, 2, BACKGROUND_SIGMA.1 / g.dz);
    let mut rng = ChaCha20Rng::seed_from_u64(seed.wrapping_add(0xb6c0_0000));
    let err = Grf::new(
        &mut rng,
        48,
        Ranges {
            major: 2500.0,
            minor: 1800.0,
            angle: 60.0,
            vertical: 400.0,
        },
    );
    let mut out = Vec::with_capacity(c.len());
    for i in 0..g.inline_count {
        for j in 0..g.xline_count {
            let (x, y) = g.node_xy(i as f64, j as f64);
            let (u, v) = basin.local(x, y);
            let lat = err.lateral(u, v);
            for k in 0..g.z_count {
                let idx = (i * g.xline_count + j) * g.z_count + k;
                let e = 1.0 + BACKGROUND_ERROR * err.at_lateral(&lat, g.z_at(k));
                out.push((c[idx] * e) as f32);
            }
        }
    }
    out
}

/// Threshold of the patch field above which the facies label is wrong
/// (P(G > 1.04) = 15 % for a standard normal G).
const PATCH_THRESHOLD: f64 = 1.04;

/// Facies labels as a seismic classification would give them: the truth with
/// wrong labels in patches (a random field above [`PATCH_THRESHOLD`]; ranges
/// 600 x 400 m laterally, 30 m vertically), where sand and shale are read as
/// heterolithic and heterolithic as sand or shale. Returns the labels (float32
/// codes) and the misclassified fraction.
pub fn facies_labels(basin: &Basin, truth: &GridTruth, seed: u64) -> (Vec<f32>, f64) {
    let g = basin.grid();
    let mut rng = ChaCha20Rng::seed_from_u64(seed.wrapping_add(0xfac1_0000));
    let patch = Grf::new(
        &mut rng,
        64,
        Ranges {
            major: 600.0,
            minor: 400.0,
            angle: 0.0,
            vertical: 30.0,
        },
    );
    let pick = Grf::new(
        &mut rng,
        24,
        Ranges {
            major: 1500.0,
            minor: 1500.0,
            angle: 0.0,
            vertical: 200.0,
        },
    );
    let mut out = Vec::with_capacity(truth.facies.len());
    let mut wrong = 0usize;
    for i in 0..g.inline_count {
        for j in 0..g.xline_count {
            let (x, y) = g.node_xy(i as f64, j as f64);
            let (u, v) = basin.local(x, y);
            let lp = patch.lateral(u, v);
            let lq = pick.lateral(u, v);
            for k in 0..g.z_count {
                let idx = (i * g.xline_count + j) * g.z_count + k;
                let f = truth.facies[idx];
                let z = g.z_at(k);
                let label = if patch.at_lateral(&lp, z) > PATCH_THRESHOLD {
                    match f {
                        SAND | SHALE => HETEROLITHIC,
                        _ => {
                            if pick.at_lateral(&lq, z) > 0.0 {
                                SAND
                            } else {
                                SHALE
                            }
                        }
                    }
                } else {
                    f
                };
                if label != f {
                    wrong += 1;
                }
                out.push(f32::from(label));
            }
        }
    }
    let frac = wrong as f64 / truth.facies.len().max(1) as f64;
    (out, frac)
}

pub use crate::formats::npy::{npy_f32, write_npy_f32};

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn npy_header_is_aligned() {
        // NEP 1: total header (magic .. newline) is a multiple of 64 bytes (v1.0 uses 16;
        // numpy >= 1.9 writes 64) and ends with '\n'.
        let b = npy_f32(&[2, 3], &[0.0; 6]);
        let hl = u16::from_le_bytes([b[8], b[9]]) as usize;
        assert_eq!((10 + hl) % 64, 0);
        assert_eq!(b[10 + hl - 1], b'\n');
        assert_eq!(b.len(), 10 + hl + 24);
    }

    #[test]
    fn smoothing_keeps_constants_and_means() {
        let dims = [3, 4, 20];
        let d: Vec<f64> = (0..240).map(|_| 5.0).collect();
        let s = smooth_axis(&d, dims, 2, 3.0);
        assert!(s.iter().all(|v| (v - 5.0).abs() < 1e-12));
        // a linear ramp stays linear away from the ends (symmetric kernel)
        let d: Vec<f64> = (0..240).map(|k| (k % 20) as f64).collect();
        let s = smooth_axis(&d, dims, 2, 2.0);
        assert!((s[10] - 10.0).abs() < 1e-9);
    }
}
