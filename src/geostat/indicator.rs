//! Facies probabilities away from wells: indicator kriging of the facies logs in
//! stratigraphic coordinates, order-relation corrections, blending with a facies
//! volume, and the most likely facies.
//!
//! # Indicators
//!
//! For `K` facies codes `c_1..c_K`, every blocked well sample carries `K`
//! indicators `i_k(x) = 1` if the facies at `x` is `c_k`, else `0` (Journel 1983,
//! *Nonparametric estimation of spatial distributions*, Mathematical Geology
//! 15(3); Goovaerts 1997, *Geostatistics for Natural Resources Evaluation*,
//! sec. 7.3.1 for categorical variables; section numbers here and below from
//! memory). A blocked cell may hold several
//! facies: with [`FaciesSample::from_blocked`] in soft mode, the indicators are
//! the cell's facies fractions `n_k / n` (the share of log samples of facies
//! `c_k` in the cell), i.e. the expected value of the point indicator over the
//! cell. They still lie in `[0, 1]` and sum to 1; they are "soft" indicators in
//! the sense of Goovaerts 1997, sec. 6.2.4 (from memory), used here as data of
//! the same support as the targets (a layer-centre value stands for its cell).
//! In hard mode the indicator of the cell's most frequent code is 1.
//!
//! # Estimation
//!
//! Each indicator is kriged on its own with its own variogram
//! ([`IndicatorSetup::prepare`]): by default **simple kriging** with the global
//! (declustered) proportion `p_k` as the known mean,
//!
//! `p_k*(x_0) = p_k + sum_i w_i (i_k(x_i) - p_k)`,
//!
//! (simple indicator kriging, Goovaerts 1997 sec. 7.3.1; Deutsch and Journel 1998,
//! *GSLIB*, 2nd ed., sec. IV.1.9 `ik3d`, from memory). SK keeps the global
//! proportions where the wells are far and, for regularly spread wells,
//! reproduces them on average over the zone. [`IndicatorMethod::Ordinary`]
//! (unknown local mean) is available; it follows local proportions more
//! closely but does not revert to the global ones away from wells.
//!
//! The `K` estimates are not a probability vector in general (negative weights,
//! different variograms per facies): [`order_relation_correct`] clips them to
//! `[0, 1]` and renormalises them to sum to 1 (Deutsch and Journel 1998, GSLIB,
//! sec. V.1.6 "order relations" for categorical variables, from memory).
//!
//! A facies whose indicator is constant over the zone's samples (never seen, or
//! seen in every cell) has no variogram to fit; it is not kriged and keeps that
//! constant value (see [`FaciesModel::Constant`]).
//!
//! # Variograms
//!
//! Per facies, unless overridden ([`IndicatorVariogram`]): the experimental
//! vertical variogram along the wells and the horizontal one between wells
//! ([`IndicatorFitOptions`]), fitted with
//! [`crate::geostat::variogram::fit_model`] (sequential strategy: nugget, sill
//! and vertical range from the vertical variogram, horizontal ranges from the
//! horizontal one). Where the horizontal evidence cannot be fitted, the
//! fallback horizontal ranges are used (and a warning says so), as for the
//! other properties of a zone.
//!
//! # Blending with a facies volume
//!
//! See [`blend_with_volume`]: a linear pool `p = lambda p_wells + (1 - lambda) p_volume`
//! with `lambda = 1 - sigma^2_IK / C(0)`, exact at the wells and equal to the
//! volume far from them.
//!
//! # Use from the build, per zone
//!
//! 1. [`FaciesSample::from_blocked`] for every blocked sample of the zone with
//!    facies data (position at its layer centre, as for the other properties);
//! 2. proportions: [`weighted_proportions`] with declustering weights (or
//!    `None` for equal weights), or any other estimate;
//! 3. [`IndicatorSetup::prepare`] once per zone;
//! 4. [`IndicatorSetup::estimator`] once per zone (borrowing the setup);
//! 5. per inline, [`IndicatorKriging::estimate_columns`] with the same layer-centre
//!    targets as the property kriging; then, where a facies volume is given,
//!    [`blend_with_volume`] per target, and [`most_likely_facies`].

use crate::condition::blocking::BlockedSample;
use crate::error::{Error, Result};
use crate::geostat::kriging::{Estimate, Kriger, KrigingKind, Note, Sample};
use crate::geostat::kriging::{SampleSet, Target};
use crate::geostat::neighbourhood::NeighbourhoodParams;
use crate::geostat::variogram::{
    fit_model, horizontal_variogram, vertical_variogram, ExperimentalVariogram, FitReport, FitSpec,
    HorizontalOptions, LagBins, StructureKind, VariogramModel, WellSeries, DEFAULT_MIN_PAIRS,
};
use crate::geostat::CovarianceModel;
use rayon::prelude::*;
use serde::Serialize;

/// Tolerance on the sum of a probability vector (proportions, fractions,
/// volume probabilities) before it is renormalised.
pub const SUM_TOLERANCE: f64 = 1e-6;

/// Relative tolerance under which two probabilities count as tied in
/// [`most_likely_facies`].
pub const TIE_TOLERANCE: f64 = 1e-12;

/// Spread (max - min) of an indicator over the samples below which it counts
/// as constant (not kriged).
const CONSTANT_SPREAD: f64 = 1e-12;

/// One blocked well sample with its facies indicators.
#[derive(Debug, Clone, PartialEq)]
pub struct FaciesSample {
    /// Well identifier (unique per well; the study's well index in the build).
    pub well: u32,
    /// Layer index of the stratigraphic cell in the zone.
    pub layer: i32,
    /// Position `(x, y, s)` in m: world x, y and stratigraphic coordinate s.
    pub pos: [f64; 3],
    /// Indicator (hard 0/1, or soft fraction) of each facies, in the order of
    /// the facies codes given to [`IndicatorSetup::prepare`]; in `[0, 1]`,
    /// summing to 1.
    pub fractions: Vec<f64>,
}

