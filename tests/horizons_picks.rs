//! Picks reader: the horizon format of the design overview (x y z a line; spaces,
//! tabs or commas; `#` comments) and the error rules of the helper rules (file and
//! line named). Expected values are written out by hand from the test files.

use std::path::PathBuf;
use stratiprior::ingest::picks::read_picks;
use stratiprior::Error;

fn write(dir: &tempfile::TempDir, name: &str, text: &[u8]) -> PathBuf {
    let p = dir.path().join(name);
    std::fs::write(&p, text).unwrap();
    p
}

/// The line number and message of an input error.
fn input_error(e: Error) -> (Option<usize>, String, String) {
    let shown = e.to_string();
    match e {
        Error::Input { loc, msg } => (loc.line, msg, shown),
        other => panic!("expected an input error, got {other:?}"),
    }
}

#[test]
fn reads_all_separator_comment_and_line_end_variants() {
    let dir = tempfile::tempdir().unwrap();
    let text = "\u{feff}# exported picks\r\n\
                x y z\r\n\
                \r\n\
                1000 2000 1500.5\r\n\
                1001.5\t2001\t1501   # trailing comment\n\
                1002,2002,1502\n\
                1003, 2003 ,\t1503\n\
                \t  1004   2004,1504e0  \n\
                # 9 9 9 (commented out)\n\
                -1.5e3 +2.5E3 .5\n";
    let p = write(&dir, "a.xyz", text.as_bytes());
    let picks = read_picks(&p, false).unwrap();
    assert_eq!(picks.path, p);
    assert_eq!(
        picks.points,
        vec![
            [1000.0, 2000.0, 1500.5],
            [1001.5, 2001.0, 1501.0],
            [1002.0, 2002.0, 1502.0],
            [1003.0, 2003.0, 1503.0],
            [1004.0, 2004.0, 1504.0],
            [-1500.0, 2500.0, 0.5],
        ]
    );
    assert!(picks.warnings.is_empty());
}

#[test]
fn comma_header_and_elevation_sign() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(&dir, "b.csv", b"X,Y,Z\n10,20,-1500\n11,21,-1510.25\n");
    let picks = read_picks(&p, true).unwrap();
    // z is elevation (positive up) in the file: TVDSS positive down is its negative
    assert_eq!(
        picks.points,
        vec![[10.0, 20.0, 1500.0], [11.0, 21.0, 1510.25]]
    );
    let picks = read_picks(&p, false).unwrap();
    assert_eq!(picks.points[0], [10.0, 20.0, -1500.0]);
}

#[test]
fn malformed_lines_name_the_line() {
    let dir = tempfile::tempdir().unwrap();
    let cases: &[(&str, usize, &str)] = &[
        ("1 2 3\nx y z\n4 5 6\n", 2, "header"),
        ("# c\n1 2 3\n1 2 3 4\n", 3, "expected 3 columns x y z"),
        ("1 2 3\n\n1 2\n", 3, "expected 3 columns x y z"),
        ("1 2 3\n4 5 abc\n", 2, "z is not a number"),
        ("1 2 3\n4 5x 6\n", 2, "y is not a number"),
        ("1 2 3\n4 nan 6\n", 2, "y is not a finite number"),
        ("x y z\n4 5 inf\n", 2, "z is not a finite number"),
        ("1,2,3\n4,,5,6\n", 2, "empty value"),
        ("1,2,3\r\n4,5,6,\r\n", 2, "empty value"),
        ("1 2 3\n4 5 6 # ok\n7 8 9 10 # four\n", 3, "found 4 values"),
        ("1,5 2,5 3,5\n", 1, "decimal commas are not supported"),
    ];
    for (k, (text, line, needle)) in cases.iter().enumerate() {
        let p = write(&dir, &format!("bad{k}.xyz"), text.as_bytes());
        let e = read_picks(&p, false).unwrap_err();
        let (l, msg, shown) = input_error(e);
        assert_eq!(l, Some(*line), "case {k}: {shown}");
        assert!(
            msg.contains(needle),
            "case {k}: {msg:?} should contain {needle:?}"
        );
        // the message shown to the user names file and line
        assert!(
            shown.starts_with(&format!("{}:{}:", p.display(), line)),
            "{shown}"
        );
    }
}

#[test]
fn empty_missing_and_non_utf8_files() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(&dir, "empty.xyz", b"# nothing\n\nx y z\n");
    let (l, msg, _) = input_error(read_picks(&p, false).unwrap_err());
    assert_eq!(l, None);
    assert!(msg.contains("no x y z points"), "{msg}");

    let p = write(&dir, "latin1.xyz", b"1 2 3\n4 5 6 # caf\xe9\n");
    let (l, msg, _) = input_error(read_picks(&p, false).unwrap_err());
    assert_eq!(l, Some(2));
    assert!(msg.contains("UTF-8"), "{msg}");

    let missing = dir.path().join("nope.xyz");
    match read_picks(&missing, false).unwrap_err() {
        Error::Io { path, .. } => assert_eq!(path, missing),
        other => panic!("expected an I/O error, got {other:?}"),
    }
}

#[test]
fn duplicate_positions_are_merged_and_reported() {
    let dir = tempfile::tempdir().unwrap();
    let text = "0 0 100\n1 0 200\n0 0 100\n1 0 210\n2 0 300\n1 0 230\n-0 0 100\n";
    let p = write(&dir, "dup.xyz", text.as_bytes());
    let picks = read_picks(&p, false).unwrap();
    // (0,0) three times with z 100 (-0 is 0): one point; (1,0) with 200, 210, 230: mean 213.33..
    assert_eq!(picks.points.len(), 3);
    assert_eq!(picks.points[0], [0.0, 0.0, 100.0]);
    assert_eq!(picks.points[1][..2], [1.0, 0.0]);
    assert!((picks.points[1][2] - 640.0 / 3.0).abs() < 1e-12);
    assert_eq!(picks.points[2], [2.0, 0.0, 300.0]);
    assert_eq!(picks.warnings.len(), 2, "{:?}", picks.warnings);
    assert!(
        picks.warnings[0].starts_with("2 repeated points"),
        "{:?}",
        picks.warnings
    );
    assert!(picks.warnings[1].contains("mean z"), "{:?}", picks.warnings);
    assert!(
        picks.warnings[1].contains("spread 30 m"),
        "{:?}",
        picks.warnings
    );
    assert!(
        picks.warnings[1].contains("lines 2 and 6"),
        "{:?}",
        picks.warnings
    );
}
