//! The kriging systems: simple, ordinary and external-drift kriging of one target.
//!
//! Notation (all kinds): `n` neighbours at `x_1..x_n` with values `z_i`, target
//! `x_0`, covariance `C(h)` of the model, `C_ij = C(x_i - x_j)`, `C_i0 = C(x_i - x_0)`,
//! `C(0)` the sill ([`CovarianceModel::sill`]; the diagonal `C_ii` is `C(0)` too).
//!
//! **Simple kriging (SK)** with a known mean `m` (constant, or a known trend
//! `m(x)`, kriging the residuals `z - m`): solve `sum_j w_j C_ij = C_i0`
//! (`i = 1..n`), estimate `z*(x_0) = m(x_0) + sum_i w_i (z_i - m(x_i))`,
//! variance `sigma^2_SK = C(0) - sum_i w_i C_i0`
//! (Goovaerts 1997, *Geostatistics for Natural Resources Evaluation*, sec. 5.2,
//! eqs. 5.10-5.13; Chiles and Delfiner 2012, *Geostatistics: Modeling Spatial
//! Uncertainty*, 2nd ed., sec. 3.3).
//!
//! **Ordinary kriging (OK)**: unknown constant mean, unbiasedness `sum w_i = 1`
//! with a Lagrange multiplier `mu`: `sum_j w_j C_ij + mu = C_i0`, `sum_j w_j = 1`;
//! estimate `sum_i w_i z_i`, variance `sigma^2_OK = C(0) - sum_i w_i C_i0 - mu`
//! (Isaaks and Srivastava 1989, *An Introduction to Applied Geostatistics*,
//! ch. 12, eqs. 12.12 and 12.14 in covariance form; Goovaerts 1997 sec. 5.3).
//!
//! **Kriging with an external drift (KED)**: the mean is `a_0 + a_1 f(x)` with a
//! known drift variable `f` and unknown `a_0, a_1`; unbiasedness for all
//! `a_0, a_1` gives `sum w_i = 1` and `sum w_i f(x_i) = f(x_0)`. With two
//! multipliers: `sum_j w_j C_ij + mu_0 + mu_1 f(x_i) = C_i0`, `sum_j w_j = 1`,
//! `sum_j w_j f(x_j) = f(x_0)`; variance
//! `sigma^2_KED = C(0) - sum_i w_i C_i0 - mu_0 - mu_1 f(x_0)`
//! (Wackernagel 2003, *Multivariate Geostatistics*, 3rd ed., ch. 37 "External
//! drift"; Chiles and Delfiner 2012 sec. 5.7.3; Goovaerts 1997 sec. 6.1.2).
//!
//! **How the systems are solved.** The covariance block `C` is symmetric positive
//! definite for distinct points and a valid (positive-definite) model, so it is
//! factored by Cholesky, `C = L L^T`, and the constraints are eliminated through
//! the Schur complement (Chiles and Delfiner 2012 sec. 3.4, "dual" form): with
//! `F` the `n x p` matrix of constraint columns (`p = 1`: the column of ones;
//! `p = 2`: ones and the drift), `a = C^-1 c_0`, `B = C^-1 F`, the multipliers
//! solve the small `p x p` system `(F^T B) mu = F^T a - f_0` and `w = a - B mu`.
//! In KED the drift enters as the offsets `g_i = f(x_i) - f(x_0)` (the
//! constraint `sum w_i g_i = 0` is equivalent given `sum w_i = 1`); this changes
//! `mu_0` into `mu_0 + mu_1 f(x_0)` and makes the variance
//! `C(0) - sum w_i C_i0 - mu_0` in that form.
//!
//! If Cholesky fails (a model that is not positive definite on these points,
//! or coincident points), the full bordered system is solved by LU with partial
//! pivoting and the residual is checked; if that fails too the system is
//! reported as singular, naming coincident points where there are some.
//!
//! **Ill-posed drift.** When the drift is (nearly) constant over the
//! neighbourhood, the two unbiasedness constraints are (nearly) the same and
//! the KED system is singular or meaningless. The test is the squared sine of
//! the angle between the columns `1` and `g` in the `C^-1` inner product,
//! `det(F^T C^-1 F) / ((1^T C^-1 1)(g^T C^-1 g)) < 1e-10` (scale-free in `g`):
//! such targets are kriged by ordinary kriging instead and flagged
//! ([`KrigingWeights::drift_fallback`]). Kriging with an external drift
//! then has no information to use the drift, which is the standard remedy
//! (Chiles and Delfiner 2012 sec. 5.7.3 note that KED needs the drift to vary
//! across the neighbourhood).

