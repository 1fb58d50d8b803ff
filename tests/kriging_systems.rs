//! Kriging systems against published worked examples and hand-derived cases.

mod kriging_support;

use kriging_support::IsoExp;
use stratiprior::geostat::kriging::{
    external_drift_kriging_weights, ordinary_kriging_weights, simple_kriging_weights, Kriger,
    KrigingKind, Note, Sample, SampleSet, Target,
};
use stratiprior::geostat::neighbourhood::NeighbourhoodParams;
use stratiprior::geostat::CovarianceModel;

fn close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol
}

/// Source: Isaaks and Srivastava (1989), *An Introduction to Applied
/// Geostatistics*, ch. 12 (ordinary kriging worked example, seven samples around
/// (65, 137), C(h) = 10 exp(-0.3 h)). Book values from memory; PyKrige 1.7.3 and
/// GSTools 1.7.0 reproduce them (tests/reference/kriging_reference.py, case
/// "isaaks_srivastava"). Checked to the printed precision.
#[test]
fn isaaks_srivastava_ordinary_kriging_example() {
    let pts = [
        [61.0, 139.0, 0.0],
        [63.0, 140.0, 0.0],
        [64.0, 129.0, 0.0],
        [68.0, 128.0, 0.0],
        [71.0, 140.0, 0.0],
        [73.0, 141.0, 0.0],
        [75.0, 128.0, 0.0],
    ];
    let z = [477.0, 696.0, 227.0, 646.0, 606.0, 791.0, 783.0];
    let model = IsoExp { c: 10.0, a: 0.3 };
    let k = ordinary_kriging_weights(&model, &pts, [65.0, 137.0, 0.0]).unwrap();
    let book = [0.1729, 0.3178, 0.1287, 0.0864, 0.1511, 0.0572, 0.0858];
    for (w, b) in k.weights.iter().zip(book) {
        assert!(close(*w, b, 0.5e-4), "weight {w} vs book {b}");
    }
    assert!(
        close(k.combine(&z), 592.729, 0.5e-3),
        "estimate {}",
        k.combine(&z)
    );
    assert!(close(k.variance, 8.9561, 0.5e-4), "variance {}", k.variance);
    let wsum: f64 = k.weights.iter().sum();
    assert!(close(wsum, 1.0, 1e-12));

    // The same through the engine (per-well neighbourhood taking all seven
    // samples, each its own well).
    let samples: Vec<Sample> = pts
        .iter()
        .zip(z)
        .enumerate()
        .map(|(i, (p, v))| Sample::new(i as u32, 0, *p, v))
        .collect();
    let data = SampleSet::new(samples).unwrap();
    let kr = Kriger::new(
        &data,
        &model,
        NeighbourhoodParams::per_well(1, 10, 10, f64::INFINITY),
        KrigingKind::Ordinary,
    )
    .unwrap();
    let e = kr.estimate(&Target::at([65.0, 137.0, 0.0])).unwrap();
    assert_eq!(e.neighbours, 7);
    assert!(close(e.value, k.combine(&z), 1e-9));
    assert!(close(e.variance, k.variance, 1e-12));
}

/// Analytic 1-D ordinary kriging: z = 1 at x = 0, z = 3 at x = 1,
/// C(h) = exp(-h), target x = 0.25. The OK system
/// `[1 e^-1 1; e^-1 1 1; 1 1 0] [w1 w2 mu] = [e^-0.25 e^-0.75 1]` gives
/// `w1 = (1 + (e^-0.25 - e^-0.75)/(1 - e^-1)) / 2 = 0.742386`, `w2 = 0.257614`,
/// estimate `w1 + 3 w2 = 1.515228`, `mu = e^-0.25 - w1 - w2 e^-1`,
/// variance `1 - w1 e^-0.25 - w2 e^-0.75 - mu = 0.358497` (hand derivation,
/// values to 6 decimals).
#[test]
fn one_dimensional_ordinary_kriging_analytic() {
    let model = IsoExp { c: 1.0, a: 1.0 };
    let k =
        ordinary_kriging_weights(&model, &[[0.0; 3], [1.0, 0.0, 0.0]], [0.25, 0.0, 0.0]).unwrap();
    let e1 = (-1.0f64).exp();
    let w1 = 0.5 * (1.0 + ((-0.25f64).exp() - (-0.75f64).exp()) / (1.0 - e1));
    assert!(close(k.weights[0], w1, 1e-13));
    assert!(close(k.weights[0], 0.742386, 0.5e-6));
    assert!(close(k.weights[1], 0.257614, 0.5e-6));
    assert!(close(k.combine(&[1.0, 3.0]), 1.515228, 0.5e-6));
    assert!(close(k.variance, 0.358497, 0.5e-6));
    let mu = (-0.25f64).exp() - w1 - (1.0 - w1) * e1;
    assert!(close(k.lagrange[0], mu, 1e-13));
}

