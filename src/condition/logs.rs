//! Conditioned well logs: Vp0, epsilon, delta, facies, zone and stratigraphic
//! coordinate per log sample, and their blocking into stratigraphic cells.
//!
//! Per well, by the project's `[conditioning]` source:
//!
//! * from curves: Vp0 is the Vp curve (the vertical velocity of the logs),
//!   epsilon and delta the EPS/DELTA curves (from core or anisotropy processing);
//! * by Backus averaging: Vp, Vs and density averaged over a moving window along
//!   true vertical depth ([`backus_log`]), Vp0, epsilon and delta from Thomsen's
//!   definitions, plus the intrinsic anisotropy of the sample's facies
//!   (first-order addition, [`add_intrinsic`]). Intrinsic terms are not added to
//!   EPS/DELTA curves, which already measure the whole anisotropy.
//!
//! The Backus window runs along TVDSS (the layering is taken as near flat, so the
//! vertical thickness is the layer thickness; common practice).

use crate::condition::backus::{backus_log, BackusLogOptions, WindowLength};
use crate::condition::blocking::{block_well, BlockedSample, CondSample};
use crate::condition::intrinsic::{
    add_intrinsic, intrinsic_anisotropy, FaciesIntrinsic, IntrinsicTerm, NamedLog,
};
use crate::error::{Error, Result};
use crate::frame::strat::{StratFrame, StratPosition};
use crate::ingest::wells::WellPoint;
use crate::project::{BackusWindowSpec, ConditioningSource, CurveProperty, IntrinsicValue};
use crate::study::Study;
use serde::Serialize;

/// Where a well's epsilon and delta came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum AnisotropySource {
    /// EPS and DELTA curves.
    Curves,
    /// Backus averaging of Vp, Vs and density.
    Backus,
    /// None: the well has neither EPS/DELTA nor Vp, Vs and density.
    Missing,
}

/// One well's conditioned logs.
#[derive(Debug, Clone, Serialize)]
pub struct ConditionedWell {
    /// Index of the well in the study.
    pub well: usize,
    /// Well name.
    pub name: String,
    /// Measured depth of each sample, m.
    pub md: Vec<f64>,
    /// Position of each sample.
    pub points: Vec<WellPoint>,
    /// Zone, stratigraphic coordinate and layer of each sample (None outside every zone).
    pub strat: Vec<Option<StratPosition>>,
    /// Vp0, m/s.
    pub vp0: Vec<Option<f64>>,
    /// Thomsen epsilon.
    pub epsilon: Vec<Option<f64>>,
    /// Thomsen delta.
    pub delta: Vec<Option<f64>>,
    /// Facies code.
    pub facies: Vec<Option<i32>>,
    /// Source of epsilon and delta.
    pub source: AnisotropySource,
    /// Backus window length used, m (Backus source only).
    pub backus_window: Option<f64>,
    /// Blocked samples, sorted by (zone, layer).
    pub blocked: Vec<BlockedSample>,
    /// Notes about this well's conditioning.
    pub notes: Vec<String>,
}

fn term(v: &Option<IntrinsicValue>) -> IntrinsicTerm {
    match v {
        None => IntrinsicTerm::Constant(0.0),
        Some(IntrinsicValue::Constant(c)) => IntrinsicTerm::Constant(*c),
        Some(IntrinsicValue::Linear {
            log,
            intercept,
            slope,
        }) => IntrinsicTerm::Linear {
            log: log.clone(),
            a: *intercept,
            b: *slope,
        },
    }
}

