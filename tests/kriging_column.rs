//! Column kriging with reuse of the weights along a column ("factor once and
//! reuse"), against independent solves of every target, and determinism of the
//! parallel driver. References: the engine's own independent solves (checked
//! against published examples and PyKrige/GSTools in the other kriging tests)
//! and, for when reuse is allowed, a direct check of the configuration written
//! here (kriging weights depend only on the relative geometry: common practice,
//! e.g. Chiles and Delfiner 2012 sec. 3.3, kriging equations in displacements).

mod kriging_support;

use kriging_support::{drift_at, trend_at, vertical_wells, AnisoExp};
use stratiprior::geostat::kriging::{krige_column, Kriger, KrigingKind, Sample, SampleSet, Target};
use stratiprior::geostat::neighbourhood::NeighbourhoodParams;

const KINDS: [KrigingKind; 4] = [
    KrigingKind::SimpleMean(0.3),
    KrigingKind::SimpleTrend,
    KrigingKind::Ordinary,
    KrigingKind::ExternalDrift,
];

fn model() -> AnisoExp {
    AnisoExp {
        c: 1.3,
        lengths: [900.0, 600.0, 8.0],
        azimuth_deg: 40.0,
    }
}

fn params() -> NeighbourhoodParams {
    NeighbourhoodParams::per_well(4, 4, 16, f64::INFINITY)
}

/// Targets of one grid column at the layer centres `s[l]`.
fn column(x: f64, y: f64, s: &[f64]) -> Vec<Target> {
    s.iter()
        .map(|&s| {
            let pos = [x, y, s];
            Target {
                pos,
                drift: Some(drift_at(pos)),
                trend: Some(trend_at(pos)),
            }
        })
        .collect()
}

/// For each target after the first: is its neighbourhood the previous one
/// shifted by the same number of layers in every well, with the same relative
/// displacements (1e-9 m)? Written independently of the engine's test.
fn shifted_configuration(
    data: &SampleSet,
    kr: &Kriger<'_, AnisoExp>,
    targets: &[Target],
) -> Vec<bool> {
    let m = model();
    let smp = data.samples();
    let nbs: Vec<Vec<u32>> = targets
        .iter()
        .map(|t| kr.index().neighbours(&m, t.pos))
        .collect();
    let mut out = vec![false];
    for k in 1..targets.len() {
        let (a, b) = (&nbs[k - 1], &nbs[k]);
        let ok = !a.is_empty() && a.len() == b.len() && {
            let delta = smp[b[0] as usize].layer - smp[a[0] as usize].layer;
            a.iter().zip(b).all(|(&i, &j)| {
                let (si, sj) = (&smp[i as usize], &smp[j as usize]);
                let same_rel = (0..3).all(|c| {
                    ((sj.pos[c] - targets[k].pos[c]) - (si.pos[c] - targets[k - 1].pos[c])).abs()
                        <= 1e-9
                });
                si.well == sj.well && sj.layer - si.layer == delta && same_rel
            })
        };
        out.push(ok);
    }
    out
}

fn check_column(data: &SampleSet, targets: &[Target], kind: KrigingKind) -> (u64, u64) {
    let m = model();
    let kr = Kriger::new(data, &m, params(), kind).unwrap();
    let reuse = kr.krige_column(targets).unwrap();
    let fresh = kr.krige_column_independent(targets).unwrap();
    assert_eq!(fresh.stats.reuses, 0);
    assert_eq!(fresh.stats.solves, targets.len() as u64);
    for (k, (a, b)) in reuse.estimates.iter().zip(&fresh.estimates).enumerate() {
        assert!(
            (a.value - b.value).abs() <= 1e-10,
            "{kind:?} target {k}: {} vs {}",
            a.value,
            b.value
        );
        assert!(
            (a.variance - b.variance).abs() <= 1e-10,
            "{kind:?} target {k} variance"
        );
        assert_eq!(a.neighbours, b.neighbours);
        // The estimate on its own is the same as well.
        let e = kr.estimate(&targets[k]).unwrap();
        assert!((e.value - a.value).abs() <= 1e-10);
    }
    let expected = shifted_configuration(data, &kr, targets);
    let reused: Vec<bool> = reuse.estimates.iter().map(|e| e.reused).collect();
    assert_eq!(
        reused, expected,
        "{kind:?}: reuse exactly where the configuration repeats"
    );
    assert_eq!(
        reuse.stats.solves + reuse.stats.reuses,
        targets.len() as u64
    );
    (reuse.stats.solves, reuse.stats.reuses)
}

