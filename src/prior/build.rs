//! `stratiprior build`: mean and standard-deviation volumes of Vp0, epsilon and
//! delta and a zone-index volume, by kriging in stratigraphic coordinates.
//!
//! For every zone and property:
//!
//! 1. the blocked well samples of the zone ([`crate::condition`]) become kriging
//!    data at `(x, y, s)`;
//! 2. a variogram model is fitted to them or taken from the project
//!    ([`super::variograms`]);
//! 3. targets are the centres of the zone's stratigraphic layers in every map
//!    column, so that the kriging configuration repeats layer after layer and
//!    the kriging weights are reused wherever it does;
//! 4. each depth sample of the survey grid takes the value of its zone and
//!    stratigraphic coordinate, interpolated linearly in `s` between layer
//!    centres (nearest layer beyond the first and last centre).
//!
//! The standard deviation is the square root of the kriging variance. Epsilon
//! and delta means are clipped to the project's bounds, and clipped cells are
//! counted. Cells outside every zone hold zone index -1, standard deviations 0,
//! epsilon and delta 0, and Vp0 from the background volume where one is given
//! (else 0): inversion codes should mask them with the zone volume.
//!
//! Volumes are computed and written inline by inline, so memory does not grow
//! with the number of inlines.

use super::banks::{
    draw_banks, write_region, zone_area_pools, BankReport, BankVolumes, JointSample, PoolSource,
};
use super::manifest::{Manifest, ManifestFile, ManifestVolume, OutsideFill};
use super::variograms::{zone_property_variogram, VariogramRecord};
use super::volume_sampling::{sample_volume, trace_at_depth};
use crate::condition::blocking::BlockedSample;
use crate::condition::logs::condition_all;
use crate::error::{Error, Result};
use crate::formats::segy::{SegyWriter, VolumeMeta};
use crate::frame::strat::StratFrame;
use crate::geostat::indicator::{
    blend_with_volume, confused_label_probabilities, label_confusion, label_probabilities,
    most_likely_facies, volume_probabilities, weighted_proportions, FaciesSample,
    IndicatorFitOptions, IndicatorKriging, IndicatorMethod, IndicatorOptions, IndicatorSetup,
};
use crate::geostat::kriging::{Kriger, KrigingKind, KrigingStats, Note, Sample, SampleSet, Target};
use crate::geostat::neighbourhood::NeighbourhoodParams;
use crate::geostat::variogram::VariogramModel;
use crate::geostat::CovarianceModel;
use crate::io_util::{refuse_overwrite_input, write_atomic};
use crate::project::{Drift, KrigingMethod};
use crate::report::data::{CrossPlotRegion, MapFigure, SectionFigure};
use crate::report::{ReportInputs, ReportKind};
use crate::study::{load, Study};
use indicatif::{ProgressBar, ProgressStyle};
use rayon::prelude::*;
use serde::Serialize;
use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

/// The kriged properties, in volume order.
pub const PROPERTIES: [&str; 3] = ["vp0", "epsilon", "delta"];

/// Options of a build.
#[derive(Debug, Clone)]
pub struct BuildOptions {
    /// Output folder (the project's `output` when `None`).
    pub out: Option<PathBuf>,
    /// Worker threads (rayon's default when `None`).
    pub threads: Option<usize>,
    /// Show progress bars.
    pub progress: bool,
}

/// What was done for one zone and property.
#[derive(Debug, Clone, Serialize)]
pub struct ZonePropertyReport {
    /// Zone name.
    pub zone: String,
    /// Property.
    pub property: String,
    /// Kriging method.
    pub method: String,
    /// Secondary variable: the drift of external-drift kriging, or the variable
    /// of the linear trend of simple kriging with a trend (`depth` or `background_vp0`).
    pub secondary: Option<String>,
    /// Blocked samples used.
    pub samples: usize,
    /// Wells contributing.
    pub wells: usize,
    /// Mean of the samples (SI), before the facies trend is removed.
    pub data_mean: f64,
    /// Variogram.
    pub variogram: VariogramRecord,
    /// Targets kriged (layer centres).
    pub targets: u64,
    /// Kriging systems solved.
    pub solves: u64,
    /// Targets whose weights were reused.
    pub reuses: u64,
    /// Targets with no neighbour in the search (filled with the zone mean and the sill).
    pub no_neighbours: u64,
    /// External-drift targets that fell back to ordinary kriging.
    pub drift_fallbacks: u64,
    /// Depth cells clipped to the bounds (epsilon, delta).
    pub clipped_cells: u64,
    /// Facies offsets of the facies trend, by facies name (empty without it).
    pub facies_offsets: Vec<(String, f64)>,
}

/// Facies estimation of one zone.
#[derive(Debug, Clone, Serialize)]
pub struct FaciesZoneReport {
    /// Zone name.
    pub zone: String,
    /// Blocked samples with a facies.
    pub samples: usize,
    /// Wells contributing.
    pub wells: usize,
    /// Global proportions used as kriging means, by facies name.
    pub proportions: Vec<(String, f64)>,
    /// How the probabilities were made.
    pub source: String,
}

/// One row of a calibrated label confusion: the label (facies name) and the
/// probability of each facies in cells with that label.
pub type LabelConfusionRow = (String, Vec<(String, f64)>);

/// What `build` did.
#[derive(Debug, Clone, Serialize)]
pub struct BuildReport {
    /// Output folder.
    pub out: PathBuf,
    /// The manifest written.
    pub manifest: PathBuf,
    /// Per zone and property.
    pub zones: Vec<ZonePropertyReport>,
    /// Depth cells inside a zone.
    pub cells_in_zones: u64,
    /// Depth cells outside every zone.
    pub cells_outside: u64,
    /// Facies estimation per zone (empty when the project has no facies).
    pub facies: Vec<FaciesZoneReport>,
    /// Sample banks per region (zone, facies).
    pub banks: Vec<BankReport>,
    /// The facies-label volume's confusion calibrated at the wells: per label
    /// (facies name), the probability of each facies (`None` without a label
    /// volume, or with `[volumes] calibrate_facies_labels = false`).
    pub facies_label_confusion: Option<Vec<LabelConfusionRow>>,
    /// Warnings.
    pub warnings: Vec<String>,
}

/// One resampled trace: `nvol` volume values per depth sample (flat, depth
/// major), cells inside and outside zones, clipped cells per zone and property.
type TraceResult = (Vec<f32>, u64, u64, Vec<u64>);

/// The kriging data, variogram and settings of one zone and property.
pub(crate) struct ZoneProperty {
    pub(crate) zone: usize,
    pub(crate) prop: usize,
    pub(crate) model: VariogramModel,
    pub(crate) samples: SampleSet,
    pub(crate) kind: KrigingKind,
    pub(crate) method: KrigingMethod,
    pub(crate) drift: Option<Drift>,
    pub(crate) trend: Option<(f64, f64)>,
    pub(crate) mean: f64,
    /// Facies offsets `d_f` per project facies (empty: no facies trend); the
    /// samples hold `v - d_f` of their facies.
    pub(crate) facies_offsets: Vec<f64>,
    pub(crate) report: ZonePropertyReport,
}

impl ZoneProperty {
    /// The kriging target at node (i, j), depth `z`, position `pos` = (x, y, s):
    /// drift and trend values from the secondary variable there.
    fn target(
        &self,
        g: &crate::grid::SurveyGrid,
        background: Option<&crate::study::InputVolume>,
        i: usize,
        j: usize,
        pos: [f64; 3],
        z: f64,
    ) -> Target {
        let sec = match self.drift {
            Some(Drift::Depth) => Some(z),
            Some(Drift::BackgroundVp0) => {
                background.and_then(|b| trace_at_depth(g, &b.data, i, j, z))
            }
            None => None,
        };
        self.target_with(pos, sec)
    }

    /// The kriging target at `pos` = (x, y, s) where the secondary variable
    /// (depth or background Vp0) is `sec`: as for the kriging data.
    pub(crate) fn target_with(&self, pos: [f64; 3], sec: Option<f64>) -> Target {
        Target {
            pos,
            drift: if self.method == KrigingMethod::ExternalDrift {
                sec
            } else {
                None
            },
            trend: match (self.trend, sec) {
                (Some((a, b)), Some(v)) => Some(a + b * v),
                _ => None,
            },
        }
    }
}

/// The value of property `prop` (0 vp0, 1 epsilon, 2 delta) of a blocked sample.
pub(crate) fn value_of(b: &BlockedSample, prop: usize) -> Option<f64> {
    match prop {
        0 => b.vp0,
        1 => b.epsilon,
        _ => b.delta,
    }
}

