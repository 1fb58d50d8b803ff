//! Fitting variogram models to experimental variograms.
//!
//! # Criterion
//!
//! Weighted least squares with the weights of Cressie (1985, *Fitting variogram
//! models by weighted least squares*, Mathematical Geology 17(5), 563-586):
//!
//! `Q = sum_j N(h_j) / gamma_model(h_j)^2 * (gamma_exp(h_j) - gamma_model(h_j))^2`
//!
//! minimised by iterated reweighting: the first pass uses the weights `N(h)`; each
//! later pass freezes the weights `N(h) / gamma_model(h)^2` at the current model and
//! solves the weighted problem again, until the parameters change by less than
//! the tolerance (relative) or the pass limit is reached.
//!
//! # Parameters and optimiser
//!
//! The nugget and the partial sills enter the model linearly; for given ranges
//! they are the non-negative weighted least-squares solution (exact, by
//! enumerating active sets), i.e. the variable-projection approach of Golub &
//! Pereyra (1973, SIAM J. Numer. Anal. 10(2)). The ranges (and, with at least three
//! horizontal directions, the azimuth) are found by Levenberg-Marquardt
//! (Marquardt 1963, J. SIAM 11(2)) on log-ranges with a finite-difference Jacobian,
//! from several starting points (fractions of the largest lag). So nugget and
//! sills are `>= 0` and ranges `> 0` by construction. Any parameter can be fixed
//! ([`FixedParameters`]).
//!
//! # Strategy ([`FitStrategy::Sequential`], the default)
//!
//! Wells sample the vertical densely and the horizontal sparsely, so:
//! 1. nugget, partial sills and vertical ranges are fitted to the vertical
//!    experimental variogram(s);
//! 2. the horizontal ranges are then fitted to the horizontal experimental
//!    variogram(s) with nugget and sills held.
//!
//! Without a vertical variogram, nugget, sills and horizontal ranges are fitted
//! to the horizontal ones and every vertical range must be fixed (and without a
//! horizontal variogram every horizontal range must be fixed).
//! [`FitStrategy::Joint`] fits all free parameters to all variograms at once.
//!
//! Horizontal anisotropy: an omnidirectional variogram, or directional ones along a
//! single bearing, determine one horizontal range; `range_minor` is then tied to
//! `range_major` (unless fixed) and an omnidirectional variogram is evaluated along
//! the major axis. Two bearings determine both ranges, with the azimuth taken as
//! the first bearing unless fixed (major and minor are swapped, and the azimuth
//! turned by 90 degrees, if the data show the longer range across it). Three or
//! more bearings also determine the azimuth. Omnidirectional and directional
//! horizontal variograms cannot be mixed in one fit.

use super::experimental::{ExperimentalVariogram, LagDirection};
use super::model::{Structure, StructureKind, VariogramModel};
use crate::error::{Error, Result};
use nalgebra::{DMatrix, DVector};
use serde::{Deserialize, Serialize};

/// Values the user fixes for one structure (`None` = fitted).
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FixedStructure {
    /// Partial sill.
    pub sill: Option<f64>,
    /// Major horizontal range (m).
    pub range_major: Option<f64>,
    /// Minor horizontal range (m).
    pub range_minor: Option<f64>,
    /// Azimuth of the major axis (degrees clockwise from north).
    pub azimuth: Option<f64>,
    /// Vertical range (m).
    pub range_vertical: Option<f64>,
}

/// Values the user fixes (`None` = fitted).
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FixedParameters {
    /// Nugget.
    #[serde(default)]
    pub nugget: Option<f64>,
    /// One entry per structure, or empty for none fixed.
    #[serde(default)]
    pub structures: Vec<FixedStructure>,
}

/// Which parameters are fitted to which experimental variograms.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum FitStrategy {
    /// Sill and vertical ranges from the vertical variogram, then horizontal ranges.
    #[default]
    Sequential,
    /// Everything at once on all variograms.
    Joint,
}

/// What to fit.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FitSpec {
    /// Kinds of the nested structures (at most 6).
    pub kinds: Vec<StructureKind>,
    /// Fixed values.
    #[serde(default)]
    pub fixed: FixedParameters,
    /// Strategy.
    #[serde(default)]
    pub strategy: FitStrategy,
    /// Maximum number of Cressie reweighting passes after the first fit.
    #[serde(default = "default_reweightings")]
    pub max_reweightings: usize,
    /// Relative parameter change below which reweighting stops.
    #[serde(default = "default_tolerance")]
    pub tolerance: f64,
}

fn default_reweightings() -> usize {
    30
}
fn default_tolerance() -> f64 {
    1e-10
}

