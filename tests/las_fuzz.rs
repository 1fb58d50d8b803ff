//! No panic on any byte sequence: `parse_las` runs on deterministic mutations of
//! the LAS corpus (byte flips, insertions of bytes and LAS tokens, deletions,
//! line duplications / truncations / deletions / swaps, splices between files)
//! under `catch_unwind`; zero panics are allowed. Every file it accepts must
//! also satisfy the reader's promises (equal curve lengths, an index that is
//! never null and strictly monotonic, no NaN).
//!
//! Number of cases: env STRATIPRIOR_FUZZ_CASES, default 100000 (see
//! `default_cases`).

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use std::panic::{catch_unwind, AssertUnwindSafe};
use std::path::{Path, PathBuf};
use std::sync::{Arc, Mutex};
use std::time::Instant;
use stratiprior::formats::las::{parse_las, LasFile};

/// (valid files, all files).
fn corpus() -> (Vec<Vec<u8>>, Vec<Vec<u8>>) {
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/data/las");
    let mut files = Vec::new();
    let mut valid = 0;
    for sub in ["valid", "invalid"] {
        let mut paths: Vec<PathBuf> = std::fs::read_dir(root.join(sub))
            .unwrap()
            .map(|e| e.unwrap().path())
            .collect();
        paths.sort();
        for p in paths {
            files.push(std::fs::read(p).unwrap());
        }
        if sub == "valid" {
            valid = files.len();
        }
    }
    (files[..valid].to_vec(), files)
}

/// Default case count: 100000 in every profile. Measured on the project
/// machine (2 shared cores): about 20 s in a debug build (the parser is not
/// optimised there) and a few seconds in release, so no lower debug default is
/// needed. Set STRATIPRIOR_FUZZ_CASES for a quicker or a longer run.
fn default_cases() -> usize {
    100_000
}

const TOKENS: &[&[u8]] = &[
    b"~V",
    b"~W",
    b"~C",
    b"~P",
    b"~O",
    b"~A",
    b"~",
    b"VERS. 2.0 : v\n",
    b"VERS. 1.2 :\n",
    b"VERS. 3.0 :\n",
    b"WRAP. YES : w\n",
    b"WRAP. NO :\n",
    b"NULL. -999.25 :\n",
    b"STRT.M 0 :\n",
    b"STEP.M 0 :\n",
    b"DLM. COMMA :\n",
    b"-999.25",
    b"1e308",
    b"1e999",
    b"-0",
    b"NaN",
    b"..",
    b":",
    b".",
    b"#",
    b"\r\n",
    b"\r",
    b"\n",
    b"\t",
    b" ",
    b"\x1a",
    b"\x00",
    b"\xef\xbb\xbf",
    b"\xc3",
    b"\xff",
    b"\xe2\x82\xac",
    b"12:30",
    b"(",
    b"[M]",
    b"_DATA",
    b"LASF",
    b"1000 LBF",
];

fn lines(b: &[u8]) -> Vec<(usize, usize)> {
    let mut out = Vec::new();
    let mut s = 0;
    for (i, &c) in b.iter().enumerate() {
        if c == b'\n' {
            out.push((s, i + 1));
            s = i + 1;
        }
    }
    if s < b.len() {
        out.push((s, b.len()));
    }
    out
}

fn mutate(rng: &mut ChaCha8Rng, base: &[u8], other: &[u8]) -> Vec<u8> {
    let mut b = base.to_vec();
    // Mostly single mutations, so that many inputs get deep into the reader.
    let n_mut = match rng.gen_range(0..20) {
        0..=11 => 1,
        12..=16 => 2,
        _ => rng.gen_range(3..=5),
    };
    for _ in 0..n_mut {
        let len = b.len();
        match rng.gen_range(0..11) {
            0 if len > 0 => {
                let i = rng.gen_range(0..len);
                b[i] ^= 1 << rng.gen_range(0..8);
            }
            1 if len > 0 => {
                let i = rng.gen_range(0..len);
                b[i] = rng.gen();
            }
            2 => {
                let i = rng.gen_range(0..=len);
                let t = TOKENS[rng.gen_range(0..TOKENS.len())];
                b.splice(i..i, t.iter().copied());
            }
            3 => {
                let i = rng.gen_range(0..=len);
                let k = rng.gen_range(1..16);
                let bytes: Vec<u8> = (0..k).map(|_| rng.gen()).collect();
                b.splice(i..i, bytes);
            }
            4 if len > 0 => {
                let i = rng.gen_range(0..len);
                let k = rng.gen_range(1..=(len - i).min(64));
                b.drain(i..i + k);
            }
            5..=7 => {
                let ls = lines(&b);
                if ls.is_empty() {
                    continue;
                }
                let (s, e) = ls[rng.gen_range(0..ls.len())];
                match rng.gen_range(0..4) {
                    0 => {
                        let copy = b[s..e].to_vec();
                        b.splice(e..e, copy);
                    }
                    1 => {
                        let cut = rng.gen_range(s..=e);
                        b.drain(cut..e);
                    }
                    2 => {
                        b.drain(s..e);
                    }
                    _ => {
                        let (s2, e2) = ls[rng.gen_range(0..ls.len())];
                        if s2 > e {
                            let l2 = b[s2..e2].to_vec();
                            let l1 = b[s..e].to_vec();
                            b.splice(s2..e2, l1);
                            b.splice(s..e, l2);
                        }
                    }
                }
            }
            8 => {
                // Splice: a prefix of this file and a suffix of another.
                let i = rng.gen_range(0..=len);
                let j = rng.gen_range(0..=other.len());
                b.truncate(i);
                b.extend_from_slice(&other[j..]);
            }
            9 if len > 0 => {
                // Replace a digit run's neighbourhood with a long run of one byte.
                let i = rng.gen_range(0..len);
                let k = rng.gen_range(1..300);
                let c = *TOKENS[rng.gen_range(0..TOKENS.len())]
                    .first()
                    .unwrap_or(&b'9');
                b.splice(i..i, std::iter::repeat(c).take(k));
            }
            _ => {
                let i = rng.gen_range(0..=len);
                b.truncate(i);
            }
        }
    }
    b
}

