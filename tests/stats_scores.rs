//! Validation scores (`validation::scores`) against published check values,
//! values worked out by hand from the definitions, and the definitions
//! evaluated numerically. The comparison with scipy and numpy on random data is
//! in `tests/stats_scipy.rs`.

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use stratiprior::validation::scores::{
    central_interval, coverage, crps_ensemble, crps_ensemble_fair, crps_normal, normal_cdf,
    normal_pdf, wasserstein_1d, weighted_mean, weighted_quantile, weighted_quantiles,
    weighted_variance, QuantileMethod, VarianceKind,
};

fn close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol
}

#[test]
fn wasserstein_check_values() {
    // scipy.stats.wasserstein_distance docstring examples (scipy 1.17.1,
    // read from the installed source) and the values, each by hand:
    // * [0, 1, 3] vs [5, 6, 8]: v is u shifted by 5, so W1 = 5.
    assert!(close(
        wasserstein_1d(&[0.0, 1.0, 3.0], &[5.0, 6.0, 8.0], None, None).unwrap(),
        5.0,
        1e-15
    ));
    // * [0, 1] weights [3, 1] vs [0, 1] weights [2, 2]: on [0, 1) F_u = 3/4 and
    //   F_v = 1/2, equal elsewhere: W1 = 1/4 * 1 = 0.25.
    assert!(close(
        wasserstein_1d(
            &[0.0, 1.0],
            &[0.0, 1.0],
            Some(&[3.0, 1.0]),
            Some(&[2.0, 2.0])
        )
        .unwrap(),
        0.25,
        1e-15
    ));
    // * [1, 2, 3] vs [1, 2, 3, 4] (the issue): on [1, 2) |1/3 - 1/4| = 1/12, on
    //   [2, 3) |2/3 - 2/4| = 1/6, on [3, 4) |1 - 3/4| = 1/4; W1 = 1/12 + 2/12 +
    //   3/12 = 0.5.
    assert!(close(
        wasserstein_1d(&[1.0, 2.0, 3.0], &[1.0, 2.0, 3.0, 4.0], None, None).unwrap(),
        0.5,
        1e-15
    ));
    // * the docstring's third example, value as printed there.
    let w = wasserstein_1d(
        &[3.4, 3.9, 7.5, 7.8],
        &[4.5, 1.4],
        Some(&[1.4, 0.9, 3.1, 7.2]),
        Some(&[3.2, 3.5]),
    )
    .unwrap();
    #[allow(clippy::excessive_precision)] // the digits as printed in the docstring
    let printed = 4.0781331438047861;
    assert!(close(w, printed, 1e-14), "{w}");
}

#[test]
fn wasserstein_equals_the_sorted_matching_and_replication() {
    let mut rng = ChaCha8Rng::seed_from_u64(1);
    for n in [1, 2, 7, 40] {
        let u: Vec<f64> = (0..n).map(|_| rng.gen_range(-5.0..5.0)).collect();
        let v: Vec<f64> = (0..n).map(|_| rng.gen_range(-3.0..9.0)).collect();
        // Equal sizes, equal weights: the optimal coupling matches order
        // statistics, W1 = (1/n) sum |u_(i) - v_(i)| (Villani 2009, the 1-D case).
        let (mut us, mut vs) = (u.clone(), v.clone());
        us.sort_by(f64::total_cmp);
        vs.sort_by(f64::total_cmp);
        let matched = us.iter().zip(&vs).map(|(a, b)| (a - b).abs()).sum::<f64>() / n as f64;
        let w = wasserstein_1d(&u, &v, None, None).unwrap();
        assert!(
            close(w, matched, 1e-12 * matched.max(1.0)),
            "{w} vs {matched}"
        );
        // Symmetry and a shift: W1(u, u + c) = |c|.
        assert!(close(wasserstein_1d(&v, &u, None, None).unwrap(), w, 1e-12));
        let shifted: Vec<f64> = u.iter().map(|x| x - 2.5).collect();
        assert!(close(
            wasserstein_1d(&u, &shifted, None, None).unwrap(),
            2.5,
            1e-12
        ));
        // Integer weights are replications (the definition of the weighted ECDF).
        let k: Vec<f64> = (0..n).map(|_| rng.gen_range(1..4) as f64).collect();
        let rep: Vec<f64> = u
            .iter()
            .zip(&k)
            .flat_map(|(x, c)| std::iter::repeat_n(*x, *c as usize))
            .collect();
        let a = wasserstein_1d(&u, &v, Some(&k), None).unwrap();
        let b = wasserstein_1d(&rep, &v, None, None).unwrap();
        assert!(close(a, b, 1e-12 * b.max(1.0)), "{a} vs {b}");
    }
    // Zero distance between a sample and itself; zero weights drop values.
    assert_eq!(
        wasserstein_1d(&[1.0, 2.0], &[2.0, 1.0], None, None).unwrap(),
        0.0
    );
    let a = wasserstein_1d(&[1.0, 50.0], &[1.0], Some(&[1.0, 0.0]), None).unwrap();
    assert_eq!(a, 0.0);
}