/// Simple kriging, hand derivation (Goovaerts 1997, eqs. 5.10-5.13):
/// (a) one datum at distance h: `w = C(h)/C(0) = e^{-a h}`,
///     `sigma^2 = c (1 - e^{-2 a h})`;
/// (b) two data at x = -1 and x = 1, target 0, C(h) = exp(-h):
///     `w1 = w2 = e^-1 / (1 + e^-2) = 1 / (2 cosh 1)`,
///     `sigma^2 = 1 - 2 e^-1 w1 = 1 - 2 / (e^2 + 1)`.
#[test]
fn simple_kriging_analytic() {
    let m = IsoExp { c: 2.5, a: 0.4 };
    let h = 1.7f64;
    let k = simple_kriging_weights(&m, &[[0.0, 0.0, 0.0]], [0.0, 0.0, h]).unwrap();
    assert!(close(k.weights[0], (-0.4 * h).exp(), 1e-14));
    assert!(close(k.variance, 2.5 * (1.0 - (-0.8 * h).exp()), 1e-13));

    let m1 = IsoExp { c: 1.0, a: 1.0 };
    let k = simple_kriging_weights(&m1, &[[-1.0, 0.0, 0.0], [1.0, 0.0, 0.0]], [0.0; 3]).unwrap();
    let w = 1.0 / (2.0 * 1.0f64.cosh());
    assert!(close(k.weights[0], w, 1e-14) && close(k.weights[1], w, 1e-14));
    let e2 = 1.0f64.exp().powi(2);
    assert!(close(k.variance, 1.0 - 2.0 / (e2 + 1.0), 1e-14));

    // Engine: SK with a constant mean and with a trend give
    // m(x0) + sum w (z - m(x_i)).
    let z = [4.0, 7.0];
    let trend = [3.0, 5.0];
    let samples: Vec<Sample> = (0..2)
        .map(|i| {
            let mut s = Sample::new(i, 0, [2.0 * i as f64 - 1.0, 0.0, 0.0], z[i as usize]);
            s.trend = Some(trend[i as usize]);
            s
        })
        .collect();
    let data = SampleSet::new(samples).unwrap();
    let nb = NeighbourhoodParams::per_well(1, 4, 4, f64::INFINITY);
    let kr = Kriger::new(&data, &m1, nb, KrigingKind::SimpleMean(5.0)).unwrap();
    let e = kr.estimate(&Target::at([0.0; 3])).unwrap();
    assert!(close(
        e.value,
        5.0 + w * (4.0 - 5.0) + w * (7.0 - 5.0),
        1e-13
    ));
    assert!(close(e.variance, 1.0 - 2.0 / (e2 + 1.0), 1e-14));
    let kr = Kriger::new(&data, &m1, nb, KrigingKind::SimpleTrend).unwrap();
    let mut t = Target::at([0.0; 3]);
    t.trend = Some(4.5);
    let e = kr.estimate(&t).unwrap();
    assert!(close(
        e.value,
        4.5 + w * (4.0 - 3.0) + w * (7.0 - 5.0),
        1e-13
    ));
    // Far from all data (outside the radius): SK returns the mean, variance C(0).
    let kr = Kriger::new(
        &data,
        &m1,
        NeighbourhoodParams::per_well(1, 4, 4, 3.0),
        KrigingKind::SimpleMean(5.0),
    )
    .unwrap();
    let e = kr.estimate(&Target::at([0.0, 10.0, 0.0])).unwrap();
    assert_eq!(
        (e.value, e.variance, e.note),
        (5.0, 1.0, Note::NoNeighbours)
    );
}

