//! Plain records of a leave-one-well-out validation: what `validate` computes
//! and what the QC report draws. Values are SI (m/s for Vp0, dimensionless for
//! epsilon and delta; depths TVDSS in metres, positive down).

use serde::Serialize;

/// The prior (kriging with the engine's settings, predictive distribution =
/// kriged mean plus the residual pool of the remaining wells).
pub const METHOD_PRIOR: &str = "prior";
/// Baseline: the zone mean of the remaining wells' blocked samples.
pub const METHOD_ZONE_MEAN: &str = "zone_mean";
/// Baseline: the nearest remaining well (horizontal distance), at the nearest
/// stratigraphic coordinate.
pub const METHOD_NEAREST_WELL: &str = "nearest_well";
/// Baseline: inverse-distance weighting in stratigraphic coordinates.
pub const METHOD_IDW: &str = "idw";
/// Baseline (Vp0 only): the background Vp0 volume at the sample.
pub const METHOD_BACKGROUND: &str = "background";

/// Scores of one method for one held-out well, zone and property (or, with
/// `well == "all"`, pooled over every held-out well).
#[derive(Debug, Clone, Serialize)]
pub struct ScoreRow {
    /// Held-out well name, or `all`.
    pub well: String,
    /// Zone name.
    pub zone: String,
    /// `vp0`, `epsilon` or `delta`.
    pub property: String,
    /// One of the `METHOD_*` names.
    pub method: String,
    /// Blocked samples scored.
    pub samples: usize,
    /// Mean of (prediction - observation).
    pub bias: f64,
    /// Root mean square error.
    pub rmse: f64,
    /// Mean absolute error.
    pub mae: f64,
    /// Mean of the standardized error (error / predictive sd).
    pub z_mean: f64,
    /// Variance of the standardized error (1 when the sd is calibrated).
    pub z_var: f64,
    /// Fraction of observations inside the central 80% predictive interval.
    pub coverage80: f64,
    /// Fraction of observations inside the central 95% predictive interval.
    pub coverage95: f64,
    /// Mean CRPS of the predictive distribution over the samples.
    pub crps: f64,
    /// Wasserstein-1 distance between the well's values in the zone and the
    /// predictive distribution pooled over its samples.
    pub w1: f64,
    /// For baseline rows: the prior's skill against this baseline,
    /// `1 - RMSE_prior / RMSE_baseline` (positive: the prior is better).
    /// `None` on prior rows.
    pub skill: Option<f64>,
}

/// One blocked sample of a held-out well with the leave-one-out prediction of
/// the prior, per property in the order vp0, epsilon, delta.
#[derive(Debug, Clone, Serialize)]
pub struct PredictedSample {
    /// Zone name.
    pub zone: String,
    /// TVDSS of the blocked cell centre, m.
    pub z: f64,
    /// Observed (blocked) value, `None` where the well has no data.
    pub observed: [Option<f64>; 3],
    /// Leave-one-out prior mean.
    pub mean: [Option<f64>; 3],
    /// Leave-one-out prior standard deviation (kriging sd).
    pub sd: [Option<f64>; 3],
}

/// A zone's interval along a held-out well (TVDSS, m), from the leave-one-out
/// frame (horizons tied without the well).
#[derive(Debug, Clone, Serialize)]
pub struct ZoneInterval {
    /// Zone name.
    pub zone: String,
    /// Top, m TVDSS.
    pub z_top: f64,
    /// Base, m TVDSS.
    pub z_base: f64,
}

/// The leave-one-out prediction along one held-out well.
#[derive(Debug, Clone, Serialize)]
pub struct WellPrediction {
    /// Well name.
    pub well: String,
    /// Zone intervals along the well, top down.
    pub zones: Vec<ZoneInterval>,
    /// Blocked samples, top down.
    pub samples: Vec<PredictedSample>,
}