#[test]
fn crps_check_values() {
    // The values, by hand from CRPS = E|X - y| - 0.5 E|X - X'|
    // (Gneiting and Raftery 2007, eq. 21):
    // * {1, 2, 3}, y = 2.5: E|X - y| = (1.5 + 0.5 + 0.5)/3 = 5/6; sum over all
    //   ordered pairs |x_i - x_j| = 2 (1 + 2 + 1) = 8, E|X - X'| = 8/9;
    //   CRPS = 5/6 - 4/9 = 7/18 = 0.388889. Fair (Ferro 2014): 8 / (3 * 2) = 4/3,
    //   CRPS_fair = 5/6 - 2/3 = 1/6 = 0.166667.
    let c = crps_ensemble(&[1.0, 2.0, 3.0], None, 2.5).unwrap();
    assert!(close(c, 7.0 / 18.0, 1e-15), "{c}");
    assert!(close(c, 0.388889, 5e-7));
    let f = crps_ensemble_fair(&[1.0, 2.0, 3.0], None, 2.5).unwrap();
    assert!(close(f, 1.0 / 6.0, 1e-15), "{f}");
    assert!(close(f, 0.166667, 5e-7));
    // * {1, 2, 3, 4, 5}, y = 0: E|X - y| = 3; sum_{i<j} (j - i) = 4 + 6 + 6 + 4
    //   = 20, over ordered pairs 40, E|X - X'| = 40/25 = 1.6; CRPS = 3 - 0.8 = 2.2.
    let c = crps_ensemble(&[1.0, 2.0, 3.0, 4.0, 5.0], None, 0.0).unwrap();
    assert!(close(c, 2.2, 1e-15), "{c}");
    // * N(0, 1), y = 0: 2 phi(0) - 1/sqrt(pi) = (sqrt 2 - 1) / sqrt(pi) = 0.233695.
    let c = crps_normal(0.0, 1.0, 0.0).unwrap();
    let exact = (2f64.sqrt() - 1.0) / std::f64::consts::PI.sqrt();
    assert!(close(c, exact, 1e-15), "{c}");
    assert!(close(c, 0.233695, 5e-7));
    // Location-scale: CRPS(N(mu, s^2), y) = s CRPS(N(0, 1), (y - mu) / s).
    let a = crps_normal(3000.0, 150.0, 3210.0).unwrap();
    let b = 150.0 * crps_normal(0.0, 1.0, 1.4).unwrap();
    assert!(close(a, b, 1e-11), "{a} vs {b}");
    // Weights: {1, 2, 3} with weights (1, 2, 1) is {1, 2, 2, 3} equally weighted.
    let a = crps_ensemble(&[1.0, 2.0, 3.0], Some(&[1.0, 2.0, 1.0]), 2.7).unwrap();
    let b = crps_ensemble(&[1.0, 2.0, 2.0, 3.0], None, 2.7).unwrap();
    assert!(close(a, b, 1e-15));
    // A one-member ensemble scores the absolute error (Gneiting and Raftery 2007).
    assert!(close(crps_ensemble(&[4.0], None, 1.5).unwrap(), 2.5, 1e-15));
}

/// The weighted empirical CDF of an ensemble, by counting.
fn ecdf(x: &[f64], w: &[f64], t: f64) -> f64 {
    let tot: f64 = w.iter().sum();
    x.iter()
        .zip(w)
        .filter(|(x, _)| **x <= t)
        .map(|(_, w)| w)
        .sum::<f64>()
        / tot
}

