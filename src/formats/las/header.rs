//! One header line, `MNEM.UNIT  VALUE : DESCRIPTION`, split the way lasio 0.31
//! splits it (`lasio.reader.read_header_line` and
//! `configure_metadata_patterns`), written out by hand without a regex engine.
//!
//! The rules (CWLS LAS 2.0 specification, "line format", with lasio's handling
//! of the cases the specification leaves open):
//! * the mnemonic runs to the first dot (a dot at the very start of the line is
//!   skipped first when that still leaves a dot to end the mnemonic);
//! * the unit follows that dot up to the first whitespace; lasio also accepts
//!   digits, one space and a word as a unit (`1000 LBF`, lasio issue 363);
//! * the value runs to the LAST colon and the description follows it, so a
//!   time such as `12:30` in a value is kept whole while a colon in the
//!   description is not possible; in `~P` lasio first tries the first colon
//!   that does not look like part of a time (`hh:mm`);
//! * with no colon the rest of the line is the value; with no dot before the
//!   first colon the text before it is the mnemonic and the rest the value;
//! * in `~C`, a mnemonic ending in a dot (`TIME..S`) is recognised when `..`
//!   follows a non-space character before the last colon.

use super::text::{is_ws, strip};

/// Which section a line is in, as far as line splitting cares.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum LineKind {
    Curves,
    Parameter,
    Other,
}

/// The four fields of a header line, trimmed.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) struct Fields {
    pub name: String,
    pub unit: String,
    pub value: String,
    pub descr: String,
    /// The line had no dot before its first colon (mnemonic without unit
    /// separator): worth a warning.
    pub no_dot: bool,
}

#[derive(Clone, Copy)]
enum ValueRule {
    /// `(?P<value>[^:]*)` on a line without colon: the rest of the line.
    Rest,
    /// `(?P<value>.*):(?P<descr>.*)`: up to the last colon.
    LastColon,
    /// lasio's time-aware lazy rule for `~P`.
    TimeColon,
}

struct Matcher<'a> {
    c: &'a [char],
    /// run[i]: length of the run of non-whitespace starting at i.
    nonws_run: Vec<usize>,
    /// digit_run[i]: length of the run of ASCII digits starting at i.
    digit_run: Vec<usize>,
    last_colon: Option<usize>,
    /// Positions of colons that lasio's time rule accepts, ascending.
    time_colons: Vec<usize>,
}

impl<'a> Matcher<'a> {
    fn new(c: &'a [char]) -> Self {
        let n = c.len();
        let mut nonws_run = vec![0; n + 1];
        let mut digit_run = vec![0; n + 1];
        for i in (0..n).rev() {
            if !is_ws(c[i]) {
                nonws_run[i] = nonws_run[i + 1] + 1;
            }
            if c[i].is_ascii_digit() {
                digit_run[i] = digit_run[i + 1] + 1;
            }
        }
        let last_colon = c.iter().rposition(|&x| x == ':');
        // (?<!( [0-2][0-3]| hh| HH)):(?!([0-5][0-9]|mm|MM))
        let time_colons = (0..n)
            .filter(|&i| c[i] == ':')
            .filter(|&i| {
                let before = if i >= 3 {
                    let (a, b, d) = (c[i - 3], c[i - 2], c[i - 1]);
                    a == ' '
                        && (('0'..='2').contains(&b) && ('0'..='3').contains(&d)
                            || (b == 'h' && d == 'h')
                            || (b == 'H' && d == 'H'))
                } else {
                    false
                };
                let after = match (c.get(i + 1), c.get(i + 2)) {
                    (Some(&x), Some(&y)) => {
                        (('0'..='5').contains(&x) && y.is_ascii_digit())
                            || (x == 'm' && y == 'm')
                            || (x == 'M' && y == 'M')
                    }
                    _ => false,
                };
                !before && !after
            })
            .collect();
        Matcher {
            c,
            nonws_run,
            digit_run,
            last_colon,
            time_colons,
        }
    }

