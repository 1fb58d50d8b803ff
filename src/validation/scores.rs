//! Scores and weighted statistics for validating priors against observations.
//!
//! A prior at a held-out location is a predictive distribution: an ensemble
//! (a sample bank, possibly with declustering weights) or a normal distribution
//! with the kriging mean and standard deviation. This module scores such a
//! distribution against an observation:
//!
//! * [`crps_ensemble`], [`crps_ensemble_fair`], [`crps_normal`]: the continuous
//!   ranked probability score (Gneiting and Raftery 2007), lower is better, in the
//!   unit of the property;
//! * [`wasserstein_1d`]: the Wasserstein-1 distance between two (weighted)
//!   samples, e.g. the prior bank against a held-out well's samples;
//! * [`coverage`]: how often observations fall inside the central intervals;
//! * [`weighted_mean`], [`weighted_variance`], [`weighted_quantile`],
//!   [`weighted_quantiles`], [`central_interval`]: the weighted statistics these
//!   rest on.
//!
//! Weights, wherever accepted, must be finite and non-negative with a positive
//! finite sum; they need not sum to 1 (they are normalised). `None` means equal
//! weights. Values and observations must be finite. Bad input gives an
//! [`Error`] whose message names the function and the offending entry.

use crate::error::{Error, Result};
use serde::Serialize;

/// `1 / sqrt(pi)`.
const FRAC_1_SQRT_PI: f64 = 0.564_189_583_547_756_3;
/// `1 / sqrt(2 pi)`.
const FRAC_1_SQRT_2PI: f64 = 0.398_942_280_401_432_7;

fn bad(msg: String) -> Error {
    Error::inconsistent(msg)
}

/// Checks one sample and its optional weights; returns the weight total
/// (the count when unweighted).
fn check_sample(ctx: &str, x: &[f64], w: Option<&[f64]>) -> Result<f64> {
    if x.is_empty() {
        return Err(bad(format!("{ctx}: no values; expected at least one")));
    }
    if let Some(i) = x.iter().position(|v| !v.is_finite()) {
        return Err(bad(format!(
            "{ctx}: value {i} is {}; expected finite values",
            x[i]
        )));
    }
    let Some(w) = w else {
        return Ok(x.len() as f64);
    };
    if w.len() != x.len() {
        return Err(bad(format!(
            "{ctx}: {} weights for {} values; expected one weight per value",
            w.len(),
            x.len()
        )));
    }
    if let Some(i) = w.iter().position(|v| !(v.is_finite() && *v >= 0.0)) {
        return Err(bad(format!(
            "{ctx}: weight {i} is {}; expected finite non-negative weights",
            w[i]
        )));
    }
    let total: f64 = w.iter().sum();
    if !(total > 0.0 && total.is_finite()) {
        return Err(bad(format!(
            "{ctx}: the weights sum to {total}; expected a positive finite sum"
        )));
    }
    Ok(total)
}

/// A finite result, or an error saying the inputs overflowed.
fn finite_result(ctx: &str, v: f64) -> Result<f64> {
    if v.is_finite() {
        Ok(v)
    } else {
        Err(bad(format!(
            "{ctx}: the result overflowed ({v}); values too large for f64 arithmetic"
        )))
    }
}

fn check_finite(ctx: &str, what: &str, v: f64) -> Result<()> {
    if v.is_finite() {
        Ok(())
    } else {
        Err(bad(format!(
            "{ctx}: {what} is {v}; expected a finite number"
        )))
    }
}

/// Values sorted ascending with their weights (1 when unweighted). Values must
/// have been checked finite.
fn sorted_pairs(x: &[f64], w: Option<&[f64]>) -> (Vec<f64>, Vec<f64>) {
    let mut pairs: Vec<(f64, f64)> = match w {
        Some(w) => x.iter().copied().zip(w.iter().copied()).collect(),
        None => x.iter().map(|&v| (v, 1.0)).collect(),
    };
    pairs.sort_by(|a, b| a.0.total_cmp(&b.0));
    pairs.into_iter().unzip()
}