impl FitSpec {
    /// Fit the given structure kinds with nothing fixed and default settings.
    pub fn new(kinds: Vec<StructureKind>) -> Self {
        FitSpec {
            kinds,
            fixed: FixedParameters::default(),
            strategy: FitStrategy::Sequential,
            max_reweightings: default_reweightings(),
            tolerance: default_tolerance(),
        }
    }
}

/// One stage of the fit.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FitStageReport {
    /// The experimental variograms used.
    pub data: Vec<String>,
    /// Parameters fitted in this stage.
    pub free: Vec<String>,
    /// Cressie criterion over this stage's data at its end.
    pub weighted_residual: f64,
    /// Levenberg-Marquardt iterations (all starts and passes).
    pub iterations: usize,
    /// Reweighting passes after the first.
    pub reweightings: usize,
    /// Whether the parameters settled within the tolerance.
    pub converged: bool,
}

/// Result of [`fit_model`].
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FitReport {
    /// The fitted model (validated).
    pub model: VariogramModel,
    /// Cressie (1985) criterion `sum N (gamma_exp - gamma_model)^2 / gamma_model^2`
    /// over every non-empty lag of every variogram given, for the final model.
    pub weighted_residual: f64,
    /// Levenberg-Marquardt iterations over all stages.
    pub iterations: usize,
    /// Reweighting passes over all stages.
    pub reweightings: usize,
    /// Whether every stage settled within the tolerance.
    pub converged: bool,
    /// Parameters fixed by the user, e.g. `nugget`, `structures[0].range_vertical`.
    pub fixed: Vec<String>,
    /// Parameters tied to others, with the reason.
    pub tied: Vec<String>,
    /// The stages in order.
    pub stages: Vec<FitStageReport>,
    /// Anything the user should look at.
    pub warnings: Vec<String>,
}

#[derive(Clone, Copy)]
struct Datum {
    lag: [f64; 3],
    gamma: f64,
    pairs: f64,
}

#[derive(Clone, Copy, PartialEq, Eq, Debug)]
enum Lin {
    Nugget,
    Sill(usize),
}

#[derive(Clone, Copy, PartialEq, Eq, Debug)]
enum Target {
    Major(usize),
    Minor(usize),
    Vertical(usize),
    Azimuth(usize),
}

#[derive(Clone, Debug)]
struct NlParam {
    structure: usize,
    targets: Vec<Target>,
    log: bool,
    lo: f64,
    hi: f64,
    /// Lag extent for starting values (m); unused for angles.
    extent: f64,
    name: String,
}

struct Stage {
    label: Vec<String>,
    data: Vec<Datum>,
    lin: Vec<Lin>,
    nl: Vec<NlParam>,
    azimuth_starts: Vec<f64>,
}

fn lin_name(l: Lin) -> String {
    match l {
        Lin::Nugget => "nugget".into(),
        Lin::Sill(k) => format!("structures[{k}].sill"),
    }
}

fn set_target(m: &mut VariogramModel, t: Target, v: f64) {
    match t {
        Target::Major(k) => m.structures[k].range_major = v,
        Target::Minor(k) => m.structures[k].range_minor = v,
        Target::Vertical(k) => m.structures[k].range_vertical = v,
        Target::Azimuth(k) => m.structures[k].azimuth = v,
    }
}

fn get_target(m: &VariogramModel, t: Target) -> f64 {
    match t {
        Target::Major(k) => m.structures[k].range_major,
        Target::Minor(k) => m.structures[k].range_minor,
        Target::Vertical(k) => m.structures[k].range_vertical,
        Target::Azimuth(k) => m.structures[k].azimuth,
    }
}

fn apply_nl(m: &mut VariogramModel, nl: &[NlParam], theta: &[f64]) {
    for (p, &t) in nl.iter().zip(theta) {
        let v = if p.log { t.exp() } else { t };
        for &tg in &p.targets {
            set_target(m, tg, v);
        }
    }
}

fn check_fixed(name: &str, v: Option<f64>, positive: bool) -> Result<()> {
    if let Some(x) = v {
        let ok = x.is_finite() && if positive { x > 0.0 } else { x >= 0.0 };
        if !ok {
            return Err(Error::inconsistent(format!(
                "variogram fit: fixed {name} must be finite and {}, got {x}",
                if positive { "> 0" } else { ">= 0" }
            )));
        }
    }
    Ok(())
}

fn data_of(ev: &ExperimentalVariogram, along: impl Fn(f64) -> [f64; 3]) -> Vec<Datum> {
    ev.bins
        .iter()
        .filter(|b| b.pairs > 0 && b.h_mean > 0.0 && b.gamma.is_finite() && b.h_mean.is_finite())
        .map(|b| Datum {
            lag: along(b.h_mean),
            gamma: b.gamma,
            pairs: b.pairs as f64,
        })
        .collect()
}