fn check_promises(las: &LasFile) -> Result<(), String> {
    let n = las.index().data.len();
    if las.curves.is_empty() || n == 0 {
        return Err("accepted a file without curves or rows".into());
    }
    if las.curves.iter().any(|c| c.data.len() != n) {
        return Err("curves of different lengths".into());
    }
    let idx: Vec<f64> = las
        .index()
        .data
        .iter()
        .map(|v| v.ok_or_else(|| "null in index".to_string()))
        .collect::<Result<_, _>>()?;
    if idx.len() >= 2 {
        let up = idx[1] > idx[0];
        if !idx
            .windows(2)
            .all(|w| if up { w[1] > w[0] } else { w[1] < w[0] })
        {
            return Err("index not strictly monotonic".into());
        }
    }
    if las
        .curves
        .iter()
        .flat_map(|c| c.data.iter().flatten())
        .any(|v| !v.is_finite() || *v == las.null_value)
    {
        return Err("non-finite or NULL-valued sample".into());
    }
    Ok(())
}

#[test]
fn no_panic_on_mutated_corpus() {
    let cases: usize = std::env::var("STRATIPRIOR_FUZZ_CASES")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or_else(default_cases);
    // Bases are the valid files; splices may take text from any corpus file.
    let (valid, files) = corpus();
    assert!(valid.len() >= 15 && files.len() > valid.len());
    let mut rng = ChaCha8Rng::seed_from_u64(0x5742_4154_4950_5249);

    // Panics are counted, not printed 100000 times.
    let messages: Arc<Mutex<Vec<String>>> = Arc::new(Mutex::new(Vec::new()));
    let sink = Arc::clone(&messages);
    let previous = std::panic::take_hook();
    std::panic::set_hook(Box::new(move |info| {
        if let Ok(mut m) = sink.lock() {
            m.push(info.to_string());
        }
    }));

    let start = Instant::now();
    let (mut ok, mut err, mut panics) = (0usize, 0usize, 0usize);
    let mut broken: Vec<String> = Vec::new();
    let mut first_panic: Option<Vec<u8>> = None;
    let path = Path::new("fuzz.las");
    for case in 0..cases {
        let a = rng.gen_range(0..valid.len());
        let o = rng.gen_range(0..files.len());
        let input = mutate(&mut rng, &valid[a], &files[o]);
        match catch_unwind(AssertUnwindSafe(|| parse_las(&input, path))) {
            Ok(Ok(las)) => {
                ok += 1;
                if let Err(e) = check_promises(&las) {
                    if broken.len() < 5 {
                        broken.push(format!(
                            "case {case}: {e}: {:?}",
                            String::from_utf8_lossy(&input)
                        ));
                    }
                }
            }
            Ok(Err(_)) => err += 1,
            Err(_) => {
                panics += 1;
                if first_panic.is_none() {
                    first_panic = Some(input.clone());
                }
            }
        }
    }
    std::panic::set_hook(previous);
    let secs = start.elapsed().as_secs_f64();
    println!(
        "LAS fuzz: {cases} mutated inputs in {secs:.1} s: {ok} read, {err} refused with an error, {panics} panics"
    );
    if let Some(p) = first_panic {
        let msg = messages.lock().map(|m| m.first().cloned()).ok().flatten();
        panic!(
            "{panics} panics; first: {msg:?}\ninput: {:?}",
            String::from_utf8_lossy(&p)
        );
    }
    assert!(
        broken.is_empty(),
        "accepted files break the reader's promises:\n{}",
        broken.join("\n")
    );
    // The mutations must exercise both outcomes, or the test proves little.
    assert!(ok > cases / 50 && err > cases / 50, "ok {ok}, err {err}");
}