#[test]
fn ensemble_crps_equals_the_integral_definition() {
    // CRPS(F, y) = integral (F(t) - 1{t >= y})^2 dt (Gneiting and Raftery 2007,
    // eq. 20), integrated numerically: the integrand is constant between the
    // sorted members and y, so a midpoint rule on every such piece (plus the
    // empty tails) is exact up to rounding.
    let mut rng = ChaCha8Rng::seed_from_u64(2);
    for trial in 0..40 {
        let m = 1 + trial % 13;
        let x: Vec<f64> = (0..m).map(|_| rng.gen_range(-4.0..4.0)).collect();
        let w: Vec<f64> = (0..m).map(|_| rng.gen_range(0.0..2.0)).collect();
        let y = rng.gen_range(-6.0..6.0);
        let mut knots: Vec<f64> = x.clone();
        knots.push(y);
        knots.sort_by(f64::total_cmp);
        let mut integral = 0.0;
        for k in knots.windows(2) {
            let (a, b) = (k[0], k[1]);
            // Five midpoints per piece (the integrand is constant on it).
            for s in 0..5 {
                let t = a + (s as f64 + 0.5) / 5.0 * (b - a);
                let h = if t >= y { 1.0 } else { 0.0 };
                integral += (ecdf(&x, &w, t) - h).powi(2) * (b - a) / 5.0;
            }
        }
        let ours = crps_ensemble(&x, Some(&w), y).unwrap();
        assert!(
            close(ours, integral, 1e-12 * integral.max(1.0)),
            "trial {trial}: {ours} vs {integral}"
        );
    }
}

#[test]
fn normal_crps_equals_the_integral_definition() {
    // CRPS(N(mu, s^2), y) = integral (Phi((t - mu)/s) - 1{t >= y})^2 dt,
    // composite Simpson on each side of y over 14 standard deviations.
    for (mu, s, y) in [
        (0.0f64, 1.0f64, 0.3f64),
        (0.0f64, 1.0f64, 0.3f64),
        (2.0, 0.5, -1.0),
        (3000.0, 120.0, 3333.0),
        (0.1, 0.03, 0.1),
    ] {
        // Each side's integrand is smooth: Phi^2 left of y, (1 - Phi)^2 right of it.
        let simpson = |g: &dyn Fn(f64) -> f64, a: f64, b: f64| {
            let n = 20_000;
            let h = (b - a) / n as f64;
            let mut acc = g(a) + g(b);
            for i in 1..n {
                acc += g(a + i as f64 * h) * if i % 2 == 1 { 4.0 } else { 2.0 };
            }
            acc * h / 3.0
        };
        let lo = (mu - 14.0 * s).min(y - s);
        let hi = (mu + 14.0 * s).max(y + s);
        let left = |t: f64| normal_cdf((t - mu) / s).powi(2);
        let right = |t: f64| (1.0 - normal_cdf((t - mu) / s)).powi(2);
        let integral = simpson(&left, lo, y) + simpson(&right, y, hi);
        let ours = crps_normal(mu, s, y).unwrap();
        assert!(
            close(ours, integral, 1e-10 * s),
            "N({mu}, {s}^2), y = {y}: {ours} vs {integral}"
        );
    }
}

#[test]
fn normal_cdf_and_pdf_values() {
    // Abramowitz and Stegun (1964), table 26.1 (values from memory, confirmed
    // with scipy.stats.norm.cdf 1.17.1): Phi(1) = 0.8413447461,
    // Phi(1.96) = 0.9750021049, Phi(-3) = 0.0013498980.
    assert!(close(normal_cdf(0.0), 0.5, 1e-16));
    assert!(close(normal_cdf(1.0), 0.841_344_746_1, 1e-10));
    assert!(close(normal_cdf(1.96), 0.975_002_104_9, 1e-10));
    assert!(close(normal_cdf(-3.0), 0.001_349_898_0, 1e-10));
    // Lower tail keeps relative accuracy (erfc, not 1 - erf): Phi(-10) =
    // 7.61985302416047e-24 (scipy.stats.norm.cdf(-10), scipy 1.17.1).
    let t = normal_cdf(-10.0);
    assert!(close(t / 7.619_853_024_160_47e-24, 1.0, 1e-12), "{t}");
    assert!(close(
        normal_pdf(0.0),
        1.0 / (2.0 * std::f64::consts::PI).sqrt(),
        1e-16
    ));
    assert!(close(normal_pdf(1.0), 0.241_970_724_519_143_37, 1e-15));
}