    /// Match `unit value [: descr]` from position `r` (just after the dot that
    /// ends the mnemonic). Returns (unit_end, value_end, descr_start) where the
    /// unit is `r..unit_end`, the value `unit_end..value_end`.
    fn rest(
        &self,
        r: usize,
        with_unit: bool,
        rule: ValueRule,
    ) -> Option<(usize, usize, Option<usize>)> {
        let n = self.c.len();
        // `(?P<unit>([0-9]+\s)?[^\s]*)`: try with the digits-and-space group, then without.
        let d = self.digit_run.get(r).copied().unwrap_or(0);
        let mut groups = Vec::with_capacity(2);
        if with_unit && d > 0 && self.c.get(r + d).is_some_and(|&x| is_ws(x)) {
            groups.push(d + 1);
        }
        groups.push(0);
        for g in groups {
            let us = r + g;
            let l_max = if with_unit {
                self.nonws_run.get(us).copied().unwrap_or(0)
            } else {
                0
            };
            let u_max = us + l_max;
            match rule {
                ValueRule::Rest => return Some((u_max, n, None)),
                ValueRule::LastColon => {
                    if let Some(lc) = self.last_colon {
                        if lc >= u_max {
                            return Some((u_max, lc, Some(lc + 1)));
                        }
                        if lc >= us {
                            // The unit gives back characters up to the last colon.
                            return Some((lc, lc, Some(lc + 1)));
                        }
                    }
                }
                ValueRule::TimeColon => {
                    // Lazy value: the first accepted colon at or after the value start,
                    // with the unit as long as possible.
                    if let Some(&c1) = self.time_colons.iter().find(|&&p| p >= u_max) {
                        return Some((u_max, c1, Some(c1 + 1)));
                    }
                    if let Some(&cl) = self.time_colons.iter().rev().find(|&&p| p >= us) {
                        return Some((cl, cl, Some(cl + 1)));
                    }
                }
            }
        }
        None
    }
}

fn s(c: &[char], a: usize, b: usize) -> String {
    c.get(a..b.max(a))
        .map_or(String::new(), |x| x.iter().collect())
}