/// Linear interpolation the way numpy's `_lerp` does it (from the nearer end).
fn lerp(a: f64, b: f64, g: f64) -> f64 {
    let d = b - a;
    if g >= 0.5 {
        b - d * (1.0 - g)
    } else {
        a + d * g
    }
}

/// Wasserstein-1 distance between two one-dimensional weighted samples:
///
/// ```text
/// W1(u, v) = integral over t of | F_u(t) - F_v(t) | dt
/// ```
///
/// with `F_u(t) = sum_{u_i <= t} a_i / sum_i a_i` the weighted empirical CDF
/// (weights `a = u_w`, equal when `None`), likewise `F_v`. This is the optimal
/// transport cost `inf E|X - Y|` over couplings of the two distributions
/// (Villani 2009, Optimal Transport, Springer, remark 2.19 / the 1-D case), and
/// the definition of `scipy.stats.wasserstein_distance`. Computed exactly by
/// merging the sorted samples, O((n + m) log(n + m)). Result in the unit of the
/// values.
///
/// Errors: an empty sample, a non-finite value, a weight count that differs
/// from the value count, a negative or non-finite weight, or weights that do not
/// sum to a positive finite number.
pub fn wasserstein_1d(
    u: &[f64],
    v: &[f64],
    u_w: Option<&[f64]>,
    v_w: Option<&[f64]>,
) -> Result<f64> {
    check_sample("wasserstein_1d: u", u, u_w)?;
    check_sample("wasserstein_1d: v", v, v_w)?;
    let (us, uw) = sorted_pairs(u, u_w);
    let (vs, vw) = sorted_pairs(v, v_w);
    let cum = |w: &[f64]| {
        let mut c = Vec::with_capacity(w.len() + 1);
        let mut s = 0.0;
        c.push(0.0);
        for x in w {
            s += x;
            c.push(s);
        }
        c
    };
    let (cu, cv) = (cum(&uw), cum(&vw));
    let (tu, tv) = (cu[us.len()], cv[vs.len()]);
    let mut all: Vec<f64> = us.iter().chain(vs.iter()).copied().collect();
    all.sort_by(f64::total_cmp);
    let (mut iu, mut iv) = (0usize, 0usize);
    let mut sum = 0.0;
    for pair in all.windows(2) {
        let t = pair[0];
        while iu < us.len() && us[iu] <= t {
            iu += 1;
        }
        while iv < vs.len() && vs[iv] <= t {
            iv += 1;
        }
        let fu = cu[iu] / tu;
        let fv = cv[iv] / tv;
        sum += (fu - fv).abs() * (pair[1] - pair[0]);
    }
    finite_result("wasserstein_1d", sum)
}

/// The two expectations of the energy form of the CRPS for a weighted ensemble,
/// `(E|X - y|, sum_{i,j} a_i a_j |x_i - x_j|, sum a, sum a^2)`.
fn crps_parts(ctx: &str, x: &[f64], w: Option<&[f64]>, y: f64) -> Result<(f64, f64, f64, f64)> {
    let total = check_sample(ctx, x, w)?;
    check_finite(ctx, "the observation", y)?;
    let (xs, ws) = sorted_pairs(x, w);
    let abs_err = xs
        .iter()
        .zip(&ws)
        .map(|(x, w)| w * (x - y).abs())
        .sum::<f64>()
        / total;
    // sum_{i,j} a_i a_j |x_i - x_j| = 2 sum_k (x_{k+1} - x_k) S_k R_k over the sorted
    // ensemble, S_k the weight up to and including k, R_k the weight above k:
    // every gap is crossed by the pairs with one member below and one above it.
    let n = xs.len();
    let mut above = vec![0.0; n];
    let mut r = 0.0;
    for k in (0..n).rev() {
        above[k] = r;
        r += ws[k];
    }
    let mut s = 0.0;
    let mut pairs = 0.0;
    for k in 0..n.saturating_sub(1) {
        s += ws[k];
        pairs += (xs[k + 1] - xs[k]) * s * above[k];
    }
    let sq: f64 = ws.iter().map(|w| w * w).sum();
    Ok((abs_err, 2.0 * pairs, total, sq))
}

