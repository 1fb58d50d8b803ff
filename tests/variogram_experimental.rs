//! Experimental variograms against brute-force O(n^2) pair loops written here from
//! the definition of Matheron's (1963) estimator
//! `gamma(h) = sum_{pairs in class} (z_i - z_j)^2 / (2 N(h))`, and the grid node
//! positions of the survey-grid convention in the design overview.

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use stratiprior::geostat::variogram::{
    gridded_variogram, horizontal_variogram, vertical_variogram, DirectionFilter, GridDirection,
    GridValues, HorizontalOptions, LagBins, LagDirection, Sample, WellSeries,
};

struct Brute {
    sq: Vec<f64>,
    h: Vec<f64>,
    n: Vec<u64>,
}

impl Brute {
    fn new(k: usize) -> Self {
        Brute {
            sq: vec![0.0; k],
            h: vec![0.0; k],
            n: vec![0; k],
        }
    }
    fn add_if(&mut self, edges: &[f64], h: f64, dz: f64) {
        for k in 0..edges.len() - 1 {
            if h >= edges[k] && h < edges[k + 1] {
                self.sq[k] += dz * dz;
                self.h[k] += h;
                self.n[k] += 1;
            }
        }
    }
    fn check(&self, ev: &stratiprior::geostat::variogram::ExperimentalVariogram) {
        assert_eq!(ev.bins.len(), self.n.len());
        for (k, b) in ev.bins.iter().enumerate() {
            assert_eq!(b.pairs, self.n[k], "bin {k}");
            if self.n[k] > 0 {
                let g = self.sq[k] / (2.0 * self.n[k] as f64);
                let h = self.h[k] / self.n[k] as f64;
                assert!(
                    (b.gamma - g).abs() <= 1e-12 * g.abs().max(1e-300),
                    "bin {k}: {} vs {g}",
                    b.gamma
                );
                assert!((b.h_mean - h).abs() <= 1e-12 * h.max(1.0), "bin {k}");
            } else {
                assert_eq!(b.gamma, 0.0);
            }
        }
    }
}

fn random_wells(rng: &mut ChaCha8Rng, nw: usize) -> Vec<WellSeries> {
    (0..nw)
        .map(|w| {
            let n = 50 + 20 * w;
            let mut s: Vec<f64> = (0..n).map(|_| rng.gen_range(0.0..60.0)).collect();
            // A sampling gap and some duplicated depths.
            s.retain(|v| !(20.0..24.0).contains(v));
            s.push(s[3]);
            let values = s
                .iter()
                .map(|_| {
                    if rng.gen_bool(0.07) {
                        f64::NAN
                    } else {
                        2500.0 + rng.gen_range(-200.0..200.0)
                    }
                })
                .collect();
            WellSeries {
                well: format!("Ptarmigan-{w}"),
                s,
                values,
            }
        })
        .collect()
}

#[test]
fn vertical_equals_brute_force_within_wells() {
    let mut rng = ChaCha8Rng::seed_from_u64(11);
    let wells = random_wells(&mut rng, 5);
    let bins = LagBins::uniform(2.0, 10).unwrap();
    let ev = vertical_variogram(&wells, &bins, 30).unwrap();
    assert_eq!(ev.direction, LagDirection::Vertical);
    let mut b = Brute::new(10);
    for w in &wells {
        for i in 0..w.s.len() {
            for j in i + 1..w.s.len() {
                if w.values[i].is_nan() || w.values[j].is_nan() {
                    continue;
                }
                b.add_if(
                    bins.edges(),
                    (w.s[i] - w.s[j]).abs(),
                    w.values[i] - w.values[j],
                );
            }
        }
    }
    b.check(&ev);
    assert!(ev.total_pairs() > 1000);
    // Pairs across wells are not used: with two copies of one well the counts double
    // exactly, whereas cross-well pairs would add many more.
    let w0 = wells[0].clone();
    let mut w1 = w0.clone();
    w1.well = "copy".into();
    let one = vertical_variogram(std::slice::from_ref(&w0), &bins, 30).unwrap();
    let two = vertical_variogram(&[w0, w1], &bins, 30).unwrap();
    for (a, c) in one.bins.iter().zip(&two.bins) {
        assert_eq!(2 * a.pairs, c.pairs);
        assert!((a.gamma - c.gamma).abs() <= 1e-12 * a.gamma.max(1.0));
    }
}

