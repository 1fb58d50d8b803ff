//! Spatially correlated Gaussian random fields by random Fourier modes, and the
//! few random draws the demo needs, all computed with the pure-Rust `libm`
//! functions so that the generated files are the same on every platform.

use rand::Rng;
use rand_chacha::ChaCha20Rng;
use std::f64::consts::PI;

/// Practical range of the Matern 3/2 correlation in units of its length scale:
/// the distance `r` at which `(1 + sqrt(3) r) exp(-sqrt(3) r) = 0.05`
/// (solved numerically; checked in the tests).
pub const MATERN32_PRACTICAL_RANGE: f64 = 2.738_9;

/// A standard normal draw by the Box-Muller transform,
/// `z = sqrt(-2 ln u1) cos(2 pi u2)` with `u1` in (0, 1] and `u2` in [0, 1)
/// (Box and Muller 1958, Ann. Math. Statist. 29(2), 610-611).
pub fn normal(rng: &mut ChaCha20Rng) -> f64 {
    let u1: f64 = 1.0 - rng.gen::<f64>();
    let u2: f64 = rng.gen::<f64>();
    (-2.0 * libm::log(u1)).sqrt() * libm::cos(2.0 * PI * u2)
}

/// A uniform draw in `[a, b)`.
pub fn uniform(rng: &mut ChaCha20Rng, a: f64, b: f64) -> f64 {
    a + (b - a) * rng.gen::<f64>()
}

/// One Fourier mode: wave numbers (rad/m) along the two map axes and the
/// stratigraphic vertical axis, and a phase (rad).
#[derive(Debug, Clone, Copy)]
struct Mode {
    ku: f64,
    kv: f64,
    kw: f64,
    phase: f64,
}

/// Correlation ranges of a field, metres: the practical (5 %) ranges along the
/// major and minor lateral axes, the bearing of the major axis measured from the
/// map `u` axis towards `v` (degrees), and the vertical range.
#[derive(Debug, Clone, Copy, serde::Serialize)]
pub struct Ranges {
    /// Practical range along the major lateral axis, m.
    pub major: f64,
    /// Practical range along the minor lateral axis, m.
    pub minor: f64,
    /// Angle of the major axis from the u axis towards the v axis, degrees.
    pub angle: f64,
    /// Practical range along the stratigraphic vertical, m.
    pub vertical: f64,
}

/// A zero-mean, unit-variance stationary Gaussian random field with a
/// geometrically anisotropic Matern 3/2 covariance, represented by `N` random
/// Fourier modes (spectral representation of Shinozuka and Deodatis 1991,
/// Appl. Mech. Rev. 44(4); "random Fourier features" of Rahimi and Recht 2007):
///
/// ```text
/// G(x) = sqrt(2 / N) * sum_n cos(k_n . A x + phi_n),   phi_n ~ U(0, 2 pi),
/// ```
///
/// where `A` scales and rotates the coordinates to unit correlation length and
/// the wave vectors `k_n` are drawn from the normalised spectral density of the
/// covariance. The Matern covariance with smoothness `nu` in 3-D has a
/// multivariate Student-t spectral density with `2 nu` degrees of freedom
/// (Rasmussen and Williams 2006, Gaussian Processes for Machine Learning, eq. 4.15);
/// for `nu = 3/2`, `k = z / sqrt(chi2_3 / 3)` with `z` standard normal in 3-D, and
/// `E[G(x) G(x + h)] = (1 + sqrt(3) r) exp(-sqrt(3) r)`, `r = |A h|`.
#[derive(Debug, Clone)]
pub struct Grf {
    modes: Vec<Mode>,
    amp: f64,
}