use crate::error::{Error, Result};
use crate::geostat::CovarianceModel;
use nalgebra::{DMatrix, DVector};

/// Threshold on the squared sine between the drift and constant columns below
/// which the external drift counts as constant over the neighbourhood.
pub const DRIFT_ILL_POSED: f64 = 1e-10;

/// Relative size (to the sill) of a negative kriging variance that is taken as
/// rounding and set to zero (a target on a datum).
const VARIANCE_ROUNDING: f64 = 1e-12;

/// The constraints of a kriging system.
#[derive(Debug, Clone, Copy)]
pub(crate) enum Constraints<'a> {
    /// Simple kriging: no constraint.
    None,
    /// Ordinary kriging: `sum w = 1`.
    Unbiased,
    /// Kriging with an external drift, given the offsets `g_i = f(x_i) - f(x_0)`.
    Drift(&'a [f64]),
}

/// What one solve gives besides the weights (which go to the caller's buffer).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Solved {
    /// Kriging variance.
    pub variance: f64,
    /// Lagrange multipliers `[mu_0, mu_1]` (offset form for KED); unused ones are 0.
    pub lagrange: [f64; 2],
    /// KED fell back to OK (drift constant over the neighbourhood).
    pub drift_fallback: bool,
    /// Cholesky failed and the bordered system was solved by LU.
    pub lu_fallback: bool,
}

/// Why a system could not be solved.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Singular {
    /// Two neighbours (indices into the point list) at the same position, if any.
    pub coincident: Option<(usize, usize)>,
}

/// Weights, multipliers and variance of one kriging system.
#[derive(Debug, Clone, PartialEq)]
pub struct KrigingWeights {
    /// The kriging weights, one per point, in the order given.
    pub weights: Vec<f64>,
    /// Lagrange multipliers: empty (SK), `[mu]` (OK) or `[mu_0, mu_1]` (KED, in
    /// the form `sum_j w_j C_ij + mu_0 + mu_1 f(x_i) = C_i0`).
    pub lagrange: Vec<f64>,
    /// The kriging (estimation) variance, in the squared unit of the property.
    pub variance: f64,
    /// True when KED was asked for but the drift is constant over the points,
    /// so ordinary kriging was used (see the module documentation).
    pub drift_fallback: bool,
}

impl KrigingWeights {
    /// `sum_i w_i v_i`: the estimate for OK and KED, or the residual part of SK.
    pub fn combine(&self, values: &[f64]) -> f64 {
        self.weights.iter().zip(values).map(|(w, v)| w * v).sum()
    }
}

/// Fill `mat` (n x n) with `C_ij` and `c0` with `C_i0`.
fn fill<M: CovarianceModel + ?Sized>(
    model: &M,
    pts: &[[f64; 3]],
    x0: [f64; 3],
    mat: &mut DMatrix<f64>,
    c0: &mut DVector<f64>,
) {
    let n = pts.len();
    let sill = model.sill();
    for j in 0..n {
        let pj = pts[j];
        mat[(j, j)] = sill;
        for i in (j + 1)..n {
            let pi = pts[i];
            let c = model.covariance([pi[0] - pj[0], pi[1] - pj[1], pi[2] - pj[2]]);
            mat[(i, j)] = c;
            mat[(j, i)] = c;
        }
        c0[j] = model.covariance([pj[0] - x0[0], pj[1] - x0[1], pj[2] - x0[2]]);
    }
}

