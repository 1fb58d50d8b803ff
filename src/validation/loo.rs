//! `stratiprior validate`: leave-one-well-out validation of the prior.
//!
//! For each well with blocked samples, in table order (in parallel over wells,
//! results in well order):
//!
//! 1. the horizons are re-tied without the well's tops
//!    ([`Study::without_well_tops`]) and every well is conditioned in that
//!    frame; the held-out well's blocked samples and zones come from it, the
//!    other wells' blocked samples are the kriging data;
//! 2. the build's preparation ([`crate::prior::build`]) runs on those data with
//!    the full-data variogram models (or refitted ones, `refit_variograms`),
//!    and the same kriging method, drift, trend, neighbourhood and clipping
//!    predict each held-out sample at (x, y, layer-centre s): kriged mean and
//!    kriging sd;
//! 3. the prior's predictive distribution is "bank style": the kriged mean plus
//!    the facies offset and the residual pool of the remaining wells
//!    ([`crate::prior::banks::zone_pools`]: residual = value - leave-one-well-out
//!    kriged mean among the remaining wells, declustered weights; the region of
//!    the sample's facies, or the zone pool when the region has fewer than
//!    `MIN_REGION_SAMPLES` samples or `MIN_REGION_WELLS` wells, or the sample
//!    has no facies). Areas (`[[areas]]`) are not used here: the pools are per
//!    zone and facies.
//!
//! Baselines, each from the remaining wells' blocked samples of the zone with
//! the property (`c_i = v_i - mean`, the zone-centred values, equal weights):
//!
//! * `zone_mean`: point = mean of the values; distribution = point + c_i (the
//!   remaining wells' values themselves);
//! * `nearest_well`: the well whose nearest zone sample is closest in plan to
//!   the held-out sample, its value at the same layer or the nearest layer with
//!   data (the shallower on ties); distribution = point + c_i;
//! * `idw`: inverse-distance weighting with power 2 (Shepard 1968) over the
//!   `[kriging] neighbours` nearest samples in the anisotropy-scaled space of
//!   the property's variogram (the space of the kriging search: the horizontal
//!   ranges and the vertical range scale x, y and s); distribution = point + c_i;
//! * `background` (vp0, with a background volume): the volume at the sample's
//!   (x, y, z); distribution = point + c_i.
//!
//! Scores per (well, zone, property, method), and pooled over wells (`all`):
//! see [`score`].

use crate::condition::blocking::BlockedSample;
use crate::condition::logs::condition_all;
use crate::error::{Error, Result};
use crate::geostat::indicator::IndicatorKriging;
use crate::geostat::kriging::Target;
use crate::geostat::kriging::{Kriger, Note};
use crate::geostat::variogram::VariogramModel;
use crate::geostat::CovarianceModel;
use crate::io_util::{refuse_overwrite_input, write_atomic};
use crate::prior::banks::zone_pools;
use crate::prior::build::{
    clip_property, facies_mix, joint_samples, loo_means, neighbourhood_params, prepare_facies,
    prepare_with_models, secondary_at, value_of, well_decluster_weights, FaciesVolumes, PROPERTIES,
};
use crate::prior::variograms::VariogramRecord;
use crate::prior::volume_sampling::sample_volume;
use crate::report::{ReportInputs, ReportKind, ValidationContent};
use crate::study::{load, Study};
use crate::validation::records::*;
use crate::validation::scores::{central_interval, crps_ensemble, wasserstein_1d, QuantileMethod};
use indicatif::{ProgressBar, ProgressStyle};
use rayon::prelude::*;
use serde::Serialize;
use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

/// Options of a validation.
#[derive(Debug, Clone)]
pub struct ValidateOptions {
    /// Output folder.
    pub out: PathBuf,
    /// Worker threads (rayon's default when `None`).
    pub threads: Option<usize>,
    /// Show a progress bar over wells.
    pub progress: bool,
    /// Refit the variograms without the held-out well (default: the full-data models).
    pub refit_variograms: bool,
}

