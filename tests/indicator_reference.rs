//! Simple indicator kriging against GSTools 1.7.0 (PyPI), through the indicator
//! path (`IndicatorSetup` -> `IndicatorKriging`, i.e. the crate's kriging
//! engine with the crate's variogram models), on random 3-D data with identical
//! neighbour sets (all 40 points in every system).
//!
//! The case and the reference results come from
//! `tests/reference/indicator_reference.py`: per facies, GSTools simple kriging
//! of the hard indicator with the sample proportion as mean (raw estimates and
//! kriging variances), and the order-relation-corrected probabilities computed
//! with numpy (clip to [0, 1], divide by the sum; Deutsch and Journel 1998,
//! GSLIB 2nd ed., sec. V.1.6, from memory). With `STRATIPRIOR_PYTHON` set to an
//! interpreter with gstools, the script is run live and its output compared
//! (and the committed golden file checked against it); otherwise the committed
//! golden file `tests/golden/indicator/reference.json` is used. With
//! `STRATIPRIOR_REQUIRE_PYTHON=1`, a missing interpreter or library is a failure.

#![allow(clippy::needless_range_loop)] // index loops over facies read best here

use serde_json::Value;
use std::path::PathBuf;
use stratiprior::geostat::indicator::{
    FaciesSample, IndicatorFitOptions, IndicatorMethod, IndicatorOptions, IndicatorSetup,
    IndicatorVariogram,
};
use stratiprior::geostat::kriging::Target;
use stratiprior::geostat::neighbourhood::NeighbourhoodParams;
use stratiprior::geostat::variogram::{Structure, StructureKind, VariogramModel};

mod pyref;
use pyref::{arr, load};

fn golden_path() -> PathBuf {
    pyref::repo("tests/golden/indicator/reference.json")
}

/// The live reference (see `tests/pyref`).
fn live() -> Option<Value> {
    pyref::live(
        "indicator_reference.py",
        "gstools and numpy",
        &golden_path(),
    )
}

fn rows(v: &Value) -> Vec<Vec<f64>> {
    v.as_array().unwrap().iter().map(arr).collect()
}

fn model_of(m: &Value) -> VariogramModel {
    let kind = match m["kind"].as_str().unwrap() {
        "spherical" => StructureKind::Spherical,
        "exponential" => StructureKind::Exponential,
        "gaussian" => StructureKind::Gaussian,
        k => panic!("unknown kind {k}"),
    };
    let f = |k: &str| m[k].as_f64().unwrap();
    VariogramModel {
        nugget: f("nugget"),
        structures: vec![Structure {
            kind,
            sill: f("sill"),
            range_major: f("range_major"),
            range_minor: f("range_minor"),
            azimuth: f("azimuth"),
            range_vertical: f("range_vertical"),
        }],
    }
}

