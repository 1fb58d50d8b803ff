//! Damaged, truncated and foreign files: clear errors naming the file and
//! the trace / byte offset, never a panic.

mod segy_support;

use segy_support::*;
use std::io::Cursor;
use std::panic::{catch_unwind, AssertUnwindSafe};
use std::path::Path;
use stratiprior::formats::segy::{
    infer_grid, read_segy, read_volume_on_grid, summarize, textual_header_lines, write_volume,
    SegyReader, TextEncoding, VolumeMeta,
};

fn base(dir: &Path) -> Vec<u8> {
    let g = utm_grid();
    let p = dir.join("base.sgy");
    write_volume(
        &p,
        &g,
        &VolumeMeta::default(),
        &test_values(g.trace_count() * g.z_count, 5),
    )
    .unwrap();
    std::fs::read(&p).unwrap()
}

fn read_err(dir: &Path, bytes: &[u8]) -> String {
    let p = dir.join("bad.sgy");
    std::fs::write(&p, bytes).unwrap();
    match read_segy(&p) {
        Ok(_) => panic!("accepted a bad file"),
        Err(e) => {
            let e = e.to_string();
            assert!(e.contains("bad.sgy"), "error does not name the file: {e}");
            e
        }
    }
}

fn has(msg: &str, part: &str) {
    assert!(msg.contains(part), "message:\n{msg}\nlacks:\n{part}");
}

#[test]
fn specific_damage_gives_specific_errors() {
    let dir = tempfile::tempdir().unwrap();
    let ok = base(dir.path());
    let nz = utm_grid().z_count;
    let tb = 240 + 4 * nz;

    has(
        &read_err(dir.path(), &ok[..100]),
        "file is 100 bytes, shorter than the 3600 bytes of SEG-Y textual and binary headers",
    );
    has(
        &read_err(dir.path(), &ok[..3600]),
        "no traces: the file ends after its 3600 header bytes",
    );
    let e = read_err(dir.path(), &ok[..ok.len() - 10]);
    has(
        &e,
        &format!(
            "file size {} bytes is not a whole number of traces",
            ok.len() - 10
        ),
    );
    has(
        &e,
        &format!("trace 20 at byte offset {} is truncated", 3600 + 19 * tb),
    );

    let mut b = ok.clone();
    patch_bin_i16(&mut b, 3221, 0);
    patch_i16(&mut b, 0, nz, 115, 0);
    has(&read_err(dir.path(), &b), "zero samples per trace");

    let mut b = ok.clone();
    patch_bin_i16(&mut b, 3225, 4);
    let e = read_err(dir.path(), &b);
    has(&e, "not supported: data sample format code 4 (binary header bytes 3225-3226, 4-byte fixed point");

    let mut b = ok.clone();
    patch_bin_i16(&mut b, 3225, 999);
    has(
        &read_err(dir.path(), &b),
        "data sample format code 999 (binary header bytes 3225-3226) is not a SEG-Y format code",
    );

    let mut b = ok.clone();
    patch_bin_i16(&mut b, 3505, -1);
    has(
        &read_err(dir.path(), &b),
        "not supported: binary header bytes 3505-3506 = -1",
    );

    let mut b = ok.clone();
    patch_bin_i16(&mut b, 3505, 5);
    has(
        &read_err(dir.path(), &b),
        &format!("announce 5 extended textual headers, which end at byte 19600, but the file has only {} bytes", ok.len()),
    );

    // variable-length traces (fixed-length flag cleared, one trace header disagrees)
    let mut b = ok.clone();
    patch_bin_i16(&mut b, 3503, 0);
    patch_i16(&mut b, 2, nz, 115, 6);
    has(
        &read_err(dir.path(), &b),
        &format!("trace 3 at byte offset {} has 6 samples (trace bytes 115-116) but the file has 7 per trace", 3600 + 2 * tb),
    );
    // with the flag set, the binary header rules (SEG-Y rev 1, bytes 3503-3504)
    let mut b = ok.clone();
    patch_i16(&mut b, 2, nz, 115, 6);
    std::fs::write(dir.path().join("flag.sgy"), &b).unwrap();
    assert!(read_segy(&dir.path().join("flag.sgy")).is_ok());

    let e = read_segy(&dir.path().join("does-not-exist.sgy"))
        .unwrap_err()
        .to_string();
    has(&e, "does-not-exist.sgy");
}