fn layers(n: usize, ds: f64) -> Vec<f64> {
    (0..n).map(|l| (l as f64 + 0.5) * ds).collect()
}

#[test]
fn reuse_on_vertical_blocked_wells_equals_independent_solves() {
    let (_, samples) = vertical_wells(21, 6, 60, 2000.0, 1.0);
    let data = SampleSet::new(samples).unwrap();
    let s = layers(60, 1.0);
    for kind in KINDS {
        let mut total = (0, 0);
        for (x, y) in [(1000.0, 1000.0), (150.0, 1800.0), (1700.0, 300.0)] {
            let (solves, reuses) = check_column(&data, &column(x, y, &s), kind);
            total = (total.0 + solves, total.1 + reuses);
        }
        println!("{kind:?}: solves {} reuses {}", total.0, total.1);
        // Away from the zone top and base every neighbourhood is a shift of the previous.
        assert!(
            total.1 as f64 >= 0.8 * (3 * 60) as f64,
            "{kind:?}: {total:?}"
        );
    }
    // The free function gives the same.
    let m = model();
    let t = column(1000.0, 1000.0, &s);
    let a = krige_column(&t, &data, &m, params(), KrigingKind::Ordinary).unwrap();
    let b = Kriger::new(&data, &m, params(), KrigingKind::Ordinary)
        .unwrap()
        .krige_column(&t)
        .unwrap();
    assert_eq!(a, b);
}

/// A log gap (missing layers in one well) breaks the shift: the targets whose
/// neighbourhood straddles the gap are solved afresh.
#[test]
fn no_reuse_across_a_log_gap() {
    let (heads, samples) = vertical_wells(21, 6, 60, 2000.0, 1.0);
    let s = layers(60, 1.0);
    // The well nearest to the column loses layers 28..=31.
    let col = (1000.0, 1000.0);
    let near = (0..heads.len())
        .min_by(|&a, &b| {
            let da = (heads[a][0] - col.0).hypot(heads[a][1] - col.1);
            let db = (heads[b][0] - col.0).hypot(heads[b][1] - col.1);
            da.total_cmp(&db)
        })
        .unwrap() as u32;
    let full = SampleSet::new(samples.clone()).unwrap();
    let gap: Vec<Sample> = samples
        .into_iter()
        .filter(|sm| !(sm.well == 100 + near && (28..=31).contains(&sm.layer)))
        .collect();
    let gap = SampleSet::new(gap).unwrap();
    let t = column(col.0, col.1, &s);
    for kind in KINDS {
        let (s_full, r_full) = check_column(&full, &t, kind);
        let (s_gap, r_gap) = check_column(&gap, &t, kind);
        assert!(
            s_gap > s_full && r_gap < r_full,
            "{kind:?}: {s_full}/{r_full} vs {s_gap}/{r_gap}"
        );
        assert!(r_gap > 0);
    }
    // The targets around the gap are fresh solves.
    let m = model();
    let kr = Kriger::new(&gap, &m, params(), KrigingKind::Ordinary).unwrap();
    let out = kr.krige_column(&t).unwrap();
    for k in 28..=32 {
        assert!(
            !out.estimates[k].reused,
            "layer {k} next to the gap was reused"
        );
    }
}

