//! Thomsen (1986) parameters of VTI media and their relation to stiffnesses.
//!
//! A transversely isotropic medium with a vertical symmetry axis (VTI) has five
//! independent stiffnesses C11, C13, C33, C44, C66 (Voigt notation, Pa). Thomsen
//! (1986) replaced them by the vertical velocities Vp0, Vs0 and three
//! dimensionless anisotropy parameters epsilon, delta, gamma, which stay small in
//! most rocks ("weak anisotropy").
//!
//! Source: Thomsen, L., 1986, Weak elastic anisotropy. Geophysics 51(10),
//! 1954-1966 (the definitions of section "Weak anisotropy"; the citation details
//! are from memory, the formulas are the standard ones restated in e.g. Mavko,
//! Mukerji and Dvorkin, The Rock Physics Handbook, section on Thomsen parameters).

use super::backus::VtiStiffness;
use crate::error::{Error, Result};

/// Thomsen's parameters of a VTI medium.
///
/// Velocities in m/s; `epsilon`, `delta`, `gamma` dimensionless.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Thomsen {
    /// Vertical P velocity, sqrt(C33 / rho), m/s.
    pub vp0: f64,
    /// Vertical S velocity, sqrt(C44 / rho), m/s.
    pub vs0: f64,
    /// epsilon = (C11 - C33) / (2 C33).
    pub epsilon: f64,
    /// delta = ((C13 + C44)^2 - (C33 - C44)^2) / (2 C33 (C33 - C44)).
    pub delta: f64,
    /// gamma = (C66 - C44) / (2 C44).
    pub gamma: f64,
}

/// Thomsen's parameters of the VTI medium with stiffnesses `c`.
///
/// Thomsen (1986, Geophysics 51(10)):
///
/// ```text
/// vp0     = sqrt(C33 / rho)
/// vs0     = sqrt(C44 / rho)
/// epsilon = (C11 - C33) / (2 C33)
/// gamma   = (C66 - C44) / (2 C44)
/// delta   = ((C13 + C44)^2 - (C33 - C44)^2) / (2 C33 (C33 - C44))
/// ```
///
/// The formulas need `rho > 0` and `C33 > C44 >= 0`, which every output of
/// [`super::backus::backus_average`] and [`stiffness_from_thomsen`] satisfies
/// (each layer has P modulus > shear modulus, and both harmonic means keep that
/// order). Otherwise the results are whatever IEEE arithmetic gives (inf / NaN);
/// this function never panics.
///
/// Fluid limit: when C44 = 0 (a fluid layer in a Backus average decouples shear,
/// see [`super::backus::backus_average`]) vs0 = 0 and gamma is +infinity if
/// C66 > 0; gamma is 0 when C66 = C44 (including C66 = C44 = 0), the value the
/// definition gives for an SH-isotropic medium. epsilon and delta stay finite.
pub fn thomsen_from_stiffness(c: &VtiStiffness) -> Thomsen {
    let vp0 = (c.c33 / c.rho).sqrt();
    let vs0 = (c.c44 / c.rho).sqrt();
    let epsilon = (c.c11 - c.c33) / (2.0 * c.c33);
    let gamma = if c.c66 == c.c44 {
        0.0
    } else if c.c44 == 0.0 {
        f64::INFINITY
    } else {
        (c.c66 - c.c44) / (2.0 * c.c44)
    };
    let d = c.c33 - c.c44;
    let s = c.c13 + c.c44;
    // (s^2 - d^2) written as (s - d)(s + d): exact zero when s == d and less
    // cancellation for nearly elliptical media.
    let delta = (s - d) * (s + d) / (2.0 * c.c33 * d);
    Thomsen {
        vp0,
        vs0,
        epsilon,
        delta,
        gamma,
    }
}

/// The VTI stiffnesses (Pa) with Thomsen parameters `t` and density `rho` (kg/m3).
///
/// Inverse of [`thomsen_from_stiffness`] (Thomsen 1986, Geophysics 51(10),
/// definitions solved for the stiffnesses):
///
/// ```text
/// C33 = rho vp0^2            C44 = rho vs0^2
/// C11 = C33 (1 + 2 epsilon)  C66 = C44 (1 + 2 gamma)
/// C13 = sqrt(2 delta C33 (C33 - C44) + (C33 - C44)^2) - C44
/// ```
///
/// The delta definition fixes only (C13 + C44)^2; we take the positive root,
/// C13 + C44 > 0. This is common practice (the negative root describes anomalous
/// media and is not produced by layering of isotropic rocks, where
/// C13 + C44 = <lambda/(lambda+2mu)> C33 + C44 > 0 for lambda >= 0).
///
/// Errors (`Error::Inconsistent`) when an input is not finite, when `rho <= 0`,
/// `vp0 <= 0`, `vs0 < 0` or `vs0 >= vp0`, when `epsilon` or `gamma` make C11 or
/// C66 negative, or when `delta < -(C33 - C44) / (2 C33)` (no real C13).
pub fn stiffness_from_thomsen(t: &Thomsen, rho: f64) -> Result<VtiStiffness> {
    let all = [t.vp0, t.vs0, t.epsilon, t.delta, t.gamma, rho];
    if all.iter().any(|v| !v.is_finite()) {
        return Err(Error::inconsistent(format!(
            "stiffness from Thomsen parameters: every value must be finite, got \
             vp0 {}, vs0 {}, epsilon {}, delta {}, gamma {}, rho {}",
            t.vp0, t.vs0, t.epsilon, t.delta, t.gamma, rho
        )));
    }
    if rho <= 0.0 || t.vp0 <= 0.0 || t.vs0 < 0.0 || t.vs0 >= t.vp0 {
        return Err(Error::inconsistent(format!(
            "stiffness from Thomsen parameters: expected rho > 0 kg/m3 and \
             0 <= vs0 < vp0 (m/s), got rho {rho}, vp0 {}, vs0 {}",
            t.vp0, t.vs0
        )));
    }
    if t.epsilon < -0.5 || t.gamma < -0.5 {
        return Err(Error::inconsistent(format!(
            "stiffness from Thomsen parameters: epsilon {} and gamma {} must be \
             >= -0.5 (else C11 or C66 < 0)",
            t.epsilon, t.gamma
        )));
    }
    let c33 = rho * t.vp0 * t.vp0;
    let c44 = rho * t.vs0 * t.vs0;
    let d = c33 - c44;
    let radicand = d * (2.0 * t.delta * c33 + d);
    if radicand < 0.0 {
        return Err(Error::inconsistent(format!(
            "stiffness from Thomsen parameters: delta {} is below the smallest \
             value -(C33 - C44)/(2 C33) = {} for vp0 {} m/s, vs0 {} m/s; no real C13",
            t.delta,
            -d / (2.0 * c33),
            t.vp0,
            t.vs0
        )));
    }
    Ok(VtiStiffness {
        c11: c33 * (1.0 + 2.0 * t.epsilon),
        c13: radicand.sqrt() - c44,
        c33,
        c44,
        c66: c44 * (1.0 + 2.0 * t.gamma),
        rho,
    })
}