#[test]
fn vertical_input_errors() {
    let bins = LagBins::uniform(1.0, 5).unwrap();
    let w = WellSeries {
        well: "Merlin-2".into(),
        s: vec![1.0, 2.0],
        values: vec![1.0],
    };
    let e = vertical_variogram(&[w], &bins, 30).unwrap_err().to_string();
    assert!(
        e.contains("Merlin-2") && e.contains("2 stratigraphic coordinates but 1 values"),
        "{e}"
    );
    let w = WellSeries {
        well: "Merlin-3".into(),
        s: vec![1.0, f64::NAN],
        values: vec![1.0, 2.0],
    };
    let e = vertical_variogram(&[w], &bins, 30).unwrap_err().to_string();
    assert!(e.contains("Merlin-3") && e.contains("sample 1"), "{e}");
    // A missing value at a missing s is simply a gap.
    let w = WellSeries {
        well: "Merlin-4".into(),
        s: vec![1.0, f64::NAN, 2.0],
        values: vec![1.0, f64::NAN, 3.0],
    };
    let ev = vertical_variogram(&[w], &bins, 30).unwrap();
    assert_eq!(ev.bins[1].pairs, 1);
    assert_eq!(ev.bins[1].gamma, 2.0); // (1 - 3)^2 / 2
    assert!(LagBins::uniform(0.0, 3).is_err());
    assert!(LagBins::uniform(1.0, 0).is_err());
    let e = LagBins::from_edges(vec![0.0, 2.0, 2.0])
        .unwrap_err()
        .to_string();
    assert!(e.contains("increase strictly"), "{e}");
}

/// Deviated wells: x, y drift with s.
fn random_samples(rng: &mut ChaCha8Rng, nw: usize, per_well: usize) -> Vec<Sample> {
    let mut out = Vec::new();
    for w in 0..nw {
        let x0 = rng.gen_range(0.0..3000.0);
        let y0 = rng.gen_range(0.0..3000.0);
        let (vx, vy) = (rng.gen_range(-5.0..5.0), rng.gen_range(-5.0..5.0));
        for _ in 0..per_well {
            let s = rng.gen_range(0.0..30.0);
            let value = if rng.gen_bool(0.05) {
                f64::NAN
            } else {
                0.1 + rng.gen_range(-0.03..0.03)
            };
            out.push(Sample {
                x: x0 + vx * s,
                y: y0 + vy * s,
                s,
                value,
                well: w,
            });
        }
    }
    out
}

fn brute_horizontal(samples: &[Sample], opts: &HorizontalOptions) -> Brute {
    let edges = opts.bins.edges();
    let mut b = Brute::new(edges.len() - 1);
    for i in 0..samples.len() {
        for j in i + 1..samples.len() {
            let (p, q) = (samples[i], samples[j]);
            if p.well == q.well || p.value.is_nan() || q.value.is_nan() {
                continue;
            }
            if (p.s - q.s).abs() > opts.vertical_tolerance {
                continue;
            }
            let (dx, dy) = (q.x - p.x, q.y - p.y);
            let h = (dx * dx + dy * dy).sqrt();
            if let Some(d) = opts.direction {
                // Angle between the separation and the bearing, either sense.
                let bearing = dx.atan2(dy).to_degrees();
                let mut diff = (bearing - d.azimuth).rem_euclid(180.0);
                if diff > 90.0 {
                    diff = 180.0 - diff;
                }
                if h > 0.0 && diff > d.tolerance {
                    continue;
                }
                if let Some(bw) = d.bandwidth {
                    if h * diff.to_radians().sin() > bw {
                        continue;
                    }
                }
            }
            b.add_if(edges, h, p.value - q.value);
        }
    }
    b
}

