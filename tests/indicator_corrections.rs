//! Hand cases of the facies-probability helpers: order-relation correction,
//! blending with a volume, most likely facies, label and probability volumes,
//! weighted proportions, facies samples from blocked cells, and input errors.
//!
//! Sources: the order-relation correction for categorical indicator kriging is
//! "clip to [0, 1], then divide by the sum" (Deutsch and Journel 1998, GSLIB
//! 2nd ed., sec. V.1.6, from memory); the expected values below are computed by
//! hand from that rule. The blend is the linear pool
//! `lambda p_wells + (1 - lambda) p_volume` (Genest and Zidek 1986, from memory).
//! The declustered proportion is the weighted mean of the indicators
//! (Goovaerts 1997 sec. 2.2.2, from memory).

#![allow(clippy::needless_range_loop)] // index loops over facies read best here

use std::collections::BTreeMap;
use stratiprior::condition::blocking::BlockedSample;
use stratiprior::geostat::indicator::{
    blend_with_volume, label_probabilities, most_likely_facies, order_relation_correct,
    volume_probabilities, weighted_proportions, FaciesModel, FaciesSample, IndicatorFitOptions,
    IndicatorMethod, IndicatorOptions, IndicatorSetup,
};
use stratiprior::geostat::kriging::Target;
use stratiprior::geostat::neighbourhood::NeighbourhoodParams;

fn close(a: &[f64], b: &[f64], tol: f64) {
    assert_eq!(a.len(), b.len(), "{a:?} vs {b:?}");
    for (x, y) in a.iter().zip(b) {
        assert!((x - y).abs() <= tol, "{a:?} vs {b:?}");
    }
}

#[test]
fn order_relation_correction_hand_cases() {
    // a negative value: clip to 0, then divide by 1.1
    let mut p = [-0.1, 0.6, 0.5];
    assert!(order_relation_correct(&mut p));
    close(&p, &[0.0, 6.0 / 11.0, 5.0 / 11.0], 1e-15);

    // a value above 1 and a negative one: [1, 0.2, 0] / 1.2
    let mut p = [1.3, 0.2, -0.4];
    assert!(order_relation_correct(&mut p));
    close(&p, &[5.0 / 6.0, 1.0 / 6.0, 0.0], 1e-15);

    // values in range but a sum of 0.9: renormalised
    let mut p = [0.2, 0.3, 0.4];
    assert!(order_relation_correct(&mut p));
    close(&p, &[2.0 / 9.0, 3.0 / 9.0, 4.0 / 9.0], 1e-15);

    // already a probability vector: left alone
    let mut p = [0.2, 0.3, 0.5];
    assert!(!order_relation_correct(&mut p));
    assert_eq!(p, [0.2, 0.3, 0.5]);

    // everything clipped to 0: uniform
    let mut p = [-0.2, -0.1, 0.0];
    assert!(order_relation_correct(&mut p));
    close(&p, &[1.0 / 3.0; 3], 1e-15);

    // a NaN counts as 0
    let mut p = [f64::NAN, 0.25, 0.25];
    assert!(order_relation_correct(&mut p));
    close(&p, &[0.0, 0.5, 0.5], 1e-15);

    let mut e: [f64; 0] = [];
    assert!(!order_relation_correct(&mut e));

    // the result always lies in [0, 1] and sums to 1
    for case in [[2.0, 3.0, -1.0, 0.5], [1e-20, -1e-20, 0.7, 0.2999]] {
        let mut p = case;
        order_relation_correct(&mut p);
        assert!(p.iter().all(|v| (0.0..=1.0).contains(v)));
        assert!((p.iter().sum::<f64>() - 1.0).abs() <= 1e-12);
    }
}