/// Facies offsets of one zone and property: `d_f = m_f - m`, the declustered
/// mean of the blocked samples of facies `f` minus the declustered mean of all
/// the zone's samples of the property (cell declustering of the wells, Deutsch
/// 1989, as for the bank offsets), per project facies; 0 for a facies without
/// samples.
///
/// With them the prior follows a facies-conditioned trend (kriging with a
/// locally varying mean, Goovaerts 1997, "Geostatistics for Natural Resources
/// Evaluation", section 6.2): the samples are kriged as `v - d_f(sample)` and
/// at a cell with facies probabilities `p_f` the estimate is
/// `m* + sum_f p_f d_f` with variance `sigma2* + sum_f p_f (d_f - sum_g p_g d_g)^2`
/// (the law of total variance over the uncertain facies).
fn facies_offsets(
    rows: &[&BlockedSample],
    pi: usize,
    facies: &[crate::project::FaciesDef],
) -> Result<Vec<f64>> {
    let with: Vec<&BlockedSample> = rows
        .iter()
        .copied()
        .filter(|b| value_of(b, pi).is_some())
        .collect();
    let points: Vec<[f64; 2]> = with.iter().map(|b| [b.x, b.y]).collect();
    let wells: Vec<usize> = with.iter().map(|b| b.well).collect();
    let values: Vec<f64> = with
        .iter()
        .map(|b| value_of(b, pi).unwrap_or(f64::NAN))
        .collect();
    let w = well_decluster_weights(&points, &wells, &values)?;
    let wmean = |keep: &dyn Fn(&BlockedSample) -> bool| -> Option<f64> {
        let (mut sw, mut swv) = (0.0, 0.0);
        for ((b, v), wt) in with.iter().zip(&values).zip(&w) {
            if keep(b) {
                sw += wt;
                swv += wt * v;
            }
        }
        (sw > 0.0).then(|| swv / sw)
    };
    let Some(zone) = wmean(&|_| true) else {
        return Ok(vec![0.0; facies.len()]);
    };
    Ok(facies
        .iter()
        .map(|f| wmean(&|b| b.facies == Some(f.code)).map_or(0.0, |m| m - zone))
        .collect())
}

/// The facies trend at a cell with facies probabilities `probs`: the
/// probability-weighted offset `sum_f p_f d_f` and the variance it adds,
/// `sum_f p_f (d_f - sum_g p_g d_g)^2` (see [`facies_offsets`]); `(0, 0)`
/// without offsets.
pub(crate) fn facies_mix(offsets: &[f64], probs: &[f64]) -> (f64, f64) {
    if offsets.is_empty() || offsets.len() != probs.len() {
        return (0.0, 0.0);
    }
    let mix: f64 = offsets.iter().zip(probs).map(|(d, p)| p * d).sum();
    let var: f64 = offsets
        .iter()
        .zip(probs)
        .map(|(d, p)| p * (d - mix) * (d - mix))
        .sum();
    (mix, var)
}

/// Least-squares line `v = a + b z`; `None` with fewer than 2 distinct depths.
fn depth_trend(points: &[(f64, f64)]) -> Option<(f64, f64)> {
    let n = points.len() as f64;
    if points.len() < 2 {
        return None;
    }
    let mz = points.iter().map(|p| p.0).sum::<f64>() / n;
    let mv = points.iter().map(|p| p.1).sum::<f64>() / n;
    let szz: f64 = points.iter().map(|p| (p.0 - mz).powi(2)).sum();
    if szz <= 1e-12 * n {
        return None;
    }
    let szv: f64 = points.iter().map(|p| (p.0 - mz) * (p.1 - mv)).sum();
    let b = szv / szz;
    Some((mv - b * mz, b))
}

/// Run a build of the project at `project`.
pub fn build(project: &Path, opts: &BuildOptions) -> Result<BuildReport> {
    with_threads(opts.threads, || build_inner(project, opts))
}

/// Run `f` on a rayon pool of `threads` workers (rayon's global pool when
/// `None`); results depend only on the thread count, not on scheduling.
pub(crate) fn with_threads<T>(
    threads: Option<usize>,
    f: impl FnOnce() -> Result<T> + Send,
) -> Result<T>
where
    T: Send,
{
    match threads {
        Some(n) => rayon::ThreadPoolBuilder::new()
            .num_threads(n.max(1))
            .build()
            .map_err(|e| Error::inconsistent(format!("cannot start {n} threads: {e}")))?
            .install(f),
        None => f(),
    }
}

/// The variogram record of every zone and property of a loaded study, as `build`
/// would use them, with the warnings of the preparation.
pub fn variogram_records(study: &Study) -> Result<(Vec<VariogramRecord>, Vec<String>)> {
    let frame = study.strat_frame();
    let wells = condition_all(study, &frame)?;
    let blocked: Vec<&BlockedSample> = wells.iter().flat_map(|w| w.blocked.iter()).collect();
    let mut warnings = Vec::new();
    let zps = prepare(study, &frame, &blocked, &mut warnings)?;
    Ok((
        zps.into_iter().map(|z| z.report.variogram).collect(),
        warnings,
    ))
}

/// The kriging data, variogram and settings of every zone and property of a
/// study: the common first half of `build` and `variogram`.
fn prepare(
    study: &Study,
    frame: &StratFrame,
    blocked: &[&BlockedSample],
    warnings: &mut Vec<String>,
) -> Result<Vec<ZoneProperty>> {
    prepare_with_models(study, frame, blocked, None, warnings)
}

/// The secondary variable of drift `drift` at world (x, y, z): the depth, or
/// the background Vp0 volume there (`None` outside it), as [`prepare`] takes it
/// at the kriging data.
pub(crate) fn secondary_at(
    study: &Study,
    drift: Option<Drift>,
    x: f64,
    y: f64,
    z: f64,
) -> Option<f64> {
    let background = study.volumes.iter().find(|v| v.role == "background_vp0");
    match drift? {
        Drift::Depth => Some(z),
        Drift::BackgroundVp0 => sample_volume(&study.project.grid, &background?.data, x, y, z),
    }
}

/// The neighbourhood of the project's kriging settings.
pub(crate) fn neighbourhood_params(p: &crate::project::Project) -> NeighbourhoodParams {
    NeighbourhoodParams::per_well(
        p.kriging.per_well,
        p.kriging.max_wells,
        p.kriging.neighbours,
        p.kriging.search_radius,
    )
}

