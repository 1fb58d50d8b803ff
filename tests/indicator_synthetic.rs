//! Indicator kriging on a synthetic three-facies zone: 12 vertical wells on a
//! regular 4 x 3 pattern, 40 layers of 2 m, facies from a thresholded smooth
//! field, fitted indicator variograms, a dense grid of targets.
//!
//! Checks:
//! * every target's probabilities lie in [0, 1] and sum to 1 (1e-12): the
//!   order-relation correction (Deutsch and Journel 1998, GSLIB 2nd ed., sec.
//!   V.1.6, from memory);
//! * simple indicator kriging with the global proportion as mean reproduces the
//!   proportions on average over the zone (within 0.02) for regularly spread
//!   wells: the SK estimate is `p + sum w_i (i_i - p)` and the residuals
//!   average out (Goovaerts 1997 sec. 7.3.1, from memory); proportions with
//!   equal weights (the wells are on a regular pattern, so declustering weights
//!   are equal);
//! * exactness at a data position (kriging is an exact interpolator: Goovaerts
//!   1997 sec. 5.2, Journel and Huijbregts 1978; zero nugget overrides, and the
//!   fitted models), for hard and soft (cell-fraction) indicators;
//! * the blend with a volume equals the volume beyond the range of every well
//!   (sigma^2 = sill) and the wells' indicators at a well (sigma^2 = 0);
//! * columns kriged with weight reuse equal independent single-target estimates.

#![allow(clippy::needless_range_loop)] // index loops over facies read best here

use stratiprior::geostat::indicator::{
    blend_with_volume, label_probabilities, most_likely_facies, weighted_proportions, FaciesModel,
    FaciesSample, IndicatorFitOptions, IndicatorMethod, IndicatorOptions, IndicatorSetup,
    IndicatorVariogram,
};
use stratiprior::geostat::kriging::Target;
use stratiprior::geostat::neighbourhood::NeighbourhoodParams;
use stratiprior::geostat::variogram::{Structure, StructureKind, VariogramModel};

const CODES: [i32; 3] = [1, 2, 3];
const LAYERS: i32 = 40;
const DS: f64 = 2.0;
const EXTENT: [f64; 2] = [2800.0, 2100.0];

/// The smooth "geology" whose thresholds give the facies.
fn field(x: f64, y: f64, s: f64) -> f64 {
    (x / 1100.0 + 0.3).sin() + 0.8 * (y / 900.0 - 1.1).cos() + 0.7 * (s / 6.0 + x / 1500.0).sin()
}

/// Thresholds of the field: its 35 % and 70 % quantiles over a dense sampling
/// of the zone, so that the facies cover about 35, 35 and 30 % of it.
fn thresholds() -> (f64, f64) {
    static T: std::sync::OnceLock<(f64, f64)> = std::sync::OnceLock::new();
    *T.get_or_init(|| {
        let mut v = Vec::new();
        for i in 0..=56 {
            for j in 0..=42 {
                for l in 0..LAYERS {
                    v.push(field(i as f64 * 50.0, j as f64 * 50.0, s_of(l)));
                }
            }
        }
        v.sort_by(f64::total_cmp);
        (v[v.len() * 35 / 100], v[v.len() * 70 / 100])
    })
}

fn facies_at(x: f64, y: f64, s: f64) -> i32 {
    let f = field(x, y, s);
    let (t1, t2) = thresholds();
    if f < t1 {
        1
    } else if f < t2 {
        2
    } else {
        3
    }
}

fn s_of(layer: i32) -> f64 {
    (layer as f64 + 0.5) * DS
}

/// 12 wells at the centres of a 4 x 3 partition of the area.
fn wells() -> Vec<FaciesSample> {
    let mut out = Vec::new();
    for i in 0..4 {
        for j in 0..3 {
            let (x, y) = (350.0 + 700.0 * i as f64, 350.0 + 700.0 * j as f64);
            let w = (i * 3 + j) as u32;
            for l in 0..LAYERS {
                let s = s_of(l);
                out.push(FaciesSample::hard(w, l, [x, y, s], facies_at(x, y, s), &CODES).unwrap());
            }
        }
    }
    out
}