/// Varying layer thickness (same layer shift, different displacements) and a
/// slanted well (displacements change with depth) must not be reused.
#[test]
fn no_reuse_when_displacements_change() {
    let (heads, samples) = vertical_wells(33, 5, 50, 1500.0, 1.0);
    // Irregular layering: s of layer l is a cumulative sum of varying thicknesses.
    let mut s_of = vec![0.0; 51];
    for l in 0..50 {
        s_of[l + 1] = s_of[l] + 1.0 + 0.3 * ((l * 7 % 5) as f64);
    }
    let centre = |l: i32| 0.5 * (s_of[l as usize] + s_of[l as usize + 1]);
    let irregular: Vec<Sample> = samples
        .iter()
        .map(|sm| {
            let mut sm = *sm;
            sm.pos[2] = centre(sm.layer);
            sm
        })
        .collect();
    let data = SampleSet::new(irregular).unwrap();
    let s: Vec<f64> = (0..50).map(centre).collect();
    let t = column(700.0, 800.0, &s);
    for kind in KINDS {
        let (_, reuses) = check_column(&data, &t, kind);
        assert!(reuses < 15, "{kind:?}: {reuses}");
    }
    // One slanted well among vertical ones (x moves 2 m per layer).
    let slanted: Vec<Sample> = samples
        .iter()
        .map(|sm| {
            let mut sm = *sm;
            if sm.well == 100 {
                sm.pos[0] += 2.0 * sm.layer as f64;
            }
            sm
        })
        .collect();
    let data = SampleSet::new(slanted).unwrap();
    let t = column(heads[0][0] + 40.0, heads[0][1], &layers(50, 1.0));
    for kind in KINDS {
        let (_, reuses) = check_column(&data, &t, kind);
        assert!(reuses < 50, "{kind:?}");
    }
}

/// Bit-identical results with 1 and 2 threads, and equal to column-by-column
/// sequential kriging.
#[test]
fn parallel_results_do_not_depend_on_thread_count() {
    let (_, samples) = vertical_wells(8, 10, 40, 2000.0, 1.0);
    let data = SampleSet::new(samples).unwrap();
    let s = layers(40, 1.0);
    let cols: Vec<Vec<Target>> = (0..64)
        .map(|c| column(31.0 * (c % 8) as f64 * 8.0, 29.0 * (c / 8) as f64 * 8.0, &s))
        .collect();
    let m = model();
    for kind in KINDS {
        let kr = Kriger::new(&data, &m, params(), kind).unwrap();
        let run = |threads: usize| {
            rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .unwrap()
                .install(|| kr.krige_columns(&cols).unwrap())
        };
        let (a, b) = (run(1), run(2));
        assert_eq!(a.stats, b.stats);
        assert!(a.stats.reuses > 0);
        let bits = |g: &stratiprior::geostat::kriging::GridEstimates| -> Vec<(u64, u64)> {
            g.columns
                .iter()
                .flatten()
                .map(|e| (e.value.to_bits(), e.variance.to_bits()))
                .collect()
        };
        assert_eq!(bits(&a), bits(&b), "{kind:?}");
        for (c, col) in cols.iter().enumerate() {
            assert_eq!(kr.krige_column(col).unwrap().estimates, a.columns[c]);
        }
        let ind = kr.krige_columns_independent(&cols).unwrap();
        for (x, y) in ind.columns.iter().flatten().zip(a.columns.iter().flatten()) {
            assert!((x.value - y.value).abs() <= 1e-10 && (x.variance - y.variance).abs() <= 1e-10);
        }
    }
}

/// A target without the drift or trend its kind needs is a clear error.
#[test]
fn missing_target_drift_or_trend_is_an_error() {
    let (_, samples) = vertical_wells(8, 3, 10, 500.0, 1.0);
    let data = SampleSet::new(samples).unwrap();
    let m = model();
    let kr = Kriger::new(&data, &m, params(), KrigingKind::ExternalDrift).unwrap();
    let e = kr
        .krige_column(&[Target::at([1.0, 2.0, 3.0])])
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("target 0 at [1.0, 2.0, 3.0]") && e.contains("drift"),
        "{e}"
    );
    let kr = Kriger::new(&data, &m, params(), KrigingKind::SimpleTrend).unwrap();
    let e = kr
        .estimate(&Target::at([1.0, 2.0, 3.0]))
        .unwrap_err()
        .to_string();
    assert!(e.contains("trend"), "{e}");
}
