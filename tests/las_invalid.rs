//! Malformed LAS files: each must give the expected kind of error, at the
//! expected line, with a message that says what is wrong.
//!
//! The rules behind the expectations are the CWLS LAS 2.0 specification
//! (sections ~V, ~W, ~C, ~A required; ~V first and ~A last; VERS 1.2/2.0;
//! WRAP YES/NO; STRT/STOP/STEP/NULL in ~W; one value per curve per depth step;
//! in wrap mode the index alone on the first line of a depth step) and the
//! choices documented in `stratiprior::formats::las` (index strictly monotonic,
//! never NULL; LAS 3.0 refused as unsupported).

use std::path::{Path, PathBuf};
use stratiprior::formats::las::{parse_las, read_las};
use stratiprior::Error;

#[derive(Debug, Clone, Copy, PartialEq)]
enum Kind {
    Input,
    Unsupported,
}

fn dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data/las/invalid")
}

const CASES: &[(&str, Kind, Option<usize>, &str)] = &[
    ("empty.las", Kind::Input, None, "file is empty"),
    ("whitespace_only.las", Kind::Input, None, "file is empty"),
    ("comments_only.las", Kind::Input, None, "no section"),
    (
        "binary_garbage.las",
        Kind::Input,
        Some(1),
        "control character",
    ),
    ("lidar_point_cloud.las", Kind::Input, None, "LiDAR"),
    (
        "text_before_version.las",
        Kind::Input,
        Some(1),
        "before the first section",
    ),
    (
        "missing_version_section.las",
        Kind::Input,
        Some(1),
        "expected ~V",
    ),
    ("version_not_first.las", Kind::Input, Some(1), "expected ~V"),
    ("missing_well_section.las", Kind::Input, None, "no ~W"),
    ("missing_curve_section.las", Kind::Input, None, "no ~C"),
    ("missing_data_section.las", Kind::Input, None, "no ~A"),
    (
        "data_without_rows.las",
        Kind::Input,
        Some(13),
        "no data rows",
    ),
    (
        "no_curves_listed.las",
        Kind::Input,
        Some(9),
        "lists no curves",
    ),
    (
        "short_row.las",
        Kind::Input,
        Some(15),
        "has 2 values (too few); expected 3",
    ),
    (
        "long_row.las",
        Kind::Input,
        Some(16),
        "has 4 values (too many); expected 3",
    ),
    (
        "curve_count_mismatch.las",
        Kind::Input,
        Some(15),
        "has 3 values (too few); expected 4, one per curve of the ~C section (line 9)",
    ),
    (
        "wrapped_truncated.las",
        Kind::Input,
        Some(19),
        "ends inside the depth step starting at line 19: it has 4 of 5 values",
    ),
    (
        "wrapped_missing_value.las",
        Kind::Input,
        Some(20),
        "index alone on its line, but this line has 2 values",
    ),
    (
        "wrapped_index_not_alone.las",
        Kind::Input,
        Some(16),
        "index alone on its line",
    ),
    (
        "non_numeric_value.las",
        Kind::Input,
        Some(15),
        "value 'abc' (item 2 on the line) is not a number",
    ),
    (
        "comma_decimal_mark.las",
        Kind::Input,
        Some(14),
        "value '50,5'",
    ),
    (
        "overflowing_value.las",
        Kind::Input,
        Some(15),
        "value '1e999'",
    ),
    (
        "bad_strt.las",
        Kind::Input,
        Some(5),
        "STRT value 'ABC' is not a number",
    ),
    (
        "bad_stop.las",
        Kind::Input,
        Some(6),
        "STOP value '100.2.3' is not a number",
    ),
    (
        "empty_step.las",
        Kind::Input,
        Some(7),
        "STEP value '' is not a number",
    ),
    ("missing_stop.las", Kind::Input, Some(4), "has no STOP item"),
    (
        "duplicate_strt.las",
        Kind::Input,
        Some(6),
        "STRT is given twice (lines 5 and 6)",
    ),
    (
        "bad_null.las",
        Kind::Input,
        Some(8),
        "NULL value 'NONE' is not a number",
    ),
    ("missing_null.las", Kind::Input, Some(4), "has no NULL item"),
    (
        "wrap_not_yes_no.las",
        Kind::Input,
        Some(3),
        "WRAP value 'MAYBE' is not YES or NO",
    ),
    ("wrap_missing.las", Kind::Input, Some(1), "no WRAP item"),
    ("vers_missing.las", Kind::Input, Some(1), "no VERS item"),
    ("vers_unknown.las", Kind::Input, Some(2), "VERS value '2.5'"),
    (
        "las3.las",
        Kind::Unsupported,
        Some(2),
        "LAS 3.0 is not supported",
    ),
    (
        "dlm_comma.las",
        Kind::Unsupported,
        Some(4),
        "only space-delimited data",
    ),
    (
        "depth_reverses.las",
        Kind::Input,
        Some(16),
        "reverses the direction of the index",
    ),
    (
        "depth_repeats.las",
        Kind::Input,
        Some(16),
        "repeats the depth at line 15",
    ),
    ("null_index.las", Kind::Input, Some(15), "is the NULL value"),
    (
        "duplicate_well_section.las",
        Kind::Input,
        Some(9),
        "second ~W section (the first is at line 4)",
    ),
    (
        "section_after_data.las",
        Kind::Input,
        Some(17),
        "~A must be the last section",
    ),
    (
        "bad_header_line.las",
        Kind::Input,
        Some(9),
        "cannot read header line 'JUSTAWORD'",
    ),
    (
        "ctrlz_inside.las",
        Kind::Input,
        Some(9),
        "end-of-file byte 0x1A is followed by more text",
    ),
];

