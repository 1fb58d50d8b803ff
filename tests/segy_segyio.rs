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
use stratiprior::formats::segy::{
    apply_coord_scalar, infer_grid, read_segy, read_volume_on_grid, textual_header_lines,
    write_volume, ByteOrder, SegyFile, VolumeMeta,
};
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

/// Our reader agrees with segyio on a file we wrote.
#[test]
fn our_reader_agrees_with_segyio_on_our_file() {
    let dir = tempfile::tempdir().unwrap();
    let (path, grid, data) = write_ours(dir.path());
    let d = segyio_view_of_ours(dir.path(), &path);
    let f = read_segy(&path).unwrap();
    compare_with_segyio(&f, &d, "ours");
    assert_eq!(f.samples.len(), data.len());
    assert!(f
        .samples
        .iter()
        .zip(&data)
        .all(|(a, b)| a.to_bits() == b.to_bits()));
    let back = read_volume_on_grid(&path, &grid).unwrap();
    assert!(back
        .iter()
        .zip(&data)
        .all(|(a, b)| a.to_bits() == b.to_bits()));
}

/// Compare what we read with what segyio read from the same file.
fn compare_with_segyio(f: &SegyFile, d: &Value, name: &str) {
    let h = &f.headers;
    let bin = &d["bin"];
    assert_eq!(h.sample_count as i64, int(&bin["Samples"]), "{name}");
    assert_eq!(h.sample_interval as i64, int(&bin["Interval"]), "{name}");
    assert_eq!(h.format.code() as i64, int(&bin["Format"]), "{name}");
    assert_eq!(
        h.binary.revision as i64 >> 8,
        int(&bin["SEGYRevision"]),
        "{name}"
    );
    assert_eq!(
        h.binary.revision as i64 & 0xFF,
        int(&bin["SEGYRevisionMinor"]),
        "{name}"
    );
    assert_eq!(h.binary.job_id as i64, int(&bin["JobID"]), "{name}");
    assert_eq!(
        h.binary.measurement_system as i64,
        int(&bin["MeasurementSystem"]),
        "{name}"
    );
    assert_eq!(h.trace_count as i64, int(&d["tracecount"]), "{name}");
    let order = if d["endian"] == "little" {
        ByteOrder::Little
    } else {
        ByteOrder::Big
    };
    assert_eq!(h.byte_order, order, "{name}");
    // textual headers as segyio decodes them (trailing blanks trimmed on our side)
    let lines = |v: &Value| -> Vec<String> {
        v.as_array()
            .unwrap()
            .iter()
            .map(|l| l.as_str().unwrap().trim_end().to_string())
            .collect()
    };
    assert_eq!(h.text, lines(&d["text"]), "{name}");
    let ext: Vec<Vec<String>> = d["ext_text"]
        .as_array()
        .unwrap()
        .iter()
        .map(lines)
        .collect();
    assert_eq!(h.extended_text, ext, "{name}");
    let dtype = d["dtype"].as_str().unwrap();
    let traces = d["traces"].as_array().unwrap();
    assert_eq!(f.traces.len(), traces.len());
    for (n, (t, s)) in f.traces.iter().zip(traces).enumerate() {
        assert_eq!(t.inline as i64, int(&s["iline"]), "{name} trace {n}");
        assert_eq!(t.crossline as i64, int(&s["xline"]), "{name} trace {n}");
        assert_eq!(t.delay as i64, int(&s["delay"]), "{name} trace {n}");
        assert_eq!(
            t.sequence_file as i64,
            int(&s["seq_file"]),
            "{name} trace {n}"
        );
        let sc = int(&s["scalar"]) as i16;
        assert_eq!(t.coord_scalar, sc);
        // SEG-Y rev 1 bytes 71-72: negative divides, positive multiplies, 0 = 1
        let want = |raw: i64| match sc {
            0 => raw as f64,
            s if s < 0 => raw as f64 / -(s as f64),
            s => raw as f64 * s as f64,
        };
        assert_eq!(t.cdp_x, want(int(&s["cdp_x"])), "{name} trace {n}");
        assert_eq!(t.cdp_y, want(int(&s["cdp_y"])), "{name} trace {n}");
        assert_eq!(t.cdp_x, apply_coord_scalar(int(&s["cdp_x"]) as i32, sc));
        let ours = f.trace(n).unwrap();
        let theirs = s["data"].as_array().unwrap();
        assert_eq!(ours.len(), theirs.len());
        for (k, (a, b)) in ours.iter().zip(theirs).enumerate() {
            let expect = match dtype {
                "float32" => f32::from_bits(b.as_u64().unwrap() as u32),
                "float64" => f64::from_bits(b.as_u64().unwrap()) as f32,
                _ => b.as_f64().unwrap() as f32,
            };
            assert_eq!(
                a.to_bits(),
                expect.to_bits(),
                "{name} trace {n} sample {k}: {a} vs {expect}"
            );
        }
    }
}