/// Continuous ranked probability score of a (weighted) ensemble forecast
/// `x` (weights `w`, equal when `None`) for the observation `y`, in the energy
/// form (Gneiting and Raftery 2007, JASA 102(477), 359-378, eq. 21):
///
/// ```text
/// CRPS = E|X - y| - 0.5 E|X - X'|
///      = sum_i a_i |x_i - y| - 0.5 sum_i sum_j a_i a_j |x_i - x_j|,   a = w / sum w
/// ```
///
/// equal to `integral (F(t) - 1{t >= y})^2 dt` for the ensemble's weighted
/// empirical CDF `F`. The double sum is taken over the sorted ensemble as
/// `2 sum_k (x_(k+1) - x_(k)) S_k (1 - S_k)` (`S_k` the weight of the `k`
/// smallest members), O(m log m). Lower is better; the unit is that of `x`.
/// A one-member ensemble scores the absolute error `|x - y|`.
pub fn crps_ensemble(x: &[f64], w: Option<&[f64]>, y: f64) -> Result<f64> {
    let (abs_err, pairs, total, _) = crps_parts("crps_ensemble", x, w, y)?;
    finite_result("crps_ensemble", abs_err - 0.5 * pairs / (total * total))
}

/// The "fair" ensemble CRPS (Ferro 2014, Q. J. R. Meteorol. Soc. 140, 1917-1923;
/// Zamo and Naveau 2018, Math. Geosci. 50, 209-234, the unbiased estimator
/// CRPS_U): the score the ensemble's parent distribution would get, as if the
/// ensemble were infinitely large:
///
/// ```text
/// fair CRPS = (1/m) sum_i |x_i - y| - 1 / (2 m (m - 1)) sum_{i != j} |x_i - x_j|
/// ```
///
/// With weights `w` (ours; it reduces to the above for equal weights) the pair
/// term is normalised over distinct pairs, `sum_{i != j} w_i w_j |x_i - x_j| /
/// ((sum w)^2 - sum w^2)`. Needs at least two members of positive weight.
pub fn crps_ensemble_fair(x: &[f64], w: Option<&[f64]>, y: f64) -> Result<f64> {
    let (abs_err, pairs, total, sq) = crps_parts("crps_ensemble_fair", x, w, y)?;
    let positive = match w {
        Some(w) => w.iter().filter(|&&v| v > 0.0).count(),
        None => x.len(),
    };
    let denom = total * total - sq;
    if positive < 2 || denom <= 0.0 {
        return Err(bad(format!(
            "crps_ensemble_fair: {positive} member(s) of positive weight; expected at least two"
        )));
    }
    finite_result("crps_ensemble_fair", abs_err - 0.5 * pairs / denom)
}

/// Standard normal CDF `Phi(z) = erfc(-z / sqrt 2) / 2` (libm's `erfc`, accurate
/// in both tails).
pub fn normal_cdf(z: f64) -> f64 {
    0.5 * libm::erfc(-z / std::f64::consts::SQRT_2)
}

/// Standard normal density `phi(z) = exp(-z^2 / 2) / sqrt(2 pi)`.
pub fn normal_pdf(z: f64) -> f64 {
    FRAC_1_SQRT_2PI * libm::exp(-0.5 * z * z)
}