/// Split a header line (already trimmed, not a comment, not a section title).
/// `None` when lasio would raise `LASHeaderError` (the line has no dot, or no
/// field layout fits).
pub(crate) fn split_line(line: &str, kind: LineKind) -> Option<Fields> {
    let c: Vec<char> = line.chars().collect();
    let n = c.len();
    let first_colon = c.iter().position(|&x| x == ':');
    let finish = |name: String, unit: String, value: String, descr: String, no_dot: bool| {
        let mut unit = strip(&unit).to_string();
        if unit.ends_with('.') {
            unit = unit.trim_matches('.').to_string();
        }
        Fields {
            name: strip(&name).to_string(),
            unit,
            value: strip(&value).to_string(),
            descr: strip(&descr).to_string(),
            no_dot,
        }
    };
    // lasio's `configure_metadata_patterns`, in its order: a line with a
    // colon but no dot before it has no unit and no description (the name runs
    // to the first colon, the value is the rest); a line without colon has no
    // description; in ~C a `..` switches to the mnemonic-with-dots rule.
    let no_dot = first_colon.is_some_and(|fc| !c[..fc].contains(&'.'));
    let last_colon = c.iter().rposition(|&x| x == ':');
    let dots_name = kind == LineKind::Curves
        && match first_colon {
            None => line.contains(".."),
            Some(_) => {
                let has = (0..n.saturating_sub(2))
                    .any(|i| c[i] != ' ' && c[i + 1] == '.' && c[i + 2] == '.');
                let dd = (0..n.saturating_sub(1)).find(|&i| c[i] == '.' && c[i + 1] == '.');
                has && matches!((dd, last_colon), (Some(a), Some(b)) if a < b)
            }
        };
    // Name candidates in the regex's priority order: (name_start, name_end, rest_start).
    let mut names: Vec<(usize, usize, usize)> = Vec::new();
    if dots_name {
        // `\.?(?P<name>[^.].*[.])\.`: first char not a dot, the name ends with a
        // dot followed by another dot; longest first.
        let starts: &[usize] = if c.first() == Some(&'.') {
            &[1, 0]
        } else {
            &[0]
        };
        for &st in starts {
            if c.get(st).is_some_and(|&x| x != '.') {
                let mut k = n;
                while k > st + 1 {
                    k -= 1;
                    if c[k] == '.' && c[k - 1] == '.' {
                        names.push((st, k, k + 1));
                    }
                }
            }
        }
    } else if let (true, Some(fc)) = (no_dot, first_colon) {
        // `(?P<name>[^:]*):`
        names.push((0, fc, fc + 1));
    } else {
        // `\.?(?P<name>[^.]*)\.`
        let starts: &[usize] = if c.first() == Some(&'.') {
            &[1, 0]
        } else {
            &[0]
        };
        for &st in starts {
            if let Some(off) = c.get(st..).and_then(|t| t.iter().position(|&x| x == '.')) {
                names.push((st, st + off, st + off + 1));
            }
        }
    }
    let with_unit = !no_dot;
    let rules: Vec<ValueRule> = match (first_colon, kind) {
        (None, _) => vec![ValueRule::Rest],
        _ if no_dot => vec![ValueRule::Rest],
        (Some(_), LineKind::Parameter) => vec![ValueRule::TimeColon, ValueRule::LastColon],
        (Some(_), _) => vec![ValueRule::LastColon],
    };
    let m = Matcher::new(&c);
    for rule in rules {
        for &(ns, ne, r) in &names {
            if let Some((ue, ve, ds)) = m.rest(r, with_unit, rule) {
                return Some(finish(
                    s(&c, ns, ne),
                    s(&c, r, ue),
                    s(&c, ue, ve),
                    ds.map_or(String::new(), |d| s(&c, d, n)),
                    no_dot,
                ));
            }
        }
    }
    None
}

/// lasio's `SectionParser.strip_brackets` on a unit: trim, then drop one pair
/// of enclosing `[]` or `()`.
pub(crate) fn strip_brackets(u: &str) -> String {
    let t = strip(u);
    let c: Vec<char> = t.chars().collect();
    if c.len() >= 2 {
        if let (Some(&a), Some(&b)) = (c.first(), c.last()) {
            if (a == '[' && b == ']') || (a == '(' && b == ')') {
                return c[1..c.len() - 1].iter().collect();
            }
        }
    }
    t.to_string()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn f(line: &str, kind: LineKind) -> (String, String, String, String) {
        let x = split_line(line, kind).unwrap();
        (x.name, x.unit, x.value, x.descr)
    }

    fn t(a: &str, b: &str, c: &str, d: &str) -> (String, String, String, String) {
        (a.into(), b.into(), c.into(), d.into())
    }

    // Expected values printed by lasio 0.31 `reader.read_header_line` (run by
    // hand with /work/venv/bin/python while writing this module).
    #[test]
    fn lasio_splits() {
        use LineKind::*;
        assert_eq!(
            f("STRT.M        1670.000000:", Other),
            t("STRT", "M", "1670.000000", "")
        );
        assert_eq!(
            f("NULL. -9999.0: NULL VALUE", Other),
            t("NULL", "", "-9999.0", "NULL VALUE")
        );
        assert_eq!(
            f("TIME.      12:30 : time", Other),
            t("TIME", "", "12:30", "time")
        );
        assert_eq!(
            f("TIME.  12:30 : time", Parameter),
            t("TIME", "", "12:30", "time")
        );
        assert_eq!(
            f("TDD.. FT 123 : dots", Parameter),
            t("TDD", "", "FT 123", "dots")
        );
        assert_eq!(f(".M    : blank", Curves), t("", "M", "", "blank"));
        assert_eq!(
            f("PRES.1000 LBF  25 : pressure", Other),
            t("PRES", "1000 LBF", "25", "pressure")
        );
        assert_eq!(
            f("WELL : NO DOT HERE", Other),
            t("WELL", "", "NO DOT HERE", "")
        );
        assert_eq!(f("A.B:C", Other), t("A", "B", "", "C"));
        assert_eq!(f("NOCOLON.FT  12 3", Other), t("NOCOLON", "FT", "12 3", ""));
        assert_eq!(
            f("TIME..S   5 : time in s", Curves),
            t("TIME.", "S", "5", "time in s")
        );
        assert_eq!(
            f("DATE.  2020-01-02 10:15 : x", Parameter),
            t("DATE", "", "2020-01-02 10:15", "x")
        );
        assert_eq!(f("T. 23:59:10 : x", Parameter), t("T", "", "23:59:10", "x"));
        assert_eq!(f("X.  ab:cd : e", Parameter), t("X", "", "ab", "cd : e"));
        assert_eq!(f("Y.U:V:W", Other), t("Y", "U:V", "", "W"));
        assert!(split_line("no dot or colon", Other).is_none());
        assert_eq!(strip_brackets(" (m) "), "m");
    }
}

