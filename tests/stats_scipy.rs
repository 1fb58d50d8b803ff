//! Validation scores against scipy 1.17.1 and numpy 2.4.6 (PyPI) on random
//! (weighted) data.
//!
//! The cases and reference values come from `tests/reference/scipy_scores.py`:
//! `scipy.stats.wasserstein_distance`; the ensemble CRPS and its fair version
//! computed directly with numpy over all member pairs; the normal CRPS closed
//! form with `scipy.stats.norm` and the integral definition by
//! `scipy.integrate.quad`; `numpy.average`, `numpy.cov(aweights=..., ddof=1)`,
//! `numpy.quantile` (`linear`, and `inverted_cdf` with weights); coverage of
//! central intervals from `numpy.quantile`.
//!
//! With `STRATIPRIOR_PYTHON` set to an interpreter with scipy and numpy, the
//! script runs live and its output is compared, and the committed golden file
//! `tests/golden/stats/scipy_scores.json` must equal it (so it cannot go stale;
//! `STRATIPRIOR_REGEN_GOLDEN=1` rewrites it from the live run). Without it, the
//! golden file is used. With `STRATIPRIOR_REQUIRE_PYTHON=1`, a missing
//! interpreter or library is a failure.

use serde_json::Value;
use std::path::PathBuf;
use stratiprior::validation::scores::{
    coverage, crps_ensemble, crps_ensemble_fair, crps_normal, wasserstein_1d, weighted_mean,
    weighted_quantiles, weighted_variance, QuantileMethod, VarianceKind,
};

mod pyref;
use pyref::{arr, load};

fn golden_path() -> PathBuf {
    pyref::repo("tests/golden/stats/scipy_scores.json")
}

/// The live reference (see `tests/pyref`).
fn live() -> Option<Value> {
    pyref::live("scipy_scores.py", "scipy and numpy", &golden_path())
}

fn opt_arr(v: &Value) -> Option<Vec<f64>> {
    if v.is_null() {
        None
    } else {
        Some(arr(v))
    }
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap()
}

/// Relative difference, with `scale` as the floor of the denominator.
fn rel(a: f64, b: f64, scale: f64) -> f64 {
    (a - b).abs() / b.abs().max(scale)
}

/// Largest relative differences seen, per quantity, for the report.
#[derive(Default)]
struct Worst {
    w1: f64,
    crps: f64,
    fair: f64,
    normal: f64,
    normal_quad: f64,
    moments: f64,
    quantile: f64,
    counts: [usize; 6],
}

