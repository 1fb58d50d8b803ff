//! Fitting recovers known parameters from synthetic experimental variograms made
//! from an exact model (noise-free and with multiplicative noise), respects fixed
//! parameters, and reports the Cressie (1985, Math. Geol. 17(5)) criterion
//! `sum N (g_exp - g_model)^2 / g_model^2`, recomputed here from its definition.

use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;
use rand_distr::{Distribution, Normal};
use stratiprior::geostat::variogram::{
    fit_model, ExperimentalVariogram, FitSpec, FitStrategy, FixedParameters, FixedStructure,
    LagBin, LagDirection, Structure, StructureKind, VariogramModel,
};

/// Experimental variogram sampled from `m` at `n` class centres of width `w`
/// along `dir`, with pair counts varying by class and relative noise `noise`.
fn synthetic(
    m: &VariogramModel,
    dir: LagDirection,
    w: f64,
    n: usize,
    noise: f64,
    rng: &mut ChaCha8Rng,
) -> ExperimentalVariogram {
    let u = match dir {
        LagDirection::Omnidirectional => [0.0, 1.0, 0.0],
        d => d.unit_vector().unwrap(),
    };
    let normal = Normal::new(0.0, 1.0).unwrap();
    let bins = (0..n)
        .map(|k| {
            let h = (k as f64 + 0.5) * w;
            let g = m.gamma([h * u[0], h * u[1], h * u[2]]);
            let e = if noise > 0.0 {
                noise * normal.sample(rng)
            } else {
                0.0
            };
            LagBin {
                h_lower: k as f64 * w,
                h_upper: (k + 1) as f64 * w,
                h_mean: h,
                gamma: g * (1.0 + e),
                pairs: 200 + 37 * k as u64,
            }
        })
        .collect();
    ExperimentalVariogram {
        direction: dir,
        bins,
        min_pairs: 30,
        warnings: vec![],
    }
}

fn horizontal(az: f64) -> LagDirection {
    LagDirection::Horizontal {
        azimuth: az,
        tolerance: 22.5,
    }
}

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}

fn truth() -> VariogramModel {
    VariogramModel {
        nugget: 0.1,
        structures: vec![Structure {
            kind: StructureKind::Spherical,
            sill: 0.9,
            range_major: 1500.0,
            range_minor: 800.0,
            azimuth: 30.0,
            range_vertical: 12.0,
        }],
    }
}

fn cressie(m: &VariogramModel, evs: &[ExperimentalVariogram]) -> f64 {
    let mut q = 0.0;
    for ev in evs {
        let u = ev.direction.unit_vector().unwrap();
        for b in ev.bins.iter().filter(|b| b.pairs > 0) {
            let g = m.gamma([b.h_mean * u[0], b.h_mean * u[1], b.h_mean * u[2]]);
            q += b.pairs as f64 * ((b.gamma - g) / g).powi(2);
        }
    }
    q
}

#[test]
fn noise_free_spherical_with_anisotropy_is_recovered() {
    let t = truth();
    let mut rng = ChaCha8Rng::seed_from_u64(1);
    let evs = vec![
        synthetic(&t, LagDirection::Vertical, 1.0, 25, 0.0, &mut rng),
        synthetic(&t, horizontal(30.0), 150.0, 16, 0.0, &mut rng),
        synthetic(&t, horizontal(120.0), 150.0, 16, 0.0, &mut rng),
    ];
    for strategy in [FitStrategy::Sequential, FitStrategy::Joint] {
        let mut spec = FitSpec::new(vec![StructureKind::Spherical]);
        spec.strategy = strategy;
        let r = fit_model(&evs, &spec).unwrap();
        let m = &r.model;
        let s = &m.structures[0];
        assert!(rel(m.nugget, 0.1) < 1e-4, "{strategy:?} {m:?}");
        assert!(rel(s.sill, 0.9) < 1e-4, "{m:?}");
        assert!(rel(s.range_vertical, 12.0) < 1e-4, "{m:?}");
        assert!(rel(s.range_major, 1500.0) < 1e-4, "{m:?}");
        assert!(rel(s.range_minor, 800.0) < 1e-4, "{m:?}");
        assert!((s.azimuth - 30.0).abs() < 1e-9);
        assert!(r.weighted_residual < 1e-12, "{}", r.weighted_residual);
        assert!((r.weighted_residual - cressie(m, &evs)).abs() < 1e-12);
        assert!(r.converged);
        assert!(r.fixed.is_empty());
        assert_eq!(
            r.stages.len(),
            if strategy == FitStrategy::Sequential {
                2
            } else {
                1
            }
        );
    }
}