/// [`prepare`], with the variogram models given (`fixed`, one per zone and
/// property in the order `prepare` returns them) instead of fitted or taken
/// from the project: leave-one-well-out validation keeps the full-data models.
pub(crate) fn prepare_with_models(
    study: &Study,
    frame: &StratFrame,
    blocked: &[&BlockedSample],
    fixed: Option<&[VariogramModel]>,
    warnings: &mut Vec<String>,
) -> Result<Vec<ZoneProperty>> {
    let p = &study.project;
    let g = &p.grid;
    let background = study.volumes.iter().find(|v| v.role == "background_vp0");
    let mut zps: Vec<ZoneProperty> = Vec::new();
    for (zi, zdef) in p.zones.iter().enumerate() {
        let mut vp0_horizontal: Option<(f64, f64, f64)> = None;
        for (pi, pname) in PROPERTIES.iter().enumerate() {
            let rows: Vec<&BlockedSample> = blocked
                .iter()
                .copied()
                .filter(|b| b.zone == zi && value_of(b, pi).is_some())
                .collect();
            if rows.is_empty() {
                return Err(Error::inconsistent(format!(
                    "zone {}: no well has {pname} data in this zone; kriging needs at least one blocked sample",
                    zdef.name
                )));
            }
            let mut method = p.kriging.method(&zdef.name, pname);
            let drift = match method {
                KrigingMethod::ExternalDrift | KrigingMethod::SimpleTrend => Some(if pi == 0 {
                    p.kriging.vp0_drift
                } else {
                    Drift::Depth
                }),
                _ => None,
            };
            if drift == Some(Drift::BackgroundVp0) && background.is_none() {
                return Err(Error::inconsistent(format!(
                    "zone {}: {pname} uses the background Vp0 as drift, but [volumes.background_vp0] is not given",
                    zdef.name
                )));
            }
            let drift_at = |x: f64, y: f64, z: f64| -> Option<f64> {
                match drift? {
                    Drift::Depth => Some(z),
                    Drift::BackgroundVp0 => sample_volume(g, &background?.data, x, y, z),
                }
            };
            // the facies trend: each sample's facies offset is removed before kriging
            let offsets = if p.kriging.facies_trend && !p.facies.is_empty() {
                facies_offsets(&rows, pi, &p.facies)?
            } else {
                Vec::new()
            };
            let offset_of = |b: &BlockedSample| -> f64 {
                b.facies
                    .and_then(|c| p.facies.iter().position(|f| f.code == c))
                    .and_then(|f| offsets.get(f).copied())
                    .unwrap_or(0.0)
            };
            let adjusted = |b: &BlockedSample| value_of(b, pi).unwrap_or(f64::NAN) - offset_of(b);
            let values: Vec<(f64, f64)> = rows.iter().map(|b| (b.z, adjusted(b))).collect();
            let raw_mean = rows
                .iter()
                .map(|b| value_of(b, pi).unwrap_or(f64::NAN))
                .sum::<f64>()
                / rows.len() as f64;
            let mean = values.iter().map(|v| v.1).sum::<f64>() / values.len() as f64;
            // secondary-variable value at every sample
            let mut sec = Vec::with_capacity(rows.len());
            if drift.is_some() {
                for b in &rows {
                    sec.push(drift_at(b.x, b.y, b.z).ok_or_else(|| {
                        Error::inconsistent(format!(
                            "well {}: a blocked sample at x {:.1} y {:.1} is outside the background volume",
                            study.wells[b.well].name(),
                            b.x,
                            b.y
                        ))
                    })?);
                }
            }
            let mut trend = None;
            if method == KrigingMethod::SimpleTrend {
                let pts: Vec<(f64, f64)> =
                    sec.iter().zip(&values).map(|(s, v)| (*s, v.1)).collect();
                trend = depth_trend(&pts);
                if trend.is_none() {
                    warnings.push(format!(
                        "zone {} {pname}: no linear trend can be fitted (the secondary variable is constant over the samples); simple kriging with the zone mean instead",
                        zdef.name
                    ));
                    method = KrigingMethod::Simple;
                }
            }
            let drift_values = method == KrigingMethod::ExternalDrift;
            let mut samples = Vec::with_capacity(rows.len());
            for b in &rows {
                // the blocked value stands for its whole cell: it sits at the layer centre,
                // so the configuration of vertical wells repeats exactly layer after layer
                let s_centre = frame.zones[zi].layer_centre(b.layer);
                let mut s = Sample::new(
                    b.well as u32,
                    b.layer as i32,
                    [b.x, b.y, s_centre],
                    adjusted(b),
                );
                let k = samples.len();
                if drift_values {
                    s.drift = sec.get(k).copied();
                }
                if let Some((a, bb)) = trend {
                    s.trend = sec.get(k).map(|v| a + bb * v);
                }
                samples.push(s);
            }
            // residuals for the variogram: from the drift regression, the trend or the mean
            let residuals: Vec<f64> = match (drift_values, trend) {
                (true, _) => {
                    let pts: Vec<(f64, f64)> = samples
                        .iter()
                        .map(|s| (s.drift.unwrap_or(0.0), s.value))
                        .collect();
                    match depth_trend(&pts) {
                        Some((a, b)) => pts.iter().map(|(d, v)| v - (a + b * d)).collect(),
                        None => samples.iter().map(|s| s.value - mean).collect(),
                    }
                }
                (false, Some(_)) => samples
                    .iter()
                    .map(|s| s.value - s.trend.unwrap_or(mean))
                    .collect(),
                (false, None) => samples.iter().map(|s| s.value - mean).collect(),
            };
            let (model, record) = match fixed.and_then(|f| f.get(zps.len())) {
                Some(m) => (
                    m.clone(),
                    VariogramRecord {
                        zone: zdef.name.clone(),
                        property: pname.to_string(),
                        source: "given (full-data model)".into(),
                        model: m.clone(),
                        toml: m.to_toml_entry(&format!("variograms.{}.{pname}", zdef.name)),
                        experimental: Vec::new(),
                        fit: None,
                        warnings: Vec::new(),
                    },
                ),
                None => zone_property_variogram(
                    study,
                    frame,
                    zi,
                    pname,
                    &samples,
                    &residuals,
                    (pi == 0).then_some(background).flatten(),
                    vp0_horizontal,
                )?,
            };
            if pi == 0 {
                vp0_horizontal = model
                    .search_structure()
                    .map(|s| (s.range_major, s.range_minor, s.azimuth));
            }
            warnings.extend(
                record
                    .warnings
                    .iter()
                    .map(|w| format!("zone {} {pname}: {w}", zdef.name)),
            );
            let kind = match method {
                KrigingMethod::Simple => KrigingKind::SimpleMean(mean),
                KrigingMethod::SimpleTrend => KrigingKind::SimpleTrend,
                KrigingMethod::Ordinary => KrigingKind::Ordinary,
                KrigingMethod::ExternalDrift => KrigingKind::ExternalDrift,
            };
            let nwells = {
                let mut w: Vec<usize> = rows.iter().map(|b| b.well).collect();
                w.sort_unstable();
                w.dedup();
                w.len()
            };
            let report = ZonePropertyReport {
                zone: zdef.name.clone(),
                property: pname.to_string(),
                method: method.name().into(),
                secondary: drift.map(|d| match d {
                    Drift::BackgroundVp0 => "background_vp0".to_string(),
                    Drift::Depth => "depth".to_string(),
                }),
                samples: rows.len(),
                wells: nwells,
                data_mean: raw_mean,
                variogram: record,
                targets: 0,
                solves: 0,
                reuses: 0,
                no_neighbours: 0,
                drift_fallbacks: 0,
                clipped_cells: 0,
                facies_offsets: p
                    .facies
                    .iter()
                    .zip(&offsets)
                    .map(|(f, d)| (f.name.clone(), *d))
                    .collect(),
            };
            zps.push(ZoneProperty {
                zone: zi,
                prop: pi,
                model,
                samples: SampleSet::new(samples)?,
                kind,
                method,
                drift,
                trend,
                mean,
                facies_offsets: offsets,
                report,
            });
        }
    }

    Ok(zps)
}