#[test]
fn blend_hand_cases() {
    let wells = [0.7, 0.2, 0.1];
    let vol = [0.1, 0.3, 0.6];
    // at a well (sigma^2 = 0): the wells
    close(
        &blend_with_volume(&wells, 0.0, &vol).unwrap(),
        &wells,
        1e-15,
    );
    // far away (sigma^2 = sill): the volume
    close(&blend_with_volume(&wells, 1.0, &vol).unwrap(), &vol, 1e-15);
    // ratio 0.25: lambda 0.75 -> 0.75 * wells + 0.25 * volume
    close(
        &blend_with_volume(&wells, 0.25, &vol).unwrap(),
        &[0.55, 0.225, 0.225],
        1e-15,
    );
    // OK variances above the sill clamp to the volume; negative rounding to the wells
    close(&blend_with_volume(&wells, 1.7, &vol).unwrap(), &vol, 1e-15);
    close(
        &blend_with_volume(&wells, -1e-14, &vol).unwrap(),
        &wells,
        1e-15,
    );
    assert!(blend_with_volume(&wells, 0.5, &vol[..2]).is_err());
    assert!(blend_with_volume(&wells, f64::NAN, &vol).is_err());
    assert!(blend_with_volume(&[f64::NAN, 0.5, 0.5], 0.5, &vol).is_err());
}

#[test]
fn most_likely_facies_hand_cases() {
    assert_eq!(most_likely_facies(&[0.2, 0.5, 0.3], &[1, 2, 3]), Some(2));
    // tie between codes 5 and 2: the smaller code, whatever the order
    assert_eq!(most_likely_facies(&[0.4, 0.2, 0.4], &[5, 1, 2]), Some(2));
    // a tie up to rounding counts as a tie
    let third = 1.0 / 3.0;
    let other = 1.0 - 2.0 * third;
    assert_ne!(third, other);
    assert_eq!(
        most_likely_facies(&[third, third, other], &[9, 4, 3]),
        Some(3)
    );
    assert_eq!(
        most_likely_facies(&[f64::NAN, 0.1, 0.05], &[1, 2, 3]),
        Some(2)
    );
    assert_eq!(most_likely_facies(&[f64::NAN; 2], &[1, 2]), None);
    assert_eq!(most_likely_facies(&[0.5, 0.5], &[1, 2, 3]), None);
}

#[test]
fn label_and_probability_volumes() {
    let codes = [1, 2, 3];
    close(
        &label_probabilities(2.0, &codes, 1.0).unwrap().unwrap(),
        &[0.0, 1.0, 0.0],
        0.0,
    );
    // float32 storage of a code
    close(
        &label_probabilities(f64::from(3.0f32) + 1e-6, &codes, 1.0)
            .unwrap()
            .unwrap(),
        &[0.0, 0.0, 1.0],
        0.0,
    );
    // confidence 0.8: the others share 0.2
    close(
        &label_probabilities(1.0, &codes, 0.8).unwrap().unwrap(),
        &[0.8, 0.1, 0.1],
        1e-15,
    );
    assert_eq!(label_probabilities(f64::NAN, &codes, 1.0).unwrap(), None);
    let e = label_probabilities(2.4, &codes, 1.0)
        .unwrap_err()
        .to_string();
    assert!(e.contains("2.4") && e.contains("1, 2, 3"), "{e}");
    let e = label_probabilities(7.0, &codes, 1.0)
        .unwrap_err()
        .to_string();
    assert!(e.contains('7') && e.contains("1, 2, 3"), "{e}");
    assert!(label_probabilities(1.0, &codes, 0.2).is_err());
    assert!(label_probabilities(1.0, &[1, 1], 1.0).is_err());

    close(
        &volume_probabilities(&[0.2, 0.3, 0.5]).unwrap().unwrap(),
        &[0.2, 0.3, 0.5],
        1e-15,
    );
    close(
        &volume_probabilities(&[0.2, 0.3, 0.4]).unwrap().unwrap(),
        &[2.0 / 9.0, 3.0 / 9.0, 4.0 / 9.0],
        1e-15,
    );
    close(
        &volume_probabilities(&[1.0005, -0.0005, 0.0])
            .unwrap()
            .unwrap(),
        &[1.0, 0.0, 0.0],
        0.0,
    );
    assert_eq!(volume_probabilities(&[0.5, f64::NAN, 0.5]).unwrap(), None);
    assert!(volume_probabilities(&[1.2, 0.0, 0.0]).is_err());
    assert!(volume_probabilities(&[0.0, 0.0, 0.0]).is_err());
    assert!(volume_probabilities(&[]).is_err());
}

