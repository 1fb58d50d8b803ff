//! The two LAS variants the crate's LAS 2.0 writer does not produce, written
//! here for the demo so that the reader meets them: LAS 1.2 (CWLS 1990, where
//! the `~W` information items carry their value after the colon) and wrapped
//! LAS 2.0 (CWLS 1992: the depth alone on a line, then the other values on
//! lines of at most 80 characters).

use super::wells::LogTable;
use std::fmt::Write as _;

/// NULL value of every demo LAS file.
pub const NULL: f64 = -999.25;

/// Values per continuation line of the wrapped file.
const WRAP_VALUES: usize = 4;

/// A `~W` information item: mnemonic, description (LAS 1.2 name) and value.
#[derive(Debug, Clone)]
pub struct InfoItem {
    /// Mnemonic, e.g. `WELL`.
    pub mnemonic: &'static str,
    /// Long name, e.g. `WELL NAME`.
    pub description: &'static str,
    /// Value.
    pub value: String,
}

fn fmt_value(v: Option<f64>, decimals: usize) -> String {
    match v {
        Some(x) => format!("{x:.decimals$}"),
        None => format!("{NULL:.2}"),
    }
}

fn depth_decimals(t: &LogTable) -> usize {
    if t.depth_unit == "FT" {
        1
    } else {
        2
    }
}

fn curve_section(out: &mut String, t: &LogTable, v12: bool) {
    let dunit = t.depth_unit;
    if v12 {
        let _ = writeln!(out, "~CURVE INFORMATION");
        let _ = writeln!(out, "#MNEM.UNIT      API CODE      CURVE DESCRIPTION");
        let _ = writeln!(
            out,
            "#---------    -------------   ------------------------------"
        );
        let _ = writeln!(out, " {:<14}{:>15}:  1  DEPTH", format!("DEPT.{dunit}"), "");
        for (k, c) in t.curves.iter().enumerate() {
            let mu = format!("{}.{}", c.mnemonic, c.unit);
            let _ = writeln!(out, " {mu:<14}{:>15}:  {}  {}", "", k + 2, c.description);
        }
    } else {
        let _ = writeln!(out, "~Curve Information");
        let _ = writeln!(out, "#MNEM.UNIT          API CODE   : DESCRIPTION");
        let _ = writeln!(
            out,
            " {:<14} {:>16} : Measured depth",
            format!("DEPT.{dunit}"),
            ""
        );
        for c in &t.curves {
            let mu = format!("{}.{}", c.mnemonic, c.unit);
            let _ = writeln!(out, " {mu:<14} {:>16} : {}", "", c.description);
        }
    }
}

fn parameter_section(out: &mut String, params: &[(&str, &str, String, &str)]) {
    let _ = writeln!(out, "~Parameter Information");
    for (m, u, v, d) in params {
        let mu = format!("{m}.{u}");
        let _ = writeln!(out, " {mu:<14} {v:>16} : {d}");
    }
}

