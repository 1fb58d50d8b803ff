//! Kriging against the reference libraries PyKrige 1.7.3 and GSTools 1.7.0
//! (PyPI), on random 3-D data with identical neighbour sets (all points).
//!
//! The cases and the reference results come from
//! `tests/reference/kriging_reference.py`. With `STRATIPRIOR_PYTHON` set to an
//! interpreter that has both libraries, the script is run live and its output
//! is compared (as well as the committed golden file); otherwise the committed
//! golden file `tests/golden/kriging/reference.json` written by the same script
//! is used. With `STRATIPRIOR_REQUIRE_PYTHON=1`, a missing interpreter or
//! library is a failure.
//!
//! Covariance mapping (see the script): PyKrige exponential `psill = c`,
//! `range = 3 / a`; GSTools `Exponential(var = c, len_scale = 1 / a)` for
//! `C(h) = c exp(-a h)`; anisotropic GSTools `len_scale = [l1, l2, l3]` is our
//! test model with lengths `(l1, l2, l3)` along (x, y, s) (azimuth 90 deg puts
//! the major axis on x).

mod kriging_support;

use kriging_support::{AnisoExp, IsoExp};
use serde_json::Value;
use std::path::PathBuf;
use stratiprior::geostat::kriging::{
    external_drift_kriging_weights, ordinary_kriging_weights, simple_kriging_weights, Kriger,
    KrigingKind, Sample, SampleSet, Target,
};
use stratiprior::geostat::neighbourhood::NeighbourhoodParams;
use stratiprior::geostat::CovarianceModel;

mod pyref;
use pyref::{arr, load};

fn golden_path() -> PathBuf {
    pyref::repo("tests/golden/kriging/reference.json")
}

/// The live reference (see `tests/pyref`).
fn live() -> Option<Value> {
    pyref::live(
        "kriging_reference.py",
        "pykrige and gstools",
        &golden_path(),
    )
}

fn arr3(v: &Value) -> Vec<[f64; 3]> {
    v.as_array()
        .unwrap()
        .iter()
        .map(|p| {
            let p = arr(p);
            [p[0], p[1], p[2]]
        })
        .collect()
}

fn model_of(m: &Value) -> Box<dyn CovarianceModel> {
    match m["type"].as_str().unwrap() {
        "iso_exp" => Box::new(IsoExp {
            c: m["c"].as_f64().unwrap(),
            a: m["a"].as_f64().unwrap(),
        }),
        "aniso_exp" => {
            let l = arr(&m["lengths"]);
            Box::new(AnisoExp {
                c: m["c"].as_f64().unwrap(),
                lengths: [l[0], l[1], l[2]],
                azimuth_deg: 90.0,
            })
        }
        t => panic!("unknown model type {t}"),
    }
}

/// Our estimates and variances for one case: through the one-target functions
/// and through the engine (each point its own well, neighbourhood = all points).
/// Per target: (estimate, variance).
type Results = Vec<(f64, f64)>;

fn ours(case: &Value) -> (Results, Results) {
    let model = model_of(&case["model"]);
    let pts = arr3(&case["points"]);
    let z = arr(&case["values"]);
    let tg = arr3(&case["targets"]);
    let kind = case["kind"].as_str().unwrap();
    let mean = case.get("mean").and_then(Value::as_f64).unwrap_or(0.0);
    let drift = case.get("drift").map(arr).unwrap_or_default();
    let tdrift = case.get("target_drift").map(arr).unwrap_or_default();
    let mut direct = Vec::new();
    for (k, &t) in tg.iter().enumerate() {
        let (e, v) = match kind {
            "ordinary" => {
                let w = ordinary_kriging_weights(model.as_ref(), &pts, t).unwrap();
                (w.combine(&z), w.variance)
            }
            "simple" => {
                let w = simple_kriging_weights(model.as_ref(), &pts, t).unwrap();
                let r: Vec<f64> = z.iter().map(|v| v - mean).collect();
                (mean + w.combine(&r), w.variance)
            }
            "external_drift" => {
                let w = external_drift_kriging_weights(model.as_ref(), &pts, &drift, t, tdrift[k])
                    .unwrap();
                assert!(!w.drift_fallback);
                (w.combine(&z), w.variance)
            }
            _ => panic!("unknown kind {kind}"),
        };
        direct.push((e, v));
    }
    let samples: Vec<Sample> = pts
        .iter()
        .enumerate()
        .map(|(i, p)| {
            let mut s = Sample::new(i as u32, 0, *p, z[i]);
            s.drift = drift.get(i).copied();
            s
        })
        .collect();
    let data = SampleSet::new(samples).unwrap();
    let kk = match kind {
        "ordinary" => KrigingKind::Ordinary,
        "simple" => KrigingKind::SimpleMean(mean),
        _ => KrigingKind::ExternalDrift,
    };
    let all = NeighbourhoodParams::per_well(1, pts.len(), pts.len(), f64::INFINITY);
    let kr = Kriger::new(&data, model.as_ref(), all, kk).unwrap();
    let targets: Vec<Target> = tg
        .iter()
        .enumerate()
        .map(|(k, &p)| Target {
            pos: p,
            drift: tdrift.get(k).copied(),
            trend: None,
        })
        .collect();
    let col = kr.krige_column(&targets).unwrap();
    let engine = col
        .estimates
        .iter()
        .map(|e| {
            assert_eq!(e.neighbours as usize, pts.len());
            (e.value, e.variance)
        })
        .collect();
    (direct, engine)
}

fn compare(reference: &Value, label: &str) {
    let mut checked = 0;
    let mut worst = 0.0f64;
    for case in reference["cases"].as_array().unwrap() {
        let name = case["name"].as_str().unwrap();
        let (direct, engine) = ours(case);
        for (lib, r) in case["reference"].as_object().unwrap() {
            let re = arr(&r["estimate"]);
            let rv = arr(&r["variance"]);
            assert_eq!(re.len(), direct.len());
            for k in 0..re.len() {
                for (what, (e, v)) in [("direct", direct[k]), ("engine", engine[k])] {
                    worst = worst
                        .max((e - re[k]).abs() / re[k].abs().max(1.0))
                        .max((v - rv[k]).abs() / rv[k].abs().max(1.0));
                    let tol_e = 1e-8 * re[k].abs().max(1.0);
                    let tol_v = 1e-8 * rv[k].abs().max(1.0);
                    assert!(
                        (e - re[k]).abs() <= tol_e,
                        "{label} {name} {lib} target {k} ({what}): estimate {e} vs {}",
                        re[k]
                    );
                    assert!(
                        (v - rv[k]).abs() <= tol_v,
                        "{label} {name} {lib} target {k} ({what}): variance {v} vs {}",
                        rv[k]
                    );
                }
                checked += 1;
            }
        }
    }
    println!("{label}: largest difference {worst:.2e} (relative, or absolute below 1)");
    // 1 + 5 x 25 targets x libraries: I&S (2 libs), OK (2), SK (1), KED (2), 3 aniso (1 each)
    assert_eq!(
        checked,
        2 + 25 * (2 + 1 + 2 + 3),
        "{label}: all cases checked"
    );
}

#[test]
fn agrees_with_pykrige_and_gstools() {
    let golden = load(&golden_path());
    assert_eq!(golden["meta"]["pykrige"], "1.7.3");
    assert_eq!(golden["meta"]["gstools"], "1.7.0");
    compare(&golden, "golden");
    if let Some(l) = live() {
        compare(&l, "live");
    }
}