/// Condition one well of the study.
pub fn condition_well(study: &Study, frame: &StratFrame, wi: usize) -> Result<ConditionedWell> {
    let p = &study.project;
    let w = &study.wells[wi];
    let name = w.name().to_string();
    let n = w.md.len();
    let log = |prop: CurveProperty| w.logs.get(&prop).map(|l| l.values.as_slice());
    let facies: Vec<Option<i32>> = match log(CurveProperty::Facies) {
        Some(v) => v.iter().map(|x| x.map(|x| x as i32)).collect(),
        None => vec![None; n],
    };
    let vp = log(CurveProperty::Vp)
        .ok_or_else(|| Error::inconsistent(format!("well {name}: no vp curve")))?;
    let has_curves = log(CurveProperty::Epsilon).is_some() && log(CurveProperty::Delta).is_some();
    let has_elastic = log(CurveProperty::Vs).is_some() && log(CurveProperty::Density).is_some();
    let mut notes = Vec::new();
    let use_backus = match p.conditioning.source {
        ConditioningSource::Curves => false,
        ConditioningSource::Backus => {
            if !has_elastic {
                return Err(Error::inconsistent(format!(
                    "well {name}: conditioning.source = \"backus\" needs vs and density curves"
                )));
            }
            true
        }
        ConditioningSource::Auto => !has_curves && has_elastic,
    };
    let (vp0, epsilon, delta, source, backus_window) = if use_backus {
        let z: Vec<f64> = w.points.iter().map(|q| q.z).collect();
        let window = match p.conditioning.window {
            BackusWindowSpec::Metres(l) => WindowLength::Metres(l),
            BackusWindowSpec::BackusNumber { b, frequency } => WindowLength::BackusNumber {
                b,
                frequency_hz: frequency,
            },
        };
        let (Some(vs), Some(rho)) = (log(CurveProperty::Vs), log(CurveProperty::Density)) else {
            return Err(Error::inconsistent(format!(
                "well {name}: Backus averaging needs vs and density curves"
            )));
        };
        let bl = backus_log(&name, &z, vp, vs, rho, &BackusLogOptions::new(window))?;
        if !bl.rejected.is_empty() {
            notes.push(format!(
                "{} samples with impossible Vp/Vs/density were treated as missing",
                bl.rejected.len()
            ));
        }
        let rules: Vec<FaciesIntrinsic> = p
            .conditioning
            .intrinsic
            .iter()
            .map(|r| FaciesIntrinsic {
                facies: r.facies,
                epsilon: term(&r.epsilon),
                delta: term(&r.delta),
            })
            .collect();
        let (mut eps, mut del) = (bl.epsilon(), bl.delta());
        if !rules.is_empty() {
            let named: Vec<NamedLog<'_>> = w
                .extra_logs
                .iter()
                .map(|(k, v)| NamedLog { name: k, values: v })
                .collect();
            let intr = intrinsic_anisotropy(&name, &facies, &rules, &named)?;
            eps = add_intrinsic(&name, &eps, &intr.epsilon)?;
            del = add_intrinsic(&name, &del, &intr.delta)?;
        }
        (
            bl.vp0(),
            eps,
            del,
            AnisotropySource::Backus,
            Some(bl.window_length),
        )
    } else if has_curves {
        (
            vp.to_vec(),
            log(CurveProperty::Epsilon)
                .map(<[_]>::to_vec)
                .unwrap_or_default(),
            log(CurveProperty::Delta)
                .map(<[_]>::to_vec)
                .unwrap_or_default(),
            AnisotropySource::Curves,
            None,
        )
    } else {
        notes.push(
            "no EPS/DELTA curves and no Vs and density: epsilon and delta are missing".into(),
        );
        (
            vp.to_vec(),
            vec![None; n],
            vec![None; n],
            AnisotropySource::Missing,
            None,
        )
    };

    let g = &p.grid;
    let strat: Vec<Option<StratPosition>> = w
        .points
        .iter()
        .map(|q| frame.locate(g, q.x, q.y, q.z))
        .collect();
    let samples: Vec<CondSample> = (0..n)
        .filter_map(|k| {
            let sp = strat[k]?;
            let q = w.points[k];
            Some(CondSample {
                x: q.x,
                y: q.y,
                z: q.z,
                zone: sp.zone,
                layer: sp.layer,
                s: sp.s,
                vp0: vp0[k],
                epsilon: epsilon[k],
                delta: delta[k],
                facies: facies[k],
            })
        })
        .collect();
    let blocked = block_well(wi, &samples);
    Ok(ConditionedWell {
        well: wi,
        name,
        md: w.md.clone(),
        points: w.points.clone(),
        strat,
        vp0,
        epsilon,
        delta,
        facies,
        source,
        backus_window,
        blocked,
        notes,
    })
}

/// Condition every well of the study.
pub fn condition_all(study: &Study, frame: &StratFrame) -> Result<Vec<ConditionedWell>> {
    (0..study.wells.len())
        .map(|i| condition_well(study, frame, i))
        .collect()
}