fn dot(a: &DVector<f64>, b: &DVector<f64>) -> f64 {
    a.iter().zip(b.iter()).map(|(x, y)| x * y).sum()
}

fn sum(a: &DVector<f64>) -> f64 {
    a.iter().sum()
}

fn finish_variance(v: f64, sill: f64) -> f64 {
    if v < 0.0 && v >= -VARIANCE_ROUNDING * sill {
        0.0
    } else {
        v
    }
}

/// Solve one kriging system; the weights are written to `w` (resized to `n`).
///
/// See the module documentation for the equations and their sources.
pub(crate) fn solve<M: CovarianceModel + ?Sized>(
    model: &M,
    pts: &[[f64; 3]],
    x0: [f64; 3],
    constraints: Constraints<'_>,
    w: &mut Vec<f64>,
) -> std::result::Result<Solved, Singular> {
    let n = pts.len();
    let sill = model.sill();
    let mut mat = DMatrix::<f64>::zeros(n, n);
    let mut c0 = DVector::<f64>::zeros(n);
    fill(model, pts, x0, &mut mat, &mut c0);
    w.clear();
    let chol = match nalgebra::Cholesky::new(mat) {
        Some(c) => c,
        None => return solve_lu(model, pts, x0, constraints, w),
    };
    let a = chol.solve(&c0);
    let mut out = Solved {
        variance: 0.0,
        lagrange: [0.0; 2],
        drift_fallback: false,
        lu_fallback: false,
    };
    let ones = DVector::<f64>::from_element(n, 1.0);
    let ordinary = |out: &mut Solved, w: &mut Vec<f64>| {
        // OK: mu = (1^T a - 1) / (1^T b), b = C^-1 1, w = a - mu b.
        let b = chol.solve(&ones);
        let mu = (sum(&a) - 1.0) / sum(&b);
        w.extend(a.iter().zip(b.iter()).map(|(ai, bi)| ai - mu * bi));
        out.lagrange = [mu, 0.0];
    };
    match constraints {
        Constraints::None => {
            w.extend(a.iter().copied());
        }
        Constraints::Unbiased => ordinary(&mut out, w),
        Constraints::Drift(g) => {
            let gv = DVector::<f64>::from_iterator(n, g.iter().copied().take(n));
            let b1 = chol.solve(&ones);
            let b2 = chol.solve(&gv);
            // S = F^T C^-1 F with F = [1, g]; symmetric.
            let s00 = sum(&b1);
            let s01 = sum(&b2);
            let s11 = dot(&gv, &b2);
            let det = s00 * s11 - s01 * s01;
            let sin2 = det / (s00 * s11);
            if !(sin2.is_finite() && sin2 >= DRIFT_ILL_POSED) {
                out.drift_fallback = true;
                ordinary(&mut out, w);
            } else {
                // rhs = F^T a - (1, 0)
                let r0 = sum(&a) - 1.0;
                let r1 = dot(&gv, &a);
                let mu0 = (s11 * r0 - s01 * r1) / det;
                let mu1 = (s00 * r1 - s01 * r0) / det;
                w.extend(
                    a.iter()
                        .zip(b1.iter().zip(b2.iter()))
                        .map(|(ai, (p, q))| ai - mu0 * p - mu1 * q),
                );
                out.lagrange = [mu0, mu1];
            }
        }
    }
    let wc: f64 = w.iter().zip(c0.iter()).map(|(wi, ci)| wi * ci).sum();
    out.variance = finish_variance(sill - wc - out.lagrange[0], sill);
    Ok(out)
}

