//! Variogram models (nugget plus nested structures, geometric anisotropy),
//! experimental variograms and weighted least-squares fitting, with JSON and SVG
//! output.
//!
//! * [`model`] -- [`VariogramModel`], [`Structure`], [`StructureKind`]; the
//!   [`CovarianceModel`](crate::geostat::CovarianceModel) used by kriging; TOML in
//!   project-file syntax.
//! * [`experimental`] -- vertical (within wells), horizontal (between wells) and
//!   gridded-volume experimental variograms (Matheron 1963 estimator).
//! * [`fit`] -- [`fit_model`], iterated Cressie (1985) weighted least squares.
//! * [`plot`] -- [`plot_svg`].
//!
//! Units: lags and ranges in metres, semivariances in the property unit squared,
//! azimuths in degrees clockwise from north.

pub mod experimental;
pub mod fit;
pub mod model;
pub mod plot;

pub use experimental::{
    gridded_variogram, horizontal_variogram, vertical_variogram, DirectionFilter,
    ExperimentalVariogram, GridDirection, GridValues, HorizontalOptions, LagBin, LagBins,
    LagDirection, LagWarning, Sample, WellSeries, DEFAULT_MIN_PAIRS,
};
pub use fit::{
    fit_model, model_curve, FitReport, FitSpec, FitStageReport, FitStrategy, FixedParameters,
    FixedStructure,
};
pub use model::{Structure, StructureKind, VariogramModel};
pub use plot::{plot_model_svg, plot_svg, PlotOptions};

use crate::error::{Error, Result};
use serde::Serialize;
use std::path::Path;

/// Everything about one property's variogram analysis, for JSON output.
#[derive(Debug, Clone, Serialize)]
pub struct VariogramSummary {
    /// Property name (e.g. `vp0`).
    pub property: String,
    /// Unit of the property squared (e.g. `(m/s)^2`).
    pub value_unit: String,
    /// The experimental variograms.
    pub experimental: Vec<ExperimentalVariogram>,
    /// The model, if any.
    pub model: Option<VariogramModel>,
    /// The fit, if the model was fitted.
    pub fit: Option<FitReport>,
}

/// Pretty-printed JSON of any of this module's values (non-finite numbers become `null`).
pub fn to_json<T: Serialize>(value: &T) -> Result<String> {
    serde_json::to_string_pretty(value)
        .map_err(|e| Error::inconsistent(format!("variogram JSON: {e}")))
}

/// Write [`to_json`] of `value` to `path` atomically (temporary name, then rename).
pub fn write_json<T: Serialize>(path: impl AsRef<Path>, value: &T) -> Result<()> {
    let mut text = to_json(value)?;
    text.push('\n');
    crate::io_util::write_atomic(path, text.as_bytes())
}

/// Write an SVG text (from [`plot_svg`]) to `path` atomically.
pub fn write_svg(path: impl AsRef<Path>, svg: &str) -> Result<()> {
    crate::io_util::write_atomic(path, svg.as_bytes())
}