/// The survey grids the reference script built its files on (FILES in
/// tests/reference/segyio_reference.py).
fn segyio_file_grid(name: &str) -> Option<SurveyGrid> {
    match name {
        "segyio_ibm" => Some(SurveyGrid {
            x0: 452000.3,
            y0: 6702000.7,
            azimuth: 30.0,
            inline_spacing: 25.0,
            xline_spacing: 12.5,
            inline_first: 5,
            inline_count: 3,
            xline_first: 20,
            xline_count: 4,
            z0: 1200.0,
            dz: 2.5,
            z_count: 6,
        }),
        "segyio_ieee_le_xl_sorted" => Some(SurveyGrid {
            x0: 300000.0,
            y0: 5000000.0,
            azimuth: 90.0,
            inline_spacing: 50.0,
            xline_spacing: 30.0,
            inline_first: 1,
            inline_count: 3,
            xline_first: 101,
            xline_count: 2,
            z0: -40.0,
            dz: 4.0,
            z_count: 5,
        }),
        _ => None,
    }
}

const SEGYIO_FILES: [&str; 6] = [
    "segyio_ibm",
    "segyio_ieee_le_xl_sorted",
    "segyio_int32",
    "segyio_int16",
    "segyio_int8",
    "segyio_f64",
];

/// Our reader reads files written by segyio (IBM float, little-endian with an
/// extended textual header and crossline-sorted traces, integer formats,
/// float64) and gets the numbers segyio reads from them.
#[test]
fn we_read_segyio_files() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = match python() {
        Some(py) => {
            run_script(&py, &["make", tmp.path().to_str().unwrap()]);
            if regen() {
                for name in SEGYIO_FILES {
                    for ext in ["sgy", "json"] {
                        let f = format!("{name}.{ext}");
                        std::fs::copy(tmp.path().join(&f), golden_dir().join(&f)).unwrap();
                    }
                }
            }
            tmp.path().to_path_buf()
        }
        None => golden_dir(),
    };
    for name in SEGYIO_FILES {
        let path = dir.join(format!("{name}.sgy"));
        let d = load_json(&dir.join(format!("{name}.json")));
        let f = read_segy(&path).unwrap_or_else(|e| panic!("{e}"));
        compare_with_segyio(&f, &d, name);
        if let Some(grid) = segyio_file_grid(name) {
            // placed by inline/crossline whatever the file order
            let vol = read_volume_on_grid(&path, &grid).unwrap_or_else(|e| panic!("{e}"));
            for (n, t) in f.traces.iter().enumerate() {
                let i = (t.inline - grid.inline_first) as usize;
                let j = (t.crossline - grid.xline_first) as usize;
                let k = grid.trace_index(i, j) * grid.z_count;
                assert_eq!(
                    &vol[k..k + grid.z_count],
                    f.trace(n).unwrap(),
                    "{name} trace {n}"
                );
            }
            let g = infer_grid(&path).unwrap_or_else(|e| panic!("{e}"));
            // coordinates are stored to 0.1 m (scalar -10) or exactly, so the
            // fitted grid's nodes lie within 0.1 m of the script's grid nodes
            for (p, q) in g.corners().iter().zip(grid.corners()) {
                let dist = (p.0 - q.0).hypot(p.1 - q.1);
                assert!(dist < 0.1, "{name}: corner {p:?} vs {q:?}: {g:?}");
            }
            assert_eq!(
                (
                    g.inline_first,
                    g.inline_count,
                    g.xline_first,
                    g.xline_count,
                    g.z0,
                    g.dz,
                    g.z_count
                ),
                (
                    grid.inline_first,
                    grid.inline_count,
                    grid.xline_first,
                    grid.xline_count,
                    grid.z0,
                    grid.dz,
                    grid.z_count
                )
            );
        }
    }
    let le = read_segy(&dir.join("segyio_ieee_le_xl_sorted.sgy")).unwrap();
    assert_eq!(le.headers.extended_text.len(), 1);
    assert!(le.headers.extended_text[0][0].contains("extended textual header card"));
}

/// Our EBCDIC table is IBM code page 037 as Python's codec has it.
#[test]
fn ebcdic_table_is_code_page_037() {
    let tmp = tempfile::tempdir().unwrap();
    let json = match python() {
        Some(py) => {
            let p = tmp.path().join("cp037.json");
            run_script(&py, &["cp037", p.to_str().unwrap()]);
            if regen() {
                std::fs::copy(&p, golden_dir().join("cp037.json")).unwrap();
            }
            p
        }
        None => golden_dir().join("cp037.json"),
    };
    let table: Vec<u32> = load_json(&json)["table"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_u64().unwrap() as u32)
        .collect();
    assert_eq!(table.len(), 256);
    // decode a textual header holding all 256 byte values through our reader
    let dir = tempfile::tempdir().unwrap();
    let (path, _, _) = write_ours(dir.path());
    let mut bytes = std::fs::read(&path).unwrap();
    for (k, b) in bytes[..3200].iter_mut().enumerate() {
        *b = (k % 256) as u8;
    }
    bytes[0] = 0xC3; // 'C' in EBCDIC, so the header is detected as EBCDIC
    std::fs::write(&path, &bytes).unwrap();
    let f = read_segy(&path).unwrap();
    assert_eq!(f.headers.text.len(), 40);
    for (l, line) in f.headers.text.iter().enumerate() {
        let want: String = bytes[l * 80..(l + 1) * 80]
            .iter()
            .map(|&b| {
                let c = char::from_u32(table[b as usize]).unwrap();
                if c.is_control() {
                    ' '
                } else {
                    c
                }
            })
            .collect();
        assert_eq!(line, want.trim_end(), "line {}", l + 1);
    }
}