/// The bordered system solved by LU, for when Cholesky fails.
fn solve_lu<M: CovarianceModel + ?Sized>(
    model: &M,
    pts: &[[f64; 3]],
    x0: [f64; 3],
    constraints: Constraints<'_>,
    w: &mut Vec<f64>,
) -> std::result::Result<Solved, Singular> {
    let singular = || Singular {
        coincident: coincident_pair(pts),
    };
    match lu_once(model, pts, x0, constraints, w) {
        Some(s) => Ok(s),
        None => match constraints {
            Constraints::Drift(_) => {
                let mut s =
                    lu_once(model, pts, x0, Constraints::Unbiased, w).ok_or_else(singular)?;
                s.drift_fallback = true;
                Ok(s)
            }
            _ => Err(singular()),
        },
    }
}

fn lu_once<M: CovarianceModel + ?Sized>(
    model: &M,
    pts: &[[f64; 3]],
    x0: [f64; 3],
    constraints: Constraints<'_>,
    w: &mut Vec<f64>,
) -> Option<Solved> {
    let n = pts.len();
    let p = match constraints {
        Constraints::None => 0,
        Constraints::Unbiased => 1,
        Constraints::Drift(_) => 2,
    };
    let sill = model.sill();
    let mut cmat = DMatrix::<f64>::zeros(n, n);
    let mut c0 = DVector::<f64>::zeros(n);
    fill(model, pts, x0, &mut cmat, &mut c0);
    let m = n + p;
    let mut a = DMatrix::<f64>::zeros(m, m);
    a.view_mut((0, 0), (n, n)).copy_from(&cmat);
    let mut rhs = DVector::<f64>::zeros(m);
    rhs.rows_mut(0, n).copy_from(&c0);
    if p >= 1 {
        for i in 0..n {
            a[(i, n)] = 1.0;
            a[(n, i)] = 1.0;
        }
        rhs[n] = 1.0;
    }
    if let Constraints::Drift(g) = constraints {
        for i in 0..n {
            let gi = g.get(i).copied().unwrap_or(0.0);
            a[(i, n + 1)] = gi;
            a[(n + 1, i)] = gi;
        }
        rhs[n + 1] = 0.0;
    }
    let x = a.clone().lu().solve(&rhs)?;
    // Residual check: reject a numerically singular system.
    let res = &a * &x - &rhs;
    let scale = a.amax() * x.amax() + rhs.amax();
    if !(x.iter().all(|v| v.is_finite()) && res.amax() <= 1e-8 * scale) {
        return None;
    }
    w.clear();
    w.extend(x.rows(0, n).iter().copied());
    let mut lagrange = [0.0; 2];
    for (k, l) in lagrange.iter_mut().enumerate().take(p) {
        *l = x[n + k];
    }
    let wc: f64 = w.iter().zip(c0.iter()).map(|(wi, ci)| wi * ci).sum();
    Some(Solved {
        variance: finish_variance(sill - wc - lagrange[0], sill),
        lagrange,
        drift_fallback: false,
        lu_fallback: true,
    })
}

/// The first pair of points closer than 1e-9 m in every coordinate.
fn coincident_pair(pts: &[[f64; 3]]) -> Option<(usize, usize)> {
    for i in 0..pts.len() {
        for j in (i + 1)..pts.len() {
            if (0..3).all(|k| (pts[i][k] - pts[j][k]).abs() <= 1e-9) {
                return Some((i, j));
            }
        }
    }
    None
}

fn check_points(pts: &[[f64; 3]], target: [f64; 3]) -> Result<()> {
    if pts.is_empty() {
        return Err(Error::inconsistent(
            "kriging: no data points given (expected at least one)",
        ));
    }
    let bad = pts.iter().position(|p| !p.iter().all(|c| c.is_finite()));
    if let Some(i) = bad {
        return Err(Error::inconsistent(format!(
            "kriging: point {i} has a non-finite coordinate {:?}",
            pts[i]
        )));
    }
    if !target.iter().all(|c| c.is_finite()) {
        return Err(Error::inconsistent(format!(
            "kriging: target {target:?} has a non-finite coordinate"
        )));
    }
    Ok(())
}