/// Kriging with an external drift, hand derivation (Wackernagel 2003, ch. 37):
/// with two data the two unbiasedness conditions `w1 + w2 = 1`,
/// `w1 f1 + w2 f2 = f0` fix the weights, `w1 = (f2 - f0) / (f2 - f1)`, whatever
/// the covariance. Points x = 0 (f = 1) and x = 1 (f = 3), target x = 0.25 with
/// f0 = 1.5: w1 = 0.75, w2 = 0.25. The variance is then the estimation variance
/// of these weights, `C(0) - 2 sum w_i C_i0 + sum_ij w_i w_j C_ij` (Isaaks and
/// Srivastava 1989, ch. 12, error variance), with C(h) = exp(-h):
/// `1 - 2 (0.75 e^-0.25 + 0.25 e^-0.75) + 0.75^2 + 0.25^2 + 2 (0.75)(0.25) e^-1`.
#[test]
fn external_drift_kriging_analytic() {
    let m = IsoExp { c: 1.0, a: 1.0 };
    let pts = [[0.0; 3], [1.0, 0.0, 0.0]];
    let k = external_drift_kriging_weights(&m, &pts, &[1.0, 3.0], [0.25, 0.0, 0.0], 1.5).unwrap();
    assert!(!k.drift_fallback);
    assert!(close(k.weights[0], 0.75, 1e-13) && close(k.weights[1], 0.25, 1e-13));
    let (c10, c20, c12) = ((-0.25f64).exp(), (-0.75f64).exp(), (-1.0f64).exp());
    let var = 1.0 - 2.0 * (0.75 * c10 + 0.25 * c20) + 0.5625 + 0.0625 + 2.0 * 0.1875 * c12;
    assert!(close(k.variance, var, 1e-13), "{} vs {var}", k.variance);
    // The multipliers solve C w + mu0 + mu1 f = c0 (two equations).
    let (mu0, mu1) = (k.lagrange[0], k.lagrange[1]);
    assert!(close(0.75 + 0.25 * c12 + mu0 + mu1 * 1.0, c10, 1e-13));
    assert!(close(0.75 * c12 + 0.25 + mu0 + mu1 * 3.0, c20, 1e-13));

    // Three data: weights satisfy both constraints; the Lagrange-form variance
    // equals the estimation variance of the weights, and moving the weights
    // along the constraints' null space only increases it (optimality; common
    // practice check of a kriging solver).
    let pts = [[0.0; 3], [1.0, 0.3, 0.0], [0.4, 1.2, 0.2]];
    let f = [1.0, 2.5, 1.8];
    let x0 = [0.5, 0.5, 0.1];
    let f0 = 1.9;
    let k = external_drift_kriging_weights(&m, &pts, &f, x0, f0).unwrap();
    let w = &k.weights;
    assert!(close(w.iter().sum::<f64>(), 1.0, 1e-12));
    assert!(close(
        w.iter().zip(f).map(|(a, b)| a * b).sum::<f64>(),
        f0,
        1e-12
    ));
    let est_var = |w: &[f64]| {
        let mut v = m.sill();
        for i in 0..3 {
            let d0 = [pts[i][0] - x0[0], pts[i][1] - x0[1], pts[i][2] - x0[2]];
            v -= 2.0 * w[i] * m.covariance(d0);
            for j in 0..3 {
                let d = [
                    pts[i][0] - pts[j][0],
                    pts[i][1] - pts[j][1],
                    pts[i][2] - pts[j][2],
                ];
                v += w[i] * w[j] * m.covariance(d);
            }
        }
        v
    };
    assert!(close(k.variance, est_var(w), 1e-12));
    // null space of [1 1 1; f]: n = (1,1,1) x f
    let nvec = [f[2] - f[1], f[0] - f[2], f[1] - f[0]];
    for eps in [-0.1, -0.01, 0.01, 0.1] {
        let w2: Vec<f64> = (0..3).map(|i| w[i] + eps * nvec[i]).collect();
        assert!(est_var(&w2) > k.variance);
    }
}

/// A drift constant over the neighbourhood makes KED ill-posed: the engine
/// falls back to ordinary kriging and says so (documented behaviour).
#[test]
fn constant_drift_falls_back_to_ordinary_kriging() {
    let m = IsoExp { c: 1.0, a: 0.5 };
    let pts = [[0.0; 3], [1.0, 0.3, 0.0], [0.4, 1.2, 0.2]];
    let x0 = [0.5, 0.5, 0.1];
    let ok = ordinary_kriging_weights(&m, &pts, x0).unwrap();
    for f0 in [7.0, 7.5] {
        let k = external_drift_kriging_weights(&m, &pts, &[7.0; 3], x0, f0).unwrap();
        assert!(k.drift_fallback);
        assert_eq!(k.weights, ok.weights);
        assert_eq!(k.variance, ok.variance);
    }
    // Engine: counted.
    let samples: Vec<Sample> = pts
        .iter()
        .enumerate()
        .map(|(i, p)| {
            let mut s = Sample::new(i as u32, 0, *p, i as f64);
            s.drift = Some(7.0);
            s
        })
        .collect();
    let data = SampleSet::new(samples).unwrap();
    let kr = Kriger::new(
        &data,
        &m,
        NeighbourhoodParams::per_well(1, 3, 3, f64::INFINITY),
        KrigingKind::ExternalDrift,
    )
    .unwrap();
    let mut t = Target::at(x0);
    t.drift = Some(7.0);
    let col = kr.krige_column(&[t, t]).unwrap();
    assert_eq!(col.stats.drift_fallbacks, 2);
    assert_eq!(col.estimates[0].note, Note::DriftFallback);
    assert!(close(
        col.estimates[0].value,
        ok.combine(&[0.0, 1.0, 2.0]),
        1e-12
    ));
}