fn sample(well: u32, layer: i32, f: [f64; 3]) -> FaciesSample {
    FaciesSample {
        well,
        layer,
        pos: [well as f64 * 100.0, 0.0, layer as f64],
        fractions: f.to_vec(),
    }
}

#[test]
fn weighted_proportions_hand_case() {
    let s = [
        sample(1, 0, [1.0, 0.0, 0.0]),
        sample(1, 1, [0.5, 0.5, 0.0]),
        sample(2, 0, [0.0, 0.0, 1.0]),
    ];
    // equal weights: ([1, 0, 0] + [0.5, 0.5, 0] + [0, 0, 1]) / 3
    close(
        &weighted_proportions(&s, None).unwrap(),
        &[0.5, 1.0 / 6.0, 1.0 / 3.0],
        1e-15,
    );
    // weights 1, 1, 2 (the lone sample of well 2 counts double): sum 4
    close(
        &weighted_proportions(&s, Some(&[1.0, 1.0, 2.0])).unwrap(),
        &[1.5 / 4.0, 0.5 / 4.0, 2.0 / 4.0],
        1e-15,
    );
    assert!(weighted_proportions(&s, Some(&[1.0, 1.0])).is_err());
    assert!(weighted_proportions(&s, Some(&[1.0, -1.0, 1.0])).is_err());
    assert!(weighted_proportions(&s, Some(&[0.0, 0.0, 0.0])).is_err());
    assert!(weighted_proportions(&[], None).is_err());
    let bad = [sample(1, 0, [0.6, 0.6, 0.0])];
    assert!(weighted_proportions(&bad, None).is_err());
}

fn blocked(counts: &[(i32, usize)], facies: Option<i32>) -> BlockedSample {
    BlockedSample {
        well: 4,
        zone: 1,
        layer: 7,
        x: 1000.0,
        y: 2000.0,
        z: 2100.0,
        s: 14.2,
        vp0: None,
        epsilon: None,
        delta: None,
        facies,
        count: counts.iter().map(|c| c.1).sum(),
        counts: [0; 3],
        facies_counts: counts.iter().copied().collect::<BTreeMap<_, _>>(),
    }
}

#[test]
fn facies_samples_from_blocked_cells() {
    let codes = [1, 2, 3];
    let b = blocked(&[(1, 3), (3, 1)], Some(1));
    let soft = FaciesSample::from_blocked(&b, 15.0, &codes, true, "W-4")
        .unwrap()
        .unwrap();
    assert_eq!(
        (soft.well, soft.layer, soft.pos),
        (4, 7, [1000.0, 2000.0, 15.0])
    );
    close(&soft.fractions, &[0.75, 0.0, 0.25], 0.0);
    let hard = FaciesSample::from_blocked(&b, 15.0, &codes, false, "W-4")
        .unwrap()
        .unwrap();
    close(&hard.fractions, &[1.0, 0.0, 0.0], 0.0);
    assert_eq!(
        FaciesSample::from_blocked(&blocked(&[], None), 15.0, &codes, true, "W-4").unwrap(),
        None
    );
    let e = FaciesSample::from_blocked(&blocked(&[(8, 2)], Some(8)), 15.0, &codes, true, "W-4")
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("W-4") && e.contains('8') && e.contains("layer 7"),
        "{e}"
    );
    assert!(FaciesSample::hard(1, 0, [0.0; 3], 4, &codes).is_err());
}

fn options(k: usize) -> IndicatorOptions {
    IndicatorOptions {
        method: IndicatorMethod::Simple,
        fit: IndicatorFitOptions::for_zone(1.0, 10.0, 1000.0, 25.0, None).unwrap(),
        overrides: vec![None; k],
        ratio_model: None,
    }
}

