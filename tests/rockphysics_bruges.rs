//! Check 6: the moving-window Backus log against bruges (PyPI, Agile Scientific),
//! `bruges.rockphysics.anisotropy.backus_parameters`, `thomsen_parameters` and
//! `backus`, run by tests/reference/bruges_backus.py.
//!
//! bruges (0.5.4) smooths each layer property with `bruges.util.moving_average`:
//! edge padding by int(N/2) samples, then a boxcar of N = lb/dz samples, every
//! sample the same thickness. With N an odd integer that is our definition with
//! L = N dz on a regular log, [`EdgePolicy::Extend`] (edge padding) and
//! `min_coverage = 1` (bruges gives NaN in any window holding a null). For even
//! or non-integer N bruges' boxcar is off-centre or misnormalised (its issue 105,
//! per the task brief), so the script uses N = 21 and asserts it is an integer.
//!
//! Live when STRATIPRIOR_PYTHON names a Python with bruges; otherwise against
//! the committed golden tests/golden/rockphysics/bruges_backus.json that the same
//! script wrote. STRATIPRIOR_REQUIRE_PYTHON=1 turns a missing interpreter or
//! library into a failure.
//!
//! Tolerance: 1e-10 relative for stiffnesses, velocities and density, 1e-10
//! absolute for epsilon, delta, gamma (both sides are f64 sums over 21 samples;
//! measured: 1.7e-13 relative, 6.6e-14 absolute).

use std::path::PathBuf;
use std::process::Command;

use stratiprior::condition::backus::{backus_log, BackusLogOptions, EdgePolicy, WindowLength};

fn golden_path() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/golden/rockphysics/bruges_backus.json")
}

/// The reference JSON: from a live run when possible, else the golden file.
fn reference() -> (serde_json::Value, &'static str) {
    let require = std::env::var("STRATIPRIOR_REQUIRE_PYTHON").is_ok_and(|v| v == "1");
    match std::env::var("STRATIPRIOR_PYTHON") {
        Ok(python) if !python.is_empty() => {
            let dir = tempfile::tempdir().unwrap();
            let out = dir.path().join("bruges_backus.json");
            let script =
                PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/reference/bruges_backus.py");
            let run = Command::new(&python).arg(&script).arg(&out).output();
            match run {
                Ok(o) if o.status.success() => {
                    let text = std::fs::read_to_string(&out).unwrap();
                    return (serde_json::from_str(&text).unwrap(), "live bruges");
                }
                Ok(o) => {
                    let msg = format!(
                        "{python} {}: exit {:?}: {}",
                        script.display(),
                        o.status.code(),
                        String::from_utf8_lossy(&o.stderr)
                    );
                    assert!(!require, "STRATIPRIOR_REQUIRE_PYTHON=1 and {msg}");
                    eprintln!("falling back to the golden file: {msg}");
                }
                Err(e) => {
                    assert!(
                        !require,
                        "STRATIPRIOR_REQUIRE_PYTHON=1 and cannot run {python}: {e}"
                    );
                    eprintln!("falling back to the golden file: cannot run {python}: {e}");
                }
            }
        }
        _ => assert!(
            !require,
            "STRATIPRIOR_REQUIRE_PYTHON=1 but STRATIPRIOR_PYTHON is not set"
        ),
    }
    let text = std::fs::read_to_string(golden_path()).unwrap();
    (serde_json::from_str(&text).unwrap(), "golden file")
}

fn column(doc: &serde_json::Value, key: &str) -> Vec<Option<f64>> {
    doc[key]
        .as_array()
        .unwrap_or_else(|| panic!("reference has no array '{key}'"))
        .iter()
        .map(|v| v.as_f64())
        .collect()
}

#[test]
fn moving_window_matches_bruges() {
    let (doc, origin) = reference();
    let depth: Vec<f64> = column(&doc, "depth")
        .into_iter()
        .map(|d| d.unwrap())
        .collect();
    let (vp, vs, rho) = (column(&doc, "vp"), column(&doc, "vs"), column(&doc, "rho"));
    let n_win = doc["window_samples"].as_u64().unwrap() as f64;
    let dz = doc["dz"].as_f64().unwrap();
    assert_eq!(n_win % 2.0, 1.0, "the comparison needs an odd window");
    // The script's log is regular at dz.
    for w in depth.windows(2) {
        assert!(((w[1] - w[0]) - dz).abs() < 1e-9);
    }

    let mut opts = BackusLogOptions::new(WindowLength::Metres(n_win * dz));
    opts.edges = EdgePolicy::Extend;
    opts.min_coverage = 1.0;
    let ours = backus_log("BRUGES-1", &depth, &vp, &vs, &rho, &opts).unwrap();
    assert!(ours.rejected.is_empty());

    let keys = [
        "c11", "c13", "c33", "c44", "c66", "vp0", "vs0", "rho_avg", "epsilon", "delta", "gamma",
    ];
    let cols: Vec<Vec<Option<f64>>> = keys.iter().map(|k| column(&doc, k)).collect();
    let (mut worst_rel, mut worst_abs, mut valued, mut nulls) = (0.0f64, 0.0f64, 0, 0);
    for (i, s) in ours.samples.iter().enumerate() {
        // bruges: NaN wherever the window holds a null in any input that the
        // quantity uses; delta uses all three, so it marks a window with a null.
        let bruges_null = cols[9][i].is_none();
        assert_eq!(s.is_none(), bruges_null, "sample {i} ({origin})");
        let Some(s) = s else {
            nulls += 1;
            continue;
        };
        valued += 1;
        let c = &s.stiffness;
        let t = &s.thomsen;
        let mine = [
            c.c11, c.c13, c.c33, c.c44, c.c66, t.vp0, t.vs0, c.rho, t.epsilon, t.delta, t.gamma,
        ];
        for (j, (m, col)) in mine.iter().zip(&cols).enumerate() {
            let r = col[i].unwrap_or_else(|| panic!("bruges {} null at {i}", keys[j]));
            if j < 8 {
                worst_rel = worst_rel.max((m - r).abs() / r.abs());
            } else {
                worst_abs = worst_abs.max((m - r).abs());
            }
        }
    }
    eprintln!(
        "bruges {} ({origin}): {valued} windows compared, {nulls} null; max rel diff \
         {worst_rel:e} (stiffness, velocity, density), max abs diff {worst_abs:e} (Thomsen)",
        doc["bruges_version"]
    );
    assert!(
        valued >= 300 && nulls >= 60,
        "{valued} valued, {nulls} null"
    );
    assert!(worst_rel <= 1e-10, "relative difference {worst_rel:e}");
    assert!(worst_abs <= 1e-10, "absolute difference {worst_abs:e}");
}