/// What `validate` computed.
#[derive(Debug, Clone, Serialize)]
pub struct ValidationReport {
    /// Output folder.
    pub out: PathBuf,
    /// Wells held out in turn.
    pub wells: Vec<String>,
    /// Score rows: per well, zone, property and method, then pooled (`all`).
    pub rows: Vec<ScoreRow>,
    /// Predictions along each held-out well.
    pub predictions: Vec<WellPrediction>,
    /// Warnings.
    pub warnings: Vec<String>,
    /// Whether the variograms were refitted per held-out well.
    pub refit_variograms: bool,
}

/// One prediction of one method at one held-out sample.
struct Pred {
    well: usize,
    zone: usize,
    prop: usize,
    method: &'static str,
    obs: f64,
    point: f64,
    sd: f64,
    ens: Vec<f64>,
    w: Vec<f64>,
}

type WellResult = (Vec<Pred>, Option<WellPrediction>, Vec<String>);

/// Run a leave-one-well-out validation of the project at `project`.
pub fn validate(project: &Path, opts: &ValidateOptions) -> Result<ValidationReport> {
    crate::prior::build::with_threads(opts.threads, || validate_inner(project, opts))
}

fn validate_inner(project: &Path, opts: &ValidateOptions) -> Result<ValidationReport> {
    let study = load(project, opts.progress)?;
    let p = &study.project;
    let inputs = p.input_paths();
    let csv_path = opts.out.join("validation.csv");
    let json_path = opts.out.join("validation.json");
    refuse_overwrite_input(&csv_path, &inputs)?;
    refuse_overwrite_input(&json_path, &inputs)?;
    let report_path = opts.out.join("report.html");
    refuse_overwrite_input(&report_path, &inputs)?;
    let frame = study.strat_frame();
    let full = condition_all(&study, &frame)?;
    let with_data: Vec<usize> = full
        .iter()
        .filter(|w| !w.blocked.is_empty())
        .map(|w| w.well)
        .collect();
    if with_data.len() < 3 {
        return Err(Error::inconsistent(format!(
            "validate needs at least three wells, the project has {} with blocked samples",
            with_data.len()
        )));
    }
    let mut warnings = study.warnings.clone();
    let blocked: Vec<&BlockedSample> = full.iter().flat_map(|w| w.blocked.iter()).collect();
    // the full-data variograms: used for every held-out well unless refitted,
    // and drawn in the report either way
    let zps = prepare_with_models(&study, &frame, &blocked, None, &mut warnings)?;
    let records: Vec<VariogramRecord> = zps.iter().map(|z| z.report.variogram.clone()).collect();
    let models: Option<Vec<VariogramModel>> = if opts.refit_variograms {
        None
    } else {
        Some(zps.into_iter().map(|z| z.model).collect())
    };
    let pb = if opts.progress {
        let pb = ProgressBar::new(with_data.len() as u64);
        if let Ok(st) =
            ProgressStyle::with_template("{spinner} holding out well {pos}/{len} {bar:30} {eta}")
        {
            pb.set_style(st);
        }
        pb
    } else {
        ProgressBar::hidden()
    };
    let results: Vec<Result<WellResult>> = with_data
        .par_iter()
        .map(|&wi| {
            let r = hold_out(&study, wi, models.as_deref());
            pb.inc(1);
            r
        })
        .collect();
    pb.finish_and_clear();
    let mut preds = Vec::new();
    let mut predictions = Vec::new();
    for r in results {
        let (pr, wp, w) = r?;
        preds.extend(pr);
        predictions.extend(wp);
        warnings.extend(w);
    }
    let rows = score_rows(&study, &preds)?;
    let report = ValidationReport {
        out: opts.out.clone(),
        wells: with_data
            .iter()
            .map(|&w| study.wells[w].name().to_string())
            .collect(),
        rows,
        predictions,
        warnings,
        refit_variograms: opts.refit_variograms,
    };
    write_atomic(&csv_path, report.to_csv().as_bytes())?;
    let text = serde_json::to_string_pretty(&report)
        .map_err(|e| Error::inconsistent(format!("cannot encode the validation: {e}")))?;
    write_atomic(&json_path, text.as_bytes())?;
    let files = vec![
        (
            "validation table (CSV)".to_string(),
            "validation.csv".to_string(),
        ),
        (
            "validation scores and predictions (JSON)".to_string(),
            "validation.json".to_string(),
        ),
    ];
    crate::report::write(
        &report_path,
        &ReportInputs {
            kind: ReportKind::Validate,
            study: &study,
            variograms: &records,
            maps: &[],
            map_wells: &BTreeMap::new(),
            section: None,
            crossplots: &[],
            facies_trend: &[],
            label_confusion: None,
            validation: Some(ValidationContent {
                rows: &report.rows,
                predictions: &report.predictions,
                refit_variograms: report.refit_variograms,
            }),
            files: &files,
            warnings: &report.warnings,
        },
    )?;
    Ok(report)
}

