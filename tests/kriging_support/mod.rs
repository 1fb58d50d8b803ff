//! Shared helpers of the kriging tests: small covariance models of our own and
//! synthetic blocked wells. (The crate's own variogram models are tested elsewhere.)
#![allow(dead_code)]

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use stratiprior::geostat::kriging::Sample;
use stratiprior::geostat::CovarianceModel;

/// Isotropic exponential covariance `C(h) = c exp(-a h)`.
/// Scaled space: `p * a`, so that `C = c exp(-|scaled displacement|)`.
#[derive(Debug, Clone, Copy)]
pub struct IsoExp {
    pub c: f64,
    pub a: f64,
}

impl CovarianceModel for IsoExp {
    fn covariance(&self, d: [f64; 3]) -> f64 {
        let h = (d[0] * d[0] + d[1] * d[1] + d[2] * d[2]).sqrt();
        self.c * (-self.a * h).exp()
    }
    fn sill(&self) -> f64 {
        self.c
    }
    fn to_isotropic(&self, p: [f64; 3]) -> [f64; 3] {
        [p[0] * self.a, p[1] * self.a, p[2] * self.a]
    }
}

/// Anisotropic exponential covariance `C(d) = c exp(-|A d|)`: `A` rotates the
/// horizontal plane so that the major axis points at `azimuth_deg` (clockwise
/// from north = +y), then divides by the scale lengths `(major, minor, vertical)`.
#[derive(Debug, Clone, Copy)]
pub struct AnisoExp {
    pub c: f64,
    pub lengths: [f64; 3],
    pub azimuth_deg: f64,
}

impl AnisoExp {
    fn map(&self, d: [f64; 3]) -> [f64; 3] {
        let (s, c) = self.azimuth_deg.to_radians().sin_cos();
        // unit vector of the major axis: (sin az, cos az); minor: (cos az, -sin az)
        let major = d[0] * s + d[1] * c;
        let minor = d[0] * c - d[1] * s;
        [
            major / self.lengths[0],
            minor / self.lengths[1],
            d[2] / self.lengths[2],
        ]
    }
}

impl CovarianceModel for AnisoExp {
    fn covariance(&self, d: [f64; 3]) -> f64 {
        let m = self.map(d);
        self.c * (-(m[0] * m[0] + m[1] * m[1] + m[2] * m[2]).sqrt()).exp()
    }
    fn sill(&self) -> f64 {
        self.c
    }
    fn to_isotropic(&self, p: [f64; 3]) -> [f64; 3] {
        self.map(p)
    }
}

/// A smooth "geology" for synthetic values.
pub fn field(p: [f64; 3]) -> f64 {
    (p[0] / 700.0).sin() + 0.5 * (p[1] / 450.0).cos() + 0.3 * (p[2] / 13.0).sin()
}

/// Vertical blocked wells: `nwells` wells at random (seeded) positions in
/// `[0, extent]^2`, each with samples in layers `0..nlayers` at `s = s0 + (layer
/// + 0.5) * ds`, values from [`field`] plus noise. Drift `f = 2000 + 0.5 s + 0.01 x`
/// and trend `m = 0.2 + 0.001 s` are set on every sample.
pub fn vertical_wells(
    seed: u64,
    nwells: u32,
    nlayers: i32,
    extent: f64,
    ds: f64,
) -> (Vec<[f64; 2]>, Vec<Sample>) {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let mut heads = Vec::new();
    let mut out = Vec::new();
    for w in 0..nwells {
        let x: f64 = rng.gen_range(0.0..extent);
        let y: f64 = rng.gen_range(0.0..extent);
        heads.push([x, y]);
        for l in 0..nlayers {
            let pos = [x, y, (l as f64 + 0.5) * ds];
            let v = field(pos) + 0.05 * rng.gen_range(-1.0..1.0);
            let mut s = Sample::new(100 + w, l, pos, v);
            s.drift = Some(drift_at(pos));
            s.trend = Some(trend_at(pos));
            out.push(s);
        }
    }
    (heads, out)
}

/// The external drift used by the synthetic cases: linear in s and x.
pub fn drift_at(p: [f64; 3]) -> f64 {
    2000.0 + 0.5 * p[2] + 0.01 * p[0]
}

/// The trend used by the synthetic cases.
pub fn trend_at(p: [f64; 3]) -> f64 {
    0.2 + 0.001 * p[2]
}
