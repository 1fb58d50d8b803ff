//! LAS 2.0 writer: unwrapped, space-delimited, one line per depth step.

use super::depth_unit_to_metres;
use super::text::parse_number;
use crate::error::{Error, Result};
use crate::io_util::write_atomic;
use std::fmt::Write as _;
use std::path::Path;

/// A `~W` item to write (besides STRT, STOP, STEP and NULL, which the writer
/// derives from the data).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct WriteItem<'a> {
    /// Mnemonic: no spaces, dots or colons.
    pub mnemonic: &'a str,
    /// Unit, may be empty: no spaces or colons, not ending in a dot.
    pub unit: &'a str,
    /// Value, no leading or trailing spaces.
    pub value: &'a str,
    /// Description: no colon.
    pub description: &'a str,
}

/// How the samples of a curve are printed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Decimals {
    /// The shortest decimal text that reads back to the same f64 (exact round trip).
    #[default]
    Shortest,
    /// A fixed number of decimals (values are rounded to it; what is read back
    /// is the rounded value).
    Fixed(u8),
}

/// A curve to write. The first curve given is the index.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct WriteCurve<'a> {
    /// Mnemonic: no spaces, dots or colons; unique (ignoring case).
    pub mnemonic: &'a str,
    /// Unit (for the index a depth unit, normally `M`).
    pub unit: &'a str,
    /// Description: no colon.
    pub description: &'a str,
    /// Samples (`None` is written as the NULL value). The index has no `None`.
    pub data: &'a [Option<f64>],
    /// Printing of the samples.
    pub decimals: Decimals,
}

/// Shortest decimal text of `v` that parses back to exactly `v`
/// (Rust's float formatting is shortest-round-trip); exponent form outside
/// 1e-5 <= |v| < 1e16 to keep columns short.
pub(crate) fn shortest(v: f64) -> String {
    let a = v.abs();
    if a == 0.0 || (1e-5..1e16).contains(&a) {
        format!("{v}")
    } else {
        format!("{v:e}")
    }
}

fn format_value(v: f64, d: Decimals) -> String {
    match d {
        Decimals::Shortest => shortest(v),
        Decimals::Fixed(n) => format!("{:.*}", usize::from(n), v),
    }
}

/// Text for STEP: the shortest decimal with at most 15 significant digits that
/// is within 1e-9 (relative) of `step`.
fn step_text(step: f64) -> String {
    for p in 0..15 {
        let s = format!("{:.*e}", p, step);
        if let Some(back) = parse_number(&s) {
            if (back - step).abs() <= 1e-9 * step.abs() {
                return shortest(back);
            }
        }
    }
    shortest(step)
}

fn check_field(
    what: &str,
    s: &str,
    allow_space: bool,
    allow_colon: bool,
) -> std::result::Result<(), String> {
    if s.chars().any(char::is_control) {
        return Err(format!(
            "{what} '{}' contains a control character",
            s.escape_debug()
        ));
    }
    if !allow_space && s.chars().any(char::is_whitespace) {
        return Err(format!(
            "{what} '{s}' contains a space; LAS does not allow one there"
        ));
    }
    if !allow_colon && s.contains(':') {
        return Err(format!(
            "{what} '{s}' contains a colon, which LAS uses as the field separator"
        ));
    }
    if s.trim() != s {
        return Err(format!("{what} '{s}' has leading or trailing spaces"));
    }
    Ok(())
}

fn check_mnemonic(what: &str, m: &str) -> std::result::Result<(), String> {
    check_field(what, m, false, false)?;
    if m.is_empty() {
        return Err(format!("{what} is empty"));
    }
    if m.contains('.') || m.starts_with('~') || m.starts_with('#') {
        return Err(format!(
            "{what} '{m}' contains a dot or starts with '~' or '#'; LAS cannot read that back"
        ));
    }
    Ok(())
}

fn check_unit(what: &str, u: &str) -> std::result::Result<(), String> {
    check_field(what, u, false, false)?;
    let bracketed = u.len() >= 2
        && ((u.starts_with('(') && u.ends_with(')')) || (u.starts_with('[') && u.ends_with(']')));
    if u.starts_with('.')
        || u.ends_with('.')
        || bracketed
        || (!u.is_empty() && u.bytes().all(|b| b.is_ascii_digit()))
    {
        return Err(format!(
            "{what} '{u}' starts or ends with a dot, is in brackets or is all digits; LAS readers would change it"
        ));
    }
    Ok(())
}

fn header_line(out: &mut String, mnem: &str, unit: &str, value: &str, descr: &str) {
    let mu = format!("{mnem}.{unit}");
    let _ = writeln!(out, " {mu:<14} {value:>16} : {descr}");
}