#[test]
fn prepare_refuses_bad_input() {
    let codes = [1, 2, 3];
    let s: Vec<FaciesSample> = (0..6)
        .map(|l| sample(1 + l as u32 % 2, l, [0.5, 0.5, 0.0]))
        .collect();
    let o = options(3);
    let err = |r: stratiprior::Result<IndicatorSetup>| r.err().unwrap().to_string();
    let e = err(IndicatorSetup::prepare(&s, &codes, &[0.5, 0.5, 0.5], &o));
    assert!(e.contains("sum to 1.5"), "{e}");
    let e = err(IndicatorSetup::prepare(&s, &codes, &[0.5, 0.5], &o));
    assert!(e.contains("2 proportions for 3"), "{e}");
    let e = err(IndicatorSetup::prepare(
        &s,
        &[1, 2, 1],
        &[0.5, 0.5, 0.0],
        &o,
    ));
    assert!(e.contains("twice"), "{e}");
    let e = err(IndicatorSetup::prepare(&[], &codes, &[0.5, 0.5, 0.0], &o));
    assert!(e.contains("no facies samples"), "{e}");
    let e = err(IndicatorSetup::prepare(
        &s,
        &codes,
        &[0.5, 0.5, 0.0],
        &options(2),
    ));
    assert!(e.contains("2 variogram overrides"), "{e}");
    let dup = vec![sample(1, 0, [1.0, 0.0, 0.0]), sample(1, 0, [0.0, 1.0, 0.0])];
    let e = err(IndicatorSetup::prepare(&dup, &codes, &[0.5, 0.5, 0.0], &o));
    assert!(e.contains("two samples in layer 0"), "{e}");
    let bad = vec![FaciesSample {
        fractions: vec![1.0, 0.0],
        ..sample(1, 0, [1.0, 0.0, 0.0])
    }];
    let e = err(IndicatorSetup::prepare(&bad, &codes, &[0.5, 0.5, 0.0], &o));
    assert!(e.contains("2 facies fractions for 3"), "{e}");
}

#[test]
fn constant_indicators_are_not_kriged() {
    // facies 3 never occurs, facies 1 and 2 alternate along two wells
    let codes = [1, 2, 3];
    let mut s = Vec::new();
    for w in 0..2u32 {
        for l in 0..30 {
            let f = if (l / 3 + w as i32) % 2 == 0 {
                [1.0, 0.0, 0.0]
            } else {
                [0.0, 1.0, 0.0]
            };
            s.push(FaciesSample {
                well: w,
                layer: l,
                pos: [w as f64 * 400.0, 0.0, l as f64 + 0.5],
                fractions: f.to_vec(),
            });
        }
    }
    let props = weighted_proportions(&s, None).unwrap();
    let setup = IndicatorSetup::prepare(&s, &codes, &props, &options(3)).unwrap();
    assert!(matches!(setup.records()[0].model, FaciesModel::Kriged(_)));
    assert!(matches!(setup.records()[2].model, FaciesModel::Constant(c) if c == 0.0));
    assert_eq!(setup.records()[2].source, "constant");
    let ik = setup
        .estimator(NeighbourhoodParams::per_well(8, 4, 16, 3.0))
        .unwrap();
    assert!(ik.kriger(2).is_none() && ik.kriger(1).is_some());
    let col: Vec<Target> = (0..30)
        .map(|l| Target::at([150.0, 40.0, l as f64 + 0.5]))
        .collect();
    let c = ik.estimate_column(&col).unwrap();
    for t in 0..c.len() {
        let p = c.target(t);
        assert_eq!(p[2], 0.0);
        assert!((p.iter().sum::<f64>() - 1.0).abs() <= 1e-12);
    }
    // a single facies everywhere: nothing kriged, the constant, ratio 1 without a ratio model
    let one: Vec<FaciesSample> = s
        .iter()
        .map(|x| FaciesSample {
            fractions: vec![0.0, 1.0, 0.0],
            ..x.clone()
        })
        .collect();
    let setup = IndicatorSetup::prepare(&one, &codes, &[0.0, 1.0, 0.0], &options(3)).unwrap();
    assert!(!setup.warnings().is_empty());
    let ik = setup
        .estimator(NeighbourhoodParams::per_well(8, 4, 16, 3.0))
        .unwrap();
    let (p, r) = ik.estimate(&Target::at([0.0, 0.0, 0.5])).unwrap();
    close(&p, &[0.0, 1.0, 0.0], 0.0);
    assert_eq!(r, 1.0);
}