/// Duplicate points make the system singular: a clear error naming the samples,
/// not a panic or a NaN (common practice: duplicates must be merged).
#[test]
fn duplicate_points_give_a_clear_error() {
    let m = IsoExp { c: 1.0, a: 0.5 };
    let p = [3.0, 4.0, 5.0];
    let err = ordinary_kriging_weights(&m, &[p, [0.0; 3], p], [1.0; 3]).unwrap_err();
    assert!(err.to_string().contains("points 0 and 2 coincide"), "{err}");
    let data = SampleSet::new(vec![
        Sample::new(1, 4, p, 1.0),
        Sample::new(2, 9, p, 2.0),
        Sample::new(3, 0, [0.0; 3], 2.0),
    ])
    .unwrap();
    let kr = Kriger::new(
        &data,
        &m,
        NeighbourhoodParams::per_well(4, 4, 8, f64::INFINITY),
        KrigingKind::SimpleMean(0.0),
    )
    .unwrap();
    let err = kr.estimate(&Target::at([1.0; 3])).unwrap_err().to_string();
    assert!(
        err.contains("well 1 layer 4") && err.contains("well 2 layer 9"),
        "{err}"
    );
    // Two samples of one well in one layer are refused when the set is built.
    let err = SampleSet::new(vec![
        Sample::new(1, 4, p, 1.0),
        Sample::new(1, 4, [0.0; 3], 2.0),
    ])
    .unwrap_err()
    .to_string();
    assert!(err.contains("well 1 has two samples in layer 4"), "{err}");
    // Missing drift for KED is named.
    let err = Kriger::new(
        &data,
        &m,
        NeighbourhoodParams::per_well(4, 4, 8, f64::INFINITY),
        KrigingKind::ExternalDrift,
    )
    .err()
    .map(|e| e.to_string())
    .unwrap_or_default();
    assert!(err.contains("well 1 layer 4 has no drift value"), "{err}");
}

/// A "covariance" that is not positive definite on the points: Cholesky fails
/// and the bordered system is solved by LU instead. The result must still
/// satisfy the ordinary-kriging equations `C w + mu = c0`, `sum w = 1`
/// (Isaaks and Srivastava 1989, eq. 12.12), and the fallback is counted.
#[test]
fn indefinite_model_falls_back_to_lu() {
    struct Bad;
    impl CovarianceModel for Bad {
        fn covariance(&self, d: [f64; 3]) -> f64 {
            let h = (d[0] * d[0] + d[1] * d[1] + d[2] * d[2]).sqrt();
            if h == 0.0 {
                1.0
            } else {
                0.5 - h
            }
        }
        fn sill(&self) -> f64 {
            1.0
        }
        fn to_isotropic(&self, p: [f64; 3]) -> [f64; 3] {
            p
        }
    }
    let pts = [
        [0.0, 0.0, 0.0],
        [1.0, 0.0, 0.0],
        [0.0, 1.0, 0.0],
        [1.0, 1.0, 0.0],
    ];
    let x0 = [0.3, 0.4, 0.0];
    let n = pts.len();
    let c = |a: [f64; 3], b: [f64; 3]| Bad.covariance([a[0] - b[0], a[1] - b[1], a[2] - b[2]]);
    let cm = nalgebra::DMatrix::from_fn(n, n, |i, j| if i == j { 1.0 } else { c(pts[i], pts[j]) });
    assert!(
        nalgebra::Cholesky::new(cm.clone()).is_none(),
        "precondition: not positive definite"
    );
    let k = ordinary_kriging_weights(&Bad, &pts, x0).unwrap();
    let mu = k.lagrange[0];
    for i in 0..n {
        let lhs: f64 = (0..n).map(|j| cm[(i, j)] * k.weights[j]).sum::<f64>() + mu;
        assert!(close(lhs, c(pts[i], x0), 1e-12));
    }
    assert!(close(k.weights.iter().sum::<f64>(), 1.0, 1e-12));
    let samples: Vec<Sample> = pts
        .iter()
        .enumerate()
        .map(|(i, p)| Sample::new(i as u32, 0, *p, i as f64))
        .collect();
    let data = SampleSet::new(samples).unwrap();
    let kr = Kriger::new(
        &data,
        &Bad,
        NeighbourhoodParams::per_well(1, 4, 4, f64::INFINITY),
        KrigingKind::Ordinary,
    )
    .unwrap();
    let col = kr.krige_column(&[Target::at(x0)]).unwrap();
    assert_eq!(col.stats.lu_fallbacks, 1);
    assert!(close(
        col.estimates[0].value,
        k.combine(&[0.0, 1.0, 2.0, 3.0]),
        1e-12
    ));
}