fn build_inner(project_path: &Path, opts: &BuildOptions) -> Result<BuildReport> {
    let study = load(project_path, opts.progress)?;
    let p = &study.project;
    let g = &p.grid;
    let out = opts.out.clone().unwrap_or_else(|| p.output.clone());
    let frame = study.strat_frame();
    let wells = condition_all(&study, &frame)?;
    let blocked: Vec<&BlockedSample> = wells.iter().flat_map(|w| w.blocked.iter()).collect();
    let background = study.volumes.iter().find(|v| v.role == "background_vp0");
    let mut warnings: Vec<String> = study.warnings.clone();
    for w in &wells {
        for n in &w.notes {
            warnings.push(format!("well {}: {n}", w.name));
        }
    }

    let zps = prepare(&study, &frame, &blocked, &mut warnings)?;

    let params = NeighbourhoodParams::per_well(
        p.kriging.per_well,
        p.kriging.max_wells,
        p.kriging.neighbours,
        p.kriging.search_radius,
    );
    let krigers: Vec<Kriger<'_, VariogramModel>> = zps
        .iter()
        .map(|zp| Kriger::new(&zp.samples, &zp.model, params, zp.kind))
        .collect::<Result<_>>()?;

    // leave-one-well-out kriged means at the samples, for the residual pools
    let loo: Vec<BTreeMap<(u32, i32), f64>> = zps
        .iter()
        .map(|zp| loo_means(zp, params, p))
        .collect::<Result<_>>()?;

    // facies probabilities per zone: indicator kriging of the well facies,
    // blended with a facies volume where one is given
    let codes: Vec<i32> = p.facies.iter().map(|f| f.code).collect();
    let facies_setups = prepare_facies(&study, &frame, &blocked, &zps, &mut warnings)?;
    let facies_estimators: Vec<Option<IndicatorKriging<'_>>> = facies_setups
        .iter()
        .map(|s| s.as_ref().map(|s| s.estimator(params)).transpose())
        .collect::<Result<_>>()?;
    let facies_volumes = FaciesVolumes::of(&study, &blocked);
    let nk = if facies_setups.iter().any(|s| s.is_some()) {
        codes.len()
    } else {
        0
    };

    // output files
    let inputs = p.input_paths();
    let vol_dir = out.join("volumes");
    let mut metas: Vec<(String, String, String, PathBuf)> = Vec::new();
    for (prop, unit) in [("vp0", "m/s"), ("epsilon", "1"), ("delta", "1")] {
        for stat in ["mean", "std"] {
            metas.push((
                prop.into(),
                stat.into(),
                unit.into(),
                vol_dir.join(format!("{prop}_{stat}.sgy")),
            ));
        }
    }
    metas.push((
        "zone".into(),
        "value".into(),
        "index".into(),
        vol_dir.join("zone.sgy"),
    ));
    if nk > 0 {
        for f in &p.facies {
            metas.push((
                format!("facies_probability:{}", f.name),
                "value".into(),
                "1".into(),
                vol_dir.join(format!(
                    "facies_probability_{}.sgy",
                    crate::condition::output::file_stem(&f.name)
                )),
            ));
        }
        metas.push((
            "facies".into(),
            "value".into(),
            "code".into(),
            vol_dir.join("facies_most_likely.sgy"),
        ));
    }
    let nvol = metas.len();
    let manifest_path = out.join("manifest.json");
    for (_, _, _, path) in &metas {
        refuse_overwrite_input(path, &inputs)?;
    }
    refuse_overwrite_input(&manifest_path, &inputs)?;
    let mut writers = Vec::with_capacity(metas.len());
    for (prop, stat, unit, path) in &metas {
        let mut notes = vec![format!("project {}", p.name)];
        if prop == "zone" {
            notes.push("zone index from 0 as in manifest.json; -1 outside every zone".into());
        } else if prop == "facies" {
            notes.push("most likely facies code; -1 outside every zone".into());
        } else if prop.starts_with("facies_probability") {
            notes.push("probability of the facies; 0 outside every zone".into());
        } else {
            notes.push("outside every zone: see manifest.json outside_zones".into());
        }
        writers.push(SegyWriter::create(
            path,
            g,
            &VolumeMeta {
                property: prop.clone(),
                statistic: stat.clone(),
                unit: unit.clone(),
                notes,
            },
        )?);
    }

    let pb = if opts.progress {
        let pb = ProgressBar::new(g.inline_count as u64);
        if let Ok(st) =
            ProgressStyle::with_template("{spinner} kriging inline {pos}/{len} {bar:30} {eta}")
        {
            pb.set_style(st);
        }
        pb
    } else {
        ProgressBar::hidden()
    };

    let nz = g.z_count;
    let nj = g.xline_count;
    let mut cells_in = 0u64;
    let mut cells_out = 0u64;
    let mut stats: Vec<KrigingStats> = vec![KrigingStats::default(); zps.len()];
    let mut clipped = vec![0u64; zps.len()];
    let nzones = p.zones.len();
    // report figures captured while streaming: mid-layer maps per zone and
    // property (mean, sd), the Vp0 mean and zones of the middle inline
    let mut maps: Vec<(MapFigure, MapFigure)> = zps
        .iter()
        .map(|zp| {
            let zf = &frame.zones[zp.zone];
            let layer = zf.layers / 2;
            let name = &p.zones[zp.zone].name;
            let prop = PROPERTIES[zp.prop];
            (
                MapFigure::empty(name, zp.zone, prop, "mean", layer, g.inline_count, nj),
                MapFigure::empty(name, zp.zone, prop, "sd", layer, g.inline_count, nj),
            )
        })
        .collect();
    let section_inline = g.inline_count / 2;
    let mut section: Option<SectionFigure> = None;
    for i in 0..g.inline_count {
        // layer centres per zone and column: (layer, z)
        let layers: Vec<Vec<Vec<(usize, f64)>>> = (0..nzones)
            .map(|zi| {
                let zf = &frame.zones[zi];
                let (top, base) = &frame.bounds[zi];
                (0..nj)
                    .map(|j| match (top.z_at_node(i, j), base.z_at_node(i, j)) {
                        (Some(t), Some(b)) => (0..zf.layers)
                            .filter_map(|l| zf.z_of(zf.layer_centre(l), t, b).map(|z| (l, z)))
                            .collect(),
                        _ => Vec::new(),
                    })
                    .collect()
            })
            .collect();
        // krige every zone and property on the layer centres
        let mut est: Vec<Vec<Vec<(f64, f64)>>> = Vec::with_capacity(zps.len());
        for (q, zp) in zps.iter().enumerate() {
            let columns: Vec<Vec<Target>> = (0..nj)
                .map(|j| {
                    let (x, y) = g.node_xy(i as f64, j as f64);
                    layers[zp.zone][j]
                        .iter()
                        .map(|&(l, z)| {
                            zp.target(
                                g,
                                background,
                                i,
                                j,
                                [x, y, frame.zones[zp.zone].layer_centre(l)],
                                z,
                            )
                        })
                        .collect()
                })
                .collect();
            let ge = krigers[q].krige_columns(&columns)?;
            stats[q] += ge.stats;
            let sill = zp.model.sill();
            est.push(
                ge.columns
                    .into_iter()
                    .zip(&columns)
                    .map(|(c, targets)| {
                        c.into_iter()
                            .zip(targets)
                            .map(|(e, t)| {
                                if e.note == Note::NoNeighbours || !e.value.is_finite() {
                                    let fallback = match zp.method {
                                        KrigingMethod::SimpleTrend => t.trend.unwrap_or(zp.mean),
                                        _ => zp.mean,
                                    };
                                    (fallback, sill)
                                } else {
                                    (e.value, e.variance.max(0.0))
                                }
                            })
                            .collect()
                    })
                    .collect(),
            );
        }
        // facies probabilities on the layer centres
        let mut fest: Vec<Option<crate::geostat::indicator::FaciesGrid>> =
            Vec::with_capacity(nzones);
        for (zi, fe) in facies_estimators.iter().enumerate() {
            match fe {
                None => fest.push(None),
                Some(fe) => {
                    let columns: Vec<Vec<Target>> = (0..nj)
                        .map(|j| {
                            let (x, y) = g.node_xy(i as f64, j as f64);
                            layers[zi][j]
                                .iter()
                                .map(|&(l, _)| Target::at([x, y, frame.zones[zi].layer_centre(l)]))
                                .collect()
                        })
                        .collect();
                    fest.push(Some(fe.estimate_columns(&columns)?));
                }
            }
        }
        // the report's mid-layer maps: the layer-centre estimates with the facies trend
        for (q, zp) in zps.iter().enumerate() {
            let (mean_map, sd_map) = &mut maps[q];
            for j in 0..nj {
                let col = &layers[zp.zone][j];
                let Some(n) = col.iter().position(|&(l, _)| l == mean_map.layer) else {
                    continue;
                };
                let Some(&(m, v)) = est[q][j].get(n) else {
                    continue;
                };
                let (mut mix, mut mix_var) = (0.0, 0.0);
                if nk > 0 && !zp.facies_offsets.is_empty() {
                    let kriged = match &fest[zp.zone] {
                        Some(fg) => {
                            let c = &fg.columns[j];
                            if n < c.len() {
                                Ok((c.target(n).to_vec(), c.variance_ratio[n]))
                            } else {
                                Ok((vec![1.0 / nk as f64; nk], 1.0))
                            }
                        }
                        None => Ok((vec![1.0 / nk as f64; nk], 1.0)),
                    };
                    let kz = ((col[n].1 - g.z0) / g.dz)
                        .round()
                        .clamp(0.0, (nz - 1) as f64) as usize;
                    let pr = facies_volumes.blend(kriged, g.trace_index(i, j) * nz + kz)?;
                    (mix, mix_var) = facies_mix(&zp.facies_offsets, &pr);
                }
                mean_map.values[i * nj + j] = clip_property(p, zp.prop, m + mix);
                sd_map.values[i * nj + j] = (v + mix_var).sqrt();
            }
        }
        // resample onto the depth grid, trace by trace
        let traces: Vec<Result<TraceResult>> = (0..nj)
            .into_par_iter()
            .map(|j| {
                let mut tr = vec![0f32; nz * nvol];
                let (mut cin, mut cout) = (0u64, 0u64);
                let mut clip = vec![0u64; zps.len()];
                let mut facies_error: Option<Error> = None;
                for (k, cell) in tr.chunks_exact_mut(nvol).enumerate() {
                    let Some(pos) = frame.locate_cell(g, i, j, k) else {
                        cout += 1;
                        let bg = background
                            .and_then(|b| b.data.get(g.trace_index(i, j) * nz + k).copied())
                            .unwrap_or(0.0);
                        cell.fill(0.0);
                        cell[0] = bg;
                        cell[6] = -1.0;
                        if nk > 0 {
                            cell[7 + nk] = -1.0;
                        }
                        continue;
                    };
                    cin += 1;
                    let zf = &frame.zones[pos.zone];
                    cell[6] = pos.zone as f32;
                    // facies probabilities first: the facies trend of the properties uses them
                    let mut cell_probs: Option<Vec<f64>> = None;
                    if nk > 0 {
                        let probs = facies_at(
                            &fest[pos.zone],
                            &facies_estimators[pos.zone],
                            &layers[pos.zone][j],
                            j,
                            pos.s / zf.cell_thickness - 0.5,
                            g.node_xy(i as f64, j as f64),
                            pos.s,
                            nk,
                        );
                        let cell_index = g.trace_index(i, j) * nz + k;
                        match facies_volumes.blend(probs, cell_index) {
                            Ok(pr) => {
                                for (f, v) in pr.iter().enumerate() {
                                    cell[7 + f] = *v as f32;
                                }
                                cell[7 + nk] =
                                    most_likely_facies(&pr, &codes).map_or(-1.0, |c| c as f32);
                                cell_probs = Some(pr);
                            }
                            Err(e) => {
                                if facies_error.is_none() {
                                    facies_error = Some(e);
                                }
                            }
                        }
                    }
                    for (q, zp) in zps.iter().enumerate().filter(|(_, zp)| zp.zone == pos.zone) {
                        let col = &layers[pos.zone][j];
                        let e = &est[q][j];
                        let (m, v) = if col.is_empty() {
                            // a column thinner than half a cell: no layer centre inside it
                            let (x, y) = g.node_xy(i as f64, j as f64);
                            let t = zp.target(g, background, i, j, [x, y, pos.s], g.z_at(k));
                            match krigers[q].estimate(&t) {
                                Ok(e) if e.value.is_finite() => (e.value, e.variance.max(0.0)),
                                _ => (zp.mean, zp.model.sill()),
                            }
                        } else {
                            interpolate_layers(col, e, pos.s / zf.cell_thickness - 0.5)
                        };
                        let (mix, mix_var) = cell_probs
                            .as_deref()
                            .map_or((0.0, 0.0), |pr| facies_mix(&zp.facies_offsets, pr));
                        let (mut m, v) = (m + mix, v + mix_var);
                        if zp.prop > 0 {
                            let (lo, hi) = if zp.prop == 1 {
                                p.bounds.epsilon
                            } else {
                                p.bounds.delta
                            };
                            if m < lo || m > hi {
                                m = m.clamp(lo, hi);
                                clip[q] += 1;
                            }
                        }
                        cell[2 * zp.prop] = m as f32;
                        cell[2 * zp.prop + 1] = v.sqrt() as f32;
                    }
                }
                if let Some(e) = facies_error {
                    return Err(e);
                }
                Ok((tr, cin, cout, clip))
            })
            .collect();
        let traces: Vec<TraceResult> = traces.into_iter().collect::<Result<_>>()?;
        if i == section_inline {
            section = Some(section_of(p, &frame, i, nz, nvol, &traces));
        }
        let mut buf = vec![0f32; nz];
        for (tr, cin, cout, clip) in &traces {
            cells_in += cin;
            cells_out += cout;
            for (q, c) in clip.iter().enumerate() {
                clipped[q] += c;
            }
            for (v, w) in writers.iter_mut().enumerate() {
                for (k, b) in buf.iter_mut().enumerate() {
                    *b = tr[k * nvol + v];
                }
                w.write_trace(&buf)?;
            }
        }
        pb.inc(1);
    }
    pb.finish_and_clear();
    for w in writers {
        w.finish()?;
    }

    // sample banks per region (zone, facies) or (zone, area, facies), drawn from the written volumes
    let mut pools = Vec::new();
    // (zone, area, facies, values, well) of every pool member, for the cross-plots
    type RegionSample = (usize, Option<usize>, Option<usize>, [f64; 3], usize);
    let mut region_samples: Vec<RegionSample> = Vec::new();
    for zi in 0..nzones {
        let mut area_slots: Vec<Option<usize>> = (0..p.areas.len())
            .filter(|&a| p.areas[a].zones.contains(&zi))
            .map(Some)
            .collect();
        // the implicit area `rest`: zone nodes in none of its areas (or the whole zone)
        let rest_has_nodes = (0..g.inline_count).any(|i| {
            (0..g.xline_count)
                .any(|j| crate::project::area_of_node(&p.areas, g, zi, i, j).is_none())
        });
        if area_slots.is_empty() || rest_has_nodes {
            area_slots.push(None);
        }
        let joint = joint_samples(&blocked, zi, &zps, &loo, &codes);
        for s in &joint {
            region_samples.push((
                zi,
                crate::project::area_of_xy(&p.areas, g, zi, s.xy[0], s.xy[1]),
                s.facies,
                s.values,
                s.well,
            ));
        }
        let points: Vec<[f64; 2]> = joint.iter().map(|s| s.xy).collect();
        let ws: Vec<usize> = joint.iter().map(|s| s.well).collect();
        let vp0: Vec<f64> = joint.iter().map(|s| s.values[0]).collect();
        let weights = well_decluster_weights(&points, &ws, &vp0)?;
        let slot: Vec<usize> = joint
            .iter()
            .map(|s| {
                let a = crate::project::area_of_xy(&p.areas, g, zi, s.xy[0], s.xy[1]);
                area_slots.iter().position(|x| *x == a).unwrap_or(0)
            })
            .collect();
        pools.extend(zone_area_pools(
            zi,
            &joint,
            &weights,
            nk,
            &area_slots,
            &slot,
        ));
    }
    super::banks::assign_streams(&mut pools, nzones, nk);
    let bank_volumes = BankVolumes {
        zone: metas[6].3.clone(),
        means: [metas[0].3.clone(), metas[2].3.clone(), metas[4].3.clone()],
        probabilities: (0..nk).map(|f| metas[7 + f].3.clone()).collect(),
        facies_offsets: (0..nzones)
            .map(|zi| {
                (0..nk)
                    .map(|f| {
                        let mut d = [0.0; 3];
                        for zp in zps.iter().filter(|zp| zp.zone == zi) {
                            d[zp.prop] = zp.facies_offsets.get(f).copied().unwrap_or(0.0);
                        }
                        d
                    })
                    .collect()
            })
            .collect(),
    };
    let (bank_rows, masses) = draw_banks(
        g,
        &frame,
        &bank_volumes,
        &pools,
        &p.areas,
        p.seed,
        p.bank_count,
    )?;
    let bank_dir = out.join("banks");
    let mut bank_entries = Vec::with_capacity(pools.len());
    let mut bank_reports = Vec::with_capacity(pools.len());
    let mut crossplots: Vec<CrossPlotRegion> = Vec::with_capacity(pools.len());
    for (r, pool) in pools.iter().enumerate() {
        let zname = &p.zones[pool.zone].name;
        let facies = pool
            .facies
            .and_then(|f| p.facies.get(f))
            .map(|f| (f.name.as_str(), f.code));
        let area: Option<&str> = pool.area.map(|a| {
            a.and_then(|a| p.areas.get(a))
                .map_or(crate::project::REST_AREA, |a| a.name.as_str())
        });
        let zone_area = match area {
            Some(a) => format!("zone {zname} area {a}"),
            None => format!("zone {zname}"),
        };
        let region = match facies {
            Some((f, _)) => format!("{zone_area} facies {f}"),
            None => zone_area.clone(),
        };
        let rows = bank_rows.get(r).map_or(&[][..], |v| v.as_slice());
        let members: Vec<&RegionSample> = region_samples
            .iter()
            .filter(|s| {
                s.0 == pool.zone
                    && pool.area.map_or(true, |a| a == s.1)
                    && pool.facies.map_or(true, |f| Some(f) == s.2)
            })
            .collect();
        let mut member_wells: Vec<usize> = members.iter().map(|s| s.4).collect();
        member_wells.sort_unstable();
        member_wells.dedup();
        crossplots.push(CrossPlotRegion {
            region: region.clone(),
            bank: rows
                .chunks_exact(7)
                .map(|c| [f64::from(c[0]), f64::from(c[1]), f64::from(c[2])])
                .collect(),
            wells: members.iter().map(|s| s.3).collect(),
            well_count: member_wells.len(),
        });
        let mass = masses.get(r).copied().unwrap_or(0.0);
        let entry = write_region(
            &bank_dir, &out, pool, rows, mass, zname, area, facies, p.seed,
        )?;
        if pool.borrowed() {
            let whose = match pool.source {
                PoolSource::Area => {
                    format!("the residual pool of the whole area ({zone_area}, every facies)")
                }
                _ => "the residual pool of the whole zone".to_string(),
            };
            warnings.push(format!(
                "bank {region}: only {} samples from {} wells (at least {} samples and {} wells wanted); too few to be trusted, {whose} ({} samples, {} wells) is used",
                pool.own_samples,
                pool.own_wells,
                super::banks::MIN_REGION_SAMPLES,
                super::banks::MIN_REGION_WELLS,
                pool.rows.len(),
                pool.wells
            ));
        }
        if pool.rows.is_empty() {
            warnings.push(format!(
                "bank {region}: no well sample has vp0, epsilon and delta in this zone; the bank is empty"
            ));
        } else if entry.count == 0 {
            warnings.push(format!(
                "bank {region}: the facies has zero probability in every cell of the zone; the bank is empty"
            ));
        }
        bank_reports.push(BankReport {
            zone: zname.clone(),
            area: area.map(str::to_string),
            facies: facies.map(|f| f.0.to_string()),
            count: entry.count,
            pool_count: entry.pool_count,
            wells: entry.wells,
            region_samples: pool.own_samples,
            region_wells: pool.own_wells,
            pool: entry.pool.clone(),
        });
        bank_entries.push(entry);
    }

    // reports and manifest
    drop(krigers);
    drop(facies_estimators);
    let facies_reports: Vec<FaciesZoneReport> = facies_setups
        .iter()
        .enumerate()
        .filter_map(|(zi, s)| {
            s.as_ref().map(|s| FaciesZoneReport {
                zone: p.zones[zi].name.clone(),
                samples: s.sample_count(),
                wells: s.well_count(),
                proportions: p
                    .facies
                    .iter()
                    .zip(s.proportions())
                    .map(|(f, q)| (f.name.clone(), *q))
                    .collect(),
                source: match (
                    facies_volumes.use_probabilities,
                    facies_volumes.label.is_some(),
                    p.volumes.blend_facies_with_wells,
                ) {
                    (true, _, true) => {
                        "indicator kriging blended with the facies probability volumes".into()
                    }
                    (true, _, false) => "the facies probability volumes alone".into(),
                    (false, true, true) => {
                        "indicator kriging blended with the facies-label volume".into()
                    }
                    (false, true, false) => "the facies-label volume alone".into(),
                    _ => "indicator kriging of the well facies".into(),
                },
            })
        })
        .collect();
    let trend_zones: Vec<bool> = (0..nzones)
        .map(|zi| {
            zps.iter()
                .any(|zp| zp.zone == zi && !zp.facies_offsets.is_empty())
        })
        .collect();
    let mut zones = Vec::with_capacity(zps.len());
    for (q, zp) in zps.into_iter().enumerate() {
        let mut r = zp.report;
        let s = stats[q];
        r.targets = s.targets;
        r.solves = s.solves;
        r.reuses = s.reuses;
        r.no_neighbours = s.no_neighbours;
        r.drift_fallbacks = s.drift_fallbacks;
        r.clipped_cells = clipped[q];
        if s.no_neighbours > 0 {
            warnings.push(format!(
                "zone {} {}: {} layer centres had no well sample within the search radius and hold the zone mean with the sill as variance",
                r.zone, r.property, s.no_neighbours
            ));
        }
        zones.push(r);
    }
    let mut manifest = Manifest::new(
        p,
        OutsideFill {
            zone: -1,
            vp0_mean: if background.is_some() {
                "background_vp0".into()
            } else {
                "0".into()
            },
            std: 0.0,
            epsilon_delta_mean: 0.0,
        },
    );
    manifest.banks = bank_entries;
    for (zi, mz) in manifest.zones.iter_mut().enumerate() {
        let offs = bank_volumes.facies_offsets.get(zi);
        if trend_zones.get(zi).copied().unwrap_or(false) {
            mz.facies_trend = p
                .facies
                .iter()
                .enumerate()
                .map(|(f, fd)| {
                    let d = offs.and_then(|o| o.get(f)).copied().unwrap_or([0.0; 3]);
                    (fd.name.clone(), d)
                })
                .collect();
        }
    }
    for (prop, stat, unit, path) in &metas {
        manifest.volumes.push(ManifestVolume {
            property: prop.clone(),
            statistic: stat.clone(),
            unit: unit.clone(),
            path: relative(&out, path),
        });
    }
    let models_path = out.join("variograms.toml");
    let mut toml_text = String::from("# Variogram models used by this build, in project-file syntax: paste into the\n# project under [variograms.<zone>.<property>] to fix or edit them.\n");
    for r in &zones {
        let _ = writeln!(toml_text, "\n{}", r.variogram.toml);
    }
    write_atomic(&models_path, toml_text.as_bytes())?;
    manifest.files.push(ManifestFile {
        kind: "variogram_models".into(),
        path: relative(&out, &models_path),
    });
    let summary_path = out.join("build_summary.json");
    let report = BuildReport {
        out: out.clone(),
        manifest: manifest_path.clone(),
        zones,
        cells_in_zones: cells_in,
        cells_outside: cells_out,
        facies: facies_reports,
        banks: bank_reports,
        facies_label_confusion: facies_volumes.confusion.as_ref().map(|c| {
            p.facies
                .iter()
                .zip(c)
                .map(|(l, row)| {
                    (
                        l.name.clone(),
                        p.facies
                            .iter()
                            .zip(row)
                            .map(|(f, q)| (f.name.clone(), *q))
                            .collect(),
                    )
                })
                .collect()
        }),
        warnings,
    };
    let text = serde_json::to_string_pretty(&report)
        .map_err(|e| Error::inconsistent(format!("cannot encode the build summary: {e}")))?;
    write_atomic(&summary_path, text.as_bytes())?;
    manifest.files.push(ManifestFile {
        kind: "build_summary".into(),
        path: relative(&out, &summary_path),
    });
    let report_path = out.join("report.html");
    refuse_overwrite_input(&report_path, &inputs)?;
    manifest.files.push(ManifestFile {
        kind: "report".into(),
        path: relative(&out, &report_path),
    });
    let mut files: Vec<(String, String)> = manifest
        .volumes
        .iter()
        .map(|v| {
            (
                format!("volume {} {} ({})", v.property, v.statistic, v.unit),
                v.path.clone(),
            )
        })
        .collect();
    for b in &manifest.banks {
        files.push(("bank".into(), b.path.clone()));
        files.push(("residual pool".into(), b.pool_path.clone()));
    }
    files.extend(
        manifest
            .files
            .iter()
            .map(|f| (f.kind.clone(), f.path.clone())),
    );
    files.push(("manifest".into(), relative(&out, &manifest_path)));
    let records: Vec<VariogramRecord> = report.zones.iter().map(|z| z.variogram.clone()).collect();
    let map_figures: Vec<MapFigure> = maps.into_iter().flat_map(|(m, s)| [m, s]).collect();
    let map_wells = crate::report::data::well_positions_by_zone(&study, &blocked);
    let facies_trend_rows: Vec<crate::report::ZoneFaciesTrend> = manifest
        .zones
        .iter()
        .map(|z| (z.name.clone(), z.facies_trend.clone()))
        .collect();
    crate::report::write(
        &report_path,
        &ReportInputs {
            kind: ReportKind::Build,
            study: &study,
            variograms: &records,
            maps: &map_figures,
            map_wells: &map_wells,
            section: section.as_ref(),
            crossplots: &crossplots,
            facies_trend: &facies_trend_rows,
            label_confusion: report.facies_label_confusion.as_deref(),
            validation: None,
            files: &files,
            warnings: &report.warnings,
        },
    )?;
    manifest.write(&manifest_path)?;
    Ok(report)
}

