//! Intrinsic (rock-fabric) anisotropy per facies, added to the layer-induced part.
//!
//! The Backus average ([`super::backus`]) gives the anisotropy induced by fine
//! layering of isotropic rocks. Shales are anisotropic on their own (aligned
//! clay platelets). This module adds, per facies, an intrinsic epsilon and
//! delta that is either a constant or a linear function of a named log
//! (`a + b * log`, e.g. of a clay-volume curve).
//!
//! **Why addition.** Thomsen (1986, Weak elastic anisotropy, Geophysics 51(10),
//! 1954-1966) shows that for weak anisotropy the phase velocities depend linearly
//! on epsilon and delta, and that the parameters are linear in the stiffness
//! departures from isotropy (C11 = C33 (1 + 2 epsilon), and delta linear in C13
//! to first order). Two small, independent departures from isotropy therefore add
//! to first order; the error is of second order, products of the intrinsic
//! parameters with the layer-induced ones (or with the layer contrasts). The
//! exact answer would Backus-average transversely isotropic layers (Backus 1962
//! covers that case); tests/rockphysics_intrinsic.rs checks against it that the
//! error is second order (measured: about 0.5 x (largest parameter)^2, e.g.
//! 1.3e-3 when layer-induced and intrinsic parameters are up to 0.056). The intrinsic part is taken at the sample itself, not
//! averaged over the Backus window.

use crate::error::{Error, Result};

/// The intrinsic value of one Thomsen parameter for one facies.
#[derive(Debug, Clone, PartialEq)]
pub enum IntrinsicTerm {
    /// The same value everywhere in the facies (dimensionless).
    Constant(f64),
    /// `a + b * log`, with `log` the name of a curve (matched ignoring ASCII
    /// case, as LAS mnemonics are).
    Linear {
        /// Curve name.
        log: String,
        /// Intercept (dimensionless).
        a: f64,
        /// Slope, per unit of the curve.
        b: f64,
    },
}

/// Intrinsic epsilon and delta of one facies.
#[derive(Debug, Clone, PartialEq)]
pub struct FaciesIntrinsic {
    /// Facies code (as in the facies log and the manifest).
    pub facies: i32,
    /// Intrinsic epsilon.
    pub epsilon: IntrinsicTerm,
    /// Intrinsic delta.
    pub delta: IntrinsicTerm,
}

/// A log curve by name, one value per sample (None = missing).
#[derive(Debug, Clone, Copy)]
pub struct NamedLog<'a> {
    /// Curve name.
    pub name: &'a str,
    /// Values, one per sample.
    pub values: &'a [Option<f64>],
}

/// Intrinsic epsilon and delta per sample.
#[derive(Debug, Clone, PartialEq)]
pub struct Intrinsic {
    /// Intrinsic epsilon per sample.
    pub epsilon: Vec<Option<f64>>,
    /// Intrinsic delta per sample.
    pub delta: Vec<Option<f64>>,
}