#[test]
fn ascii_textual_header_is_detected() {
    let dir = tempfile::tempdir().unwrap();
    let mut b = base(dir.path());
    let cards = textual_header_lines(&utm_grid(), &VolumeMeta::default()).unwrap();
    b[..3200].copy_from_slice(cards.concat().as_bytes());
    let p = dir.path().join("ascii.sgy");
    std::fs::write(&p, &b).unwrap();
    let f = read_segy(&p).unwrap();
    assert_eq!(f.headers.text_encoding, TextEncoding::Ascii);
    let want: Vec<String> = cards.iter().map(|c| c.trim_end().to_string()).collect();
    assert_eq!(f.headers.text, want);
    // and the EBCDIC original decodes to the same lines
    let f = read_segy(&dir.path().join("base.sgy")).unwrap();
    assert_eq!(f.headers.text_encoding, TextEncoding::Ebcdic);
    assert_eq!(f.headers.text, want);
}

/// Mutation loop: truncations, random bytes in the headers, random header
/// values, random garbage. Every reader entry point must return (Ok or an
/// error naming the file), never panic. The path functions (read_segy,
/// summarize, read_volume_on_grid, infer_grid) are these reader methods after
/// `SegyReader::open`; a sample of cases also goes through them on disk.
#[test]
fn mutations_never_panic() {
    let dir = tempfile::tempdir().unwrap();
    let ok = base(dir.path());
    let grid = utm_grid();
    let p = dir.path().join("m.sgy");
    let mut rng = SplitMix(2024);
    let mut cases: Vec<Vec<u8>> = Vec::new();
    for len in (0..ok.len()).step_by(7) {
        cases.push(ok[..len].to_vec());
    }
    for _ in 0..2000 {
        let mut b = ok.clone();
        let n = 1 + (rng.next_u64() % 4) as usize;
        for _ in 0..n {
            let r = rng.unit();
            let pos = if r < 0.5 {
                3200 + (rng.next_u64() % 400) as usize
            } else if r < 0.8 {
                3600 + (rng.next_u64() % 240) as usize
            } else {
                (rng.next_u64() % b.len() as u64) as usize
            };
            b[pos] = rng.next_u64() as u8;
        }
        // sometimes a whole field: samples, interval, format, extended headers, scalar
        if rng.unit() < 0.3 {
            let fields = [3217usize, 3221, 3225, 3503, 3505, 3501];
            let f = fields[(rng.next_u64() % fields.len() as u64) as usize];
            patch_bin_i16(&mut b, f, rng.next_u64() as i16);
        }
        if rng.unit() < 0.2 {
            patch_i16(&mut b, 0, grid.z_count, 71, rng.next_u64() as i16);
        }
        cases.push(b);
    }
    for _ in 0..200 {
        let len = (rng.next_u64() % 12000) as usize;
        cases.push((0..len).map(|_| rng.next_u64() as u8).collect());
    }
    let (mut oks, mut errs) = (0usize, 0usize);
    for (k, b) in cases.iter().enumerate() {
        // in memory through the same reader the path functions use
        let open = || SegyReader::from_reader(&p, Cursor::new(b.as_slice()));
        let r = catch_unwind(AssertUnwindSafe(|| {
            let results = [
                open().and_then(|r| r.read_all()).map(|_| ()),
                open().and_then(|r| r.summarize()).map(|_| ()),
                open().and_then(|r| r.read_on_grid(&grid)).map(|_| ()),
                open().and_then(|r| r.infer_grid()).map(|_| ()),
            ];
            for r in results {
                match r {
                    Ok(()) => oks += 1,
                    Err(e) => {
                        let e = e.to_string();
                        assert!(e.contains("m.sgy"), "error does not name the file: {e}");
                        errs += 1;
                    }
                }
            }
        }));
        assert!(r.is_ok(), "case {k} ({} bytes) panicked", b.len());
        if k % 50 == 0 {
            std::fs::write(&p, b).unwrap();
            let r = catch_unwind(|| {
                let _ = read_segy(&p);
                let _ = summarize(&p);
                let _ = read_volume_on_grid(&p, &grid);
                let _ = infer_grid(&p);
            });
            assert!(r.is_ok(), "case {k} ({} bytes) panicked from disk", b.len());
        }
    }
    assert_eq!(oks + errs, 4 * cases.len());
    assert!(cases.len() > 3000);
    eprintln!(
        "{} cases: {oks} calls succeeded, {errs} gave errors",
        cases.len()
    );
}
