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
    fn rest(&self, r: usize, rule: ValueRule) -> Option<(usize, usize, Option<usize>)> {
        let n = self.c.len();
        // `(?P<unit>([0-9]+\s)?[^\s]*)`: try with the digits-and-space group, then without.
        let d = self.digit_run.get(r).copied().unwrap_or(0);
        let mut groups = Vec::with_capacity(2);
        if d > 0 && self.c.get(r + d).is_some_and(|&x| is_ws(x)) {
            groups.push(d + 1);
        }
        groups.push(0);
        for g in groups {
            let us = r + g;
            let l_max = self.nonws_run.get(us).copied().unwrap_or(0);
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
    if let Some(fc) = first_colon {
        if !c[..fc].contains(&'.') {
            // `(?P<name>[^:]*):(?P<value>.*)`
            return Some(finish(
                s(&c, 0, fc),
                String::new(),
                s(&c, fc + 1, n),
                String::new(),
                true,
            ));
        }
    }
    // Mnemonic-with-dots rule for ~C.
    let dots_name = kind == LineKind::Curves
        && match first_colon {
            None => line.contains(".."),
            Some(_) => {
                let has = (0..n.saturating_sub(2))
                    .any(|i| c[i] != ' ' && c[i + 1] == '.' && c[i + 2] == '.');
                let dd = (0..n.saturating_sub(1)).find(|&i| c[i] == '.' && c[i + 1] == '.');
                has && match (dd, c.iter().rposition(|&x| x == ':')) {
                    (Some(a), Some(b)) => a < b,
                    _ => false,
                }
            }
        };
    // Name candidates in the regex's priority order: (name_start, name_end, rest_start).
    let mut names: Vec<(usize, usize, usize)> = Vec::new();
    let starts: Vec<usize> = if c.first() == Some(&'.') {
        vec![1, 0]
    } else {
        vec![0]
    };
    for st in starts {
        if dots_name {
            // `(?P<name>[^.].*[.])\.`: first char not a dot, name ends with a dot
            // followed by another dot; longest first.
            if c.get(st).is_some_and(|&x| x != '.') {
                let mut k = n;
                while k > st + 1 {
                    k -= 1;
                    if c[k] == '.' && c[k - 1] == '.' {
                        names.push((st, k, k + 1));
                    }
                }
            }
        } else if let Some(off) = c.get(st..).and_then(|t| t.iter().position(|&x| x == '.')) {
            names.push((st, st + off, st + off + 1));
        }
    }
    let rules: Vec<ValueRule> = match (first_colon, kind) {
        (None, _) => vec![ValueRule::Rest],
        (Some(_), LineKind::Parameter) => vec![ValueRule::TimeColon, ValueRule::LastColon],
        (Some(_), _) => vec![ValueRule::LastColon],
    };
    let m = Matcher::new(&c);
    for rule in rules {
        for &(ns, ne, r) in &names {
            if let Some((ue, ve, ds)) = m.rest(r, rule) {
                return Some(finish(
                    s(&c, ns, ne),
                    s(&c, r, ue),
                    s(&c, ue, ve),
                    ds.map_or(String::new(), |d| s(&c, d, n)),
                    false,
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
