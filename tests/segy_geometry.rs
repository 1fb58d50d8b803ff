//! Reading a volume onto the survey grid: every kind of geometry difference
//! is named exactly; traces in any order are placed by inline/crossline.
//! Also the `inspect` summary and grid inference of a file we wrote.

mod segy_support;

use segy_support::*;
use std::path::{Path, PathBuf};
use stratiprior::formats::segy::{
    infer_grid, read_volume_on_grid, summarize, write_volume, VolumeMeta,
};
use stratiprior::SurveyGrid;

fn meta() -> VolumeMeta {
    VolumeMeta {
        property: "delta".into(),
        statistic: "mean".into(),
        unit: "1".into(),
        notes: vec![],
    }
}

fn written(dir: &Path) -> (PathBuf, SurveyGrid, Vec<f32>) {
    let grid = utm_grid();
    let data = test_values(grid.trace_count() * grid.z_count, 3);
    let p = dir.join("v.sgy");
    write_volume(&p, &grid, &meta(), &data).unwrap();
    (p, grid, data)
}

fn mismatch(path: &Path, grid: &SurveyGrid) -> String {
    match read_volume_on_grid(path, grid) {
        Ok(_) => panic!("accepted a mismatching grid {grid:?}"),
        Err(e) => e.to_string(),
    }
}

fn has(msg: &str, part: &str) {
    assert!(msg.contains(part), "message:\n{msg}\nlacks:\n{part}");
}

#[test]
fn each_header_difference_is_named() {
    let dir = tempfile::tempdir().unwrap();
    let (p, grid, _) = written(dir.path());

    let mut g = grid.clone();
    g.inline_count = 5;
    let e = mismatch(&p, &g);
    has(&e, "v.sgy: volume does not match the survey grid");
    has(&e, "inline range 1001..1004 in file, 1001..1005 in survey");
    has(
        &e,
        "5 of 25 survey traces missing from the file: (il 1005, xl 2001)",
    );

    let mut g = grid.clone();
    g.xline_first = 2000;
    let e = mismatch(&p, &g);
    has(
        &e,
        "crossline range 2001..2005 in file, 2000..2004 in survey",
    );

    let mut g = grid.clone();
    g.z_count = 8;
    has(&mismatch(&p, &g), "sample count 7 in file, 8 in survey");

    let mut g = grid.clone();
    g.z0 = 1490.0;
    has(
        &mismatch(&p, &g),
        "z0 1500 m in file (delay recording time read as metres), 1490 m in survey",
    );

    let mut g = grid.clone();
    g.dz = 2.0;
    has(
        &mismatch(&p, &g),
        "dz 2.5 m in file (sample interval 2500 read as millimetres), 2 m in survey",
    );

    // several at once: all listed
    let mut g = grid.clone();
    g.dz = 2.0;
    g.z_count = 9;
    g.inline_first = 1000;
    let e = mismatch(&p, &g);
    has(&e, "sample count 7 in file, 9 in survey");
    has(&e, "dz 2.5 m in file");
    has(&e, "inline range 1001..1004 in file, 1000..1003 in survey");
}

#[test]
fn coordinates_beyond_the_tolerance_are_named() {
    let dir = tempfile::tempdir().unwrap();
    let (p, grid, data) = written(dir.path());
    // a survey whose origin is 12.3 m east of the file's
    let mut g = grid.clone();
    g.x0 += 12.3;
    let e = mismatch(&p, &g);
    let (x, y) = g.node_xy(0.0, 0.0);
    has(
        &e,
        &format!(
            "trace 1 (il 1001, xl 2001) CDP X/Y ({:.2}, {:.2}) is 12.30 m from the survey node ({x:.2}, {y:.2})",
            grid.x0, grid.y0
        ),
    );
    has(
        &e,
        "20 traces farther than the tolerance 0.124 m (1% of the smaller grid spacing, at least 0.01 m), largest 12.30 m",
    );
    // an azimuth 1 deg off: the far corner moves most
    let mut g = grid.clone();
    g.azimuth += 1.0;
    let e = mismatch(&p, &g);
    has(&e, "trace 2 (il 1001, xl 2002)");
    // within the tolerance (1% of 12.37 m): accepted, data unchanged
    let mut g = grid.clone();
    g.x0 += 0.08;
    let v = read_volume_on_grid(&p, &g).unwrap();
    assert!(v.iter().zip(&data).all(|(a, b)| a.to_bits() == b.to_bits()));
}

