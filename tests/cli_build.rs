//! `stratiprior build` on the demo: the volumes and manifest it writes, their
//! determinism over thread counts, and their accuracy against the demo truth.

use std::fs;
use std::path::{Path, PathBuf};
use std::process::Command;
use stratiprior::formats::segy::read_volume_on_grid;
use stratiprior::project::Project;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn build(out: &Path, threads: usize) -> serde_json::Value {
    let o = Command::new(env!("CARGO_BIN_EXE_stratiprior"))
        .args([
            "build",
            root().join("demo.toml").to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
            "--threads",
            &threads.to_string(),
            "--json",
        ])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    serde_json::from_slice(&o.stdout).unwrap()
}

/// A float32 little-endian C-order .npy file (NumPy format spec v1.0/2.0): its values.
fn read_npy_f32(path: &Path) -> Vec<f32> {
    let b = fs::read(path).unwrap();
    assert_eq!(&b[..6], b"\x93NUMPY");
    let (hlen, start) = if b[6] == 1 {
        (u16::from_le_bytes([b[8], b[9]]) as usize, 10)
    } else {
        (u32::from_le_bytes([b[8], b[9], b[10], b[11]]) as usize, 12)
    };
    let header = std::str::from_utf8(&b[start..start + hlen]).unwrap();
    assert!(
        header.contains("'<f4'") && header.contains("'fortran_order': False"),
        "{header}"
    );
    b[start + hlen..]
        .chunks_exact(4)
        .map(|c| f32::from_le_bytes([c[0], c[1], c[2], c[3]]))
        .collect()
}

fn rmse(a: &[f64], b: &[f64]) -> f64 {
    (a.iter().zip(b).map(|(x, y)| (x - y).powi(2)).sum::<f64>() / a.len() as f64).sqrt()
}

