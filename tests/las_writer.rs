//! The LAS 2.0 writer: what it writes, our reader and the reference reader
//! lasio (PyPI) read back to the same numbers, exactly.
//!
//! The data set is fixed (seeded ChaCha8 bits, no floating-point library
//! calls), so the rendered file is byte-for-byte stable: it is committed as
//! tests/data/las/valid/writer_output.las (so the reader corpus test compares
//! it with lasio too) with lasio's dump in tests/golden/las/writer_output.json.
//! With STRATIPRIOR_PYTHON set, lasio also reads a freshly written file.
//! After a deliberate change of the writer's layout, regenerate with
//! STRATIPRIOR_REGEN_GOLDEN=1 cargo test --test las_writer, then
//! python tests/reference/lasio_dump.py --write-golden tests/golden/las
//! tests/data/las/valid/writer_output.las.

mod las_common;

use las_common::{golden, root, run_lasio, source, Source};
use rand::{RngCore, SeedableRng};
use rand_chacha::ChaCha8Rng;
use serde_json::Value;
use stratiprior::formats::las::{
    parse_las, read_las, render_las2, write_las2, Decimals, WriteCurve, WriteItem,
};

struct Data {
    dept: Vec<Option<f64>>,
    gr: Vec<Option<f64>>,
    dt: Vec<Option<f64>>,
    ext: Vec<Option<f64>>,
    vp: Vec<Option<f64>>,
}

/// Uniform in [0, 1) from the top 53 bits (exact, no library rounding).
fn unit(rng: &mut ChaCha8Rng) -> f64 {
    (rng.next_u64() >> 11) as f64 / (1u64 << 53) as f64
}

fn data() -> Data {
    let mut rng = ChaCha8Rng::seed_from_u64(2024);
    let n = 200;
    // 0.1524 m = half a foot; accumulated by multiplication (float noise kept).
    let dept = (0..n).map(|k| Some(1000.0 + k as f64 * 0.1524)).collect();
    let gr = (0..n)
        .map(|k| {
            let v = 150.0 * unit(&mut rng);
            if k % 17 == 3 {
                None
            } else {
                Some(v)
            }
        })
        .collect();
    let dt = (0..n)
        .map(|_| Some(200.0 + 400.0 * unit(&mut rng)))
        .collect();
    let special = [
        5e-324,
        1e-300,
        1e300,
        -0.0,
        0.1 + 0.2,
        f64::MAX,
        f64::MIN_POSITIVE,
        -1.5e-7,
        123_456_789.123_456_79,
        1e16,
        9_999_999_999_999_998.0,
    ];
    let ext = (0..n)
        .map(|k| {
            if k % 13 == 0 {
                None
            } else {
                Some(special[k % special.len()] * if k % 2 == 0 { 1.0 } else { -1.0 })
            }
        })
        .collect();
    let vp = (0..n)
        .map(|_| Some(1500.0 + 4500.0 * unit(&mut rng)))
        .collect();
    Data {
        dept,
        gr,
        dt,
        ext,
        vp,
    }
}

fn curves(d: &Data) -> Vec<WriteCurve<'_>> {
    vec![
        WriteCurve {
            mnemonic: "DEPT",
            unit: "M",
            description: "MEASURED DEPTH",
            data: &d.dept,
            decimals: Decimals::Shortest,
        },
        WriteCurve {
            mnemonic: "GR",
            unit: "GAPI",
            description: "GAMMA RAY",
            data: &d.gr,
            decimals: Decimals::Shortest,
        },
        WriteCurve {
            mnemonic: "DT",
            unit: "US/M",
            description: "SONIC SLOWNESS",
            data: &d.dt,
            decimals: Decimals::Shortest,
        },
        WriteCurve {
            mnemonic: "EXTREME",
            unit: "",
            description: "RANGE AND ROUNDING EDGE CASES",
            data: &d.ext,
            decimals: Decimals::Shortest,
        },
        WriteCurve {
            mnemonic: "VP",
            unit: "M/S",
            description: "P VELOCITY TO 2 DECIMALS",
            data: &d.vp,
            decimals: Decimals::Fixed(2),
        },
    ]
}