/// Fit a nugget plus `spec.kinds` nested structures to experimental variograms
/// (any mix of vertical and horizontal ones; see the module documentation for the
/// criterion, the optimiser and the strategy).
///
/// Errors: no usable lag, inconsistent fixed values, a range that no variogram
/// determines and that is not fixed, omnidirectional mixed with directional
/// horizontal variograms, or a fitted minor range longer than a fixed major axis.
pub fn fit_model(experimental: &[ExperimentalVariogram], spec: &FitSpec) -> Result<FitReport> {
    let ns = spec.kinds.len();
    if ns > 6 {
        return Err(Error::inconsistent(format!(
            "variogram fit: at most 6 nested structures can be fitted, got {ns}"
        )));
    }
    if !spec.fixed.structures.is_empty() && spec.fixed.structures.len() != ns {
        return Err(Error::inconsistent(format!(
            "variogram fit: {} fixed-structure entries for {ns} structures (give one per structure or none)",
            spec.fixed.structures.len()
        )));
    }
    if !(spec.tolerance.is_finite() && spec.tolerance > 0.0) {
        return Err(Error::inconsistent(format!(
            "variogram fit: tolerance must be > 0, got {}",
            spec.tolerance
        )));
    }
    let none = FixedStructure::default();
    let fx = |k: usize| spec.fixed.structures.get(k).unwrap_or(&none);
    check_fixed("nugget", spec.fixed.nugget, false)?;
    for k in 0..ns {
        let f = fx(k);
        check_fixed(&format!("structures[{k}].sill"), f.sill, false)?;
        check_fixed(&format!("structures[{k}].range_major"), f.range_major, true)?;
        check_fixed(&format!("structures[{k}].range_minor"), f.range_minor, true)?;
        check_fixed(
            &format!("structures[{k}].range_vertical"),
            f.range_vertical,
            true,
        )?;
        if let Some(a) = f.azimuth {
            if !a.is_finite() {
                return Err(Error::inconsistent(format!(
                    "variogram fit: fixed structures[{k}].azimuth must be finite, got {a}"
                )));
            }
        }
    }

    // ---- data ----
    let mut vert: Vec<Datum> = Vec::new();
    let mut vert_label = Vec::new();
    let mut omni: Vec<(usize, Vec<Datum>)> = Vec::new();
    let mut dirs: Vec<(f64, Vec<Datum>)> = Vec::new();
    let mut hor_label = Vec::new();
    for (i, ev) in experimental.iter().enumerate() {
        match ev.direction {
            LagDirection::Vertical => {
                vert.extend(data_of(ev, |h| [0.0, 0.0, h]));
                vert_label.push(ev.direction.describe());
            }
            LagDirection::Omnidirectional => {
                omni.push((i, data_of(ev, |h| [0.0, h, 0.0])));
                hor_label.push(ev.direction.describe());
            }
            LagDirection::Horizontal { azimuth, .. } => {
                let (s, c) = azimuth.to_radians().sin_cos();
                dirs.push((azimuth, data_of(ev, |h| [h * s, h * c, 0.0])));
                hor_label.push(ev.direction.describe());
            }
        }
    }
    if !omni.is_empty() && !dirs.is_empty() {
        return Err(Error::inconsistent(
            "variogram fit: omnidirectional and directional horizontal variograms cannot be fitted together; \
             give one or the other",
        ));
    }
    let n_hor: usize = omni.iter().map(|o| o.1.len()).sum::<usize>()
        + dirs.iter().map(|d| d.1.len()).sum::<usize>();
    if vert.is_empty() && n_hor == 0 {
        return Err(Error::inconsistent(
            "variogram fit: no experimental lag with pairs and a lag > 0 to fit",
        ));
    }
    // Distinct bearings (mod 180).
    let mut bearings: Vec<f64> = Vec::new();
    for (az, d) in &dirs {
        if d.is_empty() {
            continue;
        }
        let a = az.rem_euclid(180.0);
        if !bearings.iter().any(|b| {
            let diff = (b - a).abs();
            diff.min(180.0 - diff) < 1e-9
        }) {
            bearings.push(a);
        }
    }
    let nd = bearings.len();
    let has_hor = n_hor > 0;
    let has_vert = !vert.is_empty();

    // ---- initial model and parameter roles ----
    let mut fixed_names = Vec::new();
    let mut tied = Vec::new();
    let mut warnings = Vec::new();
    if spec.fixed.nugget.is_some() {
        fixed_names.push("nugget".to_string());
    }
    let default_az = bearings.first().copied().unwrap_or(0.0);
    let hmax = |d: &[Datum], f: fn(&Datum) -> f64| d.iter().map(f).fold(0.0_f64, f64::max);
    let hmin = |d: &[Datum], f: fn(&Datum) -> f64| {
        d.iter()
            .map(f)
            .filter(|v| *v > 0.0)
            .fold(f64::INFINITY, f64::min)
    };
    let hor_all: Vec<Datum> = omni
        .iter()
        .flat_map(|o| o.1.iter().copied())
        .chain(dirs.iter().flat_map(|d| d.1.iter().copied()))
        .collect();
    let hlen = |d: &Datum| d.lag[0].hypot(d.lag[1]);
    let vlen = |d: &Datum| d.lag[2].abs();
    let (l_hor, lmin_hor) = (hmax(&hor_all, hlen), hmin(&hor_all, hlen));
    let (l_vert, lmin_vert) = (hmax(&vert, vlen), hmin(&vert, vlen));

    let mut model = VariogramModel {
        nugget: spec.fixed.nugget.unwrap_or(0.0),
        structures: Vec::with_capacity(ns),
    };
    let mut hor_params: Vec<NlParam> = Vec::new();
    let mut vert_params: Vec<NlParam> = Vec::new();
    let mut lin_all: Vec<Lin> = Vec::new();
    if spec.fixed.nugget.is_none() {
        lin_all.push(Lin::Nugget);
    }
    let bounds = |lmin: f64, lmax: f64| ((lmin * 1e-3).ln(), (lmax * 1e2).ln());
    for (k, &kind) in spec.kinds.iter().enumerate() {
        let f = fx(k);
        let start_h = 0.5 * if l_hor > 0.0 { l_hor } else { 1.0 };
        let start_v = 0.5 * if l_vert > 0.0 { l_vert } else { 1.0 };
        let mut s = Structure {
            kind,
            sill: f.sill.unwrap_or(0.0),
            range_major: f.range_major.unwrap_or(start_h),
            range_minor: f.range_minor.unwrap_or(f.range_major.unwrap_or(start_h)),
            azimuth: f.azimuth.unwrap_or(default_az),
            range_vertical: f.range_vertical.unwrap_or(start_v),
        };
        if f.sill.is_some() {
            fixed_names.push(format!("structures[{k}].sill"));
        } else {
            lin_all.push(Lin::Sill(k));
        }
        for (name, v) in [
            ("range_major", f.range_major),
            ("range_minor", f.range_minor),
            ("azimuth", f.azimuth),
            ("range_vertical", f.range_vertical),
        ] {
            if v.is_some() {
                fixed_names.push(format!("structures[{k}].{name}"));
            }
        }
        // vertical range
        if f.range_vertical.is_none() {
            if !has_vert {
                return Err(Error::inconsistent(format!(
                    "variogram fit: structures[{k}].range_vertical is not fixed and no vertical experimental \
                     variogram was given to fit it"
                )));
            }
            let (lo, hi) = bounds(lmin_vert, l_vert);
            vert_params.push(NlParam {
                structure: k,
                targets: vec![Target::Vertical(k)],
                log: true,
                lo,
                hi,
                extent: l_vert,
                name: format!("structures[{k}].range_vertical"),
            });
        }
        // horizontal ranges
        let need_h = f.range_major.is_none() || f.range_minor.is_none();
        if need_h && !has_hor {
            return Err(Error::inconsistent(format!(
                "variogram fit: structures[{k}] horizontal ranges are not fixed and no horizontal experimental \
                 variogram was given to fit them"
            )));
        }
        let (lo, hi) = bounds(lmin_hor, l_hor);
        let two_ranges = nd >= 2;
        match (f.range_major, f.range_minor) {
            (None, None) if !two_ranges => {
                tied.push(format!(
                    "structures[{k}].range_minor = range_major (the horizontal variograms give one bearing only)"
                ));
                hor_params.push(NlParam {
                    structure: k,
                    targets: vec![Target::Major(k), Target::Minor(k)],
                    log: true,
                    lo,
                    hi,
                    extent: l_hor,
                    name: format!("structures[{k}].range_major"),
                });
            }
            (None, None) => {
                for (t, n) in [
                    (Target::Major(k), "range_major"),
                    (Target::Minor(k), "range_minor"),
                ] {
                    hor_params.push(NlParam {
                        structure: k,
                        targets: vec![t],
                        log: true,
                        lo,
                        hi,
                        extent: l_hor,
                        name: format!("structures[{k}].{n}"),
                    });
                }
            }
            (Some(_), None) if !two_ranges => {
                s.range_minor = s.range_major;
                tied.push(format!(
                    "structures[{k}].range_minor = range_major (the horizontal variograms give one bearing only)"
                ));
            }
            (Some(_), None) => hor_params.push(NlParam {
                structure: k,
                targets: vec![Target::Minor(k)],
                log: true,
                lo,
                hi,
                extent: l_hor,
                name: format!("structures[{k}].range_minor"),
            }),
            (None, Some(_)) => hor_params.push(NlParam {
                structure: k,
                targets: vec![Target::Major(k)],
                log: true,
                lo,
                hi,
                extent: l_hor,
                name: format!("structures[{k}].range_major"),
            }),
            (Some(_), Some(_)) => {}
        }
        if f.azimuth.is_none() && nd >= 3 {
            hor_params.push(NlParam {
                structure: k,
                targets: vec![Target::Azimuth(k)],
                log: false,
                lo: f64::NEG_INFINITY,
                hi: f64::INFINITY,
                extent: 0.0,
                name: format!("structures[{k}].azimuth"),
            });
        }
        model.structures.push(s);
    }
    if omni.iter().any(|o| !o.1.is_empty()) {
        tied.push(
            "omnidirectional horizontal variogram evaluated along the major axis of each structure"
                .into(),
        );
    }
    // Omnidirectional data: evaluate along each structure's major axis, which is
    // the lag vector (0, h, 0) rotated to the azimuth. With one structure's azimuth
    // as the reference this is exact for tied ranges; for several structures with
    // fixed differing azimuths the major axis of the first is used.
    let omni_az = model.structures.first().map(|s| s.azimuth).unwrap_or(0.0);
    let (sa, ca) = omni_az.to_radians().sin_cos();
    let hor_data: Vec<Datum> = omni
        .iter()
        .flat_map(|o| o.1.iter())
        .map(|d| {
            let h = d.lag[1];
            Datum {
                lag: [h * sa, h * ca, 0.0],
                ..*d
            }
        })
        .chain(dirs.iter().flat_map(|d| d.1.iter().copied()))
        .collect();
    let azimuth_starts: Vec<f64> = if bearings.is_empty() {
        vec![0.0]
    } else {
        bearings.clone()
    };

    // ---- stages ----
    let mut stages: Vec<Stage> = Vec::new();
    match spec.strategy {
        FitStrategy::Joint => {
            let mut data = vert.clone();
            data.extend(hor_data.iter().copied());
            let mut nl = vert_params.clone();
            nl.extend(hor_params.iter().cloned());
            let mut label = vert_label.clone();
            label.extend(hor_label.iter().cloned());
            stages.push(Stage {
                label,
                data,
                lin: lin_all.clone(),
                nl,
                azimuth_starts: azimuth_starts.clone(),
            });
        }
        FitStrategy::Sequential => {
            if has_vert {
                stages.push(Stage {
                    label: vert_label.clone(),
                    data: vert.clone(),
                    lin: lin_all.clone(),
                    nl: vert_params.clone(),
                    azimuth_starts: vec![0.0],
                });
                if has_hor {
                    stages.push(Stage {
                        label: hor_label.clone(),
                        data: hor_data.clone(),
                        lin: Vec::new(),
                        nl: hor_params.clone(),
                        azimuth_starts: azimuth_starts.clone(),
                    });
                }
            } else {
                stages.push(Stage {
                    label: hor_label.clone(),
                    data: hor_data.clone(),
                    lin: lin_all.clone(),
                    nl: hor_params.clone(),
                    azimuth_starts: azimuth_starts.clone(),
                });
            }
        }
    }

    let mut stage_reports = Vec::new();
    let (mut iters, mut rew, mut conv) = (0usize, 0usize, true);
    for st in &stages {
        if st.lin.is_empty() && st.nl.is_empty() {
            continue;
        }
        if st.data.is_empty() {
            continue;
        }
        let r = run_stage(st, &mut model, spec)?;
        iters += r.iterations;
        rew += r.reweightings;
        conv &= r.converged;
        stage_reports.push(r);
    }

    // ---- normalise anisotropy ----
    for k in 0..ns {
        let f = fx(k);
        let s = &mut model.structures[k];
        if s.range_minor > s.range_major {
            if f.azimuth.is_some() || f.range_major.is_some() || f.range_minor.is_some() {
                return Err(Error::inconsistent(format!(
                    "variogram fit: structures[{k}]: the fitted range across the azimuth ({}) exceeds the one \
                     along it ({}) while the azimuth or a horizontal range is fixed; turn the fixed azimuth by \
                     90 degrees or swap the fixed ranges",
                    s.range_minor, s.range_major
                )));
            }
            std::mem::swap(&mut s.range_major, &mut s.range_minor);
            s.azimuth += 90.0;
        }
        if f.azimuth.is_none() {
            s.azimuth = s.azimuth.rem_euclid(180.0);
        }
        if s.sill == 0.0 && f.sill.is_none() {
            warnings.push(format!(
                "structures[{k}] ({}) was fitted with a zero sill: its ranges are not determined; \
                 fit fewer structures or fix some parameters",
                s.kind.name()
            ));
        }
    }
    if !conv {
        warnings.push(format!(
            "reweighting did not settle within {} passes to the tolerance {}",
            spec.max_reweightings, spec.tolerance
        ));
    }
    model.validate().map_err(|e| {
        Error::inconsistent(format!(
            "variogram fit: the fitted model is not usable ({e}); are the experimental semivariances all zero?"
        ))
    })?;

    let mut all = vert.clone();
    all.extend(hor_data.iter().copied());
    let weighted_residual = cressie(&model, &all);
    Ok(FitReport {
        model,
        weighted_residual,
        iterations: iters,
        reweightings: rew,
        converged: conv,
        fixed: fixed_names,
        tied,
        stages: stage_reports,
        warnings,
    })
}

