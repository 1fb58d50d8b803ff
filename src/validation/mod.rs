//! Validation of priors against held-out data (leave-one-well-out).
//!
//! * [`scores`]: scores of a predictive distribution (an ensemble or sample
//!   bank, optionally weighted, or a normal mean and standard deviation) against
//!   observations: CRPS, its fair ensemble version, Wasserstein-1 distance
//!   between two samples, coverage of central intervals, and the weighted mean,
//!   variance and quantiles they rest on.
//!
//! * [`records`]: the plain records of a leave-one-well-out validation (score
//!   rows, predictions along held-out wells) shared by `validate` and the report.
//!
//! All inputs and results are f64 in the unit of the property scored (m/s for
//! Vp0, dimensionless for epsilon and delta); bad input is an error, never a
//! panic.

pub mod loo;
pub mod records;
pub mod scores;

pub use scores::{
    central_interval, coverage, crps_ensemble, crps_ensemble_fair, crps_normal, normal_cdf,
    normal_pdf, wasserstein_1d, weighted_mean, weighted_quantile, weighted_quantiles,
    weighted_variance, Coverage, QuantileMethod, VarianceKind,
};