/// Hold out well `wi`: predictions of every method at its blocked samples.
fn hold_out(study: &Study, wi: usize, models: Option<&[VariogramModel]>) -> Result<WellResult> {
    let name = study.wells[wi].name().to_string();
    let loo_study = study.without_well_tops(wi)?;
    let p = &loo_study.project;
    let g = &p.grid;
    let frame = loo_study.strat_frame();
    let cw = condition_all(&loo_study, &frame)?;
    let mut warnings = Vec::new();
    let held: Vec<&BlockedSample> = cw
        .iter()
        .filter(|w| w.well == wi)
        .flat_map(|w| w.blocked.iter())
        .collect();
    if held.is_empty() {
        warnings.push(format!(
            "well {name}: no blocked sample in any zone of the frame without its tops; skipped"
        ));
        return Ok((Vec::new(), None, warnings));
    }
    let data: Vec<&BlockedSample> = cw
        .iter()
        .filter(|w| w.well != wi)
        .flat_map(|w| w.blocked.iter())
        .collect();
    let mut prep_warnings = Vec::new();
    let zps = prepare_with_models(&loo_study, &frame, &data, models, &mut prep_warnings)?;
    let params = neighbourhood_params(p);
    let krigers: Vec<Kriger<'_, VariogramModel>> = zps
        .iter()
        .map(|zp| Kriger::new(&zp.samples, &zp.model, params, zp.kind))
        .collect::<Result<_>>()?;
    let loo: Vec<_> = zps
        .iter()
        .map(|zp| loo_means(zp, params, p))
        .collect::<Result<_>>()?;
    let codes: Vec<i32> = p.facies.iter().map(|f| f.code).collect();
    let nk = codes.len();
    let background = loo_study
        .volumes
        .iter()
        .find(|v| v.role == "background_vp0");
    // facies probabilities at the held-out samples from the remaining wells
    // (indicator kriging, blended with the facies volumes as the build does)
    let facies_setups = prepare_facies(&loo_study, &frame, &data, &zps, &mut prep_warnings)?;
    let facies_estimators: Vec<Option<IndicatorKriging<'_>>> = facies_setups
        .iter()
        .map(|s| s.as_ref().map(|s| s.estimator(params)).transpose())
        .collect::<Result<_>>()?;
    let facies_volumes = FaciesVolumes::of(&loo_study, &data);
    let mut pools = Vec::new();
    for zi in 0..p.zones.len() {
        let joint = joint_samples(&data, zi, &zps, &loo, &codes);
        let points: Vec<[f64; 2]> = joint.iter().map(|s| s.xy).collect();
        let ws: Vec<usize> = joint.iter().map(|s| s.well).collect();
        let vp0: Vec<f64> = joint.iter().map(|s| s.values[0]).collect();
        let weights = well_decluster_weights(&points, &ws, &vp0)?;
        let by_facies = zone_pools(zi, &joint, &weights, nk);
        let whole = zone_pools(zi, &joint, &weights, 0);
        pools.push((by_facies, whole));
    }
    let mut preds = Vec::new();
    let mut samples = Vec::new();
    for h in &held {
        let zname = p.zones[h.zone].name.clone();
        let mut ps = PredictedSample {
            zone: zname,
            z: h.z,
            observed: [h.vp0, h.epsilon, h.delta],
            mean: [None; 3],
            sd: [None; 3],
        };
        let s_centre = frame.zones[h.zone].layer_centre(h.layer);
        let probs: Option<Vec<f64>> = if nk > 0 {
            let kriged = match &facies_estimators[h.zone] {
                Some(fe) => fe.estimate(&Target::at([h.x, h.y, s_centre])),
                None => Ok((vec![1.0 / nk as f64; nk], 1.0)),
            };
            let (fi, fj) = g.xy_to_ij(h.x, h.y);
            let i = fi.round().clamp(0.0, (g.inline_count - 1) as f64) as usize;
            let j = fj.round().clamp(0.0, (g.xline_count - 1) as f64) as usize;
            let k = ((h.z - g.z0) / g.dz)
                .round()
                .clamp(0.0, (g.z_count - 1) as f64) as usize;
            Some(facies_volumes.blend(kriged, g.trace_index(i, j) * g.z_count + k)?)
        } else {
            None
        };
        for (q, zp) in zps.iter().enumerate().filter(|(_, zp)| zp.zone == h.zone) {
            let pi = zp.prop;
            let Some(obs) = value_of(h, pi) else { continue };
            let pos = [h.x, h.y, s_centre];
            let sec = secondary_at(&loo_study, zp.drift, h.x, h.y, h.z);
            let t = zp.target_with(pos, sec);
            let (m0, v0) = match krigers[q].estimate(&t) {
                Ok(e) if e.note != Note::NoNeighbours && e.value.is_finite() => {
                    (e.value, e.variance.max(0.0))
                }
                _ => (t.trend.unwrap_or(zp.mean), zp.model.sill()),
            };
            // the facies trend at the sample, from the facies probabilities there
            let (mix, mix_var) = probs
                .as_deref()
                .map_or((0.0, 0.0), |pr| facies_mix(&zp.facies_offsets, pr));
            let m = clip_property(p, pi, m0 + mix);
            let v = v0 + mix_var;
            let sd = v.sqrt();
            ps.mean[pi] = Some(m);
            ps.sd[pi] = Some(sd);
            // prior: kriged mean + facies offset + residual pool
            // with the facies trend: the mixture over the sample's facies
            // probabilities of (trend without facies + facies offset + that
            // facies' residual pool); else the sample's facies pool (or the zone's)
            let (by_facies, whole) = &pools[h.zone];
            let mut ens = Vec::new();
            let mut w = Vec::new();
            match probs.as_deref() {
                Some(pr) if !zp.facies_offsets.is_empty() => {
                    for (f, pf) in pr.iter().enumerate() {
                        if *pf <= 0.0 {
                            continue;
                        }
                        let pool = by_facies
                            .iter()
                            .find(|r| r.facies == Some(f))
                            .filter(|r| !r.rows.is_empty())
                            .or(whole.first());
                        if let Some(pool) = pool {
                            let off = if pool.facies == Some(f) {
                                pool.offset[pi]
                            } else {
                                zp.facies_offsets.get(f).copied().unwrap_or(0.0)
                            };
                            for (r, wt, _) in &pool.rows {
                                ens.push(m0 + off + r[pi]);
                                w.push(pf * wt);
                            }
                        }
                    }
                }
                _ => {
                    let pool = match h.facies.and_then(|c| codes.iter().position(|x| *x == c)) {
                        Some(f) if nk > 0 => by_facies.iter().find(|r| r.facies == Some(f)),
                        _ => whole.first(),
                    };
                    if let Some(pool) = pool {
                        for (r, wt, _) in &pool.rows {
                            ens.push(m + pool.offset[pi] + r[pi]);
                            w.push(*wt);
                        }
                    }
                }
            }
            if ens.is_empty() {
                ens.push(m);
                w.push(1.0);
            }
            preds.push(Pred {
                well: wi,
                zone: h.zone,
                prop: pi,
                method: METHOD_PRIOR,
                obs,
                point: m,
                sd,
                ens,
                w,
            });
            // baselines from the remaining wells' samples of the zone
            let rows: Vec<&BlockedSample> = data
                .iter()
                .copied()
                .filter(|b| b.zone == h.zone && value_of(b, pi).is_some())
                .collect();
            let vals: Vec<f64> = rows.iter().filter_map(|b| value_of(b, pi)).collect();
            let n = vals.len() as f64;
            let mean = vals.iter().sum::<f64>() / n;
            let centred: Vec<f64> = vals.iter().map(|v| v - mean).collect();
            let var = centred.iter().map(|c| c * c).sum::<f64>() / n;
            let mut push = |method: &'static str, point: f64| {
                preds.push(Pred {
                    well: wi,
                    zone: h.zone,
                    prop: pi,
                    method,
                    obs,
                    point,
                    sd: var.sqrt(),
                    ens: centred.iter().map(|c| point + c).collect(),
                    w: vec![1.0 / n; centred.len()],
                });
            };
            push(METHOD_ZONE_MEAN, mean);
            // nearest well in plan, same or nearest layer
            let mut best: Option<(f64, usize)> = None;
            for b in &rows {
                let d = (b.x - h.x).hypot(b.y - h.y);
                if best.map_or(true, |(bd, _)| d < bd) {
                    best = Some((d, b.well));
                }
            }
            if let Some((_, nw)) = best {
                let mut pick: Option<(usize, usize, f64)> = None;
                for b in rows.iter().filter(|b| b.well == nw) {
                    let dl = b.layer.abs_diff(h.layer);
                    let better = match pick {
                        None => true,
                        Some((pd, pl, _)) => dl < pd || (dl == pd && b.layer < pl),
                    };
                    if better {
                        pick = Some((dl, b.layer, value_of(b, pi).unwrap_or(mean)));
                    }
                }
                if let Some((_, _, v)) = pick {
                    push(METHOD_NEAREST_WELL, v);
                }
            }
            // inverse-distance weighting in the anisotropy-scaled space
            let here = zp.model.to_isotropic(pos);
            let mut near: Vec<(f64, f64)> = rows
                .iter()
                .map(|b| {
                    let q = zp.model.to_isotropic([
                        b.x,
                        b.y,
                        frame.zones[h.zone].layer_centre(b.layer),
                    ]);
                    let d2 = (q[0] - here[0]).powi(2)
                        + (q[1] - here[1]).powi(2)
                        + (q[2] - here[2]).powi(2);
                    (d2, value_of(b, pi).unwrap_or(mean))
                })
                .collect();
            near.sort_by(|a, b| a.0.total_cmp(&b.0));
            near.truncate(p.kriging.neighbours.max(1));
            let idw = match near.iter().find(|(d2, _)| *d2 <= 0.0) {
                Some((_, v)) => *v,
                None => {
                    let (sw, swv) = near
                        .iter()
                        .fold((0.0, 0.0), |(a, b), (d2, v)| (a + 1.0 / d2, b + v / d2));
                    swv / sw
                }
            };
            push(METHOD_IDW, idw);
            if pi == 0 {
                if let Some(bg) = background.and_then(|b| sample_volume(g, &b.data, h.x, h.y, h.z))
                {
                    push(METHOD_BACKGROUND, bg);
                }
            }
        }
        samples.push(ps);
    }
    // zone intervals along the well in the frame without its tops
    let mut zones = Vec::new();
    if let Some(c) = cw.iter().find(|w| w.well == wi) {
        for (zi, z) in p.zones.iter().enumerate() {
            let zs: Vec<f64> = c
                .strat
                .iter()
                .zip(&c.points)
                .filter(|(s, _)| s.as_ref().is_some_and(|s| s.zone == zi))
                .map(|(_, pt)| pt.z)
                .collect();
            if let (Some(a), Some(b)) = (
                zs.iter().copied().reduce(f64::min),
                zs.iter().copied().reduce(f64::max),
            ) {
                zones.push(ZoneInterval {
                    zone: z.name.clone(),
                    z_top: a,
                    z_base: b,
                });
            }
        }
    }
    warnings.extend(
        prep_warnings
            .into_iter()
            .map(|w| format!("without well {name}: {w}")),
    );
    Ok((
        preds,
        Some(WellPrediction {
            well: name,
            zones,
            samples,
        }),
        warnings,
    ))
}

