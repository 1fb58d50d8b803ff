//! Shared harness of the reference tests: run a committed script of
//! `tests/reference/` that writes JSON from a reference library (live), or read
//! the golden file that script wrote earlier.
//!
//! Live when `STRATIPRIOR_PYTHON` names an interpreter; a failure to run it is a
//! test failure when `STRATIPRIOR_REQUIRE_PYTHON=1` (CI), a fallback to the golden
//! file otherwise. `STRATIPRIOR_REGEN_GOLDEN=1` copies a live result over the
//! golden file.

#![allow(dead_code)]

use serde_json::Value;
use std::path::{Path, PathBuf};
use std::process::Command;

/// A path inside the repository.
pub fn repo(rel: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(rel)
}

/// Read a JSON file, panicking with its path.
pub fn load(path: &Path) -> Value {
    let text = std::fs::read_to_string(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    serde_json::from_str(&text).unwrap_or_else(|e| panic!("{}: {e}", path.display()))
}

/// Run `tests/reference/<script> OUT.json` and return what it wrote, or `None`
/// where no interpreter is configured or it fails (allowed only without
/// `STRATIPRIOR_REQUIRE_PYTHON=1`). `libs` names the libraries for messages;
/// `golden` is regenerated from a live result with `STRATIPRIOR_REGEN_GOLDEN=1`.
pub fn live(script: &str, libs: &str, golden: &Path) -> Option<Value> {
    let require = std::env::var("STRATIPRIOR_REQUIRE_PYTHON").is_ok_and(|v| v == "1");
    let Ok(py) = std::env::var("STRATIPRIOR_PYTHON") else {
        assert!(
            !require,
            "STRATIPRIOR_REQUIRE_PYTHON=1 but STRATIPRIOR_PYTHON is not set"
        );
        return None;
    };
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("reference.json");
    let script = repo("tests/reference").join(script);
    match Command::new(&py).arg(&script).arg(&out).output() {
        Ok(o) if o.status.success() => {
            if std::env::var("STRATIPRIOR_REGEN_GOLDEN").is_ok_and(|v| v == "1") {
                std::fs::copy(&out, golden).unwrap();
            }
            Some(load(&out))
        }
        Ok(o) => {
            let msg = format!(
                "{py} {}: failed ({libs} installed?): {}",
                script.display(),
                String::from_utf8_lossy(&o.stderr)
            );
            assert!(!require, "{msg}");
            eprintln!("{msg}; using the golden file");
            None
        }
        Err(e) => {
            assert!(!require, "cannot run {py}: {e}");
            eprintln!("cannot run {py}: {e}; using the golden file");
            None
        }
    }
}

/// A JSON array of numbers.
pub fn arr(v: &Value) -> Vec<f64> {
    v.as_array()
        .unwrap()
        .iter()
        .map(|x| x.as_f64().unwrap())
        .collect()
}
