//! Neighbourhood search: per-well limits, multi-well coverage, many samples
//! sharing x and y. References: brute-force searches written here (common
//! practice: an exhaustive search is the definition the fast search must meet).

mod kriging_support;

use kriging_support::{vertical_wells, AnisoExp, IsoExp};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use std::collections::{BTreeMap, BTreeSet};
use stratiprior::geostat::kriging::{Sample, SampleSet};
use stratiprior::geostat::neighbourhood::{NearestIndex, NeighbourhoodParams, WellIndex};
use stratiprior::geostat::CovarianceModel;

fn d2(a: [f64; 3], b: [f64; 3]) -> f64 {
    (0..3).map(|k| (a[k] - b[k]).powi(2)).sum()
}

/// The per-well rule by exhaustive search: rank wells by their nearest sample
/// within the radius, keep `max_wells`, take `max_per_well` nearest samples of
/// each, keep the `max_total` nearest of those.
fn brute_force(
    data: &SampleSet,
    scaled: &[[f64; 3]],
    q: [f64; 3],
    p: &NeighbourhoodParams,
) -> Vec<u32> {
    let r2 = p.radius * p.radius;
    let mut per_well: Vec<(f64, Vec<(f64, u32)>)> = Vec::new();
    for (_, range) in data.wells() {
        let mut c: Vec<(f64, u32)> = range
            .clone()
            .map(|i| (d2(scaled[i], q), i as u32))
            .filter(|c| c.0 <= r2)
            .collect();
        c.sort_by(|a, b| a.0.total_cmp(&b.0));
        c.truncate(p.max_per_well);
        if let Some(first) = c.first() {
            per_well.push((first.0, c));
        }
    }
    per_well.sort_by(|a, b| a.0.total_cmp(&b.0));
    per_well.truncate(p.max_wells);
    let mut all: Vec<(f64, u32)> = per_well.into_iter().flat_map(|w| w.1).collect();
    all.sort_by(|a, b| a.0.total_cmp(&b.0));
    all.truncate(p.max_total);
    let mut v: Vec<u32> = all.into_iter().map(|c| c.1).collect();
    v.sort_unstable();
    v
}

fn wells_of(data: &SampleSet, nb: &[u32]) -> BTreeMap<u32, usize> {
    let mut m = BTreeMap::new();
    for &i in nb {
        *m.entry(data.samples()[i as usize].well).or_insert(0) += 1;
    }
    m
}

/// A 20-well case: wells 5 km apart at most, 200 samples each 1 m apart; the
/// model's ranges are 1000 m laterally and 20 m vertically (rotated 30 deg).
fn twenty_wells() -> (SampleSet, AnisoExp) {
    let (_, samples) = vertical_wells(7, 20, 200, 5000.0, 1.0);
    let model = AnisoExp {
        c: 1.0,
        lengths: [1000.0, 600.0, 20.0],
        azimuth_deg: 30.0,
    };
    (SampleSet::new(samples).unwrap(), model)
}

fn random_targets(seed: u64, n: usize) -> Vec<[f64; 3]> {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    (0..n)
        .map(|_| {
            [
                rng.gen_range(0.0..5000.0),
                rng.gen_range(0.0..5000.0),
                rng.gen_range(0.0..200.0),
            ]
        })
        .collect()
}

#[test]
fn per_well_limits_hold_and_match_exhaustive_search() {
    let (data, model) = twenty_wells();
    for p in [
        NeighbourhoodParams::per_well(4, 8, 32, 4.0),
        NeighbourhoodParams::per_well(6, 5, 24, 2.5),
        NeighbourhoodParams::per_well(16, 20, 32, f64::INFINITY),
    ] {
        let index = WellIndex::new(&data, &model, p).unwrap();
        assert_eq!(
            index.line_well_count(),
            20,
            "vertical wells are searched in 1-D"
        );
        let scaled = index.scaled_positions().to_vec();
        let mut nonempty = 0;
        for t in random_targets(11, 400) {
            let q = model.to_isotropic(t);
            let nb = index.neighbours(&model, t);
            let per = wells_of(&data, &nb);
            assert!(per.values().all(|&c| c <= p.max_per_well));
            assert!(per.len() <= p.max_wells);
            assert!(nb.len() <= p.max_total);
            assert!(nb
                .iter()
                .all(|&i| d2(scaled[i as usize], q) <= p.radius * p.radius));
            assert_eq!(
                nb,
                brute_force(&data, &scaled, q, &p),
                "target {t:?} params {p:?}"
            );
            nonempty += usize::from(!nb.is_empty());
        }
        assert!(
            nonempty > 300,
            "the radius leaves most targets with neighbours"
        );
    }
}