/// Intrinsic epsilon and delta per sample of a well, from the facies log and the
/// rules per facies.
///
/// Per sample: facies missing -> None (unknown); a facies without a rule -> 0
/// (that facies has no intrinsic anisotropy); [`IntrinsicTerm::Constant`] -> its
/// value; [`IntrinsicTerm::Linear`] -> `a + b * log[k]`, None where the curve is
/// missing.
///
/// Errors (`Error::Inconsistent`, naming the well) when two rules have the same
/// facies, a coefficient is not finite, a named curve is not in `logs`, or a
/// curve's length differs from the facies log's.
pub fn intrinsic_anisotropy(
    well: &str,
    facies: &[Option<i32>],
    rules: &[FaciesIntrinsic],
    logs: &[NamedLog<'_>],
) -> Result<Intrinsic> {
    let n = facies.len();
    for (i, r) in rules.iter().enumerate() {
        if rules[..i].iter().any(|o| o.facies == r.facies) {
            return Err(Error::inconsistent(format!(
                "well {well}: intrinsic anisotropy: facies {} has more than one rule",
                r.facies
            )));
        }
    }
    // Resolve every term to a closure-free form: (a, b, Option<curve values>).
    let resolve = |t: &IntrinsicTerm, what: &str, code: i32| -> Result<Resolved<'_>> {
        match t {
            IntrinsicTerm::Constant(c) => {
                if !c.is_finite() {
                    return Err(Error::inconsistent(format!(
                        "well {well}: intrinsic {what} of facies {code} must be finite, got {c}"
                    )));
                }
                Ok(Resolved::Constant(*c))
            }
            IntrinsicTerm::Linear { log, a, b } => {
                if !(a.is_finite() && b.is_finite()) {
                    return Err(Error::inconsistent(format!(
                        "well {well}: intrinsic {what} of facies {code}: coefficients \
                         must be finite, got a = {a}, b = {b}"
                    )));
                }
                let Some(curve) = logs.iter().find(|l| l.name.eq_ignore_ascii_case(log)) else {
                    let names: Vec<&str> = logs.iter().map(|l| l.name).collect();
                    return Err(Error::inconsistent(format!(
                        "well {well}: intrinsic {what} of facies {code} uses curve \
                         '{log}', which the well does not have (it has: {})",
                        names.join(", ")
                    )));
                };
                if curve.values.len() != n {
                    return Err(Error::inconsistent(format!(
                        "well {well}: curve '{}' has {} samples, the facies log {n}",
                        curve.name,
                        curve.values.len()
                    )));
                }
                Ok(Resolved::Linear {
                    a: *a,
                    b: *b,
                    values: curve.values,
                })
            }
        }
    };
    let mut resolved = Vec::with_capacity(rules.len());
    for r in rules {
        resolved.push((
            r.facies,
            resolve(&r.epsilon, "epsilon", r.facies)?,
            resolve(&r.delta, "delta", r.facies)?,
        ));
    }
    let mut epsilon = Vec::with_capacity(n);
    let mut delta = Vec::with_capacity(n);
    for (k, f) in facies.iter().enumerate() {
        let Some(code) = f else {
            epsilon.push(None);
            delta.push(None);
            continue;
        };
        match resolved.iter().find(|(c, _, _)| c == code) {
            None => {
                epsilon.push(Some(0.0));
                delta.push(Some(0.0));
            }
            Some((_, e, d)) => {
                epsilon.push(e.at(k));
                delta.push(d.at(k));
            }
        }
    }
    Ok(Intrinsic { epsilon, delta })
}

enum Resolved<'a> {
    Constant(f64),
    Linear {
        a: f64,
        b: f64,
        values: &'a [Option<f64>],
    },
}

impl Resolved<'_> {
    fn at(&self, k: usize) -> Option<f64> {
        match self {
            Resolved::Constant(c) => Some(*c),
            Resolved::Linear { a, b, values } => {
                values.get(k).copied().flatten().map(|v| a + b * v)
            }
        }
    }
}

/// Layer-induced plus intrinsic, per sample: `layer[k] + intrinsic[k]`, None
/// where either is None. First-order addition of small Thomsen parameters
/// (Thomsen 1986, weak anisotropy; see the module documentation).
///
/// Errors when the two slices differ in length.
pub fn add_intrinsic(
    well: &str,
    layer: &[Option<f64>],
    intrinsic: &[Option<f64>],
) -> Result<Vec<Option<f64>>> {
    if layer.len() != intrinsic.len() {
        return Err(Error::inconsistent(format!(
            "well {well}: layer-induced ({} samples) and intrinsic ({} samples) \
             anisotropy differ in length",
            layer.len(),
            intrinsic.len()
        )));
    }
    Ok(layer
        .iter()
        .zip(intrinsic)
        .map(|(l, i)| match (l, i) {
            (Some(l), Some(i)) => Some(l + i),
            _ => None,
        })
        .collect())
}