/// Cressie (1985) criterion `sum N (g_exp - g_mod)^2 / g_mod^2`.
fn cressie(m: &VariogramModel, data: &[Datum]) -> f64 {
    data.iter()
        .map(|d| {
            let g = m.gamma(d.lag);
            if g > 0.0 {
                d.pairs * ((d.gamma - g) / g).powi(2)
            } else {
                0.0
            }
        })
        .sum()
}

/// The weighted problem for fixed weights: residuals for nonlinear parameters
/// `theta`, with the linear parameters solved by non-negative least squares.
struct Projected<'a> {
    st: &'a Stage,
    base: &'a VariogramModel,
    sqrt_w: Vec<f64>,
}

impl Projected<'_> {
    /// Model with `theta` applied and the free linear parameters solved.
    fn solve(&self, theta: &[f64]) -> (VariogramModel, Vec<f64>) {
        let mut m = self.base.clone();
        apply_nl(&mut m, &self.st.nl, theta);
        let lin = &self.st.lin;
        for &l in lin {
            match l {
                Lin::Nugget => m.nugget = 0.0,
                Lin::Sill(k) => m.structures[k].sill = 0.0,
            }
        }
        let n = self.st.data.len();
        let y: Vec<f64> = self
            .st
            .data
            .iter()
            .zip(&self.sqrt_w)
            .map(|(d, w)| w * (d.gamma - m.gamma(d.lag)))
            .collect();
        if !lin.is_empty() {
            let mut a = DMatrix::<f64>::zeros(n, lin.len());
            for (i, (d, w)) in self.st.data.iter().zip(&self.sqrt_w).enumerate() {
                for (j, &l) in lin.iter().enumerate() {
                    a[(i, j)] = w * match l {
                        Lin::Nugget => 1.0,
                        Lin::Sill(k) => {
                            let s = &m.structures[k];
                            s.kind.unit_gamma(s.scaled_lag(d.lag))
                        }
                    };
                }
            }
            let c = nnls_enumerate(&a, &DVector::from_vec(y.clone()));
            for (&l, &v) in lin.iter().zip(c.iter()) {
                match l {
                    Lin::Nugget => m.nugget = v,
                    Lin::Sill(k) => m.structures[k].sill = v,
                }
            }
        }
        let r: Vec<f64> = self
            .st
            .data
            .iter()
            .zip(&self.sqrt_w)
            .map(|(d, w)| w * (d.gamma - m.gamma(d.lag)))
            .collect();
        (m, r)
    }
}