#[test]
fn noise_free_two_nested_structures_are_recovered() {
    let t = VariogramModel {
        nugget: 0.05,
        structures: vec![
            Structure::horizontally_isotropic(StructureKind::Exponential, 0.35, 300.0, 3.0),
            Structure::horizontally_isotropic(StructureKind::Spherical, 0.6, 2000.0, 20.0),
        ],
    };
    let mut rng = ChaCha8Rng::seed_from_u64(2);
    let evs = vec![
        synthetic(&t, LagDirection::Vertical, 0.5, 60, 0.0, &mut rng),
        synthetic(&t, LagDirection::Omnidirectional, 100.0, 30, 0.0, &mut rng),
    ];
    let spec = FitSpec::new(vec![StructureKind::Exponential, StructureKind::Spherical]);
    let r = fit_model(&evs, &spec).unwrap();
    let m = &r.model;
    assert!(rel(m.nugget, 0.05) < 1e-4, "{m:?}");
    for (a, b) in m.structures.iter().zip(&t.structures) {
        assert!(rel(a.sill, b.sill) < 1e-4, "{m:?}");
        assert!(rel(a.range_vertical, b.range_vertical) < 1e-4, "{m:?}");
        assert!(rel(a.range_major, b.range_major) < 1e-4, "{m:?}");
        assert_eq!(a.range_major, a.range_minor);
    }
    assert!(r
        .tied
        .iter()
        .any(|t| t.contains("range_minor = range_major")));
}

#[test]
fn azimuth_is_fitted_from_three_directions() {
    let mut t = truth();
    t.structures[0].kind = StructureKind::Exponential;
    t.structures[0].azimuth = 40.0;
    let mut rng = ChaCha8Rng::seed_from_u64(3);
    let mut evs = vec![synthetic(
        &t,
        LagDirection::Vertical,
        1.0,
        30,
        0.0,
        &mut rng,
    )];
    for az in [0.0, 60.0, 120.0] {
        evs.push(synthetic(&t, horizontal(az), 150.0, 16, 0.0, &mut rng));
    }
    let r = fit_model(&evs, &FitSpec::new(vec![StructureKind::Exponential])).unwrap();
    let s = &r.model.structures[0];
    assert!((s.azimuth - 40.0).abs() < 1e-3, "{s:?}");
    assert!(rel(s.range_major, 1500.0) < 1e-4, "{s:?}");
    assert!(rel(s.range_minor, 800.0) < 1e-4, "{s:?}");
    // Directions given across the major axis first: the ranges are swapped back and
    // the azimuth turned by 90 degrees.
    let evs2 = vec![
        synthetic(&truth(), LagDirection::Vertical, 1.0, 25, 0.0, &mut rng),
        synthetic(&truth(), horizontal(120.0), 150.0, 16, 0.0, &mut rng),
        synthetic(&truth(), horizontal(30.0), 150.0, 16, 0.0, &mut rng),
    ];
    let r = fit_model(&evs2, &FitSpec::new(vec![StructureKind::Spherical])).unwrap();
    let s = &r.model.structures[0];
    assert!((s.azimuth - 30.0).abs() < 1e-9, "{s:?}");
    assert!(
        rel(s.range_major, 1500.0) < 1e-4 && rel(s.range_minor, 800.0) < 1e-4,
        "{s:?}"
    );
}

#[test]
fn noisy_variogram_is_recovered_within_a_few_percent() {
    let t = truth();
    for seed in 0..4u64 {
        let mut rng = ChaCha8Rng::seed_from_u64(100 + seed);
        let evs = vec![
            synthetic(&t, LagDirection::Vertical, 0.5, 50, 0.03, &mut rng),
            synthetic(&t, horizontal(30.0), 100.0, 25, 0.03, &mut rng),
            synthetic(&t, horizontal(120.0), 100.0, 25, 0.03, &mut rng),
        ];
        let r = fit_model(&evs, &FitSpec::new(vec![StructureKind::Spherical])).unwrap();
        let m = &r.model;
        let s = &m.structures[0];
        assert!((m.nugget - 0.1).abs() < 0.05 * 1.0, "{m:?}"); // within 5 % of the total sill
        assert!(rel(s.sill, 0.9) < 0.05, "{m:?}");
        assert!(rel(s.range_vertical, 12.0) < 0.05, "{m:?}");
        assert!(rel(s.range_major, 1500.0) < 0.05, "{m:?}");
        assert!(rel(s.range_minor, 800.0) < 0.05, "{m:?}");
        assert!((r.weighted_residual - cressie(m, &evs)).abs() < 1e-9 * r.weighted_residual);
        // The fit is at least as good as the truth under its own criterion, up to
        // the difference between the iterated-reweighting fixed point and the minimiser.
        assert!(
            r.weighted_residual < 1.05 * cressie(&t, &evs),
            "{} vs {}",
            r.weighted_residual,
            cressie(&t, &evs)
        );
    }
}