/// CRPS of a normal forecast `N(mean, std^2)` for the observation `y`, closed
/// form (Gneiting, Raftery, Westveld and Goldman 2005, Mon. Weather Rev. 133,
/// 1098-1118, eq. 5; Gneiting and Raftery 2007, JASA 102(477), 359-378, eq. 22):
///
/// ```text
/// CRPS = s * ( z (2 Phi(z) - 1) + 2 phi(z) - 1 / sqrt(pi) ),   z = (y - mean) / s
/// ```
///
/// with `2 Phi(z) - 1` computed as `erf(z / sqrt 2)`. Unit of `mean`; `std > 0`.
pub fn crps_normal(mean: f64, std: f64, y: f64) -> Result<f64> {
    check_finite("crps_normal", "the mean", mean)?;
    check_finite("crps_normal", "the observation", y)?;
    if !(std.is_finite() && std > 0.0) {
        return Err(bad(format!(
            "crps_normal: the standard deviation is {std}; expected a positive finite number"
        )));
    }
    let z = (y - mean) / std;
    let two_phi_minus_1 = libm::erf(z / std::f64::consts::SQRT_2);
    finite_result(
        "crps_normal",
        std * (z * two_phi_minus_1 + 2.0 * normal_pdf(z) - FRAC_1_SQRT_PI),
    )
}

/// Weighted mean `sum w_i x_i / sum w_i` (plain mean when `w` is `None`).
pub fn weighted_mean(x: &[f64], w: Option<&[f64]>) -> Result<f64> {
    let total = check_sample("weighted_mean", x, w)?;
    let m = match w {
        Some(w) => x.iter().zip(w).map(|(x, w)| w * x).sum::<f64>() / total,
        None => x.iter().sum::<f64>() / total,
    };
    finite_result("weighted_mean", m)
}

/// Which variance [`weighted_variance`] returns.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum VarianceKind {
    /// `sum w_i (x_i - m)^2 / V1`, `V1 = sum w_i` (the variance of the weighted
    /// empirical distribution; numpy `average((x - m)**2, weights=w)`).
    Population,
    /// Unbiased with reliability weights, `sum w_i (x_i - m)^2 / (V1 - V2 / V1)`,
    /// `V2 = sum w_i^2`; equal weights give the `n - 1` sample variance
    /// (common practice; numpy `cov(x, aweights=w, ddof=1)`). Needs two values of
    /// positive weight.
    Unbiased,
}

/// Weighted variance around the weighted mean `m` (see [`VarianceKind`]), in
/// the unit of `x` squared.
pub fn weighted_variance(x: &[f64], w: Option<&[f64]>, kind: VarianceKind) -> Result<f64> {
    let total = check_sample("weighted_variance", x, w)?;
    let m = weighted_mean(x, w)?;
    let (ss, sq) = match w {
        Some(w) => (
            x.iter()
                .zip(w)
                .map(|(x, w)| w * (x - m) * (x - m))
                .sum::<f64>(),
            w.iter().map(|w| w * w).sum::<f64>(),
        ),
        None => (x.iter().map(|x| (x - m) * (x - m)).sum::<f64>(), total),
    };
    match kind {
        VarianceKind::Population => finite_result("weighted_variance", ss / total),
        VarianceKind::Unbiased => {
            let denom = total - sq / total;
            let positive = w.map_or(x.len(), |w| w.iter().filter(|&&v| v > 0.0).count());
            if positive < 2 || denom <= 0.0 {
                return Err(bad(format!(
                    "weighted_variance: {positive} value(s) of positive weight; the unbiased \
                     variance needs at least two"
                )));
            }
            finite_result("weighted_variance", ss / denom)
        }
    }
}

/// How [`weighted_quantile`] turns a sample into a quantile function.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum QuantileMethod {
    /// Piecewise linear between order statistics. Unweighted: Hyndman and Fan
    /// (1996, Am. Stat. 50(4), 361-365) type 7, `Q(p) = x_(j) + g (x_(j+1) -
    /// x_(j))`, `h = (n - 1) p`, `j = floor(h)` (0-based), `g = h - j` (numpy's
    /// default `linear`). Weighted (our generalisation, equal to type 7 for
    /// equal weights): zero-weight values are dropped, the sorted values with
    /// weights `a_k` and cumulative weights `S_k` sit at plotting positions
    /// `p_k = (C_k - C_1) / (C_n - C_1)`, `C_k = S_k - a_k / 2` (the middle of
    /// each value's share of the weight, rescaled so the minimum is at 0 and the
    /// maximum at 1), and `Q` interpolates linearly between them.
    Linear,
    /// Inverse of the weighted empirical CDF (Hyndman and Fan type 1): the
    /// smallest `x_(k)` whose cumulative weight fraction `S_k / S_n` is `>= p`
    /// (values of zero weight skipped); numpy `quantile(..., weights=w,
    /// method="inverted_cdf")`.
    InvertedCdf,
}

