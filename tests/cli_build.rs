//! `stratiprior build` on the demo: the volumes and manifest it writes, their
//! determinism over thread counts, and their accuracy against the demo truth.

use std::fs;
use std::path::{Path, PathBuf};
use std::process::Command;
use stratiprior::formats::segy::read_volume_on_grid;
use stratiprior::grid::SurveyGrid;
use stratiprior::project::Project;
use stratiprior::validation::scores::wasserstein_1d;

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

/// The shape in a .npy v1.0 header (NumPy format spec, NEP 1: magic, version
/// 1.0, u16 LE header length, dict with 'descr', 'fortran_order', 'shape';
/// magic + header a multiple of 64 bytes, ended by '\n').
fn npy_shape_v1(path: &Path) -> Vec<usize> {
    let b = fs::read(path).unwrap();
    assert_eq!(&b[..8], b"\x93NUMPY\x01\x00", "{}", path.display());
    let hlen = u16::from_le_bytes([b[8], b[9]]) as usize;
    assert_eq!((10 + hlen) % 64, 0);
    assert_eq!(b[10 + hlen - 1], b'\n');
    let header = std::str::from_utf8(&b[10..10 + hlen]).unwrap();
    let inner = &header[header.find("'shape': (").unwrap() + 10..];
    let inner = &inner[..inner.find(')').unwrap()];
    let shape: Vec<usize> = inner
        .split(',')
        .filter(|t| !t.trim().is_empty())
        .map(|t| t.trim().parse().unwrap())
        .collect();
    assert_eq!(b.len(), 10 + hlen + 4 * shape.iter().product::<usize>());
    shape
}

fn weighted_corr(a: &[f64], b: &[f64], w: &[f64]) -> f64 {
    let sw: f64 = w.iter().sum();
    let ma = a.iter().zip(w).map(|(x, w)| x * w).sum::<f64>() / sw;
    let mb = b.iter().zip(w).map(|(x, w)| x * w).sum::<f64>() / sw;
    let (mut sab, mut saa, mut sbb) = (0.0, 0.0, 0.0);
    for ((x, y), w) in a.iter().zip(b).zip(w) {
        sab += w * (x - ma) * (y - mb);
        saa += w * (x - ma).powi(2);
        sbb += w * (y - mb).powi(2);
    }
    sab / (saa * sbb).sqrt()
}

/// `n` draws of pool row indices by weight (inverse transform on the cumulative weights).
fn draw_by_weight(w: &[f64], n: usize, rng: &mut impl rand::Rng) -> Vec<usize> {
    let mut cum = Vec::with_capacity(w.len());
    let mut c = 0.0;
    for x in w {
        c += x;
        cum.push(c);
    }
    (0..n)
        .map(|_| {
            let u = rng.gen::<f64>() * c;
            cum.partition_point(|&x| x <= u).min(w.len() - 1)
        })
        .collect()
}