impl FaciesSample {
    /// A hard-indicator sample: 1 for `code`, 0 for the others.
    ///
    /// Errors: `code` is not one of `codes`.
    pub fn hard(well: u32, layer: i32, pos: [f64; 3], code: i32, codes: &[i32]) -> Result<Self> {
        let k = code_index(code, codes).ok_or_else(|| {
            Error::inconsistent(format!(
                "facies sample of well {well} layer {layer}: facies code {code} is not one of the \
                 facies codes {}",
                list_codes(codes)
            ))
        })?;
        let mut fractions = vec![0.0; codes.len()];
        fractions[k] = 1.0;
        Ok(FaciesSample {
            well,
            layer,
            pos,
            fractions,
        })
    }

    /// The facies sample of a blocked well sample, at `(b.x, b.y, s)` (`s`: the
    /// stratigraphic coordinate to use, m; the build uses the layer centre).
    ///
    /// `soft = true`: the indicators are the cell's facies fractions
    /// `n_k / sum_j n_j` from [`BlockedSample::facies_counts`]; `soft = false`:
    /// 1 for the cell's most frequent code ([`BlockedSample::facies`], ties to
    /// the smaller code), 0 for the others. `well_name` is used in messages.
    ///
    /// Returns `None` for a cell without facies data. Errors: a code that is not
    /// one of `codes`; a non-finite position.
    pub fn from_blocked(
        b: &BlockedSample,
        s: f64,
        codes: &[i32],
        soft: bool,
        well_name: &str,
    ) -> Result<Option<Self>> {
        let total: usize = b.facies_counts.values().sum();
        if total == 0 {
            return Ok(None);
        }
        let pos = [b.x, b.y, s];
        if !pos.iter().all(|c| c.is_finite()) {
            return Err(Error::inconsistent(format!(
                "well {well_name}: blocked facies sample in zone {} layer {} has a non-finite \
                 position {pos:?}",
                b.zone, b.layer
            )));
        }
        let unknown = |code: i32| {
            Error::inconsistent(format!(
                "well {well_name}: zone {} layer {}: facies code {code} is not one of the \
                 [[facies]] codes {}",
                b.zone,
                b.layer,
                list_codes(codes)
            ))
        };
        let mut fractions = vec![0.0; codes.len()];
        if soft {
            for (&code, &n) in &b.facies_counts {
                let k = code_index(code, codes).ok_or_else(|| unknown(code))?;
                fractions[k] += n as f64 / total as f64;
            }
        } else {
            let code = match b.facies {
                Some(c) => c,
                None => return Ok(None),
            };
            let k = code_index(code, codes).ok_or_else(|| unknown(code))?;
            fractions[k] = 1.0;
        }
        Ok(Some(FaciesSample {
            well: b.well as u32,
            layer: b.layer as i32,
            pos,
            fractions,
        }))
    }
}

fn code_index(code: i32, codes: &[i32]) -> Option<usize> {
    codes.iter().position(|&c| c == code)
}

fn list_codes(codes: &[i32]) -> String {
    codes
        .iter()
        .map(|c| c.to_string())
        .collect::<Vec<_>>()
        .join(", ")
}

/// Check facies codes: at least one, all distinct.
fn check_codes(codes: &[i32]) -> Result<()> {
    if codes.is_empty() {
        return Err(Error::inconsistent(
            "indicator kriging: no facies codes given (expected at least one)",
        ));
    }
    for (i, c) in codes.iter().enumerate() {
        if codes[..i].contains(c) {
            return Err(Error::inconsistent(format!(
                "indicator kriging: facies code {c} is given twice (codes {})",
                list_codes(codes)
            )));
        }
    }
    Ok(())
}

/// Check the fractions of every sample: one per code, finite, in `[0, 1]` and
/// summing to 1 within [`SUM_TOLERANCE`].
fn check_samples(samples: &[FaciesSample], k: usize) -> Result<()> {
    for s in samples {
        let at = || format!("facies sample of well {} layer {}", s.well, s.layer);
        if s.fractions.len() != k {
            return Err(Error::inconsistent(format!(
                "{}: {} facies fractions for {k} facies codes (expected one per code)",
                at(),
                s.fractions.len()
            )));
        }
        if let Some(f) = s
            .fractions
            .iter()
            .find(|f| !(f.is_finite() && (0.0..=1.0).contains(*f)))
        {
            return Err(Error::inconsistent(format!(
                "{}: facies fraction {f} is not a number in [0, 1]",
                at()
            )));
        }
        let sum: f64 = s.fractions.iter().sum();
        if (sum - 1.0).abs() > SUM_TOLERANCE {
            return Err(Error::inconsistent(format!(
                "{}: facies fractions sum to {sum} (expected 1)",
                at()
            )));
        }
    }
    Ok(())
}

/// Weighted facies proportions of `samples`: `p_k = sum_i w_i f_ik / sum_i w_i`
/// (the declustered mean of the indicators, Goovaerts 1997 sec. 2.2.2 and
/// Deutsch and Journel 1998 sec. VI.2.2 `declus`, from memory), with `w_i` the
/// declustering weights, or equal weights when `weights` is `None`.
///
/// Errors: no samples; sample fractions of the wrong length or not a
/// probability vector; a weight count different from the sample count; a
/// negative or non-finite weight; weights summing to 0.
pub fn weighted_proportions(samples: &[FaciesSample], weights: Option<&[f64]>) -> Result<Vec<f64>> {
    let Some(first) = samples.first() else {
        return Err(Error::inconsistent(
            "facies proportions: no facies samples (expected at least one)",
        ));
    };
    let k = first.fractions.len();
    check_samples(samples, k)?;
    if let Some(w) = weights {
        if w.len() != samples.len() {
            return Err(Error::inconsistent(format!(
                "facies proportions: {} weights for {} samples (expected one per sample)",
                w.len(),
                samples.len()
            )));
        }
        if let Some((i, x)) = w
            .iter()
            .enumerate()
            .find(|(_, x)| !(x.is_finite() && **x >= 0.0))
        {
            return Err(Error::inconsistent(format!(
                "facies proportions: weight {i} is {x} (expected a finite number >= 0)"
            )));
        }
    }
    let mut p = vec![0.0; k];
    let mut total = 0.0;
    for (i, s) in samples.iter().enumerate() {
        let w = weights.and_then(|w| w.get(i).copied()).unwrap_or(1.0);
        total += w;
        for (pk, f) in p.iter_mut().zip(&s.fractions) {
            *pk += w * f;
        }
    }
    if total.is_nan() || total <= 0.0 {
        return Err(Error::inconsistent(
            "facies proportions: the weights sum to 0 (expected a positive total)",
        ));
    }
    for pk in &mut p {
        *pk /= total;
    }
    Ok(p)
}

