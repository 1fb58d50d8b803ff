//! SEG-Y against the reference library segyio (PyPI, 1.9.14): files we write
//! must read back in segyio with its DEFAULT settings (`segyio.open(path)`,
//! iline=189, xline=193) with the numbers we meant.
//!
//! Live when STRATIPRIOR_PYTHON is set (tests/reference/segyio_reference.py
//! runs segyio); otherwise against tests/golden/segy/, written by the same
//! script (see its docstring for regenerating).

mod segy_support;

use segy_support::*;
use serde_json::Value;
use std::path::Path;
use stratiprior::formats::segy::{textual_header_lines, write_volume, VolumeMeta};
use stratiprior::SurveyGrid;

fn meta() -> VolumeMeta {
    VolumeMeta {
        property: "vp0".into(),
        statistic: "mean".into(),
        unit: "m/s".into(),
        notes: vec!["fictional Brannock Deep test volume".into()],
    }
}

fn int(v: &Value) -> i64 {
    v.as_i64().unwrap_or_else(|| panic!("not an integer: {v}"))
}

/// Write our acceptance volume into `dir`; returns its path and data.
fn write_ours(dir: &Path) -> (std::path::PathBuf, SurveyGrid, Vec<f32>) {
    let grid = utm_grid();
    let data = test_values(grid.trace_count() * grid.z_count, 7);
    let path = dir.join("ours.sgy");
    write_volume(&path, &grid, &meta(), &data).unwrap();
    (path, grid, data)
}

/// What segyio read from our file: live, or the golden dump after checking
/// that today's writer still produces the file the golden dump was made from.
fn segyio_view_of_ours(dir: &Path, ours: &Path) -> Value {
    let golden = golden_dir();
    if let Some(py) = python() {
        let json = dir.join("ours.json");
        run_script(
            &py,
            &["dump", ours.to_str().unwrap(), json.to_str().unwrap()],
        );
        if regen() {
            std::fs::create_dir_all(&golden).unwrap();
            std::fs::copy(ours, golden.join("ours.sgy")).unwrap();
            std::fs::copy(&json, golden.join("ours_segyio.json")).unwrap();
        }
        return load_json(&json);
    }
    let now = std::fs::read(ours).unwrap();
    let then = std::fs::read(golden.join("ours.sgy")).unwrap();
    // the textual header names the tool version, so it may differ; the rest must not
    assert_eq!(
        now.len(),
        then.len(),
        "writer output size changed: regenerate goldens"
    );
    assert!(
        now[3200..] == then[3200..],
        "writer output changed since the golden dump: regenerate goldens"
    );
    load_json(&golden.join("ours_segyio.json"))
}