/// Render an unwrapped LAS 2.0 file (see [`write_las2`]) as text.
pub fn render_las2(
    well_items: &[WriteItem<'_>],
    curves: &[WriteCurve<'_>],
    null_value: f64,
) -> Result<String> {
    render(well_items, curves, null_value)
        .map_err(|m| Error::inconsistent(format!("cannot write LAS: {m}")))
}

fn render(
    well_items: &[WriteItem<'_>],
    curves: &[WriteCurve<'_>],
    null_value: f64,
) -> std::result::Result<String, String> {
    let Some(index) = curves.first() else {
        return Err("no curves given; the first curve is the index".into());
    };
    if !null_value.is_finite() {
        return Err(format!("NULL value {null_value} is not finite"));
    }
    let n = index.data.len();
    if n == 0 {
        return Err(format!("index curve {} has no samples", index.mnemonic));
    }
    if depth_unit_to_metres(index.unit).is_none() {
        return Err(format!(
            "index curve {} has unit '{}'; expected a depth unit (M or FT)",
            index.mnemonic, index.unit
        ));
    }
    let mut seen: Vec<String> = Vec::new();
    for c in curves {
        check_mnemonic("curve mnemonic", c.mnemonic)?;
        check_unit(&format!("unit of curve {}", c.mnemonic), c.unit)?;
        check_field(
            &format!("description of curve {}", c.mnemonic),
            c.description,
            true,
            false,
        )?;
        let up = c.mnemonic.to_uppercase();
        if seen.contains(&up) {
            return Err(format!(
                "curve mnemonic {} is given twice (LAS readers would rename it)",
                c.mnemonic
            ));
        }
        seen.push(up);
        if c.data.len() != n {
            return Err(format!(
                "curve {} has {} samples but the index {} has {n}",
                c.mnemonic,
                c.data.len(),
                index.mnemonic
            ));
        }
    }
    let mut items_seen: Vec<String> = Vec::new();
    for it in well_items {
        check_mnemonic("well item mnemonic", it.mnemonic)?;
        check_unit(&format!("unit of well item {}", it.mnemonic), it.unit)?;
        check_field(
            &format!("value of well item {}", it.mnemonic),
            it.value,
            true,
            true,
        )?;
        check_field(
            &format!("description of well item {}", it.mnemonic),
            it.description,
            true,
            false,
        )?;
        let up = it.mnemonic.to_uppercase();
        if ["STRT", "STOP", "STEP", "NULL"].contains(&up.as_str()) {
            return Err(format!(
                "well item {} is written from the data; do not give it",
                it.mnemonic
            ));
        }
        if items_seen.contains(&up) {
            return Err(format!("well item {} is given twice", it.mnemonic));
        }
        items_seen.push(up);
    }

    let null_text = shortest(null_value);
    // Format every column, checking what will be read back.
    let mut columns: Vec<Vec<String>> = Vec::with_capacity(curves.len());
    let mut index_back: Vec<f64> = Vec::with_capacity(n);
    for (ci, c) in curves.iter().enumerate() {
        let mut col = Vec::with_capacity(n);
        for (k, v) in c.data.iter().enumerate() {
            let s = match v {
                None if ci == 0 => {
                    return Err(format!(
                        "index curve {} has no value at sample {}",
                        c.mnemonic,
                        k + 1
                    ));
                }
                None => null_text.clone(),
                Some(x) => {
                    if !x.is_finite() {
                        return Err(format!(
                            "curve {} sample {} is {x}; use None for a missing sample",
                            c.mnemonic,
                            k + 1
                        ));
                    }
                    let s = format_value(*x, c.decimals);
                    let back = parse_number(&s)
                        .ok_or_else(|| format!("internal: cannot read back '{s}'"))?;
                    if back == null_value {
                        return Err(format!(
                            "curve {} sample {} is written as {s}, which equals the NULL value {null_text} and would read back as missing",
                            c.mnemonic,
                            k + 1
                        ));
                    }
                    if ci == 0 {
                        index_back.push(back);
                    }
                    s
                }
            };
            col.push(s);
        }
        columns.push(col);
    }
    let increasing = index_back.len() < 2 || index_back[1] > index_back[0];
    for (k, w) in index_back.windows(2).enumerate() {
        let ok = if increasing { w[1] > w[0] } else { w[1] < w[0] };
        if !ok {
            return Err(format!(
                "index curve {} is not strictly monotonic at sample {} ({} then {}, as written)",
                index.mnemonic,
                k + 2,
                w[0],
                w[1]
            ));
        }
    }
    let first = index_back.first().copied().unwrap_or(0.0);
    let last = index_back.last().copied().unwrap_or(0.0);
    let step = if n >= 2 {
        let d = (last - first) / (n - 1) as f64;
        let regular = index_back
            .windows(2)
            .all(|w| ((w[1] - w[0]) - d).abs() <= 1e-6 * d.abs());
        if regular {
            step_text(d)
        } else {
            "0".to_string()
        }
    } else {
        "0".to_string()
    };

    let mut out = String::new();
    out.push_str("~VERSION INFORMATION\n");
    header_line(
        &mut out,
        "VERS",
        "",
        "2.0",
        "CWLS LOG ASCII STANDARD - VERSION 2.0",
    );
    header_line(&mut out, "WRAP", "", "NO", "ONE LINE PER DEPTH STEP");
    out.push_str("~WELL INFORMATION\n");
    let first_text = columns
        .first()
        .and_then(|c| c.first())
        .cloned()
        .unwrap_or_default();
    let last_text = columns
        .first()
        .and_then(|c| c.last())
        .cloned()
        .unwrap_or_default();
    header_line(&mut out, "STRT", index.unit, &first_text, "START DEPTH");
    header_line(&mut out, "STOP", index.unit, &last_text, "STOP DEPTH");
    header_line(&mut out, "STEP", index.unit, &step, "STEP");
    header_line(&mut out, "NULL", "", &null_text, "NULL VALUE");
    for it in well_items {
        header_line(&mut out, it.mnemonic, it.unit, it.value, it.description);
    }
    out.push_str("~CURVE INFORMATION\n");
    for c in curves {
        header_line(&mut out, c.mnemonic, c.unit, "", c.description);
    }
    out.push_str("~ASCII\n");
    let widths: Vec<usize> = columns
        .iter()
        .zip(curves)
        .map(|(col, c)| {
            col.iter()
                .map(String::len)
                .max()
                .unwrap_or(0)
                .max(c.mnemonic.len())
        })
        .collect();
    for k in 0..n {
        for (ci, col) in columns.iter().enumerate() {
            let w = widths.get(ci).copied().unwrap_or(0);
            let v = col.get(k).map_or("", String::as_str);
            if ci > 0 {
                out.push(' ');
            }
            let _ = write!(out, "{v:>w$}");
        }
        out.push('\n');
    }
    Ok(out)
}

/// Write an unwrapped LAS 2.0 file at `path`, atomically.
///
/// `curves[0]` is the index (normally `DEPT` in `M`), strictly monotonic with no
/// missing value. The `~W` section gets STRT and STOP (the first and last index
/// values exactly as written in `~A`), STEP (the regular spacing, or 0 when the
/// index is irregular), NULL (`null_value`), then `well_items` in order.
/// Missing samples are written as `null_value`; a present sample that would be
/// written as the NULL value is refused. Samples are printed per
/// [`WriteCurve::decimals`]; with [`Decimals::Shortest`] reading the file back
/// gives exactly the same f64 values.
pub fn write_las2(
    path: &Path,
    well_items: &[WriteItem<'_>],
    curves: &[WriteCurve<'_>],
    null_value: f64,
) -> Result<()> {
    let text = render(well_items, curves, null_value)
        .map_err(|m| Error::inconsistent(format!("cannot write {}: {m}", path.display())))?;
    write_atomic(path, text.as_bytes())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shortest_round_trips() {
        for v in [
            0.1,
            1.0 / 3.0,
            -999.25,
            1e-20,
            6.02214076e23,
            12345.678901234567,
            0.0,
        ] {
            let s = shortest(v);
            assert_eq!(s.parse::<f64>().ok(), Some(v), "{s}");
            assert_eq!(parse_number(&s), Some(v), "{s}");
        }
        assert_eq!(step_text(0.152_400_000_000_000_1), "0.1524");
        assert_eq!(step_text(-0.5), "-0.5");
    }

    #[test]
    fn renders_and_refuses() {
        let dept = [Some(100.0), Some(100.5), Some(101.0)];
        let gr = [Some(55.5), None, Some(1.0 / 3.0)];
        let curves = [
            WriteCurve {
                mnemonic: "DEPT",
                unit: "M",
                description: "DEPTH",
                data: &dept,
                decimals: Decimals::Shortest,
            },
            WriteCurve {
                mnemonic: "GR",
                unit: "GAPI",
                description: "GAMMA RAY",
                data: &gr,
                decimals: Decimals::Shortest,
            },
        ];
        let items = [WriteItem {
            mnemonic: "WELL",
            unit: "",
            value: "NORTH TARN 1",
            description: "WELL",
        }];
        let t = render_las2(&items, &curves, -999.25).unwrap();
        assert!(
            t.contains(" STEP.M                      0.5 : STEP\n"),
            "{t}"
        );
        assert!(t.contains("\n100.5            -999.25\n"), "{t}");
        assert!(t.contains("\n  101 0.3333333333333333\n"), "{t}");

        let bad_null = [Some(1.0), Some(-999.25), Some(2.0)];
        let c2 = [
            curves[0],
            WriteCurve {
                data: &bad_null,
                ..curves[1]
            },
        ];
        let e = render_las2(&[], &c2, -999.25).unwrap_err().to_string();
        assert!(e.contains("equals the NULL value"), "{e}");
        let down = [Some(1.0), Some(1.0), Some(2.0)];
        let c3 = [WriteCurve {
            data: &down,
            ..curves[0]
        }];
        let e = render_las2(&[], &c3, -999.25).unwrap_err().to_string();
        assert!(e.contains("not strictly monotonic"), "{e}");
        let strt = [WriteItem {
            mnemonic: "strt",
            unit: "M",
            value: "1",
            description: "",
        }];
        assert!(render_las2(&strt, &curves, -999.25).is_err());
        let colon = [WriteItem {
            mnemonic: "WELL",
            unit: "",
            value: "A",
            description: "a:b",
        }];
        assert!(render_las2(&colon, &curves, -999.25).is_err());
    }
}