const ITEMS: &[WriteItem<'static>] = &[
    WriteItem {
        mnemonic: "WELL",
        unit: "",
        value: "NORTH TARN 1",
        description: "WELL",
    },
    WriteItem {
        mnemonic: "COMP",
        unit: "",
        value: "TARNWICK DEMO CONSORTIUM",
        description: "COMPANY",
    },
    WriteItem {
        mnemonic: "UWI",
        unit: "",
        value: "TW-0001",
        description: "UNIQUE WELL ID",
    },
    WriteItem {
        mnemonic: "TIME",
        unit: "",
        value: "12:30",
        description: "LOGGING TIME",
    },
    WriteItem {
        mnemonic: "EKB",
        unit: "M",
        value: "31.5",
        description: "KELLY BUSHING ELEVATION",
    },
];

const NULL: f64 = -999.25;

/// What the file must read back to: Shortest curves exactly, the Fixed(2)
/// curve as its 2-decimal text.
fn expected(d: &Data) -> Vec<Vec<Option<f64>>> {
    let vp2: Vec<Option<f64>> =
        d.vp.iter()
            .map(|v| v.map(|x| format!("{x:.2}").parse().unwrap()))
            .collect();
    vec![
        d.dept.clone(),
        d.gr.clone(),
        d.dt.clone(),
        d.ext.clone(),
        vp2,
    ]
}

fn same(a: &[Option<f64>], b: &[Option<f64>]) -> bool {
    a.len() == b.len()
        && a.iter().zip(b).all(|(x, y)| match (x, y) {
            (None, None) => true,
            (Some(x), Some(y)) => x.to_bits() == y.to_bits(),
            _ => false,
        })
}

#[test]
fn writer_round_trips_through_our_reader() {
    let d = data();
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("out/well.las");
    write_las2(&p, ITEMS, &curves(&d), NULL).unwrap();
    let las = read_las(&p).unwrap();
    assert!(las.warnings.is_empty(), "{:?}", las.warnings);
    assert_eq!(
        (las.version.as_str(), las.wrapped, las.null_value),
        ("2.0", false, NULL)
    );
    let want = expected(&d);
    let mut samples = 0;
    for (c, w) in las.curves.iter().zip(&want) {
        assert!(same(&c.data, w), "curve {} differs", c.mnemonic);
        samples += w.len();
    }
    assert_eq!(las.curves.len(), 5);
    for it in ITEMS {
        let got = las.well_item(it.mnemonic).unwrap();
        assert_eq!(
            (
                got.unit.as_str(),
                got.value.as_str(),
                got.description.as_str()
            ),
            (it.unit, it.value, it.description)
        );
    }
    assert_eq!(las.well_item("STRT").unwrap().number(), Some(1000.0));
    assert_eq!(las.well_item("STOP").unwrap().number(), d.dept[199]);
    assert_eq!(las.well_item("STEP").unwrap().value, "0.1524");
    assert_eq!(las.curve("EXTREME").unwrap().unit, "");
    assert_eq!(las.index_unit_to_metres().unwrap(), 1.0);
    println!(
        "writer round trip: {} curves, {samples} samples exact",
        las.curves.len()
    );
}

#[test]
fn writer_output_is_stable_and_lasio_reads_the_same_numbers() {
    let d = data();
    let text = render_las2(ITEMS, &curves(&d), NULL).unwrap();
    let committed_path = root().join("tests/data/las/valid/writer_output.las");
    if std::env::var("STRATIPRIOR_REGEN_GOLDEN").as_deref() == Ok("1") {
        std::fs::write(&committed_path, &text).unwrap();
    }
    let committed = std::fs::read_to_string(&committed_path).unwrap();
    assert!(
        committed == text,
        "the writer's output changed; see the header of tests/las_writer.rs to regenerate"
    );

    let check = |dump: &Value, label: &str| {
        let want = expected(&d);
        let tc = dump["curves"].as_array().unwrap();
        assert_eq!(tc.len(), want.len());
        let mut n = 0;
        for (t, w) in tc.iter().zip(&want) {
            let theirs: Vec<Option<f64>> = t["data"]
                .as_array()
                .unwrap()
                .iter()
                .map(|v| v.as_str().map(|s| s.parse().unwrap()))
                .collect();
            assert!(
                same(&theirs, w),
                "{label}: lasio reads curve {} differently",
                t["mnemonic"]
            );
            n += w.len();
        }
        let well = dump["sections"]["Well"].as_array().unwrap();
        let item = |m: &str| well.iter().find(|i| i["mnemonic"] == m).unwrap().clone();
        assert_eq!(item("TIME")["value"]["text"], "12:30");
        assert_eq!(item("WELL")["value"]["text"], "NORTH TARN 1");
        assert_eq!(item("NULL")["value"]["text"], "-999.25");
        println!("lasio ({label}) reads the writer's {n} samples exactly");
    };
    check(
        &golden(&root().join("tests/golden/las/writer_output.json")),
        "golden",
    );
    if let Source::Live(py) = source() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("fresh.las");
        write_las2(&p, ITEMS, &curves(&d), NULL).unwrap();
        let m = run_lasio(&py, &[p]);
        check(m.get("fresh.las").unwrap(), "live");
    }
}