/// The facies volumes of a project and how they combine with the kriged
/// probabilities of the wells at a cell.
pub(crate) struct FaciesVolumes<'a> {
    /// The facies-label volume.
    pub(crate) label: Option<&'a crate::study::InputVolume>,
    /// One probability volume per project facies.
    pub(crate) probabilities: Vec<Option<&'a crate::study::InputVolume>>,
    /// Whether every facies has a probability volume (they are used, not the labels).
    pub(crate) use_probabilities: bool,
    /// `[volumes] blend_facies_with_wells`.
    pub(crate) blend: bool,
    /// Project facies codes.
    pub(crate) codes: Vec<i32>,
    /// Confusion of the label volume calibrated at the wells
    /// ([`crate::geostat::indicator::label_confusion`]); `None`: hard labels.
    pub(crate) confusion: Option<Vec<Vec<f64>>>,
}

impl FaciesVolumes<'_> {
    /// The facies volumes of `study`, the label volume's confusion calibrated
    /// at the blocked samples `blocked` (their facies against the label of the
    /// nearest grid cell).
    pub(crate) fn of<'s>(study: &'s Study, blocked: &[&BlockedSample]) -> FaciesVolumes<'s> {
        let p = &study.project;
        let probabilities: Vec<Option<&crate::study::InputVolume>> = p
            .facies
            .iter()
            .map(|f| {
                study
                    .volumes
                    .iter()
                    .find(|v| v.role == format!("facies_probability:{}", f.name))
            })
            .collect();
        let codes: Vec<i32> = p.facies.iter().map(|f| f.code).collect();
        let label = study.volumes.iter().find(|v| v.role == "facies");
        let g = &p.grid;
        let confusion = label
            .filter(|_| !codes.is_empty() && p.volumes.calibrate_facies_labels)
            .map(|lv| {
                let pairs: Vec<(usize, usize)> = blocked
                    .iter()
                    .filter_map(|b| {
                        let f = codes.iter().position(|c| Some(*c) == b.facies)?;
                        let (fi, fj) = g.xy_to_ij(b.x, b.y);
                        let (i, j) = (fi.round(), fj.round());
                        let k = ((b.z - g.z0) / g.dz).round();
                        if i < 0.0 || j < 0.0 || k < 0.0 {
                            return None;
                        }
                        let (i, j, k) = (i as usize, j as usize, k as usize);
                        if i >= g.inline_count || j >= g.xline_count || k >= g.z_count {
                            return None;
                        }
                        let v = f64::from(*lv.data.get(g.trace_index(i, j) * g.z_count + k)?);
                        let r = v.round();
                        let l = codes.iter().position(|c| f64::from(*c) == r)?;
                        Some((l, f))
                    })
                    .collect();
                label_confusion(&pairs, codes.len())
            });
        FaciesVolumes {
            label,
            use_probabilities: probabilities.iter().all(|v| v.is_some())
                && !probabilities.is_empty(),
            probabilities,
            blend: p.volumes.blend_facies_with_wells,
            codes,
            confusion,
        }
    }

    /// The facies probabilities at grid cell `cell_index` from the kriged
    /// probabilities of the wells and their variance ratio (`kriged`), blended
    /// with the volumes ([`blend_with_volume`]); the kriged probabilities alone
    /// without volumes, the volumes alone when blending is off.
    pub(crate) fn blend(
        &self,
        kriged: Result<(Vec<f64>, f64)>,
        cell_index: usize,
    ) -> Result<Vec<f64>> {
        let (pk, ratio) = kriged?;
        // without blending, the volume's probabilities are used alone
        let ratio = if self.blend { ratio } else { 1.0 };
        if self.use_probabilities {
            let pv: Vec<f64> = self
                .probabilities
                .iter()
                .map(|v| {
                    v.and_then(|v| v.data.get(cell_index))
                        .map_or(0.0, |x| f64::from(*x))
                })
                .collect();
            return match volume_probabilities(&pv)? {
                Some(pv) => blend_with_volume(&pk, ratio, &pv),
                None => Ok(pk),
            };
        }
        if let Some(lv) = self.label {
            let code = f64::from(lv.data.get(cell_index).copied().unwrap_or(f32::NAN));
            let pv = match &self.confusion {
                Some(c) => confused_label_probabilities(code, &self.codes, c)?,
                None => label_probabilities(code, &self.codes, 1.0)?,
            };
            return match pv {
                Some(pv) => blend_with_volume(&pk, ratio, &pv),
                None => Ok(pk),
            };
        }
        Ok(pk)
    }
}