/// Non-negative least squares `min |A c - y|^2, c >= 0` by enumerating the sets of
/// positive variables (exact; fine for the few linear parameters of a variogram).
fn nnls_enumerate(a: &DMatrix<f64>, y: &DVector<f64>) -> Vec<f64> {
    let m = a.ncols();
    let mut best = vec![0.0; m];
    let mut best_cost = y.norm_squared();
    for mask in 1u32..(1u32 << m) {
        let cols: Vec<usize> = (0..m).filter(|j| mask & (1 << j) != 0).collect();
        let sub = DMatrix::from_fn(a.nrows(), cols.len(), |i, j| a[(i, cols[j])]);
        let ata = sub.transpose() * &sub;
        let aty = sub.transpose() * y;
        let Some(ch) = ata.clone().cholesky() else {
            continue;
        };
        let c = ch.solve(&aty);
        if c.iter().any(|v| !(v.is_finite() && *v >= 0.0)) {
            continue;
        }
        let cost = (&sub * &c - y).norm_squared();
        if cost < best_cost {
            best_cost = cost;
            best = vec![0.0; m];
            for (j, &cj) in cols.iter().enumerate() {
                best[cj] = c[j];
            }
        }
    }
    best
}

fn starts(st: &Stage) -> Vec<Vec<f64>> {
    const F: [f64; 5] = [0.05, 0.15, 0.35, 0.7, 1.2];
    let mut structs: Vec<usize> = st
        .nl
        .iter()
        .filter(|p| p.log)
        .map(|p| p.structure)
        .collect();
    structs.sort_unstable();
    structs.dedup();
    let n = structs.len();
    // Ordered selections of distinct fractions, one per structure.
    let mut combos: Vec<Vec<f64>> = vec![Vec::new()];
    for _ in 0..n {
        let mut next = Vec::new();
        for c in &combos {
            for &f in &F {
                if !c.contains(&f) {
                    let mut c2 = c.clone();
                    c2.push(f);
                    next.push(c2);
                }
            }
        }
        combos = next;
        if combos.len() > 60 {
            break;
        }
    }
    if combos.is_empty() || combos[0].len() < n {
        combos = vec![(0..n).map(|i| F[i.min(F.len() - 1)]).collect()];
    }
    let mut out = Vec::new();
    for c in &combos {
        for &az in &st.azimuth_starts {
            let theta: Vec<f64> = st
                .nl
                .iter()
                .map(|p| {
                    if p.log {
                        let idx = structs.iter().position(|&s| s == p.structure).unwrap_or(0);
                        let f = c.get(idx).copied().unwrap_or(0.5);
                        (f * p.extent).ln().clamp(p.lo, p.hi)
                    } else {
                        az
                    }
                })
                .collect();
            out.push(theta);
        }
    }
    out
}