#[test]
fn horizontal_equals_brute_force_between_wells() {
    let mut rng = ChaCha8Rng::seed_from_u64(5);
    let samples = random_samples(&mut rng, 25, 40);
    let mut opts = HorizontalOptions {
        bins: LagBins::uniform(200.0, 12).unwrap(),
        vertical_tolerance: 1.5,
        direction: None,
        min_pairs: 400,
    };
    let ev = horizontal_variogram(&samples, &opts).unwrap();
    assert_eq!(ev.direction, LagDirection::Omnidirectional);
    brute_horizontal(&samples, &opts).check(&ev);
    assert!(ev.total_pairs() > 2000, "{}", ev.total_pairs());
    // Warnings list exactly the classes below min_pairs.
    let low: Vec<usize> = ev
        .bins
        .iter()
        .enumerate()
        .filter(|(_, b)| b.pairs < 400)
        .map(|(k, _)| k)
        .collect();
    assert_eq!(ev.warnings.iter().map(|w| w.lag).collect::<Vec<_>>(), low);
    assert!(!low.is_empty() && low.len() < ev.bins.len(), "{low:?}");
    for direction in [
        DirectionFilter {
            azimuth: 30.0,
            tolerance: 22.5,
            bandwidth: None,
        },
        DirectionFilter {
            azimuth: 120.0,
            tolerance: 15.0,
            bandwidth: Some(250.0),
        },
        DirectionFilter {
            azimuth: -10.0,
            tolerance: 90.0,
            bandwidth: None,
        },
    ] {
        opts.direction = Some(direction);
        let ev = horizontal_variogram(&samples, &opts).unwrap();
        brute_horizontal(&samples, &opts).check(&ev);
        assert!(ev.total_pairs() > 100);
    }
    // Tolerance 90 degrees without bandwidth is omnidirectional.
    opts.direction = None;
    let omni = horizontal_variogram(&samples, &opts).unwrap();
    opts.direction = Some(DirectionFilter {
        azimuth: 77.0,
        tolerance: 90.0,
        bandwidth: None,
    });
    let all = horizontal_variogram(&samples, &opts).unwrap();
    for (a, b) in omni.bins.iter().zip(&all.bins) {
        assert_eq!(a.pairs, b.pairs);
    }
}

#[test]
fn horizontal_hand_example_excludes_same_well_pairs() {
    // Two samples of well 0 at the same place, one of well 1, 100 m east.
    let s = |x: f64, s: f64, value: f64, well: usize| Sample {
        x,
        y: 0.0,
        s,
        value,
        well,
    };
    let samples = [
        s(0.0, 0.0, 1.0, 0),
        s(0.0, 0.5, 3.0, 0),
        s(100.0, 0.2, 2.0, 1),
    ];
    let opts = HorizontalOptions {
        bins: LagBins::uniform(200.0, 1).unwrap(),
        vertical_tolerance: 1.0,
        direction: None,
        min_pairs: 30,
    };
    let ev = horizontal_variogram(&samples, &opts).unwrap();
    // Pairs (0,2) and (1,2): squared differences 1 and 1: gamma = 2 / (2 * 2).
    assert_eq!(ev.bins[0].pairs, 2);
    assert_eq!(ev.bins[0].gamma, 0.5);
    assert_eq!(ev.bins[0].h_mean, 100.0);
    assert_eq!(ev.warnings.len(), 1);
    assert!(ev.warnings[0].message.contains("2 pairs, fewer than 30"));
    // Tight vertical tolerance drops the pair with |ds| = 0.3.
    let opts = HorizontalOptions {
        vertical_tolerance: 0.25,
        ..opts
    };
    let ev = horizontal_variogram(&samples, &opts).unwrap();
    assert_eq!(ev.bins[0].pairs, 1);
    assert_eq!(ev.bins[0].gamma, 0.5);
    // Bad settings are refused with a message.
    let bad = HorizontalOptions {
        vertical_tolerance: -1.0,
        ..opts.clone()
    };
    assert!(horizontal_variogram(&samples, &bad)
        .unwrap_err()
        .to_string()
        .contains("vertical tolerance"));
    let bad = HorizontalOptions {
        direction: Some(DirectionFilter {
            azimuth: 0.0,
            tolerance: 0.0,
            bandwidth: None,
        }),
        ..opts
    };
    assert!(horizontal_variogram(&samples, &bad)
        .unwrap_err()
        .to_string()
        .contains("angular tolerance"));
}