/// Clip an epsilon (`prop` 1) or delta (2) value to the project bounds; Vp0 as is.
pub(crate) fn clip_property(p: &crate::project::Project, prop: usize, m: f64) -> f64 {
    match prop {
        1 => m.clamp(p.bounds.epsilon.0, p.bounds.epsilon.1),
        2 => m.clamp(p.bounds.delta.0, p.bounds.delta.1),
        _ => m,
    }
}

/// The report's section of inline `i` from its resampled traces: Vp0 mean
/// (NaN outside every zone) and the depth of every zone's top and of the
/// deepest base at each trace.
fn section_of(
    p: &crate::project::Project,
    frame: &StratFrame,
    i: usize,
    nz: usize,
    nvol: usize,
    traces: &[TraceResult],
) -> SectionFigure {
    let nj = traces.len();
    let mut values = vec![f64::NAN; nj * nz];
    for (j, (tr, ..)) in traces.iter().enumerate() {
        for k in 0..nz {
            if tr[k * nvol + 6] >= 0.0 {
                values[j * nz + k] = f64::from(tr[k * nvol]);
            }
        }
    }
    let mut horizons: Vec<(String, Vec<f64>)> = Vec::new();
    let mut seen: Vec<usize> = Vec::new();
    for (zi, z) in p.zones.iter().enumerate() {
        let (top, base) = &frame.bounds[zi];
        for (h, surf) in [(z.top, top), (z.base, base)] {
            if seen.contains(&h) {
                continue;
            }
            seen.push(h);
            let name = p
                .horizons
                .get(h)
                .map_or_else(|| format!("horizon {h}"), |d| d.name.clone());
            let zs = (0..nj)
                .map(|j| surf.z_at_node(i, j).unwrap_or(f64::NAN))
                .collect();
            horizons.push((name, zs));
        }
    }
    SectionFigure {
        inline: p.grid.inline_number(i),
        nj,
        nz,
        values,
        horizons,
    }
}