fn singular_error(e: Singular, target: [f64; 3]) -> Error {
    match e.coincident {
        Some((i, j)) => Error::inconsistent(format!(
            "kriging: singular system at target {target:?}: points {i} and {j} coincide \
             (remove or merge duplicate data)"
        )),
        None => Error::inconsistent(format!(
            "kriging: singular system at target {target:?} (is the covariance model positive \
             definite?)"
        )),
    }
}

/// Simple-kriging weights of `points` for `target` (equations in the module doc).
///
/// The estimate is `m(x_0) + sum_i w_i (z_i - m(x_i))`; `variance` is
/// `C(0) - sum_i w_i C_i0`.
pub fn simple_kriging_weights<M: CovarianceModel + ?Sized>(
    model: &M,
    points: &[[f64; 3]],
    target: [f64; 3],
) -> Result<KrigingWeights> {
    check_points(points, target)?;
    let mut w = Vec::new();
    let s = solve(model, points, target, Constraints::None, &mut w)
        .map_err(|e| singular_error(e, target))?;
    Ok(KrigingWeights {
        weights: w,
        lagrange: Vec::new(),
        variance: s.variance,
        drift_fallback: false,
    })
}

/// Ordinary-kriging weights of `points` for `target` (equations in the module doc).
///
/// The estimate is `sum_i w_i z_i`; `variance` is `C(0) - sum_i w_i C_i0 - mu`.
pub fn ordinary_kriging_weights<M: CovarianceModel + ?Sized>(
    model: &M,
    points: &[[f64; 3]],
    target: [f64; 3],
) -> Result<KrigingWeights> {
    check_points(points, target)?;
    let mut w = Vec::new();
    let s = solve(model, points, target, Constraints::Unbiased, &mut w)
        .map_err(|e| singular_error(e, target))?;
    Ok(KrigingWeights {
        weights: w,
        lagrange: vec![s.lagrange[0]],
        variance: s.variance,
        drift_fallback: false,
    })
}

/// External-drift kriging weights of `points` (drift values `drift`) for `target`
/// (drift `target_drift`); equations in the module doc.
///
/// The estimate is `sum_i w_i z_i`; `variance` is
/// `C(0) - sum_i w_i C_i0 - mu_0 - mu_1 f(x_0)`. If the drift is constant over
/// the points, ordinary kriging is used and `drift_fallback` is set.
pub fn external_drift_kriging_weights<M: CovarianceModel + ?Sized>(
    model: &M,
    points: &[[f64; 3]],
    drift: &[f64],
    target: [f64; 3],
    target_drift: f64,
) -> Result<KrigingWeights> {
    check_points(points, target)?;
    if drift.len() != points.len() {
        return Err(Error::inconsistent(format!(
            "kriging with external drift: {} drift values for {} points (expected one per point)",
            drift.len(),
            points.len()
        )));
    }
    if !(target_drift.is_finite() && drift.iter().all(|f| f.is_finite())) {
        return Err(Error::inconsistent(
            "kriging with external drift: drift values must be finite",
        ));
    }
    let g: Vec<f64> = drift.iter().map(|f| f - target_drift).collect();
    let mut w = Vec::new();
    let s = solve(model, points, target, Constraints::Drift(&g), &mut w)
        .map_err(|e| singular_error(e, target))?;
    let lagrange = if s.drift_fallback {
        vec![s.lagrange[0]]
    } else {
        // Offset form -> f form: mu_0' = mu_0 - mu_1 f(x_0), mu_1' = mu_1.
        vec![s.lagrange[0] - s.lagrange[1] * target_drift, s.lagrange[1]]
    };
    Ok(KrigingWeights {
        weights: w,
        lagrange,
        variance: s.variance,
        drift_fallback: s.drift_fallback,
    })
}