fn current_theta(st: &Stage, m: &VariogramModel) -> Vec<f64> {
    st.nl
        .iter()
        .map(|p| {
            let v = get_target(m, p.targets[0]);
            if p.log {
                v.ln().clamp(p.lo, p.hi)
            } else {
                v
            }
        })
        .collect()
}

fn free_values(st: &Stage, m: &VariogramModel) -> Vec<f64> {
    let mut v: Vec<f64> = st
        .lin
        .iter()
        .map(|&l| match l {
            Lin::Nugget => m.nugget,
            Lin::Sill(k) => m.structures[k].sill,
        })
        .collect();
    v.extend(st.nl.iter().map(|p| get_target(m, p.targets[0])));
    v
}

fn run_stage(st: &Stage, model: &mut VariogramModel, spec: &FitSpec) -> Result<FitStageReport> {
    let mut iterations = 0usize;
    let scale = st
        .data
        .iter()
        .map(|d| d.gamma.abs())
        .fold(0.0_f64, f64::max);
    let floor = (scale * 1e-9).max(f64::MIN_POSITIVE);
    let mut weights: Vec<f64> = st.data.iter().map(|d| d.pairs).collect();
    let mut converged = false;
    let mut reweightings = 0usize;
    for pass in 0..=spec.max_reweightings {
        let sqrt_w: Vec<f64> = weights.iter().map(|w| w.sqrt()).collect();
        let proj = Projected {
            st,
            base: model,
            sqrt_w,
        };
        let start_list = if pass == 0 && !st.nl.is_empty() {
            let mut s = starts(st);
            s.push(current_theta(st, model));
            s
        } else {
            vec![current_theta(st, model)]
        };
        let mut best: Option<(f64, Vec<f64>)> = None;
        for x0 in start_list {
            let (x, cost, it) = levenberg_marquardt(&proj, x0, &st.nl);
            iterations += it;
            let better = match &best {
                None => true,
                Some(b) => cost < b.0,
            };
            if better {
                best = Some((cost, x));
            }
        }
        let theta = best.map(|b| b.1).unwrap_or_default();
        let (new_model, _) = proj.solve(&theta);
        let old = free_values(st, model);
        let new = free_values(st, &new_model);
        *model = new_model;
        if pass > 0 {
            reweightings += 1;
            let total = model.total_sill().max(f64::MIN_POSITIVE);
            let change = old
                .iter()
                .zip(&new)
                .map(|(a, b)| (a - b).abs() / a.abs().max(b.abs()).max(1e-12 * total))
                .fold(0.0_f64, f64::max);
            if change <= spec.tolerance {
                converged = true;
                break;
            }
        }
        weights = st
            .data
            .iter()
            .map(|d| d.pairs / model.gamma(d.lag).max(floor).powi(2))
            .collect();
    }
    let mut free: Vec<String> = st.lin.iter().map(|&l| lin_name(l)).collect();
    free.extend(st.nl.iter().map(|p| p.name.clone()));
    Ok(FitStageReport {
        data: st.label.clone(),
        free,
        weighted_residual: cressie(model, &st.data),
        iterations,
        reweightings,
        converged: converged || spec.max_reweightings == 0,
    })
}