/// Scores of a set of predictions (one method, property, zone; one well or
/// pooled over wells). With error `e_i = point_i - obs_i`:
///
/// * bias `= mean(e)`, RMSE `= sqrt(mean(e^2))`, MAE `= mean(|e|)`;
/// * standardized error `z_i = e_i / sd_i` (sd: the kriging sd for the prior,
///   the sd of the distribution for the baselines): mean and population variance;
/// * coverage: fraction of `obs_i` inside the central 80% / 95% interval of the
///   sample's weighted predictive ensemble (weighted type-7 quantiles,
///   [`central_interval`]);
/// * CRPS: mean over samples of the weighted ensemble CRPS
///   `sum w_j |x_j - y| - 1/2 sum_jk w_j w_k |x_j - x_k|` (Gneiting and Raftery
///   2007, JASA 102, eq. 21, [`crps_ensemble`]);
/// * W1: Wasserstein-1 distance between the observations and the union of the
///   samples' ensembles, each sample's weights scaled to sum `1/n`
///   ([`wasserstein_1d`]).
fn score(set: &[&Pred]) -> Result<[f64; 9]> {
    let n = set.len() as f64;
    let e: Vec<f64> = set.iter().map(|p| p.point - p.obs).collect();
    let bias = e.iter().sum::<f64>() / n;
    let rmse = (e.iter().map(|v| v * v).sum::<f64>() / n).sqrt();
    let mae = e.iter().map(|v| v.abs()).sum::<f64>() / n;
    let z: Vec<f64> = set
        .iter()
        .zip(&e)
        .map(|(p, e)| if p.sd > 0.0 { e / p.sd } else { f64::NAN })
        .collect();
    let zf: Vec<f64> = z.iter().copied().filter(|v| v.is_finite()).collect();
    let (z_mean, z_var) = if zf.is_empty() {
        (f64::NAN, f64::NAN)
    } else {
        let m = zf.iter().sum::<f64>() / zf.len() as f64;
        (
            m,
            zf.iter().map(|v| (v - m).powi(2)).sum::<f64>() / zf.len() as f64,
        )
    };
    let (mut c80, mut c95, mut crps) = (0.0, 0.0, 0.0);
    let (mut pooled, mut pooled_w) = (Vec::new(), Vec::new());
    for p in set {
        let (a, b) = central_interval(&p.ens, Some(&p.w), 0.8, QuantileMethod::Linear)?;
        c80 += f64::from(u8::from(p.obs >= a && p.obs <= b));
        let (a, b) = central_interval(&p.ens, Some(&p.w), 0.95, QuantileMethod::Linear)?;
        c95 += f64::from(u8::from(p.obs >= a && p.obs <= b));
        crps += crps_ensemble(&p.ens, Some(&p.w), p.obs)?;
        let tot: f64 = p.w.iter().sum();
        pooled.extend_from_slice(&p.ens);
        pooled_w.extend(p.w.iter().map(|w| w / tot / n));
    }
    let obs: Vec<f64> = set.iter().map(|p| p.obs).collect();
    let w1 = wasserstein_1d(&obs, &pooled, None, Some(&pooled_w))?;
    Ok([
        bias,
        rmse,
        mae,
        z_mean,
        z_var,
        c80 / n,
        c95 / n,
        crps / n,
        w1,
    ])
}