/// Leave-one-well-out kriged means of every sample of `zp`, keyed by (well,
/// layer): the kriging system of the zone and property rebuilt without the
/// sample's well and solved at the sample (cross-validation by wells, common
/// practice). Where no other well is in reach the zone mean (or the trend of
/// simple kriging with a trend) stands in; epsilon and delta are clipped to the
/// project bounds as the mean volumes are, except with the facies trend, whose
/// kriged values (`v - t_f`) are not the property itself.
pub(crate) fn loo_means(
    zp: &ZoneProperty,
    params: NeighbourhoodParams,
    p: &crate::project::Project,
) -> Result<BTreeMap<(u32, i32), f64>> {
    let all = zp.samples.samples();
    let mut wells: Vec<u32> = all.iter().map(|s| s.well).collect();
    wells.sort_unstable();
    wells.dedup();
    let fallback = |s: &Sample| match zp.method {
        KrigingMethod::SimpleTrend => s.trend.unwrap_or(zp.mean),
        _ => zp.mean,
    };
    // with the facies trend the kriged values are `v - t_f`, not the property,
    // so the bounds do not apply to them
    let clip = |m: f64| {
        if zp.facies_offsets.is_empty() {
            clip_property(p, zp.prop, m)
        } else {
            m
        }
    };
    type WellMeans = Vec<((u32, i32), f64)>;
    let per_well: Vec<Result<WellMeans>> = wells
        .par_iter()
        .map(|&w| {
            let others: Vec<Sample> = all.iter().filter(|s| s.well != w).copied().collect();
            let mine = all.iter().filter(|s| s.well == w);
            let kriger = if others.is_empty() {
                None
            } else {
                let set = SampleSet::new(others)?;
                Some(set)
            };
            let k = match &kriger {
                Some(set) => Kriger::new(set, &zp.model, params, zp.kind).ok(),
                None => None,
            };
            Ok(mine
                .map(|s| {
                    let t = Target {
                        pos: s.pos,
                        drift: s.drift,
                        trend: s.trend,
                    };
                    let m = match k.as_ref().map(|k| k.estimate(&t)) {
                        Some(Ok(e)) if e.note != Note::NoNeighbours && e.value.is_finite() => {
                            e.value
                        }
                        _ => fallback(s),
                    };
                    ((s.well, s.layer), clip(m))
                })
                .collect())
        })
        .collect();
    let mut out = BTreeMap::new();
    for r in per_well {
        out.extend(r?);
    }
    Ok(out)
}

/// The blocked samples of zone `zi` with all three properties (and a facies
/// among `codes` when the project has facies) with their leave-one-well-out
/// kriged means (`loo`, one map per entry of `zps`): the members of the
/// residual pools of the banks.
pub(crate) fn joint_samples(
    blocked: &[&BlockedSample],
    zi: usize,
    zps: &[ZoneProperty],
    loo: &[BTreeMap<(u32, i32), f64>],
    codes: &[i32],
) -> Vec<JointSample> {
    let nk = codes.len();
    let mut joint = Vec::new();
    for b in blocked.iter().filter(|b| b.zone == zi) {
        let (Some(v0), Some(v1), Some(v2)) = (b.vp0, b.epsilon, b.delta) else {
            continue;
        };
        let facies = if nk > 0 {
            match b.facies.and_then(|c| codes.iter().position(|x| *x == c)) {
                Some(f) => Some(f),
                None => continue,
            }
        } else {
            None
        };
        let key = (b.well as u32, b.layer as i32);
        let mut m = [0.0; 3];
        for (q, zp) in zps.iter().enumerate().filter(|(_, zp)| zp.zone == zi) {
            m[zp.prop] = loo[q].get(&key).copied().unwrap_or(zp.mean);
        }
        joint.push(JointSample {
            well: b.well,
            facies,
            xy: [b.x, b.y],
            values: [v0, v1, v2],
            loo: m,
        });
    }
    joint
}

/// Indicator-kriging setups of every zone (None for zones without facies data
/// or projects without facies).
pub(crate) fn prepare_facies(
    study: &Study,
    frame: &StratFrame,
    blocked: &[&BlockedSample],
    zps: &[ZoneProperty],
    warnings: &mut Vec<String>,
) -> Result<Vec<Option<IndicatorSetup>>> {
    let p = &study.project;
    let g = &p.grid;
    let codes: Vec<i32> = p.facies.iter().map(|f| f.code).collect();
    let mut out = Vec::with_capacity(p.zones.len());
    if codes.is_empty() {
        out.resize_with(p.zones.len(), || None);
        return Ok(out);
    }
    let corners = g.corners();
    let diag =
        ((corners[0].0 - corners[2].0).powi(2) + (corners[0].1 - corners[2].1).powi(2)).sqrt();
    let spacing = g.inline_spacing.max(g.xline_spacing);
    for (zi, zf) in frame.zones.iter().enumerate() {
        let mut fs = Vec::new();
        let mut fs_vp0 = Vec::new();
        for b in blocked.iter().filter(|b| b.zone == zi) {
            if let Some(s) = FaciesSample::from_blocked(
                b,
                zf.layer_centre(b.layer),
                &codes,
                true,
                study.wells[b.well].name(),
            )? {
                fs.push(s);
                fs_vp0.push(b.vp0.unwrap_or(f64::NAN));
            }
        }
        if fs.is_empty() {
            if study
                .wells
                .iter()
                .any(|w| w.logs.contains_key(&crate::project::CurveProperty::Facies))
            {
                warnings.push(format!(
                    "zone {}: no facies samples; no facies probabilities",
                    zf.name
                ));
            }
            out.push(None);
            continue;
        }
        let weights = decluster_weights(&fs, &fs_vp0)?;
        let proportions = weighted_proportions(&fs, Some(&weights))?;
        let vp0 = zps
            .iter()
            .find(|z| z.zone == zi && z.prop == 0)
            .map(|z| &z.model);
        let fallback = vp0
            .and_then(|m| m.search_structure())
            .map(|s| (s.range_major, s.range_minor, s.azimuth));
        let opts = IndicatorOptions {
            method: IndicatorMethod::Simple,
            fit: IndicatorFitOptions::for_zone(
                zf.cell_thickness,
                zf.reference_thickness,
                diag,
                spacing,
                fallback,
            )?,
            overrides: Vec::new(),
            ratio_model: vp0.cloned(),
        };
        let setup = IndicatorSetup::prepare(&fs, &codes, &proportions, &opts)?;
        warnings.extend(
            setup
                .warnings()
                .iter()
                .map(|w| format!("zone {} facies: {w}", zf.name)),
        );
        out.push(Some(setup));
    }
    Ok(out)
}

/// Cell-declustering weights of facies samples, swept on their Vp0 (`vp0`, one
/// per sample, NaN where missing); see [`well_decluster_weights`].
pub(crate) fn decluster_weights(fs: &[FaciesSample], vp0: &[f64]) -> Result<Vec<f64>> {
    let points: Vec<[f64; 2]> = fs.iter().map(|f| [f.pos[0], f.pos[1]]).collect();
    let wells: Vec<usize> = fs.iter().map(|f| f.well as usize).collect();
    well_decluster_weights(&points, &wells, vp0)
}

/// Cell-declustering weights (Deutsch 1989) of samples at map positions `points`
/// (m) from wells `wells`: every well first gets the same total weight, shared
/// by its samples, then the wells are declustered in plan, averaged over 5 x 5
/// grid origins, with the cell size chosen by the usual sweep on the primary
/// variable `values` (Vp0; NaN where missing, taken as the mean): 15 sizes from
/// the smallest to half the largest distance between wells; the size that
/// minimises the declustered mean when the wells are clustered in high values
/// (the declustered mean at the median nearest-well spacing is below the naive
/// mean), else the one that maximises it (GSLIB declus practice, Deutsch and
/// Journel 1998).
pub(crate) fn well_decluster_weights(
    points: &[[f64; 2]],
    wells: &[usize],
    values: &[f64],
) -> Result<Vec<f64>> {
    let n = points.len();
    if n == 0 {
        return Ok(Vec::new());
    }
    // mean position of each well
    let mut ids: Vec<usize> = wells.to_vec();
    ids.sort_unstable();
    ids.dedup();
    if ids.len() < 2 {
        return Ok(vec![1.0 / n as f64; n]);
    }
    let centres: Vec<[f64; 2]> = ids
        .iter()
        .map(|id| {
            let (mut x, mut y, mut n) = (0.0, 0.0, 0.0);
            for (p, w) in points.iter().zip(wells) {
                if w == id {
                    x += p[0];
                    y += p[1];
                    n += 1.0;
                }
            }
            [x / n, y / n]
        })
        .collect();
    let mut nn: Vec<f64> = centres
        .iter()
        .enumerate()
        .map(|(a, c)| {
            centres
                .iter()
                .enumerate()
                .filter(|(b, _)| *b != a)
                .map(|(_, d)| ((c[0] - d[0]).powi(2) + (c[1] - d[1]).powi(2)).sqrt())
                .fold(f64::INFINITY, f64::min)
        })
        .collect();
    nn.sort_by(f64::total_cmp);
    let cell = nn[nn.len() / 2].max(1.0);
    let finite: Vec<f64> = values.iter().copied().filter(|v| v.is_finite()).collect();
    if finite.is_empty() || values.len() != points.len() {
        return crate::geostat::decluster::well_weights(points, wells, cell, 5);
    }
    let mean = finite.iter().sum::<f64>() / finite.len() as f64;
    let vals: Vec<f64> = values
        .iter()
        .map(|v| if v.is_finite() { *v } else { mean })
        .collect();
    let mut far = 0.0f64;
    for (a, c) in centres.iter().enumerate() {
        for d in &centres[a + 1..] {
            far = far.max(((c[0] - d[0]).powi(2) + (c[1] - d[1]).powi(2)).sqrt());
        }
    }
    let (lo, hi) = (nn[0].max(1.0), (far / 2.0).max(nn[0].max(1.0)));
    let sizes = crate::geostat::decluster::size_range(lo, hi, 15)?;
    let layout = crate::geostat::decluster::Layout::Wells { points, wells };
    let at_median = crate::geostat::decluster::well_weights(points, wells, cell, 5)?;
    let dmean: f64 = at_median.iter().zip(&vals).map(|(w, v)| w * v).sum::<f64>()
        / at_median.iter().sum::<f64>();
    let naive = vals.iter().sum::<f64>() / vals.len() as f64;
    let criterion = if dmean < naive {
        crate::geostat::decluster::SweepCriterion::MinimiseMean
    } else {
        crate::geostat::decluster::SweepCriterion::MaximiseMean
    };
    Ok(crate::geostat::decluster::sweep_layout(&layout, &vals, &sizes, 5, criterion)?.weights)
}