/// Order-relation correction of categorical probabilities, in place: every
/// value is clipped to `[0, 1]` (non-finite values count as 0), then the vector
/// is divided by its sum so that it sums to 1 (Deutsch and Journel 1998, GSLIB
/// 2nd ed., sec. V.1.6, categorical case, from memory). If every clipped value
/// is 0 the result is uniform, `1 / K` each (nothing to tell the facies apart).
///
/// Returns `true` when a correction was needed: a value outside `[0, 1]` or not
/// finite, or a sum more than `1e-12` away from 1. An empty slice is left alone.
pub fn order_relation_correct(p: &mut [f64]) -> bool {
    if p.is_empty() {
        return false;
    }
    let mut changed = false;
    for v in p.iter_mut() {
        let c = if v.is_finite() {
            v.clamp(0.0, 1.0)
        } else {
            0.0
        };
        if c != *v {
            changed = true;
            *v = c;
        }
    }
    let sum: f64 = p.iter().sum();
    if (sum - 1.0).abs() > 1e-12 {
        changed = true;
    }
    if sum > 0.0 {
        for v in p.iter_mut() {
            *v /= sum;
        }
    } else {
        let u = 1.0 / p.len() as f64;
        p.iter_mut().for_each(|v| *v = u);
    }
    changed
}

/// Blend indicator-kriging probabilities with a facies volume's probabilities:
///
/// `p = lambda p_wells + (1 - lambda) p_volume`, `lambda = 1 - r`,
/// `r = clamp(sigma^2_IK / C(0), 0, 1)` (`sigma2_ratio`, as given by
/// [`IndicatorKriging::estimate_columns`]),
///
/// followed by [`order_relation_correct`] (a no-op for two probability vectors).
///
/// This is a linear opinion pool of the two sources (Genest and Zidek 1986,
/// *Combining probability distributions: a critique and an annotated
/// bibliography*, Statistical Science 1(1), from memory), with the weight of the
/// wells set by how much of the indicator variance the wells explain: for simple
/// kriging `Var(p*) = C(0) - sigma^2_SK` (the smoothing relation, Goovaerts 1997
/// sec. 5.2, from memory), so `lambda = Var(p*) / C(0)`, the squared correlation
/// between the kriged and the true indicator. At a well sample (`sigma^2 = 0`)
/// the result is the well's indicator exactly; beyond the correlation range of
/// every well (`sigma^2 = C(0)`) it is the volume's probability. It is a
/// simple form of the use of soft (secondary) data in indicator estimation
/// discussed in Goovaerts 1997 ch. 6 (sec. 6.2, the Bayesian-updating and
/// local-mean approaches; from memory); unlike Markov-Bayes cokriging it needs
/// no calibration of the volume against the wells. With ordinary kriging the
/// variance can exceed `C(0)` far from the wells; the clamp makes it 1 there.
///
/// Errors: vectors of different lengths, a non-finite value or ratio.
pub fn blend_with_volume(p_ik: &[f64], sigma2_ratio: f64, p_vol: &[f64]) -> Result<Vec<f64>> {
    if p_ik.len() != p_vol.len() {
        return Err(Error::inconsistent(format!(
            "facies blending: {} kriged probabilities but {} volume probabilities (expected one \
             per facies in both)",
            p_ik.len(),
            p_vol.len()
        )));
    }
    if !sigma2_ratio.is_finite() || !p_ik.iter().chain(p_vol).all(|v| v.is_finite()) {
        return Err(Error::inconsistent(format!(
            "facies blending: non-finite input (variance ratio {sigma2_ratio}, kriged {p_ik:?}, \
             volume {p_vol:?})"
        )));
    }
    let lambda = 1.0 - sigma2_ratio.clamp(0.0, 1.0);
    let mut p: Vec<f64> = p_ik
        .iter()
        .zip(p_vol)
        .map(|(a, b)| lambda * a + (1.0 - lambda) * b)
        .collect();
    order_relation_correct(&mut p);
    Ok(p)
}

/// The facies probabilities of a facies-label volume sample (a code stored as
/// a float): `confidence` for the labelled facies and
/// `(1 - confidence) / (K - 1)` for each of the others (a symmetric confusion
/// model; common practice). `confidence = 1` gives hard labels.
///
/// Returns `None` for a non-finite value (no label there). Errors: a value
/// farther than `1e-3` from an integer, or an integer that is not one of
/// `codes` (the message gives the value and the codes; the caller adds the
/// file and position); `confidence` outside `[1 / K, 1]`.
pub fn label_probabilities(value: f64, codes: &[i32], confidence: f64) -> Result<Option<Vec<f64>>> {
    check_codes(codes)?;
    let k = codes.len();
    let lo = 1.0 / k as f64;
    if !(confidence.is_finite() && confidence >= lo && confidence <= 1.0) {
        return Err(Error::inconsistent(format!(
            "facies label confidence {confidence} must be in [{lo}, 1] (1 / number of facies to 1)"
        )));
    }
    if !value.is_finite() {
        return Ok(None);
    }
    let r = value.round();
    let idx = if (value - r).abs() <= 1e-3 && r.abs() < i32::MAX as f64 {
        code_index(r as i32, codes)
    } else {
        None
    };
    let Some(idx) = idx else {
        return Err(Error::inconsistent(format!(
            "facies label {value} is not one of the facies codes {}",
            list_codes(codes)
        )));
    };
    let other = if k > 1 {
        (1.0 - confidence) / (k - 1) as f64
    } else {
        0.0
    };
    let mut p = vec![other; k];
    p[idx] = if k > 1 { confidence } else { 1.0 };
    Ok(Some(p))
}