/// The sample banks: identical for 1 and 2 threads, numpy-readable, and each
/// region's bank residuals reproduce the declustered (weighted) well pool.
fn check_banks(m: &serde_json::Value, o1: &Path, o2: &Path, data: &Data, g: &SurveyGrid) {
    use rand::SeedableRng;
    let banks = m["banks"].as_array().unwrap();
    let project = Project::load(&root().join("demo.toml")).unwrap();
    assert_eq!(banks.len(), project.zones.len() * project.facies.len());
    let nz = g.z_count;
    let mut python_lines = Vec::new();
    for (r, b) in banks.iter().enumerate() {
        let (bp, pp) = (
            b["path"].as_str().unwrap(),
            b["pool_path"].as_str().unwrap(),
        );
        for rel in [bp, pp] {
            let a = fs::read(o1.join(rel)).unwrap();
            assert!(
                a == fs::read(o2.join(rel)).unwrap(),
                "{rel} differs between 1 and 2 threads"
            );
        }
        let n = b["count"].as_u64().unwrap() as usize;
        let np = b["pool_count"].as_u64().unwrap() as usize;
        assert_eq!(n, project.bank_count);
        assert_eq!(npy_shape_v1(&o1.join(bp)), vec![n, 7]);
        assert_eq!(npy_shape_v1(&o1.join(pp)), vec![np, 5]);
        let bank = read_npy_f32(&o1.join(bp));
        let pool = read_npy_f32(&o1.join(pp));
        let off: Vec<f64> = (0..3).map(|q| b["offset"][q].as_f64().unwrap()).collect();
        let zi = b["zone_index"].as_u64().unwrap() as f32;
        let fname = b["facies"].as_str().unwrap();
        // the facies trend the mean volumes hold (manifest zones[].facies_trend)
        let trend_of_zone: Vec<(String, [f64; 3])> = m["zones"][zi as usize]["facies_trend"]
            .as_array()
            .unwrap()
            .iter()
            .map(|e| {
                (
                    e[0].as_str().unwrap().to_string(),
                    [0, 1, 2].map(|q| e[1][q].as_f64().unwrap()),
                )
            })
            .collect();
        // bank residual: value minus the trend at its cell
        // (mean volumes - sum_f p_f t_f + d_f)
        let mut res: Vec<Vec<f64>> = vec![Vec::new(); 3];
        for row in bank.chunks_exact(7) {
            let (fi, fj) = g.xy_to_ij(f64::from(row[3]), f64::from(row[4]));
            let (i, j) = (fi.round() as usize, fj.round() as usize);
            let k = ((f64::from(row[5]) - g.z0) / g.dz).round() as usize;
            let c = g.trace_index(i, j) * nz + k;
            assert_eq!(data["zone_value"][c], zi, "bank cell outside its zone");
            assert!(data[&format!("facies_probability:{fname}_value")][c] > 0.0);
            assert!(row[6].is_finite() && row[6] >= 0.0);
            for (q, key) in ["vp0_mean", "epsilon_mean", "delta_mean"]
                .iter()
                .enumerate()
            {
                let mix: f64 = trend_of_zone
                    .iter()
                    .map(|(f, t)| {
                        f64::from(data[&format!("facies_probability:{f}_value")][c]) * t[q]
                    })
                    .sum();
                res[q].push(f64::from(row[q]) - (f64::from(data[*key][c]) - mix + off[q]));
            }
        }
        let pw: Vec<f64> = pool.chunks_exact(5).map(|p| f64::from(p[3])).collect();
        let pv: Vec<Vec<f64>> = (0..3)
            .map(|q| pool.chunks_exact(5).map(|p| f64::from(p[q])).collect())
            .collect();
        // reference: W1 between two independent banks of the same size drawn
        // from the same pool (residuals are i.i.d. draws by weight)
        let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(7 + r as u64);
        let d1 = draw_by_weight(&pw, n, &mut rng);
        let d2 = draw_by_weight(&pw, n, &mut rng);
        let mut ratios = Vec::new();
        for q in 0..3 {
            // Wasserstein-1 as scipy.stats.wasserstein_distance (Villani 2009)
            let w_bank = wasserstein_1d(&res[q], &pv[q], None, Some(&pw)).unwrap();
            let a: Vec<f64> = d1.iter().map(|&i| pv[q][i]).collect();
            let bb: Vec<f64> = d2.iter().map(|&i| pv[q][i]).collect();
            let w_ref = wasserstein_1d(&a, &bb, None, None).unwrap();
            ratios.push(w_bank / w_ref);
            assert!(
                w_bank < 3.0 * w_ref,
                "bank {bp} column {q}: W1 {w_bank} vs two independent banks {w_ref}"
            );
        }
        let ones = vec![1.0; n];
        let c_bank = [
            weighted_corr(&res[0], &res[1], &ones),
            weighted_corr(&res[1], &res[2], &ones),
        ];
        let c_pool = [
            weighted_corr(&pv[0], &pv[1], &pw),
            weighted_corr(&pv[1], &pv[2], &pw),
        ];
        eprintln!(
            "bank {bp}: pool {np} ({}), W1 ratios vp0 {:.3} eps {:.3} delta {:.3}; corr vp0-eps {:.3}/{:.3}, eps-delta {:.3}/{:.3}",
            b["pool"], ratios[0], ratios[1], ratios[2], c_bank[0], c_pool[0], c_bank[1], c_pool[1]
        );
        for t in 0..2 {
            assert!(
                (c_bank[t] - c_pool[t]).abs() < 0.05,
                "{bp}: corr {c_bank:?} pool {c_pool:?}"
            );
        }
        let means: Vec<f64> = (0..7)
            .map(|c| {
                bank.iter()
                    .skip(c)
                    .step_by(7)
                    .map(|v| f64::from(*v))
                    .sum::<f64>()
                    / n as f64
            })
            .collect();
        python_lines.push((o1.join(bp), n, means));
    }
    // numpy reads the files: shape, dtype and column means
    match std::env::var("STRATIPRIOR_PYTHON") {
        Ok(py) => {
            for (path, n, means) in &python_lines {
                let o = Command::new(&py)
                    .args([
                        "-c",
                        "import sys, numpy as np\na = np.load(sys.argv[1])\nprint(a.shape[0], a.shape[1], a.dtype.str, a.flags['C_CONTIGUOUS'], ' '.join(repr(float(v)) for v in a.astype(np.float64).mean(axis=0)))",
                        path.to_str().unwrap(),
                    ])
                    .output()
                    .unwrap();
                assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
                let out = String::from_utf8(o.stdout).unwrap();
                let t: Vec<&str> = out.split_whitespace().collect();
                assert_eq!(t[0].parse::<usize>().unwrap(), *n);
                assert_eq!(t[1], "7");
                assert_eq!(t[2], "<f4");
                assert_eq!(t[3], "True");
                for (c, m) in means.iter().enumerate() {
                    let v: f64 = t[4 + c].parse().unwrap();
                    assert!(
                        (v - m).abs() <= 1e-9 * m.abs().max(1.0),
                        "column {c}: numpy {v} ours {m}"
                    );
                }
            }
        }
        Err(_) => assert!(
            std::env::var("STRATIPRIOR_REQUIRE_PYTHON").as_deref() != Ok("1"),
            "STRATIPRIOR_REQUIRE_PYTHON=1 but STRATIPRIOR_PYTHON is not set"
        ),
    }
}