/// The point of the per-well limit: neighbourhoods that span several wells.
/// The fractions are printed (`cargo test -- --nocapture`).
#[test]
fn per_well_neighbourhood_spans_more_wells_than_nearest_32() {
    let (data, model) = twenty_wells();
    let nearest = NearestIndex::new(&data, &model).unwrap();
    let plain = WellIndex::new(
        &data,
        &model,
        NeighbourhoodParams::nearest(32, f64::INFINITY),
    )
    .unwrap();
    let per = WellIndex::new(
        &data,
        &model,
        NeighbourhoodParams::per_well(4, 8, 32, f64::INFINITY),
    )
    .unwrap();
    let targets = random_targets(5, 2000);
    let (mut plain3, mut per3) = (0usize, 0usize);
    for &t in &targets {
        let q = model.to_isotropic(t);
        let mut a = nearest.nearest(q, 32, f64::INFINITY);
        a.sort_unstable();
        // Two independent implementations of the plain search agree.
        assert_eq!(a, plain.neighbours(&model, t));
        plain3 += usize::from(wells_of(&data, &a).len() >= 3);
        let b = per.neighbours(&model, t);
        assert_eq!(b.len(), 32);
        per3 += usize::from(wells_of(&data, &b).len() >= 3);
    }
    let fp = plain3 as f64 / targets.len() as f64;
    let fw = per3 as f64 / targets.len() as f64;
    println!("targets whose neighbourhood spans >= 3 wells: nearest-32 {fp:.3}, per-well (4/well, 8 wells, 32) {fw:.3}");
    assert!(fw == 1.0, "per-well: {fw}");
    assert!(fp < 0.5, "nearest-32: {fp}");
}

/// Vertical wells put many samples on one (x, y): every one of them must be
/// found (kiddo's mutable tree loses points when more than its bucket size
/// share a coordinate; the immutable tree and the 1-D well search must not).
#[test]
fn many_samples_sharing_x_and_y_are_all_found() {
    let model = IsoExp { c: 1.0, a: 0.01 };
    let mut samples = Vec::new();
    for l in 0..500 {
        samples.push(Sample::new(1, l, [100.0, 200.0, l as f64 * 0.5], 0.0));
        samples.push(Sample::new(2, l, [130.0, 200.0, l as f64 * 0.5], 0.0));
    }
    let data = SampleSet::new(samples).unwrap();
    let nearest = NearestIndex::new(&data, &model).unwrap();
    let scaled = nearest.scaled_positions().to_vec();
    for t in [
        [100.0, 200.0, 100.0],
        [115.0, 200.0, 0.0],
        [0.0, 0.0, 300.0],
    ] {
        let q = model.to_isotropic(t);
        for r in [0.5, 1.0, 3.0, 10.0] {
            let want: Vec<u32> = (0..data.len() as u32)
                .filter(|&i| d2(scaled[i as usize], q) <= r * r)
                .collect();
            assert_eq!(nearest.within(q, r), want, "within {r} of {t:?}");
        }
        for n in [1, 31, 33, 100, 700] {
            let mut all: Vec<(f64, u32)> = (0..data.len() as u32)
                .map(|i| (d2(scaled[i as usize], q), i))
                .collect();
            all.sort_by(|a, b| a.0.total_cmp(&b.0));
            let kth = all[n - 1].0;
            let got = nearest.nearest(q, n, f64::INFINITY);
            assert_eq!(got.len(), n);
            // Exact up to ties at the n-th distance.
            assert!(got
                .iter()
                .all(|&i| d2(scaled[i as usize], q) <= kth + 1e-12));
        }
        let per = WellIndex::new(
            &data,
            &model,
            NeighbourhoodParams::per_well(500, 2, 1000, f64::INFINITY),
        )
        .unwrap();
        assert_eq!(per.neighbours(&model, t).len(), 1000);
    }
}

/// Curved (deviated) wells are searched with a kd-tree per well; straight
/// deviated wells in 1-D. Both must meet the exhaustive search.
#[test]
fn deviated_wells_match_exhaustive_search() {
    let model = AnisoExp {
        c: 1.0,
        lengths: [800.0, 500.0, 15.0],
        azimuth_deg: 70.0,
    };
    let mut rng = ChaCha8Rng::seed_from_u64(3);
    let mut samples = Vec::new();
    for w in 0..12u32 {
        let (x0, y0) = (rng.gen_range(0.0..3000.0), rng.gen_range(0.0..3000.0));
        let curved = w % 2 == 0;
        for l in 0..150 {
            let s = l as f64;
            let (x, y) = if curved {
                (x0 + 0.02 * s * s, y0 + 3.0 * s)
            } else {
                (x0 + 2.0 * s, y0 - 1.0 * s)
            };
            samples.push(Sample::new(w, l, [x, y, s], 0.0));
        }
    }
    let data = SampleSet::new(samples).unwrap();
    let p = NeighbourhoodParams::per_well(5, 6, 24, 3.0);
    let index = WellIndex::new(&data, &model, p).unwrap();
    assert_eq!(index.line_well_count(), 6);
    let scaled = index.scaled_positions().to_vec();
    let mut wells_seen = BTreeSet::new();
    let mut rng = ChaCha8Rng::seed_from_u64(4);
    for _ in 0..300 {
        let t = [
            rng.gen_range(0.0..3500.0),
            rng.gen_range(0.0..3500.0),
            rng.gen_range(0.0..150.0),
        ];
        let q = model.to_isotropic(t);
        let nb = index.neighbours(&model, t);
        assert_eq!(nb, brute_force(&data, &scaled, q, &p));
        wells_seen.extend(wells_of(&data, &nb).into_keys());
    }
    assert_eq!(wells_seen.len(), 12);
}

#[test]
fn bad_limits_are_refused() {
    let (data, model) = twenty_wells();
    for p in [
        NeighbourhoodParams::per_well(0, 8, 32, 1.0),
        NeighbourhoodParams::per_well(4, 8, 32, 0.0),
        NeighbourhoodParams::per_well(4, 8, 32, f64::NAN),
    ] {
        let e = WellIndex::new(&data, &model, p).unwrap_err().to_string();
        assert!(e.contains("kriging neighbourhood"), "{e}");
    }
}