#[test]
fn traces_in_any_order_duplicates_and_missing() {
    let dir = tempfile::tempdir().unwrap();
    let (p, grid, data) = written(dir.path());
    let nz = grid.z_count;
    let tb = 240 + 4 * nz;
    let orig = std::fs::read(&p).unwrap();

    // reverse the trace order: same volume on the grid
    let mut rev = orig[..3600].to_vec();
    for n in (0..grid.trace_count()).rev() {
        rev.extend_from_slice(&orig[3600 + n * tb..3600 + (n + 1) * tb]);
    }
    let q = dir.path().join("reversed.sgy");
    std::fs::write(&q, &rev).unwrap();
    let v = read_volume_on_grid(&q, &grid).unwrap();
    assert!(v.iter().zip(&data).all(|(a, b)| a.to_bits() == b.to_bits()));

    // trace 6 claims the position of trace 5
    let mut dup = orig.clone();
    patch_i32(&mut dup, 5, nz, 193, 2005);
    patch_i32(&mut dup, 5, nz, 189, 1001);
    std::fs::write(&q, &dup).unwrap();
    let e = mismatch(&q, &grid);
    has(
        &e,
        "trace 6 (il 1001, xl 2005) repeats trace 5 (same inline and crossline)",
    );
    has(
        &e,
        "1 of 20 survey traces missing from the file: (il 1002, xl 2001)",
    );

    // one trace's delay differs
    let mut del = orig.clone();
    patch_i16(&mut del, 7, nz, 109, 1490);
    std::fs::write(&q, &del).unwrap();
    has(
        &mismatch(&q, &grid),
        "trace 8 (il 1002, xl 2003) has delay recording time 1490 (z0 1490 m), trace 1 has 1500",
    );

    // a short file: missing traces listed (first five) with the count
    let short = &orig[..3600 + 12 * tb];
    std::fs::write(&q, short).unwrap();
    let e = mismatch(&q, &grid);
    has(&e, "inline range 1001..1003 in file, 1001..1004 in survey");
    has(
        &e,
        "8 of 20 survey traces missing from the file: (il 1003, xl 2003), (il 1003, xl 2004), \
         (il 1003, xl 2005), (il 1004, xl 2001), (il 1004, xl 2002), ...",
    );
}

#[test]
fn summary_and_inferred_grid_of_our_file() {
    let dir = tempfile::tempdir().unwrap();
    let (p, grid, data) = written(dir.path());
    let s = summarize(&p).unwrap();
    assert_eq!(s.revision, "1.0");
    assert_eq!(s.format_code, 5);
    assert_eq!(
        (s.sample_count, s.sample_interval, s.delay),
        (7, 2500, 1500)
    );
    assert_eq!((s.z0_m, s.dz_m), (1500.0, 2.5));
    assert_eq!(s.trace_count, 20);
    assert_eq!((s.inline_range, s.inline_count), ([1001, 1004], 4));
    assert_eq!((s.xline_range, s.xline_count), ([2001, 2005], 5));
    assert_eq!(s.text_header.len(), 40);
    assert!(s.text_header[1].contains("property: delta, statistic: mean, unit: 1"));
    // corners: the grid's corner nodes, stored to the centimetre
    assert_eq!(s.corners.len(), 4);
    for (c, (x, y)) in s.corners.iter().zip(grid.corners()) {
        assert!((c.x - x).abs() <= 0.005 + 1e-9 && (c.y - y).abs() <= 0.005 + 1e-9);
    }
    let g = s.grid.clone().expect("regular");
    assert!(
        (g.x0 - grid.x0).abs() < 0.01 && (g.y0 - grid.y0).abs() < 0.01,
        "{g:?}"
    );
    assert!((g.azimuth - 30.0).abs() < 0.05, "{g:?}");
    assert!((g.inline_spacing - 18.91).abs() < 0.01 && (g.xline_spacing - 12.37).abs() < 0.01);
    assert_eq!(infer_grid(&p).unwrap(), g);
    // the inferred grid reads the file back
    let v = read_volume_on_grid(&p, &g).unwrap();
    assert!(v.iter().zip(&data).all(|(a, b)| a.to_bits() == b.to_bits()));
    // statistics of the finite values (test_values puts 1 NaN and 2 infinities first)
    let fin: Vec<f64> = data
        .iter()
        .filter(|v| v.is_finite())
        .map(|&v| v as f64)
        .collect();
    assert_eq!(
        (s.nan_count, s.inf_count, s.finite_count),
        (1, 2, fin.len() as u64)
    );
    assert_eq!(s.value_min, Some(-(f32::MAX as f64)));
    assert_eq!(s.value_max, Some(f32::MAX as f64));
    let mean = fin.iter().sum::<f64>() / fin.len() as f64;
    assert_eq!(s.value_mean, Some(mean));
    // serialises for `inspect --json`
    let j = serde_json::to_value(&s).unwrap();
    assert_eq!(j["byte_order"], "big");
    assert_eq!(j["text_encoding"], "ebcdic");
    assert_eq!(j["grid"]["inline_first"], 1001);
    let text = s.to_string();
    assert!(text.contains("inlines 1001..1004 (4 distinct)"), "{text}");
}