fn cost_of(r: &[f64]) -> f64 {
    r.iter().map(|v| v * v).sum()
}

/// Levenberg-Marquardt (Marquardt 1963) on the projected residuals, with
/// central-difference Jacobian and box bounds by clamping. Returns the point, its
/// cost `|r|^2` and the iteration count.
fn levenberg_marquardt(p: &Projected<'_>, x0: Vec<f64>, nl: &[NlParam]) -> (Vec<f64>, f64, usize) {
    let clamp = |x: &mut Vec<f64>| {
        for (v, q) in x.iter_mut().zip(nl) {
            *v = v.clamp(q.lo, q.hi);
        }
    };
    let mut x = x0;
    clamp(&mut x);
    let mut r = p.solve(&x).1;
    let mut cost = cost_of(&r);
    let n = x.len();
    if n == 0 {
        return (x, cost, 0);
    }
    let scale: f64 =
        p.st.data
            .iter()
            .zip(&p.sqrt_w)
            .map(|(d, w)| (w * d.gamma).powi(2))
            .sum::<f64>()
            .max(f64::MIN_POSITIVE);
    let mut lambda = 1e-3;
    let mut it = 0;
    while it < 200 {
        it += 1;
        if cost <= 1e-28 * scale {
            break;
        }
        let m = r.len();
        let mut jac = DMatrix::<f64>::zeros(m, n);
        for j in 0..n {
            let h = if nl[j].log { 1e-6 } else { 1e-4 };
            let mut xp = x.clone();
            xp[j] += h;
            let mut xm = x.clone();
            xm[j] -= h;
            let rp = p.solve(&xp).1;
            let rm = p.solve(&xm).1;
            for i in 0..m {
                jac[(i, j)] = (rp[i] - rm[i]) / (2.0 * h);
            }
        }
        let rv = DVector::from_column_slice(&r);
        let g = jac.transpose() * &rv;
        let hmat = jac.transpose() * &jac;
        if g.amax() <= 1e-18 * scale {
            break;
        }
        let mut accepted = false;
        let mut small_step = false;
        while lambda < 1e16 {
            let mut a = hmat.clone();
            let dmax = (0..n).map(|j| hmat[(j, j)]).fold(0.0_f64, f64::max);
            for j in 0..n {
                a[(j, j)] += lambda * hmat[(j, j)].max(1e-12 * dmax).max(1e-300);
            }
            let step = match a.cholesky() {
                Some(ch) => ch.solve(&(-&g)),
                None => {
                    lambda *= 10.0;
                    continue;
                }
            };
            let mut xn: Vec<f64> = x.iter().zip(step.iter()).map(|(a, b)| a + b).collect();
            clamp(&mut xn);
            let rn = p.solve(&xn).1;
            let cn = cost_of(&rn);
            if cn.is_finite() && cn < cost {
                let moved = x
                    .iter()
                    .zip(&xn)
                    .map(|(a, b)| (a - b).abs())
                    .fold(0.0_f64, f64::max);
                small_step = moved < 1e-13 || (cost - cn) <= 1e-15 * cost;
                x = xn;
                r = rn;
                cost = cn;
                lambda = (lambda * 0.3).max(1e-12);
                accepted = true;
                break;
            }
            lambda *= 10.0;
        }
        if !accepted || small_step {
            break;
        }
    }
    (x, cost, it)
}

/// Model curve along a direction: `(h, gamma(h))` at `n + 1` lags from 0 to `h_max` (m).
/// Omnidirectional curves are evaluated along the major axis of the first structure.
pub fn model_curve(
    model: &VariogramModel,
    direction: &LagDirection,
    h_max: f64,
    n: usize,
) -> Vec<(f64, f64)> {
    let u = direction.unit_vector().unwrap_or_else(|| {
        let az = model.structures.first().map(|s| s.azimuth).unwrap_or(0.0);
        let (s, c) = az.to_radians().sin_cos();
        [s, c, 0.0]
    });
    let n = n.max(1);
    (0..=n)
        .map(|i| {
            let h = h_max * i as f64 / n as f64;
            (h, model.gamma([h * u[0], h * u[1], h * u[2]]))
        })
        .collect()
}