fn options(overrides: Vec<Option<IndicatorVariogram>>) -> IndicatorOptions {
    let diag = EXTENT[0].hypot(EXTENT[1]);
    IndicatorOptions {
        method: IndicatorMethod::Simple,
        fit: IndicatorFitOptions::for_zone(DS, LAYERS as f64 * DS, diag, 50.0, None).unwrap(),
        overrides,
        ratio_model: None,
    }
}

fn params() -> NeighbourhoodParams {
    NeighbourhoodParams::per_well(8, 8, 32, 3.0)
}

/// Dense grid: 29 x 22 columns at 100 m, every layer centre.
fn dense_columns() -> Vec<Vec<Target>> {
    let mut cols = Vec::new();
    for i in 0..29 {
        for j in 0..22 {
            let (x, y) = (i as f64 * 100.0, j as f64 * 100.0);
            cols.push((0..LAYERS).map(|l| Target::at([x, y, s_of(l)])).collect());
        }
    }
    cols
}

fn spherical(nugget: f64, sill: f64, range: f64, vertical: f64) -> VariogramModel {
    VariogramModel {
        nugget,
        structures: vec![Structure::horizontally_isotropic(
            StructureKind::Spherical,
            sill,
            range,
            vertical,
        )],
    }
}

#[test]
fn probabilities_are_valid_and_reproduce_the_proportions() {
    let samples = wells();
    let props = weighted_proportions(&samples, None).unwrap();
    // every facies is present in reasonable amounts
    assert!(props.iter().all(|&p| p > 0.15), "{props:?}");
    let setup = IndicatorSetup::prepare(&samples, &CODES, &props, &options(vec![])).unwrap();
    assert_eq!((setup.sample_count(), setup.well_count()), (480, 12));
    for r in setup.records() {
        assert!(r.source.starts_with("fitted"), "{}", r.source);
        let FaciesModel::Kriged(m) = &r.model else {
            panic!("facies {} not kriged", r.facies)
        };
        // the indicator variance p (1 - p) bounds the sill of a hard indicator
        // (Goovaerts 1997 sec. 7.1, from memory); the fit gets near it
        let pq = r.proportion * (1.0 - r.proportion);
        println!(
            "facies {}: proportion {:.4}, p(1-p) {:.4}, model {}",
            r.facies,
            r.proportion,
            pq,
            m.to_toml_inline().replace('\n', " ")
        );
        assert!(m.total_sill() > 0.3 * pq && m.total_sill() < 2.0 * pq);
    }
    let ik = setup.estimator(params()).unwrap();
    let cols = dense_columns();
    let grid = ik.estimate_columns(&cols).unwrap();
    let mut mean = [0.0; 3];
    let mut n = 0usize;
    let mut worst_sum = 0.0f64;
    for c in &grid.columns {
        assert_eq!(c.len(), LAYERS as usize);
        for t in 0..c.len() {
            let p = c.target(t);
            assert!(p.iter().all(|v| (0.0..=1.0).contains(v)), "{p:?}");
            let sum: f64 = p.iter().sum();
            worst_sum = worst_sum.max((sum - 1.0).abs());
            assert!((sum - 1.0).abs() <= 1e-12, "sum {sum}");
            let r = c.variance_ratio[t];
            assert!((0.0..=1.0).contains(&r));
            assert!(most_likely_facies(p, &CODES).is_some());
            for k in 0..3 {
                mean[k] += p[k];
            }
            n += 1;
        }
    }
    assert_eq!(n, 29 * 22 * LAYERS as usize);
    assert_eq!(grid.stats.targets, n as u64);
    for k in 0..3 {
        mean[k] /= n as f64;
        println!(
            "facies {}: mean probability {:.4} vs proportion {:.4} (difference {:+.4})",
            CODES[k],
            mean[k],
            props[k],
            mean[k] - props[k]
        );
        assert!((mean[k] - props[k]).abs() <= 0.02);
    }
    println!(
        "{n} targets, {} solves, {} reuses, {} clipped, {} renormalised, {} without neighbours, \
         largest |sum - 1| {worst_sum:.1e}",
        grid.stats.solves,
        grid.stats.reuses,
        grid.stats.clipped,
        grid.stats.corrected,
        grid.stats.no_neighbours
    );
    // the three indicators have their own variograms: corrections do happen
    assert!(grid.stats.corrected > 0 && grid.stats.clipped > 0);
    assert!(grid.stats.reuses > 0);
}