fn compare(reference: &Value, label: &str) -> Worst {
    let mut worst = Worst::default();
    // Wasserstein-1 against scipy.stats.wasserstein_distance: 1e-12 relative.
    for c in reference["wasserstein"].as_array().unwrap() {
        let (u, v) = (arr(&c["u"]), arr(&c["v"]));
        let (uw, vw) = (opt_arr(&c["u_w"]), opt_arr(&c["v_w"]));
        let ours = wasserstein_1d(&u, &v, uw.as_deref(), vw.as_deref()).unwrap();
        let r = f(&c["w1"]);
        let d = rel(ours, r, 1e-300);
        worst.w1 = worst.w1.max(d);
        assert!(d <= 1e-12, "{label} {}: {ours} vs scipy {r}", c["name"]);
        worst.counts[0] += 1;
    }
    // Ensemble CRPS against the direct numpy O(m^2) evaluation: 1e-12 relative
    // (the fair score can be 0 up to rounding: relative to at least the largest
    // absolute error of a member).
    for c in reference["crps"].as_array().unwrap() {
        let x = arr(&c["x"]);
        let w = opt_arr(&c["w"]);
        let y = f(&c["y"]);
        let ours = crps_ensemble(&x, w.as_deref(), y).unwrap();
        let r = f(&c["crps"]);
        let d = rel(ours, r, 1e-300);
        worst.crps = worst.crps.max(d);
        assert!(
            d <= 1e-12,
            "{label} crps {}: {ours} vs numpy {r}",
            c["name"]
        );
        let fair = crps_ensemble_fair(&x, w.as_deref(), y);
        match c["fair"].as_f64() {
            Some(rf) => {
                let ours = fair.unwrap();
                let scale = x.iter().map(|v| (v - y).abs()).fold(0.0, f64::max);
                let d = rel(ours, rf, scale);
                worst.fair = worst.fair.max(d);
                assert!(
                    d <= 1e-12,
                    "{label} fair {}: {ours} vs numpy {rf}",
                    c["name"]
                );
            }
            None => assert!(
                fair.is_err(),
                "{label} fair {}: expected an error",
                c["name"]
            ),
        }
        worst.counts[1] += 1;
    }
    // Normal CRPS against the closed form with scipy.stats.norm (1e-12) and the
    // integral definition by scipy.integrate.quad (1e-9).
    for c in reference["crps_normal"].as_array().unwrap() {
        let ours = crps_normal(f(&c["mean"]), f(&c["std"]), f(&c["y"])).unwrap();
        let d = rel(ours, f(&c["closed"]), 1e-300);
        worst.normal = worst.normal.max(d);
        assert!(d <= 1e-12, "{label} normal {c}: {ours}");
        let d = rel(ours, f(&c["quad"]), 1e-300);
        worst.normal_quad = worst.normal_quad.max(d);
        assert!(d <= 1e-9, "{label} normal quad {c}: {ours}");
        worst.counts[2] += 1;
    }
    // Weighted moments and quantiles against numpy: 1e-12 relative (the mean
    // and linear quantiles relative to at least the largest |x|).
    for c in reference["stats"].as_array().unwrap() {
        let x = arr(&c["x"]);
        let w = opt_arr(&c["w"]);
        let name = &c["name"];
        let spread = x.iter().fold(0.0, |a: f64, v| a.max(v.abs()));
        let m = weighted_mean(&x, w.as_deref()).unwrap();
        let d = rel(m, f(&c["mean"]), spread);
        let mut dm = d;
        assert!(d <= 1e-12, "{label} mean {name}: {m}");
        let vp = weighted_variance(&x, w.as_deref(), VarianceKind::Population).unwrap();
        let d = rel(vp, f(&c["var_population"]), 1e-300);
        dm = dm.max(d);
        assert!(d <= 1e-12, "{label} population variance {name}: {vp}");
        let vu = weighted_variance(&x, w.as_deref(), VarianceKind::Unbiased);
        match c["var_unbiased"].as_f64() {
            Some(r) => {
                let vu = vu.unwrap();
                let d = rel(vu, r, 1e-300);
                dm = dm.max(d);
                assert!(d <= 1e-12, "{label} unbiased variance {name}: {vu} vs {r}");
            }
            None => assert!(vu.is_err(), "{label} {name}: expected an error"),
        }
        worst.moments = worst.moments.max(dm);
        let ps = arr(&c["ps"]);
        if let Some(r) = opt_arr(&c["q_linear"]) {
            let q = weighted_quantiles(&x, w.as_deref(), &ps, QuantileMethod::Linear).unwrap();
            for (k, (a, b)) in q.iter().zip(&r).enumerate() {
                let d = rel(*a, *b, spread);
                worst.quantile = worst.quantile.max(d);
                assert!(d <= 1e-12, "{label} linear {name} p {}: {a} vs {b}", ps[k]);
            }
        }
        let q = weighted_quantiles(&x, w.as_deref(), &ps, QuantileMethod::InvertedCdf).unwrap();
        // A quantile of the inverted CDF is one of the values: exact.
        assert_eq!(q, arr(&c["q_inverted_cdf"]), "{label} inverted_cdf {name}");
        worst.counts[3] += 1;
    }
    // Coverage: identical counts, widths to 1e-12.
    for c in reference["coverage"].as_array().unwrap() {
        let ens: Vec<Vec<f64>> = c["ensembles"].as_array().unwrap().iter().map(arr).collect();
        let refs: Vec<&[f64]> = ens.iter().map(|e| e.as_slice()).collect();
        let ws: Option<Vec<Vec<f64>>> =
            c["weights"].as_array().map(|a| a.iter().map(arr).collect());
        let wrefs: Option<Vec<&[f64]>> = ws
            .as_ref()
            .map(|w| w.iter().map(|e| e.as_slice()).collect());
        let method = match c["method"].as_str().unwrap() {
            "linear" => QuantileMethod::Linear,
            _ => QuantileMethod::InvertedCdf,
        };
        let obs = arr(&c["observations"]);
        let rows = coverage(&refs, wrefs.as_deref(), &obs, &arr(&c["levels"]), method).unwrap();
        for (row, r) in rows.iter().zip(c["rows"].as_array().unwrap()) {
            assert_eq!(row.level, f(&r["level"]));
            assert_eq!(
                row.inside as u64,
                r["inside"].as_u64().unwrap(),
                "{label} {} level {}",
                c["method"],
                row.level
            );
            assert_eq!(row.total, obs.len());
            let d = rel(row.mean_width, f(&r["mean_width"]), 1e-300);
            assert!(d <= 1e-12, "{label} width {}", row.mean_width);
            worst.counts[4] += 1;
        }
    }
    worst.counts[5] = 1;
    println!(
        "{label}: {} wasserstein, {} crps (+fair), {} normal crps, {} statistics cases, \
         {} coverage rows; largest relative differences: W1 {:.1e}, CRPS {:.1e}, fair {:.1e}, \
         normal {:.1e} (quad {:.1e}), moments {:.1e}, linear quantiles {:.1e}",
        worst.counts[0],
        worst.counts[1],
        worst.counts[2],
        worst.counts[3],
        worst.counts[4],
        worst.w1,
        worst.crps,
        worst.fair,
        worst.normal,
        worst.normal_quad,
        worst.moments,
        worst.quantile
    );
    worst
}