fn compare(reference: &Value, label: &str) {
    let c = &reference["case"];
    let codes: Vec<i32> = c["codes"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_i64().unwrap() as i32)
        .collect();
    let props = arr(&c["proportions"]);
    let models: Vec<VariogramModel> = c["models"]
        .as_array()
        .unwrap()
        .iter()
        .map(model_of)
        .collect();
    let pts = rows(&c["points"]);
    let facies: Vec<i32> = c["facies"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_i64().unwrap() as i32)
        .collect();
    let tg = rows(&c["targets"]);
    let raw_ref = rows(&c["raw"]);
    let var_ref = rows(&c["variance"]);
    let cor_ref = rows(&c["corrected"]);
    let n = pts.len();

    // each point its own "well", all points in every neighbourhood
    let samples: Vec<FaciesSample> = pts
        .iter()
        .zip(&facies)
        .enumerate()
        .map(|(i, (p, &f))| FaciesSample::hard(i as u32, 0, [p[0], p[1], p[2]], f, &codes).unwrap())
        .collect();
    let options = IndicatorOptions {
        method: IndicatorMethod::Simple,
        fit: IndicatorFitOptions::for_zone(2.0, 60.0, 2000.0, 25.0, None).unwrap(),
        overrides: models
            .iter()
            .map(|m| Some(IndicatorVariogram::Model(m.clone())))
            .collect(),
        ratio_model: None,
    };
    let setup = IndicatorSetup::prepare(&samples, &codes, &props, &options).unwrap();
    let all = NeighbourhoodParams::per_well(1, n, n, f64::INFINITY);
    let ik = setup.estimator(all).unwrap();
    let targets: Vec<Target> = tg.iter().map(|p| Target::at([p[0], p[1], p[2]])).collect();

    // raw estimates and variances of each indicator, through the indicator path's engine
    let mut worst = 0.0f64;
    let mut checked = 0;
    for k in 0..codes.len() {
        let kr = ik.kriger(k).expect("every facies is kriged");
        let col = kr.krige_column(&targets).unwrap();
        for (t, e) in col.estimates.iter().enumerate() {
            assert_eq!(e.neighbours as usize, n);
            let (re, rv) = (raw_ref[t][k], var_ref[t][k]);
            worst = worst.max((e.value - re).abs()).max((e.variance - rv).abs());
            assert!(
                (e.value - re).abs() <= 1e-8,
                "{label}: facies {} target {t}: raw estimate {} vs gstools {re}",
                codes[k],
                e.value
            );
            assert!(
                (e.variance - rv).abs() <= 1e-8,
                "{label}: facies {} target {t}: variance {} vs gstools {rv}",
                codes[k],
                e.variance
            );
            checked += 1;
        }
    }
    assert_eq!(checked, codes.len() * tg.len());

    // corrected probabilities: the estimator's output (targets split into columns)
    let columns: Vec<Vec<Target>> = targets.chunks(7).map(|c| c.to_vec()).collect();
    let grid = ik.estimate_columns(&columns).unwrap();
    let mut t = 0;
    let mut corrected = 0;
    for col in &grid.columns {
        for j in 0..col.len() {
            let p = col.target(j);
            for k in 0..codes.len() {
                worst = worst.max((p[k] - cor_ref[t][k]).abs());
                assert!(
                    (p[k] - cor_ref[t][k]).abs() <= 1e-8,
                    "{label}: target {t} facies {}: corrected {} vs reference {}",
                    codes[k],
                    p[k],
                    cor_ref[t][k]
                );
            }
            if raw_ref[t].iter().any(|v| !(-1e-9..=1.0 + 1e-9).contains(v)) {
                corrected += 1;
            }
            t += 1;
        }
    }
    assert_eq!(t, tg.len());
    let violated = c["violated_targets"].as_u64().unwrap();
    assert!(violated > 0 && corrected as u64 == violated);
    // every target whose raw sum is off 1 or has a value outside [0, 1] is counted
    assert!(grid.stats.corrected >= violated);
    // rounding at the data points may add clipped targets (1 + 4e-16 and the like)
    let on_data = c["on_data"].as_array().unwrap().len() as u64;
    assert!(grid.stats.clipped >= violated && grid.stats.clipped <= violated + on_data);
    assert_eq!(grid.stats.targets, tg.len() as u64);
    println!(
        "{label}: {checked} raw estimates and variances, {t} corrected targets ({violated} with \
         order-relation violations), largest difference {worst:.2e}"
    );
}

#[test]
fn simple_indicator_kriging_agrees_with_gstools() {
    let golden = load(&golden_path());
    assert_eq!(golden["meta"]["gstools"], "1.7.0");
    compare(&golden, "golden");
    if let Some(l) = live() {
        compare(&l, "live");
        // the committed golden file is what the script writes today
        for key in ["raw", "variance", "corrected"] {
            let (a, b) = (rows(&golden["case"][key]), rows(&l["case"][key]));
            assert_eq!(a.len(), b.len());
            for (ra, rb) in a.iter().zip(&b) {
                for (x, y) in ra.iter().zip(rb) {
                    assert!((x - y).abs() <= 1e-12, "golden {key} is stale: {x} vs {y}");
                }
            }
        }
    }
}