#[test]
fn weighted_moments_by_hand() {
    let x = [1.0, 2.0, 3.0, 4.0];
    assert!(close(weighted_mean(&x, None).unwrap(), 2.5, 1e-15));
    // Population variance (1.5^2 + 0.5^2 + 0.5^2 + 1.5^2) / 4 = 1.25; n - 1: 5/3.
    let pop = weighted_variance(&x, None, VarianceKind::Population).unwrap();
    assert!(close(pop, 1.25, 1e-15));
    let unb = weighted_variance(&x, None, VarianceKind::Unbiased).unwrap();
    assert!(close(unb, 5.0 / 3.0, 1e-15));
    // Equal weights of any size give the same.
    let w = [0.3; 4];
    assert!(close(
        weighted_variance(&x, Some(&w), VarianceKind::Unbiased).unwrap(),
        5.0 / 3.0,
        1e-14
    ));
    // Weights (3, 1): mean (3 + 2) / 4 = 1.25; population variance
    // (3 * 0.0625 + 0.5625) / 4 = 0.1875; reliability-weighted: V1 = 4,
    // V2 = 10, 0.75 / (4 - 10/4) = 0.5.
    let x = [1.0, 2.0];
    let w = [3.0, 1.0];
    assert!(close(weighted_mean(&x, Some(&w)).unwrap(), 1.25, 1e-15));
    assert!(close(
        weighted_variance(&x, Some(&w), VarianceKind::Population).unwrap(),
        0.1875,
        1e-15
    ));
    assert!(close(
        weighted_variance(&x, Some(&w), VarianceKind::Unbiased).unwrap(),
        0.5,
        1e-15
    ));
}

#[test]
fn quantiles_by_hand() {
    use QuantileMethod::{InvertedCdf, Linear};
    // Type 7 (Hyndman and Fan 1996): x = 1..4, h = 3p: Q(0.5) = 2.5, Q(1/3) = 2,
    // Q(0.9) = 3.7.
    let x = [4.0, 1.0, 3.0, 2.0];
    let q = weighted_quantiles(&x, None, &[0.0, 0.5, 1.0 / 3.0, 0.9, 1.0], Linear).unwrap();
    for (a, b) in q.iter().zip([1.0, 2.5, 2.0, 3.7, 4.0]) {
        assert!(close(*a, b, 1e-15), "{a} vs {b}");
    }
    // Weighted linear: x = 1, 2, 3 with weights 1, 2, 1: C = (0.5, 2, 3.5),
    // positions (0, 0.5, 1): Q(0.25) = 1.5, Q(0.5) = 2, Q(0.75) = 2.5.
    let q = weighted_quantiles(
        &[3.0, 1.0, 2.0],
        Some(&[1.0, 1.0, 2.0]),
        &[0.25, 0.5, 0.75],
        Linear,
    )
    .unwrap();
    for (a, b) in q.iter().zip([1.5, 2.0, 2.5]) {
        assert!(close(*a, b, 1e-15), "{a} vs {b}");
    }
    // Weights 2, 1, 1: C = (1, 2.5, 3.5), positions (0, 0.6, 1): Q(0.3) = 1.5,
    // Q(0.8) = 2.5. A zero-weight value is ignored.
    let q = weighted_quantiles(
        &[1.0, 2.0, 3.0, 100.0],
        Some(&[2.0, 1.0, 1.0, 0.0]),
        &[0.3, 0.8, 1.0],
        Linear,
    )
    .unwrap();
    for (a, b) in q.iter().zip([1.5, 2.5, 3.0]) {
        assert!(close(*a, b, 1e-15), "{a} vs {b}");
    }
    // Inverted CDF: weights 1, 2, 1 give the CDF 0.25, 0.75, 1.
    let xs = [1.0, 2.0, 3.0];
    let w = [1.0, 2.0, 1.0];
    let q = weighted_quantiles(
        &xs,
        Some(&w),
        &[0.0, 0.25, 0.26, 0.75, 0.76, 1.0],
        InvertedCdf,
    )
    .unwrap();
    assert_eq!(q, vec![1.0, 1.0, 2.0, 2.0, 3.0, 3.0]);
    // Leading zero weight: Q(0) is the first value of positive weight.
    let q = weighted_quantile(&xs, Some(&[0.0, 1.0, 1.0]), 0.0, InvertedCdf).unwrap();
    assert_eq!(q, 2.0);
    // One value.
    assert_eq!(weighted_quantile(&[7.0], None, 0.3, Linear).unwrap(), 7.0);
    assert_eq!(
        weighted_quantile(&[7.0, 9.0], Some(&[1.0, 0.0]), 0.3, Linear).unwrap(),
        7.0
    );
}