/// Every number of `a` equal to `b`'s within 1e-13 relative (platform
/// summation order in numpy), every other value identical.
fn same_document(a: &Value, b: &Value, at: &str) {
    match (a, b) {
        (Value::Number(x), Value::Number(y)) => {
            let (x, y) = (x.as_f64().unwrap(), y.as_f64().unwrap());
            assert!(
                (x - y).abs() <= 1e-13 * y.abs().max(1e-300),
                "golden file differs from the live run at {at}: {x} vs {y}"
            );
        }
        (Value::Array(x), Value::Array(y)) => {
            assert_eq!(x.len(), y.len(), "golden file differs at {at}: lengths");
            for (k, (p, q)) in x.iter().zip(y).enumerate() {
                same_document(p, q, &format!("{at}[{k}]"));
            }
        }
        (Value::Object(x), Value::Object(y)) => {
            assert_eq!(
                x.keys().collect::<Vec<_>>(),
                y.keys().collect::<Vec<_>>(),
                "golden file differs at {at}: keys"
            );
            for (k, p) in x {
                same_document(p, &y[k], &format!("{at}.{k}"));
            }
        }
        _ => assert_eq!(a, b, "golden file differs from the live run at {at}"),
    }
}

#[test]
fn agrees_with_scipy_and_numpy() {
    let golden = load(&golden_path());
    assert_eq!(golden["meta"]["scipy"], "1.17.1");
    assert_eq!(golden["meta"]["numpy"], "2.4.6");
    let w = compare(&golden, "golden");
    // Sizes of the committed corpus (see the script): 3 docstring + 24 random
    // Wasserstein cases, 84 CRPS, 19 normal, 10 statistics, 3 x 3 coverage rows.
    assert_eq!(w.counts[..5], [27, 84, 19, 10, 9]);
    if let Some(l) = live() {
        compare(&l, "live");
        same_document(&golden, &l, "$");
    }
}
