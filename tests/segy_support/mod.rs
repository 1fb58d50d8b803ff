//! Shared helpers of the SEG-Y integration tests: the reference interpreter
//! (segyio through tests/reference/segyio_reference.py), golden files, test
//! grids and deterministic test values.
#![allow(dead_code)]

use std::path::{Path, PathBuf};
use std::process::Command;
use stratiprior::SurveyGrid;

/// Folder of the committed golden files.
pub fn golden_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/golden/segy")
}

/// The reference script.
pub fn script() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/reference/segyio_reference.py")
}

/// Whether the golden files are to be rewritten from the live reference.
pub fn regen() -> bool {
    std::env::var("STRATIPRIOR_REGEN_GOLDEN").as_deref() == Ok("1")
}

/// The Python interpreter with segyio and numpy, from STRATIPRIOR_PYTHON.
/// None when unset (the tests then use the golden files); panics when
/// STRATIPRIOR_REQUIRE_PYTHON=1 and the interpreter or the libraries are missing.
pub fn python() -> Option<PathBuf> {
    let require = std::env::var("STRATIPRIOR_REQUIRE_PYTHON").as_deref() == Ok("1");
    let Some(py) = std::env::var_os("STRATIPRIOR_PYTHON") else {
        assert!(
            !require,
            "STRATIPRIOR_REQUIRE_PYTHON=1 but STRATIPRIOR_PYTHON is not set"
        );
        return None;
    };
    let py = PathBuf::from(py);
    let ok = Command::new(&py)
        .args(["-c", "import segyio, numpy"])
        .status()
        .map(|s| s.success())
        .unwrap_or(false);
    if !ok {
        assert!(
            !require,
            "STRATIPRIOR_REQUIRE_PYTHON=1 but {} cannot import segyio and numpy",
            py.display()
        );
        eprintln!(
            "warning: {} cannot import segyio/numpy; using golden files",
            py.display()
        );
        return None;
    }
    Some(py)
}

/// Run the reference script with `args`; panics with its stderr on failure.
pub fn run_script(py: &Path, args: &[&str]) {
    let out = Command::new(py)
        .arg(script())
        .args(args)
        .output()
        .expect("run python");
    assert!(
        out.status.success(),
        "segyio_reference.py {:?} failed:\n{}",
        args,
        String::from_utf8_lossy(&out.stderr)
    );
}

pub fn load_json(path: &Path) -> serde_json::Value {
    let s = std::fs::read_to_string(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    serde_json::from_str(&s).unwrap_or_else(|e| panic!("{}: {e}", path.display()))
}

/// The acceptance grid: non-zero azimuth (30 deg), UTM-like coordinates,
/// non-integer spacings (so the -100 coordinate scalar matters), depth axis
/// z0 = 1500 m, dz = 2.5 m.
pub fn utm_grid() -> SurveyGrid {
    SurveyGrid {
        x0: 452311.37,
        y0: 6701987.63,
        azimuth: 30.0,
        inline_spacing: 18.91,
        xline_spacing: 12.37,
        inline_first: 1001,
        inline_count: 4,
        xline_first: 2001,
        xline_count: 5,
        z0: 1500.0,
        dz: 2.5,
        z_count: 7,
    }
}

/// SplitMix64 (Steele, Lea & Flood 2014): deterministic test values.
pub struct SplitMix(pub u64);
impl SplitMix {
    pub fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    /// Uniform in [0, 1).
    pub fn unit(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// Volume values for `grid`: velocities around 2000-4000 m/s plus, at the
/// start, the float32 values whose bits a careless writer would change
/// (NaN with payload, -0, subnormals, infinities, extremes).
pub fn test_values(n: usize, seed: u64) -> Vec<f32> {
    let special = [
        f32::from_bits(0x7FC0_1234), // quiet NaN with payload
        -0.0,
        f32::from_bits(1), // smallest subnormal
        f32::MIN_POSITIVE,
        f32::INFINITY,
        f32::NEG_INFINITY,
        f32::MAX,
        -f32::MAX,
        1.0e-30,
        0.1,
    ];
    let mut r = SplitMix(seed);
    (0..n)
        .map(|k| {
            special
                .get(k)
                .copied()
                .unwrap_or_else(|| (2000.0 + 2000.0 * r.unit()) as f32)
        })
        .collect()
}
