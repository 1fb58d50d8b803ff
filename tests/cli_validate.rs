//! `stratiprior validate` on the demo: outputs, completeness, score ranges,
//! skill consistency, thread determinism, and the three-well minimum.

use std::fs;
use std::path::{Path, PathBuf};
use std::process::Command;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn validate(project: &Path, out: &Path, threads: usize) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_stratiprior"))
        .args([
            "validate",
            project.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
            "--threads",
            &threads.to_string(),
            "--json",
        ])
        .output()
        .unwrap()
}

#[test]
fn demo_validation_is_complete_consistent_and_deterministic() {
    let t1 = tempfile::tempdir().unwrap();
    let t2 = tempfile::tempdir().unwrap();
    let o = validate(&root().join("demo.toml"), t1.path(), 1);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let pooled: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert!(pooled
        .as_array()
        .unwrap()
        .iter()
        .all(|r| r["well"] == "all"));
    let o2 = validate(&root().join("demo.toml"), t2.path(), 2);
    assert!(o2.status.success());
    let csv1 = fs::read_to_string(t1.path().join("validation.csv")).unwrap();
    let csv2 = fs::read_to_string(t2.path().join("validation.csv")).unwrap();
    assert_eq!(csv1, csv2, "1 and 2 threads differ");
    assert!(
        fs::read(t1.path().join("report.html")).unwrap()
            == fs::read(t2.path().join("report.html")).unwrap(),
        "report.html differs between 1 and 2 threads"
    );

    let v: serde_json::Value =
        serde_json::from_str(&fs::read_to_string(t1.path().join("validation.json")).unwrap())
            .unwrap();
    let rows = v["rows"].as_array().unwrap();
    let wells: Vec<String> = v["wells"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w.as_str().unwrap().to_string())
        .collect();
    assert_eq!(wells.len(), 8);
    assert_eq!(v["predictions"].as_array().unwrap().len(), 8);
    // the CSV has the same rows as the JSON
    assert_eq!(csv1.lines().count(), rows.len() + 1);
    let zones = ["Pellarin", "Vostrand", "Kessimer"];
    let get = |w: &str, z: &str, p: &str, m: &str| {
        rows.iter()
            .find(|r| r["well"] == w && r["zone"] == z && r["property"] == p && r["method"] == m)
    };
    for w in wells.iter().map(String::as_str).chain(["all"]) {
        for z in zones {
            for p in ["vp0", "epsilon", "delta"] {
                let mut methods = vec!["prior", "zone_mean", "nearest_well", "idw"];
                if p == "vp0" {
                    methods.push("background"); // the demo has a background volume
                }
                let prior =
                    get(w, z, p, "prior").unwrap_or_else(|| panic!("no prior row {w} {z} {p}"));
                assert!(prior["skill"].is_null());
                for m in methods {
                    let r = get(w, z, p, m).unwrap_or_else(|| panic!("no row {w} {z} {p} {m}"));
                    assert!(r["samples"].as_u64().unwrap() > 0);
                    for k in ["bias", "rmse", "mae", "z_mean", "z_var", "crps", "w1"] {
                        assert!(
                            r[k].as_f64().is_some_and(f64::is_finite),
                            "{w} {z} {p} {m} {k}: {}",
                            r[k]
                        );
                    }
                    for k in ["coverage80", "coverage95"] {
                        let c = r[k].as_f64().unwrap();
                        assert!((0.0..=1.0).contains(&c), "{k} {c}");
                    }
                    assert!(r["coverage80"].as_f64() <= r["coverage95"].as_f64());
                    // RMSE >= MAE >= |bias| (power-mean inequality)
                    let (rmse, mae, bias) = (
                        r["rmse"].as_f64().unwrap(),
                        r["mae"].as_f64().unwrap(),
                        r["bias"].as_f64().unwrap(),
                    );
                    assert!(rmse >= mae - 1e-12 && mae >= bias.abs() - 1e-12);
                    if m != "prior" {
                        let skill = r["skill"].as_f64().unwrap();
                        let want = 1.0 - prior["rmse"].as_f64().unwrap() / rmse;
                        assert!((skill - want).abs() < 1e-12, "{skill} vs {want}");
                    }
                }
            }
        }
    }
    // pooled sample counts are the sums over wells
    for z in zones {
        let sum: u64 = wells
            .iter()
            .filter_map(|w| get(w, z, "vp0", "prior"))
            .map(|r| r["samples"].as_u64().unwrap())
            .sum();
        assert_eq!(
            get("all", z, "vp0", "prior").unwrap()["samples"]
                .as_u64()
                .unwrap(),
            sum
        );
    }
}

/// The check: the pooled Vp0 prior RMSE is below the zone-mean and
/// nearest-well baselines in every zone (skill > 0 on the pooled rows). It
/// holds with the facies trend (the default): each held-out well's facies
/// probabilities come from the remaining wells and the facies volume.
#[test]
fn vp0_prior_beats_zone_mean_and_nearest_well_in_every_zone() {
    let t = tempfile::tempdir().unwrap();
    let o = validate(&root().join("demo.toml"), t.path(), 2);
    assert!(o.status.success());
    let rows: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    for r in rows.as_array().unwrap() {
        if r["property"] == "vp0" && (r["method"] == "zone_mean" || r["method"] == "nearest_well") {
            assert!(r["skill"].as_f64().unwrap() > 0.0, "{r}");
        }
    }
}

#[test]
fn two_wells_are_refused_with_a_clear_message() {
    let t = tempfile::tempdir().unwrap();
    for d in ["demo_wells", "demo_horizons", "demo_volumes"] {
        fs::create_dir_all(t.path().join(d)).unwrap();
        for e in fs::read_dir(root().join(d)).unwrap() {
            let e = e.unwrap();
            fs::copy(e.path(), t.path().join(d).join(e.file_name())).unwrap();
        }
    }
    fs::copy(root().join("demo.toml"), t.path().join("demo.toml")).unwrap();
    let table = fs::read_to_string(root().join("demo_wells/wells.csv")).unwrap();
    let two: Vec<&str> = table.lines().take(3).collect();
    fs::write(t.path().join("demo_wells/wells.csv"), two.join("\n") + "\n").unwrap();
    let out = t.path().join("out");
    let o = validate(&t.path().join("demo.toml"), &out, 1);
    assert!(!o.status.success());
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("validate needs at least three wells, the project has 2"),
        "{err}"
    );
    assert!(!out.join("validation.csv").exists());
}