const METHODS: [&str; 5] = [
    METHOD_PRIOR,
    METHOD_ZONE_MEAN,
    METHOD_NEAREST_WELL,
    METHOD_IDW,
    METHOD_BACKGROUND,
];

/// Score rows per (well, zone, property, method), then pooled over wells
/// (`all`, scores recomputed on the pooled samples). Skill on baseline rows:
/// `1 - RMSE_prior / RMSE_baseline` (common practice, e.g. Murphy 1988, Mon.
/// Weather Rev. 116, 2417-2424).
fn score_rows(study: &Study, preds: &[Pred]) -> Result<Vec<ScoreRow>> {
    let p = &study.project;
    let mut wells: Vec<usize> = preds.iter().map(|p| p.well).collect();
    wells.dedup();
    let mut keys: Vec<Option<usize>> = wells.into_iter().map(Some).collect();
    keys.push(None);
    let mut rows = Vec::new();
    for wk in keys {
        for zi in 0..p.zones.len() {
            for (pi, pname) in PROPERTIES.iter().enumerate() {
                let mut prior_rmse = None;
                for m in METHODS {
                    let set: Vec<&Pred> = preds
                        .iter()
                        .filter(|x| {
                            wk.map_or(true, |w| x.well == w)
                                && x.zone == zi
                                && x.prop == pi
                                && x.method == m
                        })
                        .collect();
                    if set.is_empty() {
                        continue;
                    }
                    let s = score(&set)?;
                    if m == METHOD_PRIOR {
                        prior_rmse = Some(s[1]);
                    }
                    rows.push(ScoreRow {
                        well: wk.map_or("all".to_string(), |w| study.wells[w].name().to_string()),
                        zone: p.zones[zi].name.clone(),
                        property: pname.to_string(),
                        method: m.to_string(),
                        samples: set.len(),
                        bias: s[0],
                        rmse: s[1],
                        mae: s[2],
                        z_mean: s[3],
                        z_var: s[4],
                        coverage80: s[5],
                        coverage95: s[6],
                        crps: s[7],
                        w1: s[8],
                        skill: if m == METHOD_PRIOR {
                            None
                        } else {
                            prior_rmse.map(|r| if s[1] > 0.0 { 1.0 - r / s[1] } else { f64::NAN })
                        },
                    });
                }
            }
        }
    }
    Ok(rows)
}