/// Facies probabilities and kriging-variance ratio at fractional layer position
/// `u` of column `j`, linear between layer centres (a convex combination of
/// probability vectors stays one); thin columns are kriged at the cell itself.
#[allow(clippy::too_many_arguments)]
fn facies_at(
    grid: &Option<crate::geostat::indicator::FaciesGrid>,
    est: &Option<IndicatorKriging<'_>>,
    col: &[(usize, f64)],
    j: usize,
    u: f64,
    xy: (f64, f64),
    s: f64,
    nk: usize,
) -> Result<(Vec<f64>, f64)> {
    let (Some(grid), Some(est)) = (grid, est) else {
        // a zone without facies data: no information, uniform probabilities
        return Ok((vec![1.0 / nk as f64; nk], 1.0));
    };
    let c = &grid.columns[j];
    if col.is_empty() || c.is_empty() {
        return est.estimate(&Target::at([xy.0, xy.1, s]));
    }
    let (a, b, f) = layer_bracket(col, u);
    let (pa, pb) = (c.target(a), c.target(b));
    let p = pa.iter().zip(pb).map(|(x, y)| x + f * (y - x)).collect();
    let r = c.variance_ratio[a] + f * (c.variance_ratio[b] - c.variance_ratio[a]);
    Ok((p, r))
}

/// Linear interpolation of (mean, variance) at fractional layer position `u`
/// (`u = s / h - 0.5`, so layer centre `l` is at `u = l`) between the layer
/// centres present in a column; nearest centre beyond the ends.
fn interpolate_layers(col: &[(usize, f64)], est: &[(f64, f64)], u: f64) -> (f64, f64) {
    let (k0, k1, f) = layer_bracket(col, u);
    let (a, b) = (est[k0], est[k1]);
    (a.0 + f * (b.0 - a.0), a.1 + f * (b.1 - a.1))
}

/// The two layer centres of a column (non-empty, contiguous layers) around
/// fractional layer position `u`, as indices into the column, and the weight of
/// the second: `value = (1 - f) * v[k0] + f * v[k1]`; the nearest centre
/// (f = 0) beyond the first and last.
fn layer_bracket(col: &[(usize, f64)], u: f64) -> (usize, usize, f64) {
    let first = col[0].0 as f64;
    let last = col[col.len() - 1].0 as f64;
    if u <= first {
        return (0, 0, 0.0);
    }
    if u >= last {
        return (col.len() - 1, col.len() - 1, 0.0);
    }
    // layers present are contiguous: index = layer - first
    let k = ((u - first).floor() as usize).min(col.len() - 2);
    (k, k + 1, u - col[k].0 as f64)
}

fn relative(base: &Path, p: &Path) -> String {
    p.strip_prefix(base)
        .unwrap_or(p)
        .to_string_lossy()
        .replace('\\', "/")
}

impl BuildReport {
    /// A readable text rendering.
    pub fn render_text(&self) -> String {
        let mut s = String::new();
        let _ = writeln!(
            s,
            "Prior volumes written to {} (manifest {})",
            self.out.display(),
            self.manifest.display()
        );
        let _ = writeln!(
            s,
            "  {} cells inside zones, {} outside (zone -1)",
            self.cells_in_zones, self.cells_outside
        );
        let _ = writeln!(
            s,
            "\n  {:<12} {:<8} {:<15} {:>7} {:>5} {:>9} {:>9} {:>9} {:>7}",
            "zone",
            "property",
            "method",
            "samples",
            "wells",
            "targets",
            "solves",
            "reused",
            "clipped"
        );
        for r in &self.zones {
            let _ = writeln!(
                s,
                "  {:<12} {:<8} {:<15} {:>7} {:>5} {:>9} {:>9} {:>9} {:>7}",
                r.zone,
                r.property,
                r.method,
                r.samples,
                r.wells,
                r.targets,
                r.solves,
                r.reuses,
                r.clipped_cells
            );
        }
        let _ = writeln!(
            s,
            "\nVariogram models (project-file syntax; also in variograms.toml):"
        );
        for r in &self.zones {
            let _ = writeln!(s, "{}", r.variogram.toml);
        }
        if !self.banks.is_empty() {
            let _ = writeln!(
                s,
                "\nSample banks (banks/, see manifest.json banks)\n  {:<12} {:<14} {:>7} {:>6} {:>7} {:>6} {:<6}",
                "zone", "facies", "samples", "pool", "region", "wells", "pool of"
            );
            for b in &self.banks {
                let _ = writeln!(
                    s,
                    "  {:<12} {:<14} {:>7} {:>6} {:>7} {:>6} {:<6}{}",
                    match &b.area {
                        Some(a) => format!("{}/{a}", b.zone),
                        None => b.zone.clone(),
                    },
                    b.facies.as_deref().unwrap_or("(all)"),
                    b.count,
                    b.pool_count,
                    b.region_samples,
                    b.wells,
                    b.pool,
                    match b.pool.as_str() {
                        "zone" =>
                            "  warning: too few wells or samples in the region, zone pool borrowed",
                        "area" =>
                            "  warning: too few wells or samples in the region, area pool borrowed",
                        _ => "",
                    }
                );
            }
        }
        if !self.warnings.is_empty() {
            let _ = writeln!(s, "\nWarnings");
            for w in &self.warnings {
                let _ = writeln!(s, "  {w}");
            }
        }
        let _ = writeln!(s, "\nCaution: {}", super::manifest::CAUTION);
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn layer_interpolation_is_linear_between_centres_and_flat_beyond() {
        let col = [(2usize, 0.0), (3, 0.0), (4, 0.0)];
        let est = [(10.0, 1.0), (20.0, 2.0), (40.0, 4.0)];
        assert_eq!(interpolate_layers(&col, &est, 1.0), (10.0, 1.0));
        assert_eq!(interpolate_layers(&col, &est, 2.0), (10.0, 1.0));
        assert_eq!(interpolate_layers(&col, &est, 2.5), (15.0, 1.5));
        assert_eq!(interpolate_layers(&col, &est, 3.75), (35.0, 3.5));
        assert_eq!(interpolate_layers(&col, &est, 9.0), (40.0, 4.0));
    }

    #[test]
    fn least_squares_line_recovers_an_exact_line() {
        let pts: Vec<(f64, f64)> = (0..10).map(|k| (k as f64, 3.0 + 0.5 * k as f64)).collect();
        let (a, b) = depth_trend(&pts).unwrap();
        assert!((a - 3.0).abs() < 1e-12 && (b - 0.5).abs() < 1e-12);
        assert!(depth_trend(&[(1.0, 2.0), (1.0, 3.0)]).is_none());
    }
}

#[cfg(test)]
mod facies_trend_tests {
    use super::facies_mix;
    use crate::geostat::indicator::label_confusion;

    #[test]
    fn facies_mix_is_the_mixture_mean_and_variance() {
        // offsets 10 and -20 with probabilities 0.25 / 0.75 (hand computed):
        // mean 0.25 * 10 - 0.75 * 20 = -12.5; law of total variance over the
        // facies: 0.25 * 22.5^2 + 0.75 * 7.5^2 = 168.75
        let (m, v) = facies_mix(&[10.0, -20.0], &[0.25, 0.75]);
        assert!((m + 12.5).abs() < 1e-12);
        assert!((v - 168.75).abs() < 1e-9);
        // a certain facies adds its offset and no variance
        assert_eq!(facies_mix(&[10.0, -20.0], &[0.0, 1.0]), (-20.0, 0.0));
        // no offsets (no facies trend), or mismatched lengths: nothing
        assert_eq!(facies_mix(&[], &[0.5, 0.5]), (0.0, 0.0));
        assert_eq!(facies_mix(&[1.0], &[0.5, 0.5]), (0.0, 0.0));
    }

    #[test]
    fn label_confusion_is_laplace_smoothed_counts() {
        // label 0 seen 3 times on facies 0 and once on facies 1; label 1 never
        let pairs = [(0, 0), (0, 0), (0, 0), (0, 1)];
        let c = label_confusion(&pairs, 2);
        assert!((c[0][0] - 4.0 / 6.0).abs() < 1e-12);
        assert!((c[0][1] - 2.0 / 6.0).abs() < 1e-12);
        assert_eq!(c[1], vec![0.5, 0.5]);
        // out-of-range pairs are ignored
        assert_eq!(label_confusion(&[(5, 0)], 2)[0], vec![0.5, 0.5]);
    }
}
