//! Accuracy of the prior far from wells, on the demo truth: the regional demo
//! survey (`stratiprior demo --survey regional`: the demo basin and wells on a
//! 7 km x 6 km survey) has tens of thousands of cells more than 1.5 km from
//! every well. There, per zone, on the cells the prior and the truth both put
//! in the zone:
//!
//! * the Vp0 mean has lower RMSE than the zone mean of the wells' blocked data
//!   and than the background Vp0 volume;
//! * the epsilon and delta means have lower RMSE than the zone mean;
//! * the standard deviation is calibrated: the share of the truth inside
//!   mean +/- 1.645 sd (the central 90 % of a normal distribution) is between
//!   0.8 and 0.97.
//!
//! The truth is the generator's (continuous functions of position sampled on
//! the grid, written to `demo_truth/` as `.npy`); distances are in plan from
//! each column to the nearest blocked sample of the zone of any well.

use std::fs;
use std::path::Path;
use std::process::Command;
use stratiprior::condition::logs::condition_all;
use stratiprior::demo::{generate, DemoOptions, DemoSurvey, DEFAULT_SEED};
use stratiprior::formats::segy::read_volume_on_grid;
use stratiprior::study::load;

/// A little-endian float32 C-order `.npy` (format 1.0), read directly.
fn read_npy_f32(path: &Path) -> Vec<f32> {
    let b = fs::read(path).unwrap();
    assert_eq!(&b[..6], b"\x93NUMPY");
    let hlen = u16::from_le_bytes([b[8], b[9]]) as usize;
    let header = String::from_utf8_lossy(&b[10..10 + hlen]);
    assert!(header.contains("'descr': '<f4'") && header.contains("'fortran_order': False"));
    b[10 + hlen..]
        .chunks_exact(4)
        .map(|c| f32::from_le_bytes([c[0], c[1], c[2], c[3]]))
        .collect()
}

fn rmse(a: &[f64], t: &[f64]) -> f64 {
    (a.iter().zip(t).map(|(a, t)| (a - t) * (a - t)).sum::<f64>() / t.len() as f64).sqrt()
}

#[test]
fn far_from_wells_the_prior_beats_the_baselines_and_is_calibrated() {
    let d = tempfile::tempdir().unwrap();
    let demo = d.path().join("regional");
    generate(&DemoOptions {
        out_dir: demo.clone(),
        seed: DEFAULT_SEED,
        survey: DemoSurvey::Regional,
    })
    .unwrap();
    let out = d.path().join("out");
    let project = demo.join("demo.toml");
    let o = Command::new(env!("CARGO_BIN_EXE_stratiprior"))
        .args([
            "build",
            project.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
            "--threads",
            "2",
            "--quiet",
        ])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));

    let study = load(&project, false).unwrap();
    let p = &study.project;
    let g = &p.grid;
    let nz = g.z_count;
    let frame = study.strat_frame();
    let wells = condition_all(&study, &frame).unwrap();
    let vol = |name: &str| read_volume_on_grid(&out.join("volumes").join(name), g).unwrap();
    let zone = vol("zone.sgy");
    let truth_zone = read_npy_f32(&demo.join("demo_truth/zone.npy"));
    let background = read_volume_on_grid(&demo.join("demo_volumes/background_vp0.sgy"), g).unwrap();
    assert_eq!(truth_zone.len(), zone.len());
    let mut report = String::new();
    for (zi, zdef) in p.zones.iter().enumerate() {
        // plan positions of the zone's blocked samples of every well
        let pts: Vec<(f64, f64)> = wells
            .iter()
            .flat_map(|w| w.blocked.iter())
            .filter(|b| b.zone == zi)
            .map(|b| (b.x, b.y))
            .collect();
        assert!(!pts.is_empty());
        let far_column: Vec<bool> = (0..g.inline_count)
            .flat_map(|i| (0..g.xline_count).map(move |j| (i, j)))
            .map(|(i, j)| {
                let (x, y) = g.node_xy(i as f64, j as f64);
                pts.iter().all(|(px, py)| (x - px).hypot(y - py) > 1500.0)
            })
            .collect();
        let cells: Vec<usize> = (0..zone.len())
            .filter(|&k| far_column[k / nz] && zone[k] == zi as f32 && truth_zone[k] == zi as f32)
            .collect();
        assert!(
            cells.len() > 2000,
            "zone {}: {} far cells",
            zdef.name,
            cells.len()
        );
        for prop in ["vp0", "epsilon", "delta"] {
            let truth = read_npy_f32(&demo.join(format!("demo_truth/{prop}.npy")));
            let mean = vol(&format!("{prop}_mean.sgy"));
            let sd = vol(&format!("{prop}_std.sgy"));
            let t: Vec<f64> = cells.iter().map(|&k| f64::from(truth[k])).collect();
            let m: Vec<f64> = cells.iter().map(|&k| f64::from(mean[k])).collect();
            let s: Vec<f64> = cells.iter().map(|&k| f64::from(sd[k])).collect();
            // the zone mean of the wells' blocked data
            let vals: Vec<f64> = wells
                .iter()
                .flat_map(|w| w.blocked.iter())
                .filter(|b| b.zone == zi)
                .filter_map(|b| match prop {
                    "vp0" => b.vp0,
                    "epsilon" => b.epsilon,
                    _ => b.delta,
                })
                .collect();
            let zm = vals.iter().sum::<f64>() / vals.len() as f64;
            let r_prior = rmse(&m, &t);
            let r_zone = rmse(&vec![zm; t.len()], &t);
            let cover = m
                .iter()
                .zip(&t)
                .zip(&s)
                .filter(|((m, t), s)| (*m - *t).abs() <= 1.645 * **s)
                .count() as f64
                / t.len() as f64;
            let mut line = format!(
                "{} {prop}: {} cells, RMSE prior {r_prior:.5} zone mean {r_zone:.5}",
                zdef.name,
                t.len()
            );
            assert!(
                r_prior < r_zone,
                "{} {prop}: prior {r_prior} not better than the zone mean {r_zone}",
                zdef.name
            );
            if prop == "vp0" {
                let bg: Vec<f64> = cells.iter().map(|&k| f64::from(background[k])).collect();
                let r_bg = rmse(&bg, &t);
                line.push_str(&format!(" background {r_bg:.3}"));
                assert!(
                    r_prior < r_bg,
                    "{} vp0: prior {r_prior} not better than the background {r_bg}",
                    zdef.name
                );
            }
            line.push_str(&format!(", 90 % coverage {cover:.3}"));
            report.push_str(&line);
            report.push('\n');
            assert!(
                (0.8..=0.97).contains(&cover),
                "{} {prop}: coverage {cover} outside 0.8..0.97",
                zdef.name
            );
        }
    }
    eprintln!("{report}");
}