#[test]
fn gridded_equals_brute_force_pairs() {
    let (ni, nj, nk) = (6usize, 7usize, 3usize);
    let mut rng = ChaCha8Rng::seed_from_u64(9);
    let n = ni * nj * nk;
    let mut values: Vec<f64> = (0..n).map(|_| rng.gen_range(2000.0..3000.0)).collect();
    values[17] = f64::NAN;
    let active: Vec<bool> = (0..n).map(|_| rng.gen_bool(0.85)).collect();
    let (az, isp, xsp, dsp) = (30.0f64, 25.0, 12.5, 2.0);
    let grid = GridValues {
        values: &values,
        shape: [ni, nj, nk],
        inline_spacing: isp,
        xline_spacing: xsp,
        layer_spacing: dsp,
        azimuth: az,
        active: Some(&active),
    };
    let dirs = [
        GridDirection::AlongInline,
        GridDirection::AlongCrossline,
        GridDirection::Diagonal,
        GridDirection::AntiDiagonal,
        GridDirection::Vertical,
    ];
    let nlags = 6;
    let out = gridded_variogram(&grid, &dirs, nlags, 10).unwrap();
    // Node positions from the overview: (x0, y0) + j * xs * (sin az, cos az) + i * is * (cos az, -sin az).
    let (sa, ca) = az.to_radians().sin_cos();
    let pos = |i: usize, j: usize, k: usize| {
        [
            j as f64 * xsp * sa + i as f64 * isp * ca,
            j as f64 * xsp * ca - i as f64 * isp * sa,
            k as f64 * dsp,
        ]
    };
    let steps: [[i64; 3]; 5] = [[0, 1, 0], [1, 0, 0], [1, 1, 0], [1, -1, 0], [0, 0, 1]];
    let idx = |i: usize, j: usize, k: usize| (i * nj + j) * nk + k;
    for (d, ev) in out.iter().enumerate() {
        let mut sq = vec![0.0; nlags];
        let mut cnt = vec![0u64; nlags];
        let mut dist = vec![None; nlags];
        let mut bearing = None;
        // All ordered node pairs; keep those whose index difference is +L * step.
        for a in 0..n {
            for b in 0..n {
                let (ia, ja, ka) = (a / (nj * nk), (a / nk) % nj, a % nk);
                let (ib, jb, kb) = (b / (nj * nk), (b / nk) % nj, b % nk);
                let dif = [
                    ib as i64 - ia as i64,
                    jb as i64 - ja as i64,
                    kb as i64 - ka as i64,
                ];
                for l in 1..=nlags as i64 {
                    let st = steps[d];
                    if dif == [st[0] * l, st[1] * l, st[2] * l] {
                        let (pa, pb) = (pos(ia, ja, ka), pos(ib, jb, kb));
                        let dv = [pb[0] - pa[0], pb[1] - pa[1], pb[2] - pa[2]];
                        dist[l as usize - 1] =
                            Some((dv[0] * dv[0] + dv[1] * dv[1] + dv[2] * dv[2]).sqrt());
                        if d < 4 {
                            bearing = Some(dv[0].atan2(dv[1]).to_degrees().rem_euclid(360.0));
                        }
                        let (va, vb) = (values[idx(ia, ja, ka)], values[idx(ib, jb, kb)]);
                        if active[a] && active[b] && va.is_finite() && vb.is_finite() {
                            sq[l as usize - 1] += (va - vb).powi(2);
                            cnt[l as usize - 1] += 1;
                        }
                    }
                }
            }
        }
        for l in 0..nlags {
            let b = &ev.bins[l];
            assert_eq!(b.pairs, cnt[l], "direction {d} lag {}", l + 1);
            if cnt[l] > 0 {
                let g = sq[l] / (2.0 * cnt[l] as f64);
                assert!(
                    (b.gamma - g).abs() <= 1e-12 * g,
                    "direction {d} lag {}",
                    l + 1
                );
            }
            if let Some(h) = dist[l] {
                assert!(
                    (b.h_mean - h).abs() < 1e-9,
                    "direction {d} lag {}: {} vs {h}",
                    l + 1,
                    b.h_mean
                );
            }
        }
        match (ev.direction, bearing) {
            (LagDirection::Horizontal { azimuth, .. }, Some(br)) => {
                assert!((azimuth - br).abs() < 1e-9, "{azimuth} vs {br}")
            }
            (LagDirection::Vertical, None) => {}
            other => panic!("unexpected direction {other:?}"),
        }
        let low = ev.bins.iter().filter(|b| b.pairs < 10).count();
        assert_eq!(ev.warnings.len(), low);
    }
    // Along an inline is the grid azimuth, along a crossline azimuth + 90.
    assert_eq!(
        out[0].direction,
        LagDirection::Horizontal {
            azimuth: 30.0,
            tolerance: 0.0
        }
    );
    match out[1].direction {
        LagDirection::Horizontal { azimuth, .. } => assert!((azimuth - 120.0).abs() < 1e-12),
        _ => panic!(),
    }
    // Shape mismatch is an error.
    let bad = GridValues {
        shape: [ni, nj, 2],
        ..grid
    };
    assert!(gridded_variogram(&bad, &dirs, 3, 10)
        .unwrap_err()
        .to_string()
        .contains("values for a grid of"));
}