/// Quantile of probability `p` in [0, 1] of the (weighted) sample `x`; see
/// [`QuantileMethod`]. Unit of `x`.
pub fn weighted_quantile(
    x: &[f64],
    w: Option<&[f64]>,
    p: f64,
    method: QuantileMethod,
) -> Result<f64> {
    let q = weighted_quantiles(x, w, &[p], method)?;
    q.first()
        .copied()
        .ok_or_else(|| bad("weighted_quantile: no result".to_string()))
}

/// Quantiles of several probabilities `ps` (each in [0, 1]) of the (weighted)
/// sample `x`, sorting it once; see [`QuantileMethod`].
pub fn weighted_quantiles(
    x: &[f64],
    w: Option<&[f64]>,
    ps: &[f64],
    method: QuantileMethod,
) -> Result<Vec<f64>> {
    quantiles_ctx("weighted_quantiles", x, w, ps, method)
}

fn quantiles_ctx(
    ctx: &str,
    x: &[f64],
    w: Option<&[f64]>,
    ps: &[f64],
    method: QuantileMethod,
) -> Result<Vec<f64>> {
    check_sample(ctx, x, w)?;
    if let Some(&p) = ps.iter().find(|p| !(0.0..=1.0).contains(*p)) {
        return Err(bad(format!(
            "{ctx}: probability {p}; expected a number from 0 to 1"
        )));
    }
    let (xs, ws) = sorted_pairs(x, w);
    let n = xs.len();
    let last = xs[n - 1];
    let out = match (method, w) {
        (QuantileMethod::Linear, None) => ps
            .iter()
            .map(|&p| {
                let h = (n - 1) as f64 * p;
                let j = h.floor();
                let g = h - j;
                let j = j as usize;
                if j + 1 >= n {
                    last
                } else {
                    lerp(xs[j], xs[j + 1], g)
                }
            })
            .collect(),
        (QuantileMethod::Linear, Some(_)) => {
            let (xs, ws): (Vec<f64>, Vec<f64>) = xs
                .iter()
                .zip(&ws)
                .filter(|(_, w)| **w > 0.0)
                .map(|(x, w)| (*x, *w))
                .unzip();
            let n = xs.len();
            if n == 1 {
                return Ok(vec![xs[0]; ps.len()]);
            }
            let mut c = Vec::with_capacity(n);
            let mut s = 0.0;
            for w in &ws {
                c.push(s + 0.5 * w);
                s += w;
            }
            let (c0, span) = (c[0], c[n - 1] - c[0]);
            let pos: Vec<f64> = c.iter().map(|ck| (ck - c0) / span).collect();
            ps.iter()
                .map(|&p| {
                    // Last k with pos[k] <= p (pos[0] = 0 <= p).
                    let k = pos.partition_point(|&q| q <= p).saturating_sub(1);
                    if k + 1 >= n {
                        xs[n - 1]
                    } else {
                        let dp = pos[k + 1] - pos[k];
                        let g = if dp > 0.0 {
                            ((p - pos[k]) / dp).clamp(0.0, 1.0)
                        } else {
                            0.0
                        };
                        lerp(xs[k], xs[k + 1], g)
                    }
                })
                .collect()
        }
        (QuantileMethod::InvertedCdf, _) => {
            let mut cdf = Vec::with_capacity(n);
            let mut s = 0.0;
            for w in &ws {
                s += w;
                cdf.push(s);
            }
            for c in cdf.iter_mut() {
                *c /= s;
            }
            ps.iter()
                .map(|&p| {
                    // First k with cdf[k] >= p among those of positive cumulative weight.
                    let k = cdf.partition_point(|&c| c < p || c == 0.0);
                    xs[k.min(n - 1)]
                })
                .collect()
        }
    };
    Ok(out)
}

