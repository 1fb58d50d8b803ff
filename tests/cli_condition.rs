//! `stratiprior condition` on the demo: conditioned LAS files that read back
//! with the values they were made from.

use std::fs;
use std::path::{Path, PathBuf};
use std::process::Command;
use stratiprior::formats::las::read_las;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn run(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_stratiprior"))
        .args(args)
        .output()
        .unwrap()
}

fn curve<'a>(las: &'a stratiprior::formats::las::LasFile, m: &str) -> &'a [Option<f64>] {
    &las.curve(m).unwrap_or_else(|| panic!("no curve {m}")).data
}

#[test]
fn curves_source_passes_eps_and_delta_through() {
    let out = tempfile::tempdir().unwrap();
    let o = run(&[
        "condition",
        root().join("demo.toml").to_str().unwrap(),
        "--out",
        out.path().to_str().unwrap(),
        "--json",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let j: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let table = fs::read_to_string(root().join("demo_wells/wells.csv")).unwrap();
    let n_wells = table
        .lines()
        .skip(1)
        .filter(|l| !l.trim().is_empty())
        .count();
    assert_eq!(j["wells"].as_array().unwrap().len(), n_wells);
    for w in j["wells"].as_array().unwrap() {
        let name = w["well"].as_str().unwrap();
        let row = table
            .lines()
            .find(|l| l.starts_with(&format!("{name},")))
            .unwrap();
        let src = root()
            .join("demo_wells")
            .join(row.split(',').nth(1).unwrap().trim());
        let input = read_las(&src).unwrap();
        let cond = read_las(Path::new(w["path"].as_str().unwrap())).unwrap();
        // EPS and DELTA are the input curves, printed with 5 decimals
        for m in ["EPS", "DELTA"] {
            let a = curve(&input, m);
            let b = curve(&cond, m);
            assert_eq!(a.len(), b.len());
            for (x, y) in a.iter().zip(b) {
                match (x, y) {
                    (Some(x), Some(y)) => assert!((x - y).abs() <= 0.5e-5 + 1e-12, "{name} {m}"),
                    (None, None) => {}
                    _ => panic!("{name} {m}: null pattern differs"),
                }
            }
        }
        // every sample inside a zone has a stratigraphic coordinate and a layer
        let z = curve(&cond, "ZONE");
        let s = curve(&cond, "STRAT_S");
        assert_eq!(
            z.iter().filter(|v| v.is_some()).count(),
            w["samples_in_zones"].as_u64().unwrap() as usize
        );
        for (a, b) in z.iter().zip(s) {
            assert_eq!(a.is_some(), b.is_some());
            if let Some(s) = b {
                assert!(*s >= 0.0);
            }
        }
    }
}

#[test]
fn backus_source_obeys_layered_medium_invariants() {
    // Layer-induced anisotropy of isotropic layers has epsilon - delta >= 0
    // (Postma 1955; Berryman 1979); without intrinsic terms the conditioned
    // logs must obey it sample by sample.
    let d = tempfile::tempdir().unwrap();
    let text = fs::read_to_string(root().join("demo.toml")).unwrap();
    let text = text.replace(
        "[wells]",
        "[conditioning]\nsource = \"backus\"\nbackus_window = 12.0\n\n[wells]",
    );
    // paths in the project resolve against its folder: point them at the repository
    let text = text
        .replace(
            "\"demo_wells/",
            &format!("\"{}/demo_wells/", root().display()),
        )
        .replace(
            "\"demo_horizons/",
            &format!("\"{}/demo_horizons/", root().display()),
        )
        .replace(
            "\"demo_volumes/",
            &format!("\"{}/demo_volumes/", root().display()),
        );
    let p = d.path().join("p.toml");
    fs::write(&p, text).unwrap();
    let out = d.path().join("out");
    let o = run(&[
        "condition",
        p.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--json",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let j: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let mut checked = 0;
    for w in j["wells"].as_array().unwrap() {
        assert_eq!(w["source"], "backus");
        assert!((w["backus_window"].as_f64().unwrap() - 12.0).abs() < 1e-12);
        let cond = read_las(Path::new(w["path"].as_str().unwrap())).unwrap();
        for (e, dl) in curve(&cond, "EPS").iter().zip(curve(&cond, "DELTA")) {
            if let (Some(e), Some(dl)) = (e, dl) {
                // 5 printed decimals on each
                assert!(e - dl >= -1e-5, "eps {e} delta {dl}");
                checked += 1;
            }
        }
    }
    assert!(checked > 1000);
}
