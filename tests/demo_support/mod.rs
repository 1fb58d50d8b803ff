//! Shared helpers of the demo tests: one generation per test binary, the list
//! of committed demo files, and small independent readers of the demo's LAS,
//! picks and `.npy` files (deliberately not the crate's own readers).
#![allow(dead_code)]

use std::path::{Path, PathBuf};
use std::sync::OnceLock;
use stratiprior::demo::{generate, DemoOptions, DemoReport, DEFAULT_SEED};

/// The repository top, where the committed demo lives.
pub fn repo() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// One fresh generation with the default seed, shared by the tests of a binary.
pub fn fresh() -> &'static (tempfile::TempDir, DemoReport) {
    static GEN: OnceLock<(tempfile::TempDir, DemoReport)> = OnceLock::new();
    GEN.get_or_init(|| {
        let dir = tempfile::tempdir().expect("temp dir");
        let report = generate(&DemoOptions::field(dir.path().to_path_buf(), DEFAULT_SEED))
            .expect("demo generation");
        (dir, report)
    })
}

/// All files under `root/sub` (recursively), as `/`-separated paths relative to `root`.
pub fn files_under(root: &Path, sub: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut stack = vec![root.join(sub)];
    while let Some(d) = stack.pop() {
        let Ok(rd) = std::fs::read_dir(&d) else {
            continue;
        };
        for e in rd.flatten() {
            let p = e.path();
            if p.is_dir() {
                stack.push(p);
            } else {
                let rel = p
                    .strip_prefix(root)
                    .unwrap()
                    .to_string_lossy()
                    .replace('\\', "/");
                out.push(rel);
            }
        }
    }
    out.sort();
    out
}

/// The committed part of a demo folder: demo_wells/, demo_horizons/, demo_volumes/, demo.toml.
pub fn committed_files(root: &Path) -> Vec<String> {
    let mut v = Vec::new();
    for sub in ["demo_wells", "demo_horizons", "demo_volumes"] {
        v.extend(files_under(root, sub));
    }
    if root.join("demo.toml").is_file() {
        v.push("demo.toml".to_string());
    }
    v.sort();
    v
}

/// A LAS file as a plain token reader sees it.
#[derive(Debug)]
pub struct SimpleLas {
    pub version: String,
    pub wrapped: bool,
    /// Mnemonics, index first.
    pub mnemonics: Vec<String>,
    pub units: Vec<String>,
    /// Rows: the index then the curves; `None` where the NULL value stands.
    pub rows: Vec<Vec<Option<f64>>>,
}

impl SimpleLas {
    pub fn column(&self, mnemonic: &str) -> Option<usize> {
        self.mnemonics
            .iter()
            .position(|m| m.eq_ignore_ascii_case(mnemonic))
    }
}

fn header_value(line: &str) -> String {
    // "MNEM.UNIT  value : description" -> value (LAS 2.0 layout)
    let after_dot = line.split_once('.').map(|x| x.1).unwrap_or("");
    let before_colon = after_dot.rsplit_once(':').map(|x| x.0).unwrap_or(after_dot);
    let mut it = before_colon.splitn(2, char::is_whitespace);
    let _unit = it.next();
    it.next().unwrap_or("").trim().to_string()
}

/// Read a LAS 1.2 / 2.0 file, wrapped or not, by sections and tokens.
pub fn read_simple_las(path: &Path) -> SimpleLas {
    let text = std::fs::read_to_string(path).unwrap();
    let mut section = ' ';
    let (mut version, mut wrapped, mut null) = (String::new(), false, -999.25);
    let (mut mnemonics, mut units) = (Vec::new(), Vec::new());
    let mut tokens: Vec<f64> = Vec::new();
    for line in text.lines() {
        let t = line.trim();
        if t.is_empty() || t.starts_with('#') {
            continue;
        }
        if let Some(s) = t.strip_prefix('~') {
            section = s.chars().next().unwrap().to_ascii_uppercase();
            continue;
        }
        match section {
            'V' => {
                let v = header_value(t);
                if t.starts_with("VERS") {
                    version = v;
                } else if t.starts_with("WRAP") {
                    wrapped = v.eq_ignore_ascii_case("YES");
                }
            }
            'W' if t.starts_with("NULL") => null = header_value(t).parse().unwrap(),
            'C' => {
                let (m, rest) = t.split_once('.').unwrap();
                mnemonics.push(m.trim().to_string());
                units.push(
                    rest.split_whitespace()
                        .next()
                        .unwrap_or("")
                        .trim_end_matches(':')
                        .to_string(),
                );
            }
            'A' => tokens.extend(t.split_whitespace().map(|s| s.parse::<f64>().unwrap())),
            _ => {}
        }
    }
    let n = mnemonics.len();
    assert!(
        n > 1 && tokens.len() % n == 0,
        "{}: {} tokens for {n} curves",
        path.display(),
        tokens.len()
    );
    let rows = tokens
        .chunks(n)
        .map(|r| r.iter().map(|v| (*v != null).then_some(*v)).collect())
        .collect();
    SimpleLas {
        version,
        wrapped,
        mnemonics,
        units,
        rows,
    }
}

/// Read a picks file: `x y z` per line, separated by spaces, tabs or commas, `#` comments.
pub fn read_picks(path: &Path) -> Vec<(f64, f64, f64)> {
    std::fs::read_to_string(path)
        .unwrap()
        .lines()
        .filter(|l| !l.trim().is_empty() && !l.trim_start().starts_with('#'))
        .map(|l| {
            let v: Vec<f64> = l
                .split(|c: char| c == ',' || c.is_whitespace())
                .filter(|s| !s.is_empty())
                .map(|s| s.parse().unwrap())
                .collect();
            (v[0], v[1], v[2])
        })
        .collect()
}

/// Read a little-endian float32 `.npy` file (NumPy format v1.0): shape and data.
pub fn read_npy_f32(path: &Path) -> (Vec<usize>, Vec<f32>) {
    let b = std::fs::read(path).unwrap();
    assert_eq!(&b[..8], b"\x93NUMPY\x01\x00");
    let hl = u16::from_le_bytes([b[8], b[9]]) as usize;
    let header = std::str::from_utf8(&b[10..10 + hl]).unwrap();
    assert!(header.contains("'descr': '<f4'") && header.contains("'fortran_order': False"));
    let shape_txt = header
        .split("'shape': (")
        .nth(1)
        .unwrap()
        .split(')')
        .next()
        .unwrap();
    let shape: Vec<usize> = shape_txt
        .split(',')
        .map(str::trim)
        .filter(|s| !s.is_empty())
        .map(|s| s.parse().unwrap())
        .collect();
    let data: Vec<f32> = b[10 + hl..]
        .chunks_exact(4)
        .map(|c| f32::from_le_bytes([c[0], c[1], c[2], c[3]]))
        .collect();
    assert_eq!(data.len(), shape.iter().product::<usize>());
    (shape, data)
}
