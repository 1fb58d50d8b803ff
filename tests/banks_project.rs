//! `[banks]` in the project file: default, accepted values, and clear errors.

use std::fs;
use std::path::PathBuf;
use stratiprior::project::{Project, DEFAULT_BANK_COUNT};

fn load_with(extra: &str) -> Result<Project, String> {
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let d = tempfile::tempdir().unwrap();
    let text = fs::read_to_string(root.join("demo.toml")).unwrap();
    let p = d.path().join("demo.toml");
    fs::write(&p, format!("{text}\n{extra}\n")).unwrap();
    Project::load(&p).map_err(|e| e.to_string())
}

#[test]
fn bank_count_defaults_and_reads() {
    assert_eq!(load_with("").unwrap().bank_count, DEFAULT_BANK_COUNT);
    assert_eq!(DEFAULT_BANK_COUNT, 20000);
    assert_eq!(load_with("[banks]\ncount = 500").unwrap().bank_count, 500);
    assert_eq!(load_with("[banks]").unwrap().bank_count, DEFAULT_BANK_COUNT);
}

#[test]
fn bad_bank_settings_are_refused_with_the_key_named() {
    for bad in [
        "[banks]\ncount = 0",
        "[banks]\ncount = -3",
        "[banks]\ncount = 100000000",
    ] {
        let e = load_with(bad).unwrap_err();
        assert!(e.contains("banks.count") && e.contains("demo.toml"), "{e}");
    }
    let e = load_with("[banks]\nsize = 10").unwrap_err();
    assert!(e.contains("unknown field `size`"), "{e}");
    // a fraction: the parser names the file and line of `count` and the expected type
    let e = load_with("[banks]\ncount = 2.5").unwrap_err();
    assert!(
        e.contains("demo.toml:") && e.contains("expected i64"),
        "{e}"
    );
}
