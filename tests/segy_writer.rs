//! SEG-Y writer: refusals and the all-or-nothing output file.

mod segy_support;

use segy_support::utm_grid;
use stratiprior::formats::segy::{write_volume, SegyWriter, VolumeMeta};

fn meta() -> VolumeMeta {
    VolumeMeta {
        property: "epsilon".into(),
        statistic: "std".into(),
        unit: "1".into(),
        notes: vec![],
    }
}

#[test]
fn wrong_trace_length_names_the_trace() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("a.sgy");
    let g = utm_grid();
    let mut w = SegyWriter::create(&p, &g, &meta()).unwrap();
    w.write_trace(&vec![1.0; g.z_count]).unwrap();
    let e = w.write_trace(&[1.0; 3]).unwrap_err().to_string();
    assert!(
        e.contains("a.sgy")
            && e.contains("trace 2 (inline 1001, crossline 2002) has 3 samples, the grid has 7"),
        "{e}"
    );
}

#[test]
fn missing_traces_leave_no_file() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("b.sgy");
    let g = utm_grid();
    let mut w = SegyWriter::create(&p, &g, &meta()).unwrap();
    for _ in 0..5 {
        w.write_trace(&vec![0.5; g.z_count]).unwrap();
    }
    assert_eq!(w.traces_written(), 5);
    let e = w.finish().unwrap_err().to_string();
    assert!(e.contains("only 5 of 20 traces"), "{e}");
    assert!(!p.exists());
    assert_eq!(
        std::fs::read_dir(dir.path()).unwrap().count(),
        0,
        "temp file left"
    );

    let e = write_volume(&p, &g, &meta(), &[0.0; 10])
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("volume has 10 values, the grid needs 140"),
        "{e}"
    );
    assert!(!p.exists());
}

#[test]
fn grids_that_do_not_fit_the_header_fields_are_refused() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("c.sgy");
    type Change = Box<dyn Fn(&mut stratiprior::SurveyGrid)>;
    let cases: Vec<(Change, &str)> = vec![
        (
            Box::new(|g| g.z0 = 1500.25),
            "z0 = 1500.25 m is not a whole number of metres",
        ),
        (
            Box::new(|g| g.z0 = -33000.0),
            "does not fit the delay recording time",
        ),
        (
            Box::new(|g| g.dz = 2.5004),
            "dz = 2.5004 m is not a whole number of millimetres",
        ),
        (Box::new(|g| g.dz = 50.0), "outside 0.001..32.767 m"),
        (
            Box::new(|g| g.y0 = 2.2e7),
            "does not fit a 32-bit coordinate",
        ),
        (
            Box::new(|g| g.inline_first = i32::MAX - 1),
            "exceed 2147483647",
        ),
        (
            Box::new(|g| g.z_count = 1),
            "depth sample count must be at least 2",
        ),
    ];
    for (change, msg) in cases {
        let mut g = utm_grid();
        change(&mut g);
        let e = match SegyWriter::create(&p, &g, &meta()) {
            Ok(_) => panic!("accepted {g:?}"),
            Err(e) => e.to_string(),
        };
        assert!(
            e.contains("c.sgy") && e.contains(msg),
            "{e}\nexpected {msg}"
        );
        assert!(!p.exists());
    }
}