#[test]
fn exact_at_the_wells() {
    let samples = wells();
    let props = weighted_proportions(&samples, None).unwrap();
    let zero_nugget = vec![
        Some(IndicatorVariogram::Model(spherical(0.0, 0.2, 1200.0, 8.0))),
        Some(IndicatorVariogram::Model(spherical(0.0, 0.25, 900.0, 6.0))),
        Some(IndicatorVariogram::Model(spherical(0.0, 0.2, 1500.0, 10.0))),
    ];
    for (label, overrides) in [("zero nugget", zero_nugget), ("fitted", vec![])] {
        let setup = IndicatorSetup::prepare(&samples, &CODES, &props, &options(overrides)).unwrap();
        let ik = setup.estimator(params()).unwrap();
        // every sample of three wells, as columns
        let cols: Vec<Vec<Target>> = [0u32, 5, 11]
            .iter()
            .map(|&w| {
                samples
                    .iter()
                    .filter(|s| s.well == w)
                    .map(|s| Target::at(s.pos))
                    .collect()
            })
            .collect();
        let grid = ik.estimate_columns(&cols).unwrap();
        for (c, &w) in grid.columns.iter().zip(&[0u32, 5, 11]) {
            let data: Vec<&FaciesSample> = samples.iter().filter(|s| s.well == w).collect();
            for (t, s) in data.iter().enumerate() {
                let p = c.target(t);
                for k in 0..3 {
                    assert!(
                        (p[k] - s.fractions[k]).abs() <= 1e-9,
                        "{label}: well {w} layer {}: {p:?} vs {:?}",
                        s.layer,
                        s.fractions
                    );
                }
                assert!(
                    c.variance_ratio[t] <= 1e-9,
                    "{label}: ratio {}",
                    c.variance_ratio[t]
                );
            }
        }
    }
}

#[test]
fn soft_indicators_are_honoured() {
    // cells holding two facies: the fractions are the data, and kriging returns them
    let mut samples = wells();
    for s in samples.iter_mut().filter(|s| s.layer % 5 == 2) {
        let k = s.fractions.iter().position(|&f| f == 1.0).unwrap();
        s.fractions = vec![0.0; 3];
        s.fractions[k] = 0.6;
        s.fractions[(k + 1) % 3] = 0.4;
    }
    let props = weighted_proportions(&samples, None).unwrap();
    let setup = IndicatorSetup::prepare(&samples, &CODES, &props, &options(vec![])).unwrap();
    let ik = setup.estimator(params()).unwrap();
    let targets: Vec<Target> = samples
        .iter()
        .filter(|s| s.well == 7)
        .map(|s| Target::at(s.pos))
        .collect();
    let c = ik.estimate_column(&targets).unwrap();
    for (t, s) in samples.iter().filter(|s| s.well == 7).enumerate() {
        for k in 0..3 {
            assert!((c.target(t)[k] - s.fractions[k]).abs() <= 1e-9);
        }
    }
}