#[test]
fn fixed_parameters_are_respected() {
    let t = truth();
    let mut rng = ChaCha8Rng::seed_from_u64(4);
    let evs = vec![
        synthetic(&t, LagDirection::Vertical, 1.0, 25, 0.0, &mut rng),
        synthetic(&t, horizontal(30.0), 150.0, 16, 0.0, &mut rng),
        synthetic(&t, horizontal(120.0), 150.0, 16, 0.0, &mut rng),
    ];
    // Fix the nugget at a wrong value and the vertical range at the right one.
    let mut spec = FitSpec::new(vec![StructureKind::Spherical]);
    spec.fixed = FixedParameters {
        nugget: Some(0.2),
        structures: vec![FixedStructure {
            range_vertical: Some(12.0),
            azimuth: Some(30.0),
            ..Default::default()
        }],
    };
    let r = fit_model(&evs, &spec).unwrap();
    assert_eq!(r.model.nugget, 0.2);
    assert_eq!(r.model.structures[0].range_vertical, 12.0);
    assert_eq!(r.model.structures[0].azimuth, 30.0);
    assert_eq!(
        r.fixed,
        vec![
            "nugget",
            "structures[0].azimuth",
            "structures[0].range_vertical"
        ]
    );
    assert!(r.stages[0].free == vec!["structures[0].sill".to_string()]);
    assert!(r.weighted_residual > 1e-3); // a wrong nugget cannot fit exactly
                                         // Fix the sill and a horizontal range; the rest is still recovered exactly.
    spec.fixed = FixedParameters {
        nugget: None,
        structures: vec![FixedStructure {
            sill: Some(0.9),
            range_minor: Some(800.0),
            ..Default::default()
        }],
    };
    let r = fit_model(&evs, &spec).unwrap();
    let s = &r.model.structures[0];
    assert_eq!(s.sill, 0.9);
    assert_eq!(s.range_minor, 800.0);
    assert!(rel(r.model.nugget, 0.1) < 1e-4);
    assert!(rel(s.range_major, 1500.0) < 1e-4);
    assert!(rel(s.range_vertical, 12.0) < 1e-4);
}

#[test]
fn horizontal_only_and_error_messages() {
    let t = truth();
    let mut rng = ChaCha8Rng::seed_from_u64(6);
    let hor = vec![
        synthetic(&t, horizontal(30.0), 150.0, 16, 0.0, &mut rng),
        synthetic(&t, horizontal(120.0), 150.0, 16, 0.0, &mut rng),
    ];
    // Without a vertical variogram the vertical range must be fixed.
    let e = fit_model(&hor, &FitSpec::new(vec![StructureKind::Spherical]))
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("structures[0].range_vertical is not fixed"),
        "{e}"
    );
    let mut spec = FitSpec::new(vec![StructureKind::Spherical]);
    spec.fixed.structures = vec![FixedStructure {
        range_vertical: Some(12.0),
        ..Default::default()
    }];
    let r = fit_model(&hor, &spec).unwrap();
    assert!(
        rel(r.model.nugget, 0.1) < 1e-4 && rel(r.model.structures[0].range_major, 1500.0) < 1e-4
    );
    // Mixing omnidirectional and directional horizontal variograms is refused.
    let mut mixed = hor.clone();
    mixed.push(synthetic(
        &t,
        LagDirection::Omnidirectional,
        150.0,
        16,
        0.0,
        &mut rng,
    ));
    assert!(fit_model(&mixed, &spec)
        .unwrap_err()
        .to_string()
        .contains("cannot be fitted together"));
    // Bad fixed values and mismatched lists.
    spec.fixed.nugget = Some(-1.0);
    assert!(fit_model(&hor, &spec)
        .unwrap_err()
        .to_string()
        .contains("fixed nugget"));
    spec.fixed.nugget = None;
    spec.fixed.structures.push(FixedStructure::default());
    assert!(fit_model(&hor, &spec)
        .unwrap_err()
        .to_string()
        .contains("2 fixed-structure entries for 1 structures"));
    // Nothing to fit.
    assert!(fit_model(&[], &FitSpec::new(vec![StructureKind::Spherical])).is_err());
}