#[test]
fn every_malformed_file_is_refused_with_a_clear_error() {
    let mut failures = Vec::new();
    for &(name, kind, line, fragment) in CASES {
        let path = dir().join(name);
        let got = read_las(&path);
        let (k, loc, msg) = match got {
            Ok(_) => {
                failures.push(format!("{name}: read without error"));
                continue;
            }
            Err(Error::Input { loc, msg }) => (Kind::Input, loc, msg),
            Err(Error::Unsupported { loc, msg }) => (Kind::Unsupported, loc, msg),
            Err(e) => {
                failures.push(format!("{name}: unexpected error kind: {e}"));
                continue;
            }
        };
        if k != kind {
            failures.push(format!("{name}: kind {k:?}, expected {kind:?} ({msg})"));
        }
        if loc.path != path {
            failures.push(format!(
                "{name}: error names {:?}, expected the file",
                loc.path
            ));
        }
        if loc.line != line {
            failures.push(format!(
                "{name}: line {:?}, expected {line:?} ({msg})",
                loc.line
            ));
        }
        if !msg.contains(fragment) {
            failures.push(format!("{name}: message '{msg}' lacks '{fragment}'"));
        }
        // The displayed error names the file and line.
        let shown = match read_las(&path) {
            Err(e) => e.to_string(),
            Ok(_) => String::new(),
        };
        let want = match line {
            Some(l) => format!("{}:{l}: ", path.display()),
            None => format!("{}: ", path.display()),
        };
        if !shown.starts_with(&want) {
            failures.push(format!("{name}: displayed as '{shown}'"));
        }
    }
    // Every file in the folder is covered by a case.
    let mut names: Vec<String> = std::fs::read_dir(dir())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    names.sort();
    for n in &names {
        if !CASES.iter().any(|c| c.0 == n) {
            failures.push(format!("{n}: no expectation"));
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
    println!("{} malformed LAS files refused as expected", CASES.len());
}

#[test]
fn missing_file_is_an_io_error() {
    let p = dir().join("does_not_exist.las");
    match read_las(&p) {
        Err(Error::Io { path, .. }) => assert_eq!(path, p),
        other => panic!("expected an I/O error, got {other:?}"),
    }
}

#[test]
fn warnings_for_header_that_contradicts_data() {
    // STRT/STOP/STEP contradicting the data are accepted (lasio accepts them
    // too) but reported; the numbers are the data's.
    let text = "~V\nVERS. 2.0 : v\nWRAP. NO : w\n~W\nSTRT.M 99.0 : start\nSTOP.M 100.2 : stop\n\
                STEP.M 0.5 : step\nNULL. -999.25 : null\n~C\nDEPT.FT : depth\nGR.GAPI : gr\n\
                ~A\n100.0 1\n100.1 2\n100.2 3\n";
    let las = parse_las(text.as_bytes(), Path::new("contradicts.las")).unwrap();
    let w = las.warnings.join("\n");
    assert!(
        w.contains("line 5: STRT is 99 but the data's first depth is 100"),
        "{w}"
    );
    assert!(
        w.contains("line 7: STEP is 0.5 but 2 of 2 depth intervals differ"),
        "{w}"
    );
    assert!(
        w.contains("STRT is in 'M' but the index curve is in 'FT'"),
        "{w}"
    );
    assert!(!w.contains("STOP"), "{w}");
    assert_eq!(
        las.index().data,
        vec![Some(100.0), Some(100.1), Some(100.2)]
    );
    // The depth unit is ambiguous: the helper refuses to guess.
    let e = las.index_unit_to_metres().unwrap_err().to_string();
    assert!(
        e.contains("contradicts.las:5: ") && e.contains("ambiguous"),
        "{e}"
    );
}

#[test]
fn index_unit_that_is_not_a_depth() {
    let text = "~V\nVERS. 2.0 : v\nWRAP. NO : w\n~W\nSTRT.S 0 : start\nSTOP.S 1 : stop\n\
                STEP.S 1 : step\nNULL. -999.25 : null\n~C\nTIME.S : time\n~A\n0\n1\n";
    let las = parse_las(text.as_bytes(), Path::new("time.las")).unwrap();
    let e = las.index_unit_to_metres().unwrap_err().to_string();
    assert!(e.contains("unit 'S', which is not a depth unit"), "{e}");
}
