//! The demo files as the reference libraries from PyPI read them: lasio 0.31
//! (LAS), segyio 1.9 (SEG-Y) and numpy (.npy), through
//! tests/reference/demo_reference.py.
//!
//! With `STRATIPRIOR_PYTHON` set, the script runs on a fresh generation
//! (including the truth `.npy` files). Without it, the golden summary the
//! script wrote from the committed demo is used (the committed demo equals a
//! fresh generation, tests/demo_generate.rs). With
//! `STRATIPRIOR_REQUIRE_PYTHON=1` a missing interpreter or library fails.

mod demo_support;

use demo_support::{fresh, read_npy_f32, read_simple_las, repo};
use serde_json::Value;
use std::path::Path;
use stratiprior::demo::volumes::npy_f32;
use stratiprior::demo::wells::LasFlavour;
use stratiprior::project::Project;

fn require() -> bool {
    std::env::var("STRATIPRIOR_REQUIRE_PYTHON").as_deref() == Ok("1")
}

/// The reference summary: live from Python on `dir`, or the golden file.
fn reference(dir: &Path) -> (Value, bool) {
    let script = repo().join("tests/reference/demo_reference.py");
    match std::env::var("STRATIPRIOR_PYTHON") {
        Ok(py) => {
            let out = std::process::Command::new(&py)
                .arg(&script)
                .arg(dir)
                .output();
            match out {
                Ok(o) if o.status.success() => {
                    return (
                        serde_json::from_slice(&o.stdout).expect("script JSON"),
                        true,
                    )
                }
                Ok(o) => {
                    let msg = String::from_utf8_lossy(&o.stderr).to_string();
                    assert!(!require(), "reference script failed: {msg}");
                    eprintln!("reference script failed ({msg}); using the golden summary");
                }
                Err(e) => {
                    assert!(!require(), "cannot run {py}: {e}");
                    eprintln!("cannot run {py}: {e}; using the golden summary");
                }
            }
        }
        Err(_) => assert!(
            !require(),
            "STRATIPRIOR_REQUIRE_PYTHON=1 but STRATIPRIOR_PYTHON is not set"
        ),
    }
    let text = std::fs::read_to_string(repo().join("tests/reference/demo_reference.json")).unwrap();
    (serde_json::from_str(&text).unwrap(), false)
}

fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * a.abs().max(b.abs()).max(1e-12)
}

/// Decode a SEG-Y volume of our layout (3600 header bytes, then per trace 240
/// header bytes and big-endian IEEE float32 samples; SEG-Y rev 1).
fn segy_stats(path: &Path, ns: usize) -> (f64, f64, f64) {
    let b = std::fs::read(path).unwrap();
    let (mut s, mut n, mut lo, mut hi) = (0.0, 0usize, f64::INFINITY, f64::NEG_INFINITY);
    for tr in b[3600..].chunks_exact(240 + 4 * ns) {
        for c in tr[240..].chunks_exact(4) {
            let v = f64::from(f32::from_be_bytes([c[0], c[1], c[2], c[3]]));
            s += v;
            n += 1;
            lo = lo.min(v);
            hi = hi.max(v);
        }
    }
    (s / n as f64, lo, hi)
}