/// LAS 1.2 text of `t`: `~V`, `~W` (STRT/STOP/STEP/NULL values before the
/// colon, the information items after it, as LAS 1.2 has them), `~C`, `~P`,
/// `~A` unwrapped.
pub fn render_las12(
    t: &LogTable,
    items: &[InfoItem],
    params: &[(&str, &str, String, &str)],
) -> String {
    let mut out = String::new();
    let dd = depth_decimals(t);
    let dunit = t.depth_unit;
    let _ = writeln!(out, "~VERSION INFORMATION");
    let _ = writeln!(
        out,
        " VERS.                 1.2:   CWLS LOG ASCII STANDARD - VERSION 1.2"
    );
    let _ = writeln!(out, " WRAP.                  NO:   ONE LINE PER DEPTH STEP");
    let _ = writeln!(out, "~WELL INFORMATION BLOCK");
    let _ = writeln!(out, "#MNEM.UNIT       DATA TYPE    INFORMATION");
    let _ = writeln!(
        out,
        "#---------    -------------   ------------------------------"
    );
    let first = t.depth.first().copied().unwrap_or(0.0);
    let last = t.depth.last().copied().unwrap_or(0.0);
    for (m, v, d) in [
        ("STRT", format!("{first:.dd$}"), "START DEPTH"),
        ("STOP", format!("{last:.dd$}"), "STOP DEPTH"),
        ("STEP", format!("{:.dd$}", t.step), "STEP"),
    ] {
        let _ = writeln!(out, " {:<9}{v:>16}:   {d}", format!("{m}.{dunit}"));
    }
    let _ = writeln!(
        out,
        " {:<9}{:>16}:   NULL VALUE",
        "NULL.",
        format!("{NULL:.2}")
    );
    for it in items {
        let _ = writeln!(
            out,
            " {:<9}{:>16}:   {}",
            format!("{}.", it.mnemonic),
            it.description,
            it.value
        );
    }
    curve_section(&mut out, t, true);
    parameter_section(&mut out, params);
    let _ = write!(out, "~A  DEPTH");
    for c in &t.curves {
        let _ = write!(out, " {:>10}", c.mnemonic);
    }
    out.push('\n');
    for (k, d) in t.depth.iter().enumerate() {
        let _ = write!(out, "{d:>10.dd$}");
        for c in &t.curves {
            let _ = write!(
                out,
                " {:>10}",
                fmt_value(c.values.get(k).copied().flatten(), c.decimals)
            );
        }
        out.push('\n');
    }
    out
}

/// Wrapped LAS 2.0 text of `t`: each depth alone on a line, then the curve
/// values on continuation lines of four values each (at most 45 characters).
pub fn render_las20_wrapped(
    t: &LogTable,
    items: &[InfoItem],
    params: &[(&str, &str, String, &str)],
) -> String {
    let mut out = String::new();
    let dd = depth_decimals(t);
    let dunit = t.depth_unit;
    let _ = writeln!(out, "~Version Information");
    let _ = writeln!(
        out,
        " VERS.                 2.0 : CWLS log ASCII Standard - version 2.0"
    );
    let _ = writeln!(
        out,
        " WRAP.                 YES : Multiple lines per depth step"
    );
    let _ = writeln!(out, "~Well Information");
    let _ = writeln!(out, "#MNEM.UNIT              DATA : DESCRIPTION");
    let first = t.depth.first().copied().unwrap_or(0.0);
    let last = t.depth.last().copied().unwrap_or(0.0);
    for (m, v, d) in [
        ("STRT", format!("{first:.dd$}"), "First index value"),
        ("STOP", format!("{last:.dd$}"), "Last index value"),
        ("STEP", format!("{:.dd$}", t.step), "Step"),
    ] {
        let _ = writeln!(out, " {:<14} {v:>16} : {d}", format!("{m}.{dunit}"));
    }
    let _ = writeln!(
        out,
        " {:<14} {:>16} : Null value",
        "NULL.",
        format!("{NULL:.2}")
    );
    for it in items {
        let _ = writeln!(
            out,
            " {:<14} {:>16} : {}",
            format!("{}.", it.mnemonic),
            it.value,
            it.description
        );
    }
    curve_section(&mut out, t, false);
    parameter_section(&mut out, params);
    let _ = writeln!(out, "~ASCII Log Data");
    for (k, d) in t.depth.iter().enumerate() {
        let _ = writeln!(out, "{d:.dd$}");
        // at most WRAP_VALUES values per continuation line (well under 80 characters)
        for chunk in t.curves.chunks(WRAP_VALUES) {
            for c in chunk {
                let _ = write!(
                    out,
                    " {:>10}",
                    fmt_value(c.values.get(k).copied().flatten(), c.decimals)
                );
            }
            out.push('\n');
        }
    }
    out
}