#[test]
fn weighted_linear_quantiles_are_monotone_and_reduce_to_type_7() {
    let mut rng = ChaCha8Rng::seed_from_u64(4);
    for n in [2, 3, 10, 51] {
        let x: Vec<f64> = (0..n).map(|_| rng.gen_range(0.0..10.0)).collect();
        let ps: Vec<f64> = (0..=100).map(|k| k as f64 / 100.0).collect();
        let eq = vec![0.7; n];
        let a = weighted_quantiles(&x, Some(&eq), &ps, QuantileMethod::Linear).unwrap();
        let b = weighted_quantiles(&x, None, &ps, QuantileMethod::Linear).unwrap();
        for (p, (u, v)) in ps.iter().zip(a.iter().zip(&b)) {
            assert!(close(*u, *v, 1e-12), "n {n} p {p}: {u} vs {v}");
        }
        let w: Vec<f64> = (0..n).map(|_| rng.gen_range(0.01..3.0)).collect();
        let q = weighted_quantiles(&x, Some(&w), &ps, QuantileMethod::Linear).unwrap();
        assert!(q.windows(2).all(|p| p[0] <= p[1]));
        let (lo, hi) = x
            .iter()
            .fold((f64::MAX, f64::MIN), |(a, b), &v| (a.min(v), b.max(v)));
        assert_eq!(q[0], lo);
        assert_eq!(q[100], hi);
    }
}

#[test]
fn coverage_by_hand() {
    // Ensembles {1, ..., 5}; type 7 gives the 50 % interval [Q(0.25), Q(0.75)] =
    // [2, 4] and the 90 % interval [Q(0.05), Q(0.95)] = [1.2, 4.8].
    // Observations 3 (inside both), 4.7 (inside 90 % only), 10 (outside both).
    let e = [1.0, 2.0, 3.0, 4.0, 5.0];
    let (lo, hi) = central_interval(&e, None, 0.9, QuantileMethod::Linear).unwrap();
    assert!(close(lo, 1.2, 1e-15) && close(hi, 4.8, 1e-15));
    let ens: Vec<&[f64]> = vec![&e, &e, &e];
    let c = coverage(
        &ens,
        None,
        &[3.0, 4.7, 10.0],
        &[0.5, 0.9],
        QuantileMethod::Linear,
    )
    .unwrap();
    assert_eq!((c[0].inside, c[0].total), (1, 3));
    assert_eq!((c[1].inside, c[1].total), (2, 3));
    assert!(close(c[0].fraction, 1.0 / 3.0, 1e-15));
    assert!(close(c[0].mean_width, 2.0, 1e-15));
    assert!(close(c[1].mean_width, 3.6, 1e-15));
    // Bounds are inside: the observation 2 is on the 50 % lower bound.
    let c = coverage(&ens[..1], None, &[2.0], &[0.5], QuantileMethod::Linear).unwrap();
    assert_eq!(c[0].inside, 1);
}

#[test]
fn calibrated_ensembles_cover_their_level() {
    // Observations drawn from the same normal distribution as their ensemble
    // fall in the central p interval with probability close to p (the meaning
    // of calibration, Gneiting, Balabdaoui and Raftery 2007). 2000 cases of 200
    // members: binomial standard error < 0.012, so 0.03 is a 2.5-sigma bound.
    let mut rng = ChaCha8Rng::seed_from_u64(7);
    let normal = |rng: &mut ChaCha8Rng| {
        let (u1, u2): (f64, f64) = (rng.gen_range(1e-300..1.0), rng.gen());
        (-2.0 * u1.ln()).sqrt() * (2.0 * std::f64::consts::PI * u2).cos()
    };
    let mut ens = Vec::new();
    let mut obs = Vec::new();
    for _ in 0..2000 {
        let mu = 3000.0 + 100.0 * normal(&mut rng);
        ens.push(
            (0..200)
                .map(|_| mu + 80.0 * normal(&mut rng))
                .collect::<Vec<f64>>(),
        );
        obs.push(mu + 80.0 * normal(&mut rng));
    }
    let refs: Vec<&[f64]> = ens.iter().map(|e| e.as_slice()).collect();
    let levels = [0.5, 0.8, 0.9];
    let c = coverage(&refs, None, &obs, &levels, QuantileMethod::Linear).unwrap();
    for row in &c {
        assert!(
            (row.fraction - row.level).abs() < 0.03,
            "level {}: {}",
            row.level,
            row.fraction
        );
    }
    // An under-dispersed ensemble (spread 40 instead of 80) covers far less.
    let narrow: Vec<Vec<f64>> = ens
        .iter()
        .map(|e| {
            let m = e.iter().sum::<f64>() / e.len() as f64;
            e.iter().map(|x| m + 0.5 * (x - m)).collect()
        })
        .collect();
    let refs: Vec<&[f64]> = narrow.iter().map(|e| e.as_slice()).collect();
    let c = coverage(&refs, None, &obs, &[0.9], QuantileMethod::Linear).unwrap();
    assert!(c[0].fraction < 0.7, "{}", c[0].fraction);
}