/// A CSV field, quoted per RFC 4180 when it holds a comma, quote or line break
/// (well and zone names are user text).
fn csv_field(v: &str) -> String {
    if v.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", v.replace('"', "\"\""))
    } else {
        v.to_string()
    }
}

impl ValidationReport {
    /// The score rows as CSV (header row; values SI: m/s for vp0 errors, 1 for
    /// epsilon and delta; empty skill on prior rows).
    pub fn to_csv(&self) -> String {
        let mut s = String::from("well,zone,property,method,samples,bias,rmse,mae,z_mean,z_var,coverage80,coverage95,crps,w1,skill\n");
        for r in &self.rows {
            let _ = writeln!(
                s,
                "{},{},{},{},{},{},{},{},{},{},{},{},{},{},{}",
                csv_field(&r.well),
                csv_field(&r.zone),
                r.property,
                r.method,
                r.samples,
                r.bias,
                r.rmse,
                r.mae,
                r.z_mean,
                r.z_var,
                r.coverage80,
                r.coverage95,
                r.crps,
                r.w1,
                r.skill.map_or(String::new(), |v| v.to_string())
            );
        }
        s
    }

    /// The pooled rows (`well == all`) as a table.
    pub fn render_text(&self) -> String {
        let mut s = String::new();
        let _ = writeln!(
            s,
            "Leave-one-well-out validation over {} wells (validation.csv, validation.json in {})",
            self.wells.len(),
            self.out.display()
        );
        let _ = writeln!(
            s,
            "\n  {:<12} {:<8} {:<13} {:>5} {:>10} {:>10} {:>6} {:>6} {:>10} {:>7}",
            "zone", "property", "method", "n", "rmse", "bias", "cov80", "cov95", "crps", "skill"
        );
        for r in self.rows.iter().filter(|r| r.well == "all") {
            let _ = writeln!(
                s,
                "  {:<12} {:<8} {:<13} {:>5} {:>10.4} {:>10.4} {:>6.2} {:>6.2} {:>10.4} {:>7}",
                r.zone,
                r.property,
                r.method,
                r.samples,
                r.rmse,
                r.bias,
                r.coverage80,
                r.coverage95,
                r.crps,
                r.skill.map_or(String::new(), |v| format!("{v:.3}"))
            );
        }
        if !self.warnings.is_empty() {
            let _ = writeln!(s, "\nWarnings");
            for w in &self.warnings {
                let _ = writeln!(s, "  {w}");
            }
        }
        let _ = writeln!(s, "\nCaution: {}", crate::prior::manifest::CAUTION);
        s
    }
}

#[cfg(test)]
mod csv_tests {
    #[test]
    fn csv_fields_with_commas_and_quotes_are_quoted() {
        // RFC 4180, section 2, rules 6 and 7
        assert_eq!(super::csv_field("MRW-1"), "MRW-1");
        assert_eq!(super::csv_field("A,B"), "\"A,B\"");
        assert_eq!(super::csv_field("say \"x\""), "\"say \"\"x\"\"\"");
    }
}
