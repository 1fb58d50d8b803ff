//! Helpers shared by the LAS tests: running the lasio reference script or
//! loading its committed output, and comparing a `LasFile` with it.

#![allow(dead_code)]

use serde_json::Value;
use std::path::{Path, PathBuf};
use std::process::Command;
use stratiprior::formats::las::{HeaderItem, LasFile};

pub fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// Where the lasio dump comes from.
pub enum Source {
    /// `STRATIPRIOR_PYTHON` runs tests/reference/lasio_dump.py.
    Live(String),
    /// Committed golden JSON.
    Golden,
}

/// Live when `STRATIPRIOR_PYTHON` is set (and then lasio must work), golden
/// otherwise; with `STRATIPRIOR_REQUIRE_PYTHON=1` a missing interpreter fails.
pub fn source() -> Source {
    match std::env::var("STRATIPRIOR_PYTHON") {
        Ok(py) if !py.trim().is_empty() => Source::Live(py),
        _ => {
            assert!(
                std::env::var("STRATIPRIOR_REQUIRE_PYTHON").as_deref() != Ok("1"),
                "STRATIPRIOR_REQUIRE_PYTHON=1 but STRATIPRIOR_PYTHON is not set: \
                 the lasio comparison cannot run live"
            );
            Source::Golden
        }
    }
}

/// Run the reference script on `files` (live); returns file name -> dump.
pub fn run_lasio(py: &str, files: &[PathBuf]) -> serde_json::Map<String, Value> {
    let script = root().join("tests/reference/lasio_dump.py");
    let out = Command::new(py)
        .arg(&script)
        .args(files)
        .output()
        .unwrap_or_else(|e| panic!("cannot run {py}: {e}"));
    assert!(
        out.status.success(),
        "lasio_dump.py failed (is lasio installed for {py}?):\n{}",
        String::from_utf8_lossy(&out.stderr)
    );
    match serde_json::from_slice::<Value>(&out.stdout) {
        Ok(Value::Object(m)) => m,
        other => panic!("lasio_dump.py printed no JSON object: {other:?}"),
    }
}

pub fn golden(path: &Path) -> Value {
    let text = std::fs::read_to_string(path).unwrap_or_else(|e| {
        panic!(
            "{}: {e}; regenerate with python tests/reference/lasio_dump.py --write-golden ...",
            path.display()
        )
    });
    serde_json::from_str(&text).unwrap()
}

/// Counts of what was compared.
#[derive(Default, Debug)]
pub struct Counts {
    pub files: usize,
    pub curves: usize,
    pub samples: usize,
    pub nulls: usize,
    pub header_items: usize,
}

fn s(v: &Value) -> &str {
    v.as_str().unwrap_or("<not a string>")
}

/// lasio's `SectionParser.num` substitution `(\d),(\d)` -> `\1.\2`.
fn comma_sub(x: &str) -> String {
    let c: Vec<char> = x.chars().collect();
    let mut out = String::new();
    let mut i = 0;
    while i < c.len() {
        if i + 2 < c.len() && c[i].is_ascii_digit() && c[i + 1] == ',' && c[i + 2].is_ascii_digit()
        {
            out.push(c[i]);
            out.push('.');
            out.push(c[i + 2]);
            i += 3;
        } else {
            out.push(c[i]);
            i += 1;
        }
    }
    out
}

/// Compare our text value with lasio's typed value ({"type","text"}).
fn value_matches(ours: &str, theirs: &Value) -> bool {
    let t = s(&theirs["type"]);
    match t {
        "str" => ours == s(&theirs["text"]),
        "int" => {
            let want: i64 = s(&theirs["text"]).parse().unwrap();
            comma_sub(ours).trim().parse::<i64>().ok() == Some(want)
        }
        "float" => match theirs["text"].as_str() {
            None => false,
            Some(txt) => {
                let want: f64 = txt.parse().unwrap();
                comma_sub(ours)
                    .trim()
                    .parse::<f64>()
                    .map(|v| v.to_bits() == want.to_bits())
                    .unwrap_or(false)
            }
        },
        _ => false,
    }
}