#[test]
fn writer_refuses_what_would_not_read_back() {
    let dept = [Some(1.0), Some(2.0)];
    let bad_index_unit = [WriteCurve {
        mnemonic: "DEPT",
        unit: "S",
        description: "TIME",
        data: &dept,
        decimals: Decimals::Shortest,
    }];
    let e = render_las2(&[], &bad_index_unit, NULL)
        .unwrap_err()
        .to_string();
    assert!(e.contains("expected a depth unit"), "{e}");
    let nan = [Some(1.0), Some(f64::NAN)];
    let c = [
        WriteCurve {
            mnemonic: "DEPT",
            unit: "M",
            description: "D",
            data: &dept,
            decimals: Decimals::Shortest,
        },
        WriteCurve {
            mnemonic: "X",
            unit: "",
            description: "X",
            data: &nan,
            decimals: Decimals::Shortest,
        },
    ];
    assert!(render_las2(&[], &c, NULL)
        .unwrap_err()
        .to_string()
        .contains("use None"));
    let short = [Some(1.0)];
    let c = [
        c[0],
        WriteCurve {
            data: &short,
            ..c[1]
        },
    ];
    assert!(render_las2(&[], &c, NULL)
        .unwrap_err()
        .to_string()
        .contains("has 1 samples but the index"));
    let dup = [
        c[0],
        WriteCurve {
            mnemonic: "dept",
            data: &dept,
            ..c[1]
        },
    ];
    assert!(render_las2(&[], &dup, NULL)
        .unwrap_err()
        .to_string()
        .contains("given twice"));
    // Rounding to fixed decimals can make depths collide: refused.
    let close = [Some(1.001), Some(1.002)];
    let r = [WriteCurve {
        mnemonic: "DEPT",
        unit: "M",
        description: "D",
        data: &close,
        decimals: Decimals::Fixed(2),
    }];
    assert!(render_las2(&[], &r, NULL)
        .unwrap_err()
        .to_string()
        .contains("not strictly monotonic"));
    // The failed write leaves no file.
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("x.las");
    assert!(write_las2(&p, &[], &r, NULL).is_err());
    assert!(!p.exists());
    // A decreasing, irregular index is fine and gets STEP 0.
    let irr = [Some(10.0), Some(9.0), Some(7.5)];
    let r = [WriteCurve {
        mnemonic: "DEPT",
        unit: "FT",
        description: "D",
        data: &irr,
        decimals: Decimals::Shortest,
    }];
    let t = render_las2(&[], &r, NULL).unwrap();
    let las = parse_las(t.as_bytes(), std::path::Path::new("irr.las")).unwrap();
    assert_eq!(las.well_item("STEP").unwrap().number(), Some(0.0));
    assert_eq!(
        las.index_in_metres().unwrap(),
        vec![10.0 * 0.3048, 9.0 * 0.3048, 7.5 * 0.3048]
    );
}

#[test]
fn items_read_from_a_file_can_be_written_again() {
    let src = read_las(&root().join("tests/data/las/valid/v20_unwrapped.las")).unwrap();
    let keep: Vec<WriteItem<'_>> = src
        .sections
        .well
        .iter()
        .filter(|i| !["STRT", "STOP", "STEP", "NULL"].contains(&i.mnemonic.as_str()))
        .map(WriteItem::from)
        .collect();
    assert_eq!(keep.len(), 7);
    let d = data();
    let text = render_las2(&keep, &curves(&d)[..2], NULL).unwrap();
    let back = parse_las(text.as_bytes(), std::path::Path::new("copy.las")).unwrap();
    for it in &keep {
        let b = back.well_item(it.mnemonic).unwrap();
        assert_eq!(
            (b.unit.as_str(), b.value.as_str(), b.description.as_str()),
            (it.unit, it.value, it.description)
        );
    }
}