/// The confusion of a facies-label volume, calibrated at the wells:
/// `P[l][f]`, the probability that a cell labelled `l` holds facies `f`, from
/// `pairs` of (label index, well facies index) at the wells' blocked cells, with
/// add-one (Laplace) smoothing:
///
/// ```text
/// P[l][f] = (n[l][f] + 1) / (sum_g n[l][g] + K)
/// ```
///
/// for `K` facies (a label never seen at the wells gets uniform probabilities).
/// Calibrating a seismic facies classification against the wells' facies by
/// its confusion matrix is common practice; the smoothing is Laplace's rule of
/// succession (Manning, Raghavan and Schuetze 2008, "Introduction to
/// Information Retrieval", eq. 13.7).
pub fn label_confusion(pairs: &[(usize, usize)], k: usize) -> Vec<Vec<f64>> {
    let mut n = vec![vec![0usize; k]; k];
    for &(l, f) in pairs {
        if l < k && f < k {
            n[l][f] += 1;
        }
    }
    n.iter()
        .map(|row| {
            let tot: usize = row.iter().sum();
            row.iter()
                .map(|c| (*c as f64 + 1.0) / (tot as f64 + k as f64))
                .collect()
        })
        .collect()
}

/// The facies probabilities of a label-volume sample under a calibrated
/// confusion ([`label_confusion`]): the row of the sample's label. `None` for a
/// non-finite value; errors as [`label_probabilities`].
pub fn confused_label_probabilities(
    value: f64,
    codes: &[i32],
    confusion: &[Vec<f64>],
) -> Result<Option<Vec<f64>>> {
    let Some(hard) = label_probabilities(value, codes, 1.0)? else {
        return Ok(None);
    };
    let l = hard.iter().position(|p| *p >= 1.0).unwrap_or(0);
    Ok(confusion.get(l).cloned().or(Some(hard)))
}

/// Per-facies probability-volume samples made into a probability vector:
/// values must be finite and within `[-1e-3, 1 + 1e-3]` (float32 storage and
/// resampling); they are clipped to `[0, 1]` and divided by their sum.
///
/// Returns `None` when any value is non-finite (no probabilities there).
/// Errors: a value outside the range, or values summing to 0 (the message gives
/// the values; the caller adds the files and position).
pub fn volume_probabilities(values: &[f64]) -> Result<Option<Vec<f64>>> {
    if values.is_empty() {
        return Err(Error::inconsistent(
            "facies probability volumes: no values given (expected one per facies)",
        ));
    }
    if values.iter().any(|v| !v.is_finite()) {
        return Ok(None);
    }
    if let Some(v) = values.iter().find(|v| !(-1e-3..=1.0 + 1e-3).contains(*v)) {
        return Err(Error::inconsistent(format!(
            "facies probability {v} is not in [0, 1] (values {values:?})"
        )));
    }
    let mut p = values.to_vec();
    let sum: f64 = p.iter().map(|v| v.clamp(0.0, 1.0)).sum();
    if sum.is_nan() || sum <= 0.0 {
        return Err(Error::inconsistent(format!(
            "facies probabilities {values:?} sum to 0 (expected a sum of 1)"
        )));
    }
    order_relation_correct(&mut p);
    Ok(Some(p))
}

/// The most likely facies: the code of the largest probability, ties (within
/// [`TIE_TOLERANCE`] relative to the largest) to the smaller code. NaN values
/// are ignored. `None` when the lengths differ or no value is finite.
pub fn most_likely_facies(p: &[f64], codes: &[i32]) -> Option<i32> {
    if p.len() != codes.len() {
        return None;
    }
    let max = p
        .iter()
        .copied()
        .filter(|v| v.is_finite())
        .fold(f64::NEG_INFINITY, f64::max);
    if !max.is_finite() {
        return None;
    }
    let tol = TIE_TOLERANCE * max.abs().max(f64::MIN_POSITIVE);
    p.iter()
        .zip(codes)
        .filter(|(v, _)| v.is_finite() && max - **v <= tol)
        .map(|(_, &c)| c)
        .min()
}

/// Which kriging of the indicators.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum IndicatorMethod {
    /// Simple kriging with the global (declustered) proportion as the mean.
    #[default]
    Simple,
    /// Ordinary kriging (unknown local mean).
    Ordinary,
}

/// A user choice for one facies' indicator variogram.
#[derive(Debug, Clone, PartialEq)]
pub enum IndicatorVariogram {
    /// Use this model as is.
    Model(VariogramModel),
    /// Fit with this specification (structure kinds, fixed parameters).
    Fit(FitSpec),
}

/// How indicator variograms are computed and fitted.
#[derive(Debug, Clone, PartialEq)]
pub struct IndicatorFitOptions {
    /// Lag classes of the vertical variogram along the wells (m of s).
    pub vertical_bins: LagBins,
    /// Options of the horizontal variogram between wells.
    pub horizontal: HorizontalOptions,
    /// Fit specification when there is no override (default: one spherical
    /// structure plus nugget, nothing fixed).
    pub spec: FitSpec,
    /// Horizontal ranges (major, minor in m; azimuth in degrees) used when the
    /// horizontal variogram cannot be fitted.
    pub fallback_horizontal: (f64, f64, f64),
}

