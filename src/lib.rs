//! # stratiprior
//!
//! Spatially varying priors of vertical P velocity Vp0 and Thomsen's epsilon and
//! delta for anisotropic (VTI) full-waveform inversion, built from sparse wells,
//! interpreted horizons and facies labels.
//!
//! The modules follow the pipeline:
//!
//! * [`formats`]: the file formats we read and write ourselves (LAS, SEG-Y).
//! * [`ingest`]: wells (table, logs, trajectories, tops), horizon picks, input volumes.
//! * [`frame`]: the structural frame (gridded horizons tied to tops, stratigraphic order, zones).
//! * [`project`]: the project file that describes one study.
//! * [`check`], [`inspect`]: the summaries behind the `check` and `inspect` commands.
//! * [`demo`]: the generator of the fictional demo basin.
//! * [`report`]: the self-contained HTML QC report of `build` and `validate`.
//!
//! Units are SI inside (m, m/s, kg/m3); conversion happens at the edges.

pub mod check;
pub mod commands;
pub mod condition;
pub mod demo;
pub mod error;
pub mod formats;
pub mod frame;
pub mod geostat;
pub mod grid;
pub mod ingest;
pub mod inspect;
pub mod io_util;
pub mod prior;
pub mod project;
pub mod report;
pub mod study;
pub mod units;
pub mod validation;

pub use error::{Error, Result};
pub use grid::SurveyGrid;