#[test]
fn blending_with_a_volume() {
    let samples = wells();
    let props = weighted_proportions(&samples, None).unwrap();
    let range = 600.0;
    let overrides = (0..3)
        .map(|k| {
            Some(IndicatorVariogram::Model(spherical(
                0.01 * k as f64,
                0.2,
                range,
                8.0,
            )))
        })
        .collect();
    let setup = IndicatorSetup::prepare(&samples, &CODES, &props, &options(overrides)).unwrap();
    // an unlimited search, so that targets far from the wells still have neighbours
    let ik = setup
        .estimator(NeighbourhoodParams::per_well(8, 8, 32, f64::INFINITY))
        .unwrap();
    // the "volume": labels from a shifted field (differs from the wells), confidence 0.9
    let vol = |p: [f64; 3]| {
        let code = facies_at(p[0] + 250.0, p[1] - 120.0, p[2]);
        label_probabilities(code as f64, &CODES, 0.9)
            .unwrap()
            .unwrap()
    };
    // beyond the range of every well: sigma^2 = sill, the blend is the volume
    let far: Vec<Target> = (0..LAYERS)
        .map(|l| Target::at([EXTENT[0] + 1.5 * range, -1.2 * range, s_of(l)]))
        .collect();
    let c = ik.estimate_column(&far).unwrap();
    assert_eq!(c.stats.no_neighbours, 0);
    for (t, tg) in far.iter().enumerate() {
        assert!(
            (c.variance_ratio[t] - 1.0).abs() <= 1e-12,
            "{}",
            c.variance_ratio[t]
        );
        // no well information: the proportions
        for k in 0..3 {
            assert!((c.target(t)[k] - props[k]).abs() <= 1e-12);
        }
        let b = blend_with_volume(c.target(t), c.variance_ratio[t], &vol(tg.pos)).unwrap();
        let v = vol(tg.pos);
        for k in 0..3 {
            assert!((b[k] - v[k]).abs() <= 1e-12, "{b:?} vs {v:?}");
        }
    }
    // at a well: the well's indicators
    let at: Vec<&FaciesSample> = samples.iter().filter(|s| s.well == 4).collect();
    let targets: Vec<Target> = at.iter().map(|s| Target::at(s.pos)).collect();
    let c = ik.estimate_column(&targets).unwrap();
    for (t, s) in at.iter().enumerate() {
        let b = blend_with_volume(c.target(t), c.variance_ratio[t], &vol(s.pos)).unwrap();
        for k in 0..3 {
            assert!(
                (b[k] - s.fractions[k]).abs() <= 1e-9,
                "{b:?} vs {:?}",
                s.fractions
            );
        }
    }
    // in between: strictly between the two, and a probability vector
    let mid = Target::at([700.0, 700.0, s_of(10)]);
    let (p, r) = ik.estimate(&mid).unwrap();
    assert!(r > 0.0 && r < 1.0, "{r}");
    let b = blend_with_volume(&p, r, &vol(mid.pos)).unwrap();
    assert!((b.iter().sum::<f64>() - 1.0).abs() <= 1e-12);
}

#[test]
fn columns_equal_single_targets_and_ordinary_runs() {
    let samples = wells();
    let props = weighted_proportions(&samples, None).unwrap();
    for method in [IndicatorMethod::Simple, IndicatorMethod::Ordinary] {
        let mut o = options(vec![]);
        o.method = method;
        let setup = IndicatorSetup::prepare(&samples, &CODES, &props, &o).unwrap();
        assert_eq!(setup.method(), method);
        let ik = setup.estimator(params()).unwrap();
        let cols: Vec<Vec<Target>> = dense_columns().into_iter().step_by(37).collect();
        let grid = ik.estimate_columns(&cols).unwrap();
        for (c, col) in grid.columns.iter().zip(&cols) {
            for (t, tg) in col.iter().enumerate() {
                let (p, r) = ik.estimate(tg).unwrap();
                for k in 0..3 {
                    assert!((p[k] - c.target(t)[k]).abs() <= 1e-9);
                }
                assert!((r - c.variance_ratio[t]).abs() <= 1e-9);
                assert!((p.iter().sum::<f64>() - 1.0).abs() <= 1e-12);
            }
        }
    }
}