impl IndicatorFitOptions {
    /// The same experimental-variogram settings as the zone variograms of the
    /// other properties (`crate::prior::variograms`): vertical classes centred
    /// on whole numbers of cells up to `max(reference_thickness / 2, 4 h)`
    /// (3 to 60 classes), horizontal classes of width `max(diagonal / 12,
    /// spacing)` (8 classes) with a vertical tolerance of 1.5 cells, pairs
    /// counted from [`DEFAULT_MIN_PAIRS`]. `fallback_horizontal`: the zone's
    /// Vp0 horizontal ranges where known, else `diagonal / 3` isotropic.
    ///
    /// `cell_thickness` h, `reference_thickness` of the zone, the survey's
    /// `grid_diagonal` and largest node `spacing`, all in m.
    pub fn for_zone(
        cell_thickness: f64,
        reference_thickness: f64,
        grid_diagonal: f64,
        spacing: f64,
        fallback_horizontal: Option<(f64, f64, f64)>,
    ) -> Result<Self> {
        let h = cell_thickness;
        if !(h.is_finite() && h > 0.0) {
            return Err(Error::inconsistent(format!(
                "indicator variograms: cell thickness {h} m must be a positive number"
            )));
        }
        if !(grid_diagonal.is_finite() && grid_diagonal > 0.0 && spacing.is_finite()) {
            return Err(Error::inconsistent(format!(
                "indicator variograms: grid diagonal {grid_diagonal} m and spacing {spacing} m \
                 must be positive numbers"
            )));
        }
        let vmax = (reference_thickness / 2.0).max(4.0 * h);
        let nv = ((vmax / h).ceil().min(1e6) as usize).clamp(3, 60);
        let vertical_bins = LagBins::from_edges((0..=nv).map(|k| (k as f64 + 0.5) * h).collect())?;
        let hwidth = (grid_diagonal / 12.0).max(spacing);
        Ok(IndicatorFitOptions {
            vertical_bins,
            horizontal: HorizontalOptions {
                bins: LagBins::uniform(hwidth, 8)?,
                vertical_tolerance: 1.5 * h,
                direction: None,
                min_pairs: DEFAULT_MIN_PAIRS,
            },
            spec: FitSpec::new(vec![StructureKind::Spherical]),
            fallback_horizontal: fallback_horizontal.unwrap_or((
                grid_diagonal / 3.0,
                grid_diagonal / 3.0,
                0.0,
            )),
        })
    }
}

/// Settings of [`IndicatorSetup::prepare`].
#[derive(Debug, Clone, PartialEq)]
pub struct IndicatorOptions {
    /// Simple (default) or ordinary kriging.
    pub method: IndicatorMethod,
    /// Experimental variograms and fit.
    pub fit: IndicatorFitOptions,
    /// Per facies code (same order), an optional user variogram; empty for none.
    pub overrides: Vec<Option<IndicatorVariogram>>,
    /// Model whose simple-kriging variance gives the variance ratio for
    /// blending when no facies is kriged (every indicator constant over the
    /// zone's wells). Without it the ratio is then 1 (the volume rules).
    pub ratio_model: Option<VariogramModel>,
}

/// How one facies is estimated.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum FaciesModel {
    /// Kriged with this variogram model.
    Kriged(VariogramModel),
    /// The indicator is this constant over all the zone's samples (0: never
    /// seen; 1: seen in every cell): not kriged, estimated as the constant.
    Constant(f64),
}

/// The variogram of one facies indicator and how it was obtained.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct IndicatorVariogramRecord {
    /// Facies code.
    pub facies: i32,
    /// Global proportion used as the SK mean.
    pub proportion: f64,
    /// `project`, `fitted`, `fitted with fixed parameters` or `constant`.
    pub source: String,
    /// The model, or the constant.
    pub model: FaciesModel,
    /// The model as a TOML inline table (project-file syntax), if kriged.
    pub toml: Option<String>,
    /// Experimental variograms of the indicator, if computed.
    pub experimental: Vec<ExperimentalVariogram>,
    /// The fit, if fitted.
    pub fit: Option<FitReport>,
    /// Warnings.
    pub warnings: Vec<String>,
}

/// Everything indicator kriging of one zone needs: facies codes, proportions,
/// samples and a variogram per facies. Built once per zone by
/// [`IndicatorSetup::prepare`].
#[derive(Debug, Clone)]
pub struct IndicatorSetup {
    codes: Vec<i32>,
    proportions: Vec<f64>,
    method: IndicatorMethod,
    /// Per facies: the kriging data (indicator values) or `None` for a constant.
    data: Vec<Option<SampleSet>>,
    records: Vec<IndicatorVariogramRecord>,
    ratio_model: Option<VariogramModel>,
    /// Sample positions with zero values, for the ratio model.
    ratio_data: Option<SampleSet>,
    samples: usize,
    wells: usize,
}