/// Thousands of random header-like lines split by lasio 0.31's
/// `read_header_line` (tests/reference/lasio_header_lines.py): live when
/// STRATIPRIOR_PYTHON is set, else from the committed golden file.
#[cfg(test)]
mod lasio_lines {
    use super::*;
    use serde_json::Value;
    use std::io::Write;
    use std::process::{Command, Stdio};

    fn ours(line: &str, kind: LineKind) -> Value {
        match split_line(line, kind) {
            None => Value::Null,
            Some(f) => serde_json::json!([f.name, f.unit, f.value, f.descr]),
        }
    }

    #[test]
    fn random_lines_split_as_lasio_splits_them() {
        let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
        let gpath = root.join("tests/golden/las/header_lines.json");
        let golden: Value =
            serde_json::from_str(&std::fs::read_to_string(&gpath).unwrap()).unwrap();
        let lines: Vec<String> = golden["lines"]
            .as_array()
            .unwrap()
            .iter()
            .map(|l| l.as_str().unwrap().to_string())
            .collect();
        let mut results = golden["results"].clone();
        let mut label = "golden";
        match std::env::var("STRATIPRIOR_PYTHON") {
            Ok(py) if !py.trim().is_empty() => {
                let mut child = Command::new(&py)
                    .arg(root.join("tests/reference/lasio_header_lines.py"))
                    .stdin(Stdio::piped())
                    .stdout(Stdio::piped())
                    .spawn()
                    .unwrap();
                let input = serde_json::to_vec(&lines).unwrap();
                child.stdin.take().unwrap().write_all(&input).unwrap();
                let out = child.wait_with_output().unwrap();
                assert!(out.status.success(), "lasio_header_lines.py failed");
                let live: Value = serde_json::from_slice(&out.stdout).unwrap();
                assert_eq!(live, results, "golden header_lines.json is stale");
                results = live;
                label = "live";
            }
            _ => assert!(
                std::env::var("STRATIPRIOR_REQUIRE_PYTHON").as_deref() != Ok("1"),
                "STRATIPRIOR_REQUIRE_PYTHON=1 but STRATIPRIOR_PYTHON is not set"
            ),
        }
        let mut bad = Vec::new();
        let mut n = 0;
        for (key, kind) in [
            ("Other", LineKind::Other),
            ("Curves", LineKind::Curves),
            ("Parameter", LineKind::Parameter),
        ] {
            let want = results[key].as_array().unwrap();
            assert_eq!(want.len(), lines.len());
            for (line, w) in lines.iter().zip(want) {
                n += 1;
                let o = ours(line, kind);
                if &o != w && bad.len() < 20 {
                    bad.push(format!("{key} {line:?}: ours {o}, lasio {w}"));
                }
            }
        }
        println!("header lines ({label}): {n} splits compared with lasio");
        assert!(bad.is_empty(), "{}", bad.join("\n"));
    }
}
