//! The valid LAS corpus (tests/data/las/valid) read by our reader and by the
//! reference library lasio (PyPI, 0.31, default settings) must agree on
//! everything lasio reports: version, wrap, NULL, index unit, every header
//! item of ~V ~W ~C ~P (mnemonic, unit, value, description), the ~O text, and
//! every curve (mnemonic, unit, API code, description, every sample).
//!
//! Samples are compared exactly (same f64 bits; NULL positions equal).
//! Header values are compared through lasio's own number conversion.
//!
//! Live against lasio when STRATIPRIOR_PYTHON is set (then the committed golden
//! files must also equal the live output, so they cannot go stale); otherwise
//! against tests/golden/las/*.json written by tests/reference/lasio_dump.py.

mod las_common;

use las_common::{compare, golden, root, run_lasio, source, Counts, Source};
use std::path::PathBuf;
use stratiprior::formats::las::read_las;

fn valid_files() -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(root().join("tests/data/las/valid"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "las"))
        .collect();
    v.sort();
    v
}

#[test]
fn valid_corpus_agrees_with_lasio() {
    let files = valid_files();
    assert!(files.len() >= 15, "corpus too small: {}", files.len());
    let golden_dir = root().join("tests/golden/las");
    let live = match source() {
        Source::Live(py) => Some(run_lasio(&py, &files)),
        Source::Golden => None,
    };
    let mut counts = Counts::default();
    let mut bad = Vec::new();
    for f in &files {
        let name = f.file_name().unwrap().to_string_lossy().into_owned();
        let stem = f.file_stem().unwrap().to_string_lossy().into_owned();
        let gpath = golden_dir.join(format!("{stem}.json"));
        let theirs = match &live {
            Some(m) => {
                let t = m.get(&name).cloned().expect("lasio dump for every file");
                let g = golden(&gpath);
                if g != t {
                    bad.push(format!(
                        "{}: committed golden differs from live lasio output; regenerate it",
                        gpath.display()
                    ));
                }
                t
            }
            None => golden(&gpath),
        };
        let las = match read_las(f) {
            Ok(l) => l,
            Err(e) => {
                bad.push(format!("{name}: our reader failed: {e}"));
                continue;
            }
        };
        bad.extend(compare(&name, &las, &theirs, &mut counts));
    }
    println!(
        "lasio agreement ({}): {} files, {} curves, {} samples ({} null) compared exactly, {} header items",
        if live.is_some() { "live" } else { "golden" },
        counts.files,
        counts.curves,
        counts.samples,
        counts.nulls,
        counts.header_items
    );
    assert!(
        bad.is_empty(),
        "{} mismatches:\n{}",
        bad.len(),
        bad.join("\n")
    );
    assert_eq!(counts.files, files.len());
}

#[test]
fn corpus_features_are_really_there() {
    // Guard against a corpus that silently loses the variants it is meant to
    // cover (each line is a feature the task requires).
    let get = |n: &str| read_las(&root().join("tests/data/las/valid").join(n)).unwrap();
    let w = get("v20_wrapped.las");
    assert!(w.wrapped && w.curves.len() == 8 && w.samples() == 5);
    let w2 = get("wrapped_several_lines.las");
    assert!(w2.wrapped && w2.curves.len() == 17);
    assert_eq!(
        get("v12_value_in_description.las")
            .well_item("COMP")
            .unwrap()
            .value,
        "GREYFELL PETROLEUM LTD"
    );
    assert_eq!(get("v12_no_space_before_colon.las").null_value, -9999.0);
    assert_eq!(
        get("many_curves_ft.las").index_unit_to_metres().unwrap(),
        0.3048
    );
    assert_eq!(
        get("v12_feet_f_unit.las").index_unit_to_metres().unwrap(),
        0.3048
    );
    let d = get("duplicate_mnemonics.las");
    let names: Vec<&str> = d.curves.iter().map(|c| c.mnemonic.as_str()).collect();
    assert_eq!(names, ["DEPT", "GR:1", "RES:1", "GR:2", "GR:3", "RES:2"]);
    assert_eq!(d.curve("gr:3").unwrap().description, "GAMMA RAY RUN 3");
    assert_eq!(d.curve("GR").unwrap().mnemonic, "GR:1");
    let dec = get("decreasing_depth.las");
    assert!(dec.index().data.windows(2).all(|w| w[1] < w[0]));
    let l = get("lowercase_mnemonics.las");
    assert_eq!(l.curve("nphi").unwrap().original_mnemonic, "nPhi");
    assert!(get("other_section.las")
        .sections
        .other
        .unwrap()
        .contains("12:30"));
    assert_eq!(
        get("parameters_section.las")
            .parameter("PRES")
            .unwrap()
            .unit,
        "1000 LBF"
    );
    assert_eq!(
        get("latin1_description.las")
            .well_item("LOC")
            .unwrap()
            .value,
        "F\u{f8}rde Sound"
    );
    assert_eq!(get("bom_utf8.las").curve("TEMP").unwrap().unit, "\u{b0}C");
    // Index in metres: FT * 0.3048 (international foot, exact).
    let ft = get("v12_feet_f_unit.las");
    assert_eq!(
        ft.index_in_metres().unwrap(),
        vec![5600.0 * 0.3048, 5600.5 * 0.3048, 5601.0 * 0.3048]
    );
    // The LAS 1.2 value-after-colon convention cuts a time with a colon: lasio
    // does the same; we warn.
    assert!(
        ft.warnings.iter().any(|w| w.contains("may have been cut")),
        "{:?}",
        ft.warnings
    );
}

#[test]
fn stats_and_json() {
    let las = read_las(&root().join("tests/data/las/valid/null_999_25_variants.las")).unwrap();
    let gr = las.curve("GR").unwrap().stats();
    // Column GR: -999.25, -999.2500, -999.24, 999.25, -9.9925e2 -> 3 nulls.
    assert_eq!(
        (gr.samples, gr.non_null, gr.min, gr.max),
        (5, 2, Some(-999.24), Some(999.25))
    );
    let j = serde_json::to_value(las.summary()).unwrap();
    assert_eq!(j["curves"][1]["non_null"], 2);
    assert_eq!(j["samples"], 5);
    let full = serde_json::to_value(&las).unwrap();
    assert!(full["curves"][1]["data"][0].is_null());
    assert_eq!(full["curves"][1]["data"][2], -999.24);
}