impl IndicatorSetup {
    /// Prepare indicator kriging of one zone.
    ///
    /// * `samples`: the zone's facies samples ([`FaciesSample`]); at most one
    ///   per well and layer;
    /// * `codes`: the facies codes, in the order of the fractions;
    /// * `proportions`: the global (declustered) proportion of each facies,
    ///   in `[0, 1]`, summing to 1 (within [`SUM_TOLERANCE`]; renormalised);
    /// * `options`: method, fit settings, per-facies overrides, ratio model.
    ///
    /// Per facies: a constant indicator is not kriged; otherwise the override
    /// model is used, or the indicator variogram is fitted (see the module
    /// documentation).
    ///
    /// Errors: no samples or codes, duplicate codes, wrong fraction or
    /// proportion counts, values outside `[0, 1]`, proportions not summing to
    /// 1, two samples of a well in one layer, overrides of the wrong length, an
    /// invalid override model, a fit that fails even with the fallback
    /// horizontal ranges (naming the facies).
    pub fn prepare(
        samples: &[FaciesSample],
        codes: &[i32],
        proportions: &[f64],
        options: &IndicatorOptions,
    ) -> Result<Self> {
        check_codes(codes)?;
        let k = codes.len();
        if samples.is_empty() {
            return Err(Error::inconsistent(
                "indicator kriging: no facies samples (expected at least one blocked sample with \
                 facies)",
            ));
        }
        check_samples(samples, k)?;
        if proportions.len() != k {
            return Err(Error::inconsistent(format!(
                "indicator kriging: {} proportions for {k} facies codes (expected one per code)",
                proportions.len()
            )));
        }
        if let Some(p) = proportions
            .iter()
            .find(|p| !(p.is_finite() && (0.0..=1.0).contains(*p)))
        {
            return Err(Error::inconsistent(format!(
                "indicator kriging: proportion {p} is not a number in [0, 1]"
            )));
        }
        let psum: f64 = proportions.iter().sum();
        if (psum - 1.0).abs() > SUM_TOLERANCE {
            return Err(Error::inconsistent(format!(
                "indicator kriging: proportions {proportions:?} sum to {psum} (expected 1)"
            )));
        }
        let props: Vec<f64> = proportions.iter().map(|p| p / psum).collect();
        if !options.overrides.is_empty() && options.overrides.len() != k {
            return Err(Error::inconsistent(format!(
                "indicator kriging: {} variogram overrides for {k} facies codes (expected one \
                 entry per code, or none)",
                options.overrides.len()
            )));
        }
        if let Some(m) = &options.ratio_model {
            m.validate()?;
        }
        // one sample per well and layer (checked before any fit)
        SampleSet::new(
            samples
                .iter()
                .map(|s| Sample::new(s.well, s.layer, s.pos, 0.0))
                .collect(),
        )?;
        let mut wells: Vec<u32> = samples.iter().map(|s| s.well).collect();
        wells.sort_unstable();
        wells.dedup();

        let mut data = Vec::with_capacity(k);
        let mut records = Vec::with_capacity(k);
        for (fi, &code) in codes.iter().enumerate() {
            let values: Vec<f64> = samples
                .iter()
                .map(|s| s.fractions.get(fi).copied().unwrap_or(0.0))
                .collect();
            let (lo, hi) = values
                .iter()
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
                    (a.min(v), b.max(v))
                });
            let proportion = props.get(fi).copied().unwrap_or(0.0);
            if hi - lo <= CONSTANT_SPREAD {
                let c = 0.5 * (lo + hi);
                let mut warnings = Vec::new();
                if (c - proportion).abs() > 0.05 {
                    warnings.push(format!(
                        "facies {code}: the indicator is {c} in every well sample of the zone but \
                         the proportion given is {proportion}; the constant is used"
                    ));
                }
                data.push(None);
                records.push(IndicatorVariogramRecord {
                    facies: code,
                    proportion,
                    source: "constant".into(),
                    model: FaciesModel::Constant(c),
                    toml: None,
                    experimental: Vec::new(),
                    fit: None,
                    warnings,
                });
                continue;
            }
            let over = options.overrides.get(fi).and_then(|o| o.as_ref());
            let record =
                indicator_variogram(samples, &values, code, proportion, over, &options.fit)?;
            let set = SampleSet::new(
                samples
                    .iter()
                    .zip(&values)
                    .map(|(s, &v)| Sample::new(s.well, s.layer, s.pos, v))
                    .collect(),
            )?;
            data.push(Some(set));
            records.push(record);
        }
        let ratio_data = match (&options.ratio_model, data.iter().all(Option::is_none)) {
            (Some(_), true) => Some(SampleSet::new(
                samples
                    .iter()
                    .map(|s| Sample::new(s.well, s.layer, s.pos, 0.0))
                    .collect(),
            )?),
            _ => None,
        };
        Ok(IndicatorSetup {
            codes: codes.to_vec(),
            proportions: props,
            method: options.method,
            data,
            records,
            ratio_model: options.ratio_model.clone(),
            ratio_data,
            samples: samples.len(),
            wells: wells.len(),
        })
    }

    /// The facies codes, in order.
    pub fn codes(&self) -> &[i32] {
        &self.codes
    }

    /// The global proportions (renormalised to sum to 1), in code order.
    pub fn proportions(&self) -> &[f64] {
        &self.proportions
    }

    /// The kriging method.
    pub fn method(&self) -> IndicatorMethod {
        self.method
    }

    /// Per facies (code order): the variogram record.
    pub fn records(&self) -> &[IndicatorVariogramRecord] {
        &self.records
    }

    /// Number of facies samples.
    pub fn sample_count(&self) -> usize {
        self.samples
    }

    /// Number of wells contributing.
    pub fn well_count(&self) -> usize {
        self.wells
    }

    /// All warnings of the preparation, prefixed with the facies code.
    pub fn warnings(&self) -> Vec<String> {
        let mut w: Vec<String> = self
            .records
            .iter()
            .flat_map(|r| {
                r.warnings
                    .iter()
                    .map(move |m| format!("facies {}: {m}", r.facies))
            })
            .collect();
        if self.data.iter().all(Option::is_none) && self.ratio_model.is_none() {
            w.push(
                "no facies indicator varies over the zone's wells: nothing is kriged and, without \
                 a ratio model, blending with a facies volume gives the volume everywhere"
                    .into(),
            );
        }
        w
    }

    /// The estimator over this setup with the neighbourhood `params` (one
    /// [`Kriger`] per kriged facies; build once per zone, use for every inline).
    ///
    /// Errors: invalid neighbourhood limits.
    pub fn estimator(&self, params: NeighbourhoodParams) -> Result<IndicatorKriging<'_>> {
        let mut krigers = Vec::with_capacity(self.codes.len());
        for ((set, rec), &p) in self.data.iter().zip(&self.records).zip(&self.proportions) {
            match (set, &rec.model) {
                (Some(set), FaciesModel::Kriged(m)) => {
                    let kind = match self.method {
                        IndicatorMethod::Simple => KrigingKind::SimpleMean(p),
                        IndicatorMethod::Ordinary => KrigingKind::Ordinary,
                    };
                    krigers.push(Some(Kriger::new(set, m, params, kind)?));
                }
                _ => krigers.push(None),
            }
        }
        let ratio = match (&self.ratio_model, &self.ratio_data) {
            (Some(m), Some(d)) => Some(Kriger::new(d, m, params, KrigingKind::SimpleMean(0.0))?),
            _ => None,
        };
        Ok(IndicatorKriging {
            setup: self,
            krigers,
            ratio,
        })
    }
}