#[test]
fn build_writes_consistent_volumes_deterministically_and_beats_the_zone_mean() {
    let d = tempfile::tempdir().unwrap();
    let (o1, o2) = (d.path().join("t1"), d.path().join("t2"));
    let r1 = build(&o1, 1);
    let _ = build(&o2, 2);
    let project = Project::load(&root().join("demo.toml")).unwrap();
    let g = &project.grid;

    // the manifest names every volume, and files are identical for 1 and 2 threads
    let m: serde_json::Value =
        serde_json::from_slice(&fs::read(o1.join("manifest.json")).unwrap()).unwrap();
    let vols = m["volumes"].as_array().unwrap();
    // mean and std of three properties, zone, one probability per facies, most likely facies
    assert_eq!(vols.len(), 7 + project.facies.len() + 1);
    let mut data = std::collections::BTreeMap::new();
    for v in vols {
        let rel = v["path"].as_str().unwrap();
        let a = fs::read(o1.join(rel)).unwrap();
        let b = fs::read(o2.join(rel)).unwrap();
        assert!(a == b, "{rel} differs between 1 and 2 threads");
        let key = format!(
            "{}_{}",
            v["property"].as_str().unwrap(),
            v["statistic"].as_str().unwrap()
        );
        data.insert(key, read_volume_on_grid(&o1.join(rel), g).unwrap());
    }
    assert_eq!(m["zones"].as_array().unwrap().len(), project.zones.len());
    for f in m["files"].as_array().unwrap() {
        assert!(o1.join(f["path"].as_str().unwrap()).exists());
    }

    // zone index -1 outside zones with zero std; bounds respected; std positive inside
    let zone = &data["zone_value"];
    let nzones = project.zones.len() as f32;
    let b = project.bounds;
    let mut inside = 0usize;
    for (k, &z) in zone.iter().enumerate() {
        assert!(
            z == -1.0 || (z >= 0.0 && z < nzones && z.fract() == 0.0),
            "zone {z}"
        );
        let (e, dl) = (data["epsilon_mean"][k], data["delta_mean"][k]);
        for s in ["vp0_std", "epsilon_std", "delta_std"] {
            let v = data[s][k];
            assert!(v.is_finite() && v >= 0.0);
            if z < 0.0 {
                assert_eq!(v, 0.0);
            }
        }
        if z >= 0.0 {
            inside += 1;
            assert!(data["vp0_std"][k] > 0.0);
            assert!(e as f64 >= b.epsilon.0 - 1e-6 && e as f64 <= b.epsilon.1 + 1e-6);
            assert!(dl as f64 >= b.delta.0 - 1e-6 && dl as f64 <= b.delta.1 + 1e-6);
        }
    }
    assert_eq!(inside as u64, r1["cells_in_zones"].as_u64().unwrap());

    // facies probabilities lie in [0, 1] and sum to 1 in every cell of a zone
    // (f32 on disk), and the most likely facies is their argmax
    let probs: Vec<&Vec<f32>> = project
        .facies
        .iter()
        .map(|f| &data[&format!("facies_probability:{}_value", f.name)])
        .collect();
    let ml = &data["facies_value"];
    for (k, &z) in zone.iter().enumerate() {
        if z < 0.0 {
            assert_eq!(ml[k], -1.0);
            continue;
        }
        let p: Vec<f32> = probs.iter().map(|v| v[k]).collect();
        assert!(p.iter().all(|&q| (0.0..=1.0).contains(&q)), "{p:?}");
        let sum: f32 = p.iter().sum();
        assert!((sum - 1.0).abs() < 1e-5, "sum {sum}");
        let best = p
            .iter()
            .enumerate()
            .fold(0, |b, (i, &q)| if q > p[b] { i } else { b });
        assert!(
            p[best]
                - p[project
                    .facies
                    .iter()
                    .position(|f| f.code as f32 == ml[k])
                    .unwrap()]
                < 1e-6
        );
    }

    // against the demo truth: the generator writes it next to a fresh demo
    let demo = d.path().join("demo");
    stratiprior::demo::generate(&stratiprior::demo::DemoOptions {
        out_dir: demo.clone(),
        seed: stratiprior::demo::DEFAULT_SEED,
    })
    .unwrap();
    let truth_zone = read_npy_f32(&demo.join("demo_truth/zone.npy"));
    let background =
        read_volume_on_grid(&root().join("demo_volumes/background_vp0.sgy"), g).unwrap();
    for (prop, key) in [("vp0", "vp0"), ("epsilon", "epsilon"), ("delta", "delta")] {
        let truth = read_npy_f32(&demo.join(format!("demo_truth/{prop}.npy")));
        assert_eq!(truth.len(), zone.len());
        for zi in 0..project.zones.len() {
            // cells the prior and the truth both put in this zone
            let cells: Vec<usize> = (0..zone.len())
                .filter(|&k| zone[k] == zi as f32 && truth_zone[k] == zi as f32)
                .collect();
            assert!(cells.len() > 1000);
            let t: Vec<f64> = cells.iter().map(|&k| f64::from(truth[k])).collect();
            let mean: Vec<f64> = cells
                .iter()
                .map(|&k| f64::from(data[&format!("{key}_mean")][k]))
                .collect();
            let zone_mean = r1["zones"]
                .as_array()
                .unwrap()
                .iter()
                .find(|r| r["zone"] == project.zones[zi].name.as_str() && r["property"] == prop)
                .unwrap()["data_mean"]
                .as_f64()
                .unwrap();
            let zm = vec![zone_mean; t.len()];
            let (r_prior, r_zone) = (rmse(&mean, &t), rmse(&zm, &t));
            eprintln!("{prop} zone {zi}: RMSE prior {r_prior:.5}, zone mean {r_zone:.5}");
            assert!(
                r_prior < r_zone,
                "{prop} zone {zi}: prior {r_prior} not better than the zone mean {r_zone}"
            );
            if prop == "vp0" {
                let bg: Vec<f64> = cells.iter().map(|&k| f64::from(background[k])).collect();
                let r_bg = rmse(&bg, &t);
                eprintln!("vp0 zone {zi}: RMSE background {r_bg:.3}");
                assert!(
                    r_prior < r_bg,
                    "vp0 zone {zi}: prior {r_prior} not better than the background {r_bg}"
                );
            }
            // the 90 % interval mean +/- 1.645 sd holds a sensible share of the truth
            let sd: Vec<f64> = cells
                .iter()
                .map(|&k| f64::from(data[&format!("{key}_std")][k]))
                .collect();
            let cover = mean
                .iter()
                .zip(&t)
                .zip(&sd)
                .filter(|((m, t), s)| (*m - *t).abs() <= 1.645 * **s)
                .count() as f64
                / t.len() as f64;
            eprintln!("{prop} zone {zi}: 90 % interval coverage {cover:.3}");
            assert!(
                cover > 0.7 && cover < 0.99,
                "{prop} zone {zi}: coverage {cover}"
            );
        }
    }
}