#[test]
fn segyio_reads_what_we_write() {
    let dir = tempfile::tempdir().unwrap();
    let (path, grid, data) = write_ours(dir.path());
    let d = segyio_view_of_ours(dir.path(), &path);

    // binary header (SEG-Y rev 1 positions; segyio.BinField names)
    let bin = &d["bin"];
    assert_eq!(int(&bin["Format"]), 5, "IEEE float32");
    assert_eq!(int(&bin["Samples"]), grid.z_count as i64);
    assert_eq!(int(&bin["Interval"]), 2500, "dz 2.5 m in millimetres");
    assert_eq!(int(&bin["SEGYRevision"]), 1, "byte 3501: rev 1");
    assert_eq!(int(&bin["SEGYRevisionMinor"]), 0);
    assert_eq!(int(&bin["TraceFlag"]), 1, "fixed-length traces");
    assert_eq!(int(&bin["ExtendedHeaders"]), 0);
    assert_eq!(int(&bin["MeasurementSystem"]), 1, "metres");
    assert_eq!(int(&bin["SortingCode"]), 4);

    // geometry as segyio infers it with default byte locations
    let ilines: Vec<i64> = d["ilines"].as_array().unwrap().iter().map(int).collect();
    let xlines: Vec<i64> = d["xlines"].as_array().unwrap().iter().map(int).collect();
    assert_eq!(ilines, (1001..1005).collect::<Vec<_>>());
    assert_eq!(xlines, (2001..2006).collect::<Vec<_>>());
    assert_eq!(
        int(&d["sorting"]),
        2,
        "segyio TraceSortingFormat.INLINE_SORTING"
    );
    assert_eq!(int(&d["tracecount"]), grid.trace_count() as i64);
    // depth axis: segyio reports samples in ms = delay + k * interval / 1000,
    // which our convention makes metres
    let samples: Vec<f64> = d["samples"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_f64().unwrap())
        .collect();
    let expect: Vec<f64> = (0..grid.z_count).map(|k| grid.z_at(k)).collect();
    assert_eq!(samples, expect);

    let traces = d["traces"].as_array().unwrap();
    for (n, t) in traces.iter().enumerate() {
        let (i, j) = (n / grid.xline_count, n % grid.xline_count);
        assert_eq!(int(&t["iline"]), grid.inline_number(i) as i64);
        assert_eq!(int(&t["xline"]), grid.xline_number(j) as i64);
        assert_eq!(int(&t["seq_line"]), n as i64 + 1);
        assert_eq!(int(&t["seq_file"]), n as i64 + 1);
        assert_eq!(int(&t["cdp"]), n as i64 + 1);
        assert_eq!(int(&t["trace_in_ensemble"]), 1);
        assert_eq!(int(&t["trace_id"]), 1);
        assert_eq!(int(&t["coord_units"]), 1);
        assert_eq!(int(&t["delay"]), 1500, "z0 in metres");
        assert_eq!(int(&t["ns"]), grid.z_count as i64);
        assert_eq!(int(&t["dt"]), 2500);
        assert_eq!(int(&t["scalar"]), -100);
        // SEG-Y rev 1: a negative scalar divides
        let (x, y) = grid.node_xy(i as f64, j as f64);
        let cx = int(&t["cdp_x"]) as f64 / 100.0;
        let cy = int(&t["cdp_y"]) as f64 / 100.0;
        assert!((cx - x).abs() <= 0.005 + 1e-9, "trace {n}: x {cx} vs {x}");
        assert!((cy - y).abs() <= 0.005 + 1e-9, "trace {n}: y {cy} vs {y}");
        for (a, b) in [
            ("source_x", "cdp_x"),
            ("source_y", "cdp_y"),
            ("group_x", "cdp_x"),
            ("group_y", "cdp_y"),
        ] {
            assert_eq!(t[a], t[b]);
        }
        let bits: Vec<u32> = t["data"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| int(v) as u32)
            .collect();
        let ours: Vec<u32> = data[n * grid.z_count..(n + 1) * grid.z_count]
            .iter()
            .map(|v| v.to_bits())
            .collect();
        assert_eq!(bits, ours, "trace {n}: samples not bit-identical");
    }
    assert_eq!(traces.len(), grid.trace_count());

    // textual header as segyio decodes it (its own EBCDIC table)
    let text: Vec<&str> = d["text"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_str().unwrap())
        .collect();
    assert_eq!(text.len(), 40);
    let cards = textual_header_lines(&grid, &meta()).unwrap();
    for k in 1..40 {
        assert_eq!(text[k], cards[k], "card {}", k + 1);
    }
    assert!(text[0].starts_with("C 1 stratiprior "));
    let all = text.join("\n");
    for phrase in [
        "property: vp0, statistic: mean, unit: m/s",
        "z0 = 1500 m, dz = 2.5 m, 7 samples",
        "dz in millimetres",
        "z0 in metres",
        "inline 189-192",
        "crossline 193-196",
        "azimuth 30 deg",
        "Brannock Deep",
    ] {
        assert!(
            all.contains(phrase),
            "textual header lacks {phrase:?}:\n{all}"
        );
    }
    assert_eq!(text[38].trim_end(), "C39 SEG Y REV1");
    assert_eq!(text[39].trim_end(), "C40 END TEXTUAL HEADER");
}