/// Fit (or take) the variogram of one indicator.
fn indicator_variogram(
    samples: &[FaciesSample],
    values: &[f64],
    code: i32,
    proportion: f64,
    over: Option<&IndicatorVariogram>,
    fit: &IndicatorFitOptions,
) -> Result<IndicatorVariogramRecord> {
    let mut warnings = Vec::new();
    let spec = match over {
        Some(IndicatorVariogram::Model(m)) => {
            m.validate().map_err(|e| {
                Error::inconsistent(format!("indicator variogram of facies {code}: {e}"))
            })?;
            return Ok(IndicatorVariogramRecord {
                facies: code,
                proportion,
                source: "project".into(),
                model: FaciesModel::Kriged(m.clone()),
                toml: Some(m.to_toml_inline()),
                experimental: Vec::new(),
                fit: None,
                warnings,
            });
        }
        Some(IndicatorVariogram::Fit(s)) => s.clone(),
        None => fit.spec.clone(),
    };
    let source = if over.is_some() {
        "fitted with fixed parameters"
    } else {
        "fitted"
    };
    // vertical, along each well
    let mut series: Vec<WellSeries> = Vec::new();
    let mut ids: Vec<u32> = Vec::new();
    for (s, &v) in samples.iter().zip(values) {
        match ids.iter().position(|&w| w == s.well) {
            Some(i) => {
                if let Some(w) = series.get_mut(i) {
                    w.s.push(s.pos[2]);
                    w.values.push(v);
                }
            }
            None => {
                ids.push(s.well);
                series.push(WellSeries {
                    well: s.well.to_string(),
                    s: vec![s.pos[2]],
                    values: vec![v],
                });
            }
        }
    }
    let vert = vertical_variogram(&series, &fit.vertical_bins, fit.horizontal.min_pairs)?;
    // horizontal, between wells
    let hs: Vec<crate::geostat::variogram::Sample> = samples
        .iter()
        .zip(values)
        .map(|(s, &v)| crate::geostat::variogram::Sample {
            x: s.pos[0],
            y: s.pos[1],
            s: s.pos[2],
            value: v,
            well: s.well as usize,
        })
        .collect();
    let horiz = horizontal_variogram(&hs, &fit.horizontal)?;
    let experimental = vec![vert.clone(), horiz.clone()];
    let report = match fit_model(&experimental, &spec) {
        Ok(r) => r,
        Err(e) => {
            let (maj, min, az) = fit.fallback_horizontal;
            warnings.push(format!(
                "the horizontal indicator variogram could not be fitted ({e}); horizontal range \
                 {maj:.0} / {min:.0} m at {az:.0} deg used instead"
            ));
            let mut spec2 = spec.clone();
            let mut fixed = spec2.fixed.structures.clone();
            if fixed.is_empty() {
                fixed = vec![Default::default(); spec2.kinds.len()];
            }
            for f in &mut fixed {
                f.range_major = Some(maj);
                f.range_minor = Some(min.min(maj));
                f.azimuth = Some(az);
            }
            spec2.fixed.structures = fixed;
            fit_model(&experimental, &spec2)
                .or_else(|_| fit_model(std::slice::from_ref(&vert), &spec2))
                .map_err(|e| {
                    Error::inconsistent(format!(
                        "indicator variogram of facies {code}: cannot be fitted ({e}); give a \
                         model in the project"
                    ))
                })?
        }
    };
    for w in &report.warnings {
        warnings.push(w.clone());
    }
    for e in &experimental {
        for w in &e.warnings {
            warnings.push(w.message.clone());
        }
    }
    let model = report.model.clone();
    Ok(IndicatorVariogramRecord {
        facies: code,
        proportion,
        source: source.into(),
        toml: Some(model.to_toml_inline()),
        model: FaciesModel::Kriged(model),
        experimental,
        fit: Some(report),
        warnings,
    })
}

/// Counts over indicator-kriging runs.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize)]
pub struct IndicatorStats {
    /// Targets estimated.
    pub targets: u64,
    /// Kriging systems solved (all facies).
    pub solves: u64,
    /// Targets whose weights were reused (all facies).
    pub reuses: u64,
    /// Targets without any well sample in the search of some facies: that
    /// facies took its global proportion there.
    pub no_neighbours: u64,
    /// Targets where some raw estimate was outside `[0, 1]` (clipped by the
    /// order-relation correction).
    pub clipped: u64,
    /// Targets where the order-relation correction changed the estimates
    /// (clipping, or a sum more than `1e-12` from 1, as with different
    /// variograms per facies).
    pub corrected: u64,
}

impl std::ops::AddAssign for IndicatorStats {
    fn add_assign(&mut self, o: Self) {
        self.targets += o.targets;
        self.solves += o.solves;
        self.reuses += o.reuses;
        self.no_neighbours += o.no_neighbours;
        self.clipped += o.clipped;
        self.corrected += o.corrected;
    }
}

/// The facies probabilities of the targets of one column.
#[derive(Debug, Clone, PartialEq)]
pub struct FaciesColumn {
    /// Number of facies `K`.
    pub facies: usize,
    /// Corrected probabilities, `K` per target in code order, target after
    /// target: target `t`, facies `k` at `t * K + k`. Each target's `K` values
    /// lie in `[0, 1]` and sum to 1.
    pub probabilities: Vec<f64>,
    /// Per target: the variance ratio `r = mean_k sigma^2_k / C_k(0)` over the
    /// kriged facies (clamped to `[0, 1]`; 1 where no sample is in the search),
    /// for [`blend_with_volume`].
    pub variance_ratio: Vec<f64>,
    /// Counts.
    pub stats: IndicatorStats,
}

impl FaciesColumn {
    /// Number of targets.
    pub fn len(&self) -> usize {
        self.variance_ratio.len()
    }

    /// True when the column has no target.
    pub fn is_empty(&self) -> bool {
        self.variance_ratio.is_empty()
    }