fn compare_items(
    file: &str,
    sec: &str,
    ours: &[HeaderItem],
    theirs: &Value,
    counts: &mut Counts,
    bad: &mut Vec<String>,
) {
    let th = theirs.as_array().cloned().unwrap_or_default();
    if ours.len() != th.len() {
        bad.push(format!(
            "{file} {sec}: {} items, lasio {}",
            ours.len(),
            th.len()
        ));
        return;
    }
    for (o, t) in ours.iter().zip(&th) {
        counts.header_items += 1;
        let tag = format!("{file} {sec} line {} ({})", o.line, o.mnemonic);
        if o.mnemonic != s(&t["mnemonic"]) {
            bad.push(format!(
                "{tag}: mnemonic {:?}, lasio {:?}",
                o.mnemonic, t["mnemonic"]
            ));
        }
        if o.original_mnemonic.to_uppercase() != s(&t["original_mnemonic"]) {
            bad.push(format!(
                "{tag}: original mnemonic {:?}, lasio {:?}",
                o.original_mnemonic, t["original_mnemonic"]
            ));
        }
        if o.unit != s(&t["unit"]) {
            bad.push(format!("{tag}: unit {:?}, lasio {:?}", o.unit, t["unit"]));
        }
        if o.description != s(&t["descr"]) {
            bad.push(format!(
                "{tag}: description {:?}, lasio {:?}",
                o.description, t["descr"]
            ));
        }
        // lasio converts ~W/~P/~V values to numbers where it can (not API/UWI,
        // not ~C); our text is compared through the same conversion.
        let tv = &t["value"];
        if !value_matches(&o.value, tv) {
            bad.push(format!("{tag}: value {:?}, lasio {tv}", o.value));
        }
    }
}

/// Compare everything lasio reports with our reading; returns mismatches.
pub fn compare(file: &str, las: &LasFile, t: &Value, counts: &mut Counts) -> Vec<String> {
    let mut bad = Vec::new();
    counts.files += 1;
    if !value_matches(&las.version, &t["version"]) {
        bad.push(format!(
            "{file}: version {}, lasio {}",
            las.version, t["version"]
        ));
    }
    let twrap = s(&t["wrap"]["text"]) == "YES";
    if las.wrapped != twrap {
        bad.push(format!(
            "{file}: wrapped {}, lasio {}",
            las.wrapped, t["wrap"]
        ));
    }
    let tnull: Option<f64> = t["null"]["text"].as_str().and_then(|x| x.parse().ok());
    if tnull != Some(las.null_value) {
        bad.push(format!(
            "{file}: NULL {}, lasio {}",
            las.null_value, t["null"]
        ));
    }
    let want_factor = match t["index_unit"].as_str() {
        Some("M") => Some(1.0),
        Some("FT") => Some(0.3048),
        _ => None,
    };
    if let Some(f) = want_factor {
        let ours = las.index_unit_to_metres();
        if ours.as_ref().ok() != Some(&f) {
            bad.push(format!(
                "{file}: lasio index unit {}, ours {ours:?}",
                t["index_unit"]
            ));
        }
    }
    let sec = &t["sections"];
    compare_items(
        file,
        "Version",
        &las.sections.version,
        &sec["Version"],
        counts,
        &mut bad,
    );
    compare_items(
        file,
        "Well",
        &las.sections.well,
        &sec["Well"],
        counts,
        &mut bad,
    );
    compare_items(
        file,
        "Curves",
        &las.sections.curves,
        &sec["Curves"],
        counts,
        &mut bad,
    );
    compare_items(
        file,
        "Parameter",
        &las.sections.parameters,
        &sec["Parameter"],
        counts,
        &mut bad,
    );
    let other = las.sections.other.clone().unwrap_or_default();
    if other != s(&t["other"]) {
        bad.push(format!("{file}: ~O {:?}, lasio {:?}", other, t["other"]));
    }
    let tc = t["curves"].as_array().cloned().unwrap_or_default();
    if tc.len() != las.curves.len() {
        bad.push(format!(
            "{file}: {} curves, lasio {}",
            las.curves.len(),
            tc.len()
        ));
        return bad;
    }
    for (c, tcv) in las.curves.iter().zip(&tc) {
        counts.curves += 1;
        if c.mnemonic != s(&tcv["mnemonic"]) || c.unit != s(&tcv["unit"]) {
            bad.push(format!(
                "{file}: curve {}.{}, lasio {}.{}",
                c.mnemonic, c.unit, tcv["mnemonic"], tcv["unit"]
            ));
        }
        if c.description != s(&tcv["descr"]) || c.api_code != s(&tcv["value"]) {
            bad.push(format!(
                "{file}: curve {} api {:?} descr {:?}, lasio {} {}",
                c.mnemonic, c.api_code, c.description, tcv["value"], tcv["descr"]
            ));
        }
        let td = tcv["data"].as_array().cloned().unwrap_or_default();
        if td.len() != c.data.len() {
            bad.push(format!(
                "{file}: curve {} has {} samples, lasio {}",
                c.mnemonic,
                c.data.len(),
                td.len()
            ));
            continue;
        }
        for (k, (o, tv)) in c.data.iter().zip(&td).enumerate() {
            counts.samples += 1;
            let theirs: Option<f64> = tv.as_str().map(|x| x.parse().unwrap());
            // Exact: same bits (both readers round decimal text correctly).
            let same = match (o, theirs) {
                (None, None) => {
                    counts.nulls += 1;
                    true
                }
                (Some(a), Some(b)) => a.to_bits() == b.to_bits(),
                _ => false,
            };
            if !same {
                bad.push(format!(
                    "{file}: curve {} sample {k}: {o:?}, lasio {theirs:?}",
                    c.mnemonic
                ));
            }
        }
    }
    bad
}