type Data = std::collections::BTreeMap<String, Vec<f32>>;

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
    // the QC report too: nothing in it depends on scheduling
    assert!(
        fs::read(o1.join("report.html")).unwrap() == fs::read(o2.join("report.html")).unwrap(),
        "report.html differs between 1 and 2 threads"
    );
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
    check_banks(&m, &o1, &o2, &data, g);
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
    stratiprior::demo::generate(&stratiprior::demo::DemoOptions::field(
        demo.clone(),
        stratiprior::demo::DEFAULT_SEED,
    ))
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

    // Issue check on the demo truth: for every region with at least two wells, the
    // bank is closer (W1 per parameter) to the true distribution of the region's
    // cells than the pooled all-well distribution of the zone is.
    let study = stratiprior::study::load(&root().join("demo.toml"), false).unwrap();
    let frame = study.strat_frame();
    let wells = stratiprior::condition::logs::condition_all(&study, &frame).unwrap();
    let truth_facies = read_npy_f32(&demo.join("demo_truth/facies.npy"));
    let truths: Vec<Vec<f32>> = ["vp0", "epsilon", "delta"]
        .iter()
        .map(|p| read_npy_f32(&demo.join(format!("demo_truth/{p}.npy"))))
        .collect();
    for b in m["banks"].as_array().unwrap() {
        if b["wells"].as_u64().unwrap() < 2 {
            continue;
        }
        let zi = b["zone_index"].as_u64().unwrap() as usize;
        let code = b["facies_code"].as_i64().unwrap() as f32;
        let bank = read_npy_f32(&o1.join(b["path"].as_str().unwrap()));
        let cells: Vec<usize> = (0..truth_zone.len())
            .filter(|&k| truth_zone[k] == zi as f32 && truth_facies[k] == code)
            .collect();
        assert!(cells.len() > 100);
        for (q, name) in ["vp0", "epsilon", "delta"].iter().enumerate() {
            let t: Vec<f64> = cells.iter().map(|&k| f64::from(truths[q][k])).collect();
            let bk: Vec<f64> = bank.chunks_exact(7).map(|r| f64::from(r[q])).collect();
            let pooled: Vec<f64> = wells
                .iter()
                .flat_map(|w| w.blocked.iter())
                .filter(|s| s.zone == zi)
                .filter_map(|s| [s.vp0, s.epsilon, s.delta][q])
                .collect();
            let w_bank = wasserstein_1d(&bk, &t, None, None).unwrap();
            let w_pool = wasserstein_1d(&pooled, &t, None, None).unwrap();
            eprintln!(
                "bank {} {name}: W1 to truth {w_bank:.5}, pooled wells {w_pool:.5}, ratio {:.3}",
                b["path"],
                w_bank / w_pool
            );
            assert!(
                w_bank < w_pool,
                "{} {name}: bank {w_bank} vs pooled {w_pool}",
                b["path"]
            );
        }
    }
}