    /// The probabilities of target `t` (code order); empty beyond the end.
    pub fn target(&self, t: usize) -> &[f64] {
        self.probabilities
            .get(t * self.facies..(t + 1) * self.facies)
            .unwrap_or(&[])
    }
}

/// Facies probabilities of many columns.
#[derive(Debug, Clone, PartialEq)]
pub struct FaciesGrid {
    /// One column per input column, in order.
    pub columns: Vec<FaciesColumn>,
    /// Counts summed over the columns.
    pub stats: IndicatorStats,
}

/// Indicator kriging of a zone: one [`Kriger`] per kriged facies over an
/// [`IndicatorSetup`] ([`IndicatorSetup::estimator`]).
pub struct IndicatorKriging<'a> {
    setup: &'a IndicatorSetup,
    krigers: Vec<Option<Kriger<'a, VariogramModel>>>,
    ratio: Option<Kriger<'a, VariogramModel>>,
}

impl<'a> IndicatorKriging<'a> {
    /// The setup.
    pub fn setup(&self) -> &IndicatorSetup {
        self.setup
    }

    /// The kriging engine of facies `k` (code order), `None` for a facies that
    /// is not kriged (constant indicator). Its estimates are the raw
    /// (uncorrected) indicator-kriging estimates.
    pub fn kriger(&self, k: usize) -> Option<&Kriger<'a, VariogramModel>> {
        self.krigers.get(k).and_then(Option::as_ref)
    }

    /// Facies probabilities of one column of targets (successive layers of one
    /// map column, or any sequence), with weight reuse along the column.
    ///
    /// Per target: the raw estimate of each kriged facies (its proportion
    /// where the facies has no sample in the search, or where ordinary kriging
    /// has nothing to estimate from), the constant of each constant facies, then
    /// [`order_relation_correct`]. Targets need only their position.
    ///
    /// Errors: a non-finite target position; a singular kriging system.
    pub fn estimate_column(&self, targets: &[Target]) -> Result<FaciesColumn> {
        let setup = self.setup;
        let k = setup.codes.len();
        let n = targets.len();
        let mut raw = vec![0.0; n * k];
        let mut ratio_sum = vec![0.0; n];
        let mut ratio_n = 0usize;
        let mut stats = IndicatorStats {
            targets: n as u64,
            ..Default::default()
        };
        let mut empty = vec![false; n];
        for (fi, rec) in setup.records.iter().enumerate() {
            let p = setup.proportions.get(fi).copied().unwrap_or(0.0);
            match (self.krigers.get(fi).and_then(Option::as_ref), &rec.model) {
                (Some(kr), FaciesModel::Kriged(m)) => {
                    let col = kr.krige_column(targets)?;
                    stats.solves += col.stats.solves;
                    stats.reuses += col.stats.reuses;
                    ratio_n += 1;
                    let sill = m.sill();
                    for (t, e) in col.estimates.iter().enumerate() {
                        let (v, r) = raw_of(e, p, sill);
                        if e.note == Note::NoNeighbours {
                            empty[t] = true;
                        }
                        raw[t * k + fi] = v;
                        ratio_sum[t] += r;
                    }
                }
                (_, FaciesModel::Constant(c)) => {
                    for t in 0..n {
                        raw[t * k + fi] = *c;
                    }
                }
                _ => {
                    for t in 0..n {
                        raw[t * k + fi] = p;
                    }
                }
            }
        }
        let variance_ratio: Vec<f64> = if ratio_n > 0 {
            ratio_sum
                .iter()
                .map(|r| (r / ratio_n as f64).clamp(0.0, 1.0))
                .collect()
        } else if let (Some(kr), Some(m)) = (&self.ratio, &setup.ratio_model) {
            let col = kr.krige_column(targets)?;
            let sill = m.sill();
            col.estimates
                .iter()
                .map(|e| raw_of(e, 0.0, sill).1.clamp(0.0, 1.0))
                .collect()
        } else {
            vec![1.0; n]
        };
        stats.no_neighbours = empty.iter().filter(|&&b| b).count() as u64;
        for chunk in raw.chunks_mut(k.max(1)) {
            if chunk.iter().any(|v| !(0.0..=1.0).contains(v)) {
                stats.clipped += 1;
            }
            if order_relation_correct(chunk) {
                stats.corrected += 1;
            }
        }
        Ok(FaciesColumn {
            facies: k,
            probabilities: raw,
            variance_ratio,
            stats,
        })
    }

    /// [`IndicatorKriging::estimate_column`] of many columns in parallel (one
    /// column per task; results do not depend on the number of threads). On
    /// errors, the error of the first failing column (in order) is returned.
    pub fn estimate_columns<C: AsRef<[Target]> + Sync>(&self, columns: &[C]) -> Result<FaciesGrid> {
        let results: Vec<Result<FaciesColumn>> = columns
            .par_iter()
            .map(|c| self.estimate_column(c.as_ref()))
            .collect();
        let mut stats = IndicatorStats::default();
        let mut out = Vec::with_capacity(results.len());
        for r in results {
            let c = r?;
            stats += c.stats;
            out.push(c);
        }
        Ok(FaciesGrid {
            columns: out,
            stats,
        })
    }

    /// The probabilities and variance ratio of one target on its own.
    pub fn estimate(&self, target: &Target) -> Result<(Vec<f64>, f64)> {
        let c = self.estimate_column(std::slice::from_ref(target))?;
        Ok((
            c.target(0).to_vec(),
            c.variance_ratio.first().copied().unwrap_or(1.0),
        ))
    }
}

/// Raw indicator estimate and variance ratio of one kriging estimate: the
/// proportion and ratio 1 where there is nothing to estimate from.
fn raw_of(e: &Estimate, p: f64, sill: f64) -> (f64, f64) {
    if e.note == Note::NoNeighbours || !e.value.is_finite() || !e.variance.is_finite() {
        (p, 1.0)
    } else {
        (e.value, e.variance.max(0.0) / sill)
    }
}