impl Grf {
    /// Draw a field with `n` modes and the given ranges.
    pub fn new(rng: &mut ChaCha20Rng, n: usize, r: Ranges) -> Self {
        let lmaj = r.major / MATERN32_PRACTICAL_RANGE;
        let lmin = r.minor / MATERN32_PRACTICAL_RANGE;
        let lw = r.vertical / MATERN32_PRACTICAL_RANGE;
        let (sa, ca) = (
            libm::sin(r.angle.to_radians()),
            libm::cos(r.angle.to_radians()),
        );
        let modes = (0..n)
            .map(|_| {
                let z = [normal(rng), normal(rng), normal(rng)];
                // chi-square with 3 degrees of freedom: sum of three squared normals
                let c: f64 = (0..3).map(|_| normal(rng).powi(2)).sum();
                let s = (3.0 / c.max(1e-12)).sqrt();
                // wave numbers in the principal frame, per metre
                let k1 = z[0] * s / lmaj;
                let k2 = z[1] * s / lmin;
                let kw = z[2] * s / lw;
                // rotate back into (u, v): the major axis points along (ca, sa)
                let ku = k1 * ca - k2 * sa;
                let kv = k1 * sa + k2 * ca;
                let phase = uniform(rng, 0.0, 2.0 * PI);
                Mode { ku, kv, kw, phase }
            })
            .collect();
        Grf {
            modes,
            amp: (2.0 / n.max(1) as f64).sqrt(),
        }
    }

    /// Field value at map position (u, v) and stratigraphic vertical coordinate w (m).
    pub fn at(&self, u: f64, v: f64, w: f64) -> f64 {
        self.amp
            * self
                .modes
                .iter()
                .map(|m| libm::cos(m.ku * u + m.kv * v + m.kw * w + m.phase))
                .sum::<f64>()
    }

    /// The lateral parts of the mode phases at (u, v), for repeated evaluation
    /// down one trace with [`Grf::at_lateral`].
    pub fn lateral(&self, u: f64, v: f64) -> Vec<f64> {
        self.modes
            .iter()
            .map(|m| m.ku * u + m.kv * v + m.phase)
            .collect()
    }

    /// Field value from precomputed lateral phases (see [`Grf::lateral`]); the
    /// result equals [`Grf::at`] to rounding.
    pub fn at_lateral(&self, lateral: &[f64], w: f64) -> f64 {
        // a plain loop: this is the demo's innermost loop, also in debug builds
        let mut s = 0.0;
        for (m, p) in self.modes.iter().zip(lateral) {
            s += libm::cos(p + m.kw * w);
        }
        self.amp * s
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use rand::SeedableRng;

    #[test]
    fn practical_range_constant() {
        // Matern 3/2 correlation (Rasmussen and Williams 2006, eq. 4.17) is 0.05 there.
        let x = 3f64.sqrt() * MATERN32_PRACTICAL_RANGE;
        let c = (1.0 + x) * (-x).exp();
        assert!((c - 0.05).abs() < 1e-5, "{c}");
    }

    #[test]
    fn field_statistics_follow_the_matern_covariance() {
        // Ensemble check over many independent fields: variance 1, and the
        // correlation at one length scale along the major axis equals
        // (1 + sqrt 3) exp(-sqrt 3) = 0.4834 (Rasmussen and Williams 2006, eq. 4.17).
        let mut rng = ChaCha20Rng::seed_from_u64(7);
        let r = Ranges {
            major: 1000.0,
            minor: 400.0,
            angle: 20.0,
            vertical: 10.0,
        };
        let l = 1000.0 / MATERN32_PRACTICAL_RANGE;
        let (s, c) = 20f64.to_radians().sin_cos();
        let (mut s00, mut s01, mut n) = (0.0, 0.0, 0.0);
        for _ in 0..400 {
            let g = Grf::new(&mut rng, 64, r);
            for p in 0..5 {
                let (u, v) = (p as f64 * 3000.0, p as f64 * 1700.0);
                let a = g.at(u, v, 0.0);
                let b = g.at(u + l * c, v + l * s, 0.0);
                s00 += a * a;
                s01 += a * b;
                n += 1.0;
            }
        }
        let var = s00 / n;
        let corr = s01 / s00;
        assert!((var - 1.0).abs() < 0.08, "variance {var}");
        let expect = (1.0 + 3f64.sqrt()) * (-(3f64.sqrt())).exp();
        assert!((corr - expect).abs() < 0.08, "corr {corr} vs {expect}");
    }

    #[test]
    fn lateral_cache_equals_direct_evaluation() {
        let mut rng = ChaCha20Rng::seed_from_u64(3);
        let g = Grf::new(
            &mut rng,
            32,
            Ranges {
                major: 800.0,
                minor: 500.0,
                angle: 0.0,
                vertical: 5.0,
            },
        );
        let lat = g.lateral(123.0, 456.0);
        for w in [0.0, 1.5, 77.0] {
            assert!((g.at(123.0, 456.0, w) - g.at_lateral(&lat, w)).abs() < 1e-12);
        }
    }
}