#[test]
fn bad_input_is_an_error_not_a_panic() {
    let x = [1.0, 2.0, 3.0];
    let checks: Vec<(stratiprior::Result<f64>, &str)> = vec![
        (wasserstein_1d(&[], &x, None, None), "no values"),
        (wasserstein_1d(&x, &[], None, None), "wasserstein_1d: v"),
        (
            wasserstein_1d(&[f64::NAN], &x, None, None),
            "value 0 is NaN",
        ),
        (
            wasserstein_1d(&x, &x, Some(&[1.0, 2.0]), None),
            "2 weights for 3 values",
        ),
        (
            wasserstein_1d(&x, &x, Some(&[1.0, -2.0, 1.0]), None),
            "weight 1 is -2",
        ),
        (
            wasserstein_1d(&x, &x, None, Some(&[0.0, 0.0, 0.0])),
            "sum to 0",
        ),
        (
            wasserstein_1d(&x, &x, None, Some(&[1.0, f64::INFINITY, 0.0])),
            "weight 1 is inf",
        ),
        (
            wasserstein_1d(&x, &x, None, Some(&[1e308, 1e308, 1e308])),
            "positive finite sum",
        ),
        (crps_ensemble(&[], None, 1.0), "no values"),
        (crps_ensemble(&x, None, f64::NAN), "observation"),
        (crps_ensemble_fair(&[2.0], None, 1.0), "at least two"),
        (
            crps_ensemble_fair(&x, Some(&[0.0, 1.0, 0.0]), 1.0),
            "at least two",
        ),
        (crps_normal(0.0, 0.0, 1.0), "standard deviation is 0"),
        (crps_normal(0.0, -1.0, 1.0), "standard deviation"),
        (crps_normal(f64::INFINITY, 1.0, 1.0), "mean"),
        (
            weighted_variance(&[1.0], None, VarianceKind::Unbiased),
            "at least two",
        ),
        (
            weighted_quantile(&x, None, 1.5, QuantileMethod::Linear),
            "probability 1.5",
        ),
        (
            weighted_quantile(&x, None, f64::NAN, QuantileMethod::InvertedCdf),
            "probability NaN",
        ),
        (weighted_mean(&[], None), "no values"),
        (
            wasserstein_1d(&[-1e308], &[1e308], None, None),
            "overflowed",
        ),
        (crps_ensemble(&[-1e308, 1e308], None, 0.0), "overflowed"),
    ];
    for (r, word) in checks {
        let e = r.expect_err("must be an error").to_string();
        assert!(e.contains(word), "{e:?} should mention {word:?}");
    }
    let e = central_interval(&x, None, 1.0, QuantileMethod::Linear)
        .expect_err("level 1")
        .to_string();
    assert!(e.contains("strictly between 0 and 1"), "{e}");
    let ens: Vec<&[f64]> = vec![&x, &x];
    let cov = |obs: &[f64], levels: &[f64], w: Option<&[&[f64]]>| {
        coverage(&ens, w, obs, levels, QuantileMethod::Linear)
            .expect_err("must be an error")
            .to_string()
    };
    assert!(cov(&[1.0], &[0.5], None).contains("2 ensembles for 1 observations"));
    assert!(cov(&[1.0, 2.0], &[], None).contains("no interval levels"));
    assert!(cov(&[1.0, 2.0], &[0.0], None).contains("level 0"));
    assert!(cov(&[1.0, f64::NAN], &[0.5], None).contains("ensemble 1"));
    let w: Vec<&[f64]> = vec![&[1.0, 1.0, 1.0]];
    assert!(cov(&[1.0, 2.0], &[0.5], Some(&w)).contains("1 weight vectors for 2"));
    let e = coverage(&[], None, &[], &[0.5], QuantileMethod::Linear)
        .expect_err("empty")
        .to_string();
    assert!(e.contains("no observations"), "{e}");
}