#[test]
fn reference_libraries_read_the_demo_as_generated() {
    let (dir, report) = fresh();
    let (r, live) = reference(dir.path());
    let p = Project::load(&dir.path().join("demo.toml")).unwrap();
    let g = &p.grid;

    // LAS files, as lasio reads them
    for w in &report.wells {
        let file = format!("{}.las", w.name);
        let s = &r["las"][&file];
        assert!(s.is_object(), "no reference summary of {file}");
        let (version, wrap, unit) = match w.las {
            LasFlavour::Las12 => ("1.2", "NO", "M"),
            LasFlavour::Las20Wrapped => ("2.0", "YES", "M"),
            LasFlavour::Las20Feet => ("2.0", "NO", "FT"),
            LasFlavour::Las20Metres => ("2.0", "NO", "M"),
        };
        assert_eq!(s["version"], version, "{file}");
        assert_eq!(s["wrap"], wrap, "{file}");
        assert_eq!(s["index_unit"], unit, "{file}");
        assert_eq!(s["well"], w.name.as_str());
        assert_eq!(s["rows"].as_u64().unwrap() as usize, w.samples, "{file}");
        let to_m = if unit == "FT" { 0.3048 } else { 1.0 };
        assert!(close(
            s["first"].as_f64().unwrap() * to_m,
            w.logged_md.0,
            1e-9
        ));
        assert!(close(
            s["last"].as_f64().unwrap() * to_m,
            w.logged_md.1,
            1e-9
        ));
        // the curves, their nulls and means, against an independent token reader
        let l = read_simple_las(&dir.path().join(&w.las_file));
        let curves = s["curves"].as_array().unwrap();
        assert_eq!(curves.len(), l.mnemonics.len() - 1);
        for (k, c) in curves.iter().enumerate() {
            assert_eq!(c["mnemonic"], l.mnemonics[k + 1].as_str(), "{file}");
            let vals: Vec<f64> = l.rows.iter().filter_map(|row| row[k + 1]).collect();
            let nulls = l.rows.len() - vals.len();
            assert_eq!(c["nulls"].as_u64().unwrap() as usize, nulls, "{file}");
            let mean = vals.iter().sum::<f64>() / vals.len() as f64;
            assert!(
                close(c["mean"].as_f64().unwrap(), mean, 1e-9),
                "{file} {}",
                c["mnemonic"]
            );
        }
        // the gap well: 60 m of nulls at 0.5 m are 120 null rows in every curve
        if w.gap_md.is_some() {
            assert!(curves.iter().all(|c| c["nulls"] == 120), "{file}");
        }
    }
    assert_eq!(r["las"].as_object().unwrap().len(), report.wells.len());

    // SEG-Y volumes, as segyio reads them with inline at byte 189, crossline at 193
    for v in ["background_vp0.sgy", "facies.sgy"] {
        let s = &r["segy"][v];
        assert_eq!(s["inlines"][0], g.inline_first);
        assert_eq!(s["inlines"][1], g.inline_count);
        assert_eq!(s["xlines"][0], g.xline_first);
        assert_eq!(s["xlines"][1], g.xline_count);
        // depth sampling stored as milliseconds reads as metres (design overview)
        assert!(close(s["samples"][0].as_f64().unwrap(), g.z0, 1e-12));
        assert!(close(s["samples"][1].as_f64().unwrap(), g.z_last(), 1e-12));
        assert_eq!(s["samples"][2], g.z_count);
        let (mean, lo, hi) = segy_stats(&dir.path().join("demo_volumes").join(v), g.z_count);
        assert!(close(s["mean"].as_f64().unwrap(), mean, 1e-9), "{v}");
        assert!(
            close(s["min"].as_f64().unwrap(), lo, 1e-12)
                && close(s["max"].as_f64().unwrap(), hi, 1e-12)
        );
    }
    assert_eq!(r["segy"]["facies.sgy"]["min"], 1.0);
    assert_eq!(r["segy"]["facies.sgy"]["max"], 3.0);

    // truth arrays, as numpy.load reads them (live only: they are not committed)
    if live {
        let truth = dir.path().join("demo_truth");
        let npy = r["npy"].as_object().unwrap();
        assert_eq!(npy.len(), 11);
        for (name, s) in npy {
            let (shape, data) = read_npy_f32(&truth.join(name));
            assert_eq!(s["dtype"], "float32");
            let got: Vec<usize> = s["shape"]
                .as_array()
                .unwrap()
                .iter()
                .map(|x| x.as_u64().unwrap() as usize)
                .collect();
            assert_eq!(got, shape, "{name}");
            let mean = data.iter().map(|x| f64::from(*x)).sum::<f64>() / data.len() as f64;
            assert!(close(s["mean"].as_f64().unwrap(), mean, 1e-9), "{name}");
        }
    }
}

#[test]
fn npy_writer_matches_numpy_save() {
    // tests/reference/npy_arange_2x3x4.npy was written by
    // numpy.save(np.arange(24, dtype='<f4').reshape(2, 3, 4)) (demo_reference.py --golden).
    let golden = std::fs::read(repo().join("tests/reference/npy_arange_2x3x4.npy")).unwrap();
    let data: Vec<f32> = (0..24).map(|k| k as f32).collect();
    assert_eq!(npy_f32(&[2, 3, 4], &data), golden);
}