/// Central interval of probability `level` (in (0, 1)) of the (weighted) sample
/// `x`: `(Q((1 - level) / 2), Q((1 + level) / 2))` with [`weighted_quantile`].
pub fn central_interval(
    x: &[f64],
    w: Option<&[f64]>,
    level: f64,
    method: QuantileMethod,
) -> Result<(f64, f64)> {
    check_level("central_interval", level)?;
    let q = quantiles_ctx(
        "central_interval",
        x,
        w,
        &[0.5 * (1.0 - level), 0.5 * (1.0 + level)],
        method,
    )?;
    Ok((q[0], q[1]))
}

fn check_level(ctx: &str, level: f64) -> Result<()> {
    if level > 0.0 && level < 1.0 {
        Ok(())
    } else {
        Err(bad(format!(
            "{ctx}: interval level {level}; expected a probability strictly between 0 and 1"
        )))
    }
}

/// Coverage of one nominal central-interval level.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Coverage {
    /// Nominal probability of the central interval (e.g. 0.9).
    pub level: f64,
    /// Observations inside their interval (bounds included).
    pub inside: usize,
    /// Observations scored.
    pub total: usize,
    /// `inside / total`; a calibrated prior gives about `level`.
    pub fraction: f64,
    /// Mean interval width, in the unit of the values (sharpness).
    pub mean_width: f64,
}

/// Empirical coverage of central intervals: for every observation `y_j` and its
/// ensemble `ensembles[j]` (weights `weights[j]`, equal when `None`), and every
/// nominal `level`, whether `y_j` lies in the ensemble's [`central_interval`]
/// (bounds included). A calibrated forecast covers about `level` of the
/// observations (common practice; Gneiting, Balabdaoui and Raftery 2007, J. R.
/// Stat. Soc. B 69(2), 243-268, on calibration and sharpness).
pub fn coverage(
    ensembles: &[&[f64]],
    weights: Option<&[&[f64]]>,
    observations: &[f64],
    levels: &[f64],
    method: QuantileMethod,
) -> Result<Vec<Coverage>> {
    if ensembles.len() != observations.len() {
        return Err(bad(format!(
            "coverage: {} ensembles for {} observations; expected one ensemble per observation",
            ensembles.len(),
            observations.len()
        )));
    }
    if ensembles.is_empty() {
        return Err(bad(
            "coverage: no observations; expected at least one".to_string()
        ));
    }
    if let Some(w) = weights {
        if w.len() != ensembles.len() {
            return Err(bad(format!(
                "coverage: {} weight vectors for {} ensembles; expected one per ensemble",
                w.len(),
                ensembles.len()
            )));
        }
    }
    if levels.is_empty() {
        return Err(bad(
            "coverage: no interval levels; expected at least one".to_string()
        ));
    }
    for &l in levels {
        check_level("coverage", l)?;
    }
    let ps: Vec<f64> = levels
        .iter()
        .flat_map(|&l| [0.5 * (1.0 - l), 0.5 * (1.0 + l)])
        .collect();
    let mut inside = vec![0usize; levels.len()];
    let mut width = vec![0.0; levels.len()];
    for (j, (ens, &y)) in ensembles.iter().zip(observations).enumerate() {
        let ctx = format!("coverage: ensemble {j}");
        check_finite(&ctx, "the observation", y)?;
        let w = weights.and_then(|w| w.get(j).copied());
        let q = quantiles_ctx(&ctx, ens, w, &ps, method)?;
        for (l, b) in q.chunks_exact(2).enumerate() {
            if b[0] <= y && y <= b[1] {
                inside[l] += 1;
            }
            width[l] += b[1] - b[0];
        }
    }
    let total = observations.len();
    Ok(levels
        .iter()
        .enumerate()
        .map(|(l, &level)| Coverage {
            level,
            inside: inside[l],
            total,
            fraction: inside[l] as f64 / total as f64,
            mean_width: width[l] / total as f64,
        })
        .collect())
}
