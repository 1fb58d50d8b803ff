//! The strict LAS 1.2 / 2.0 reader.

use super::header::{split_line, strip_brackets, LineKind};
use super::text::{decode, parse_number, split_lines, strip, tokens};
use super::{HeaderItem, LasCurve, LasFile, LasSections};
use crate::error::{Error, Result};
use std::path::Path;

/// One section: its title line (trimmed), 1-based line number and body lines
/// (1-based number, trimmed text).
struct Section<'a> {
    title: &'a str,
    line: usize,
    letter: char,
    body: Vec<(usize, &'a str)>,
}

struct Ctx<'p> {
    path: &'p Path,
    warnings: Vec<String>,
}

impl Ctx<'_> {
    fn err(&self, line: usize, msg: impl Into<String>) -> Error {
        Error::input(self.path, Some(line), msg)
    }
    fn warn(&mut self, line: usize, msg: impl AsRef<str>) {
        self.warnings.push(format!("line {line}: {}", msg.as_ref()));
    }
}

/// lasio's duplicate naming (`SectionItems.assign_duplicate_suffixes`): an
/// empty mnemonic is `UNKNOWN`; a mnemonic that occurs k > 1 times (ignoring
/// case) becomes `M:1` ... `M:k` in order of appearance.
fn assign_unique(names: &[String]) -> Vec<String> {
    let useful: Vec<String> = names
        .iter()
        .map(|n| {
            let up = strip(n).to_uppercase();
            if up.is_empty() {
                "UNKNOWN".to_string()
            } else {
                up
            }
        })
        .collect();
    let mut out = Vec::with_capacity(useful.len());
    let mut counts: std::collections::HashMap<&str, usize> = std::collections::HashMap::new();
    for u in &useful {
        *counts.entry(u.as_str()).or_insert(0) += 1;
    }
    let mut seen: std::collections::HashMap<&str, usize> = std::collections::HashMap::new();
    for u in &useful {
        let total = counts.get(u.as_str()).copied().unwrap_or(1);
        if total > 1 {
            let k = seen.entry(u.as_str()).or_insert(0);
            *k += 1;
            out.push(format!("{u}:{k}"));
        } else {
            out.push(u.clone());
        }
    }
    out
}

/// Parse the items of a header section. `swap_12` gives the LAS 1.2 `~W`
/// convention (value after the colon) for items other than STRT/STOP/STEP/NULL.
fn parse_items(
    ctx: &mut Ctx<'_>,
    sec: &Section<'_>,
    kind: LineKind,
    swap_12: bool,
) -> Result<Vec<HeaderItem>> {
    let mut items = Vec::new();
    for &(ln, text) in &sec.body {
        if text.is_empty() || text.starts_with('#') {
            continue;
        }
        let Some(f) = split_line(text, kind) else {
            return Err(ctx.err(
                ln,
                format!(
                    "cannot read header line '{}' in section {}; expected MNEMONIC.UNIT VALUE : DESCRIPTION",
                    short(text),
                    short(sec.title)
                ),
            ));
        };
        if f.no_dot {
            ctx.warn(
                ln,
                format!(
                    "header line '{}' has no '.' after the mnemonic; read as mnemonic '{}' with value '{}'",
                    short(text),
                    f.name,
                    f.value
                ),
            );
        }
        let upper = f.name.to_uppercase();
        let swap = swap_12 && !matches!(upper.as_str(), "STRT" | "STOP" | "STEP" | "NULL");
        if swap && f.value.contains(':') {
            ctx.warn(
                ln,
                format!(
                    "LAS 1.2 item {}: the value is taken from after the last colon ('{}'); the text before it ('{}') has a colon too, so the value may have been cut",
                    f.name, f.descr, f.value
                ),
            );
        }
        let (value, description) = if swap {
            (f.descr, f.value)
        } else {
            (f.value, f.descr)
        };
        items.push(HeaderItem {
            mnemonic: String::new(),
            original_mnemonic: f.name,
            unit: strip_brackets(&f.unit),
            value,
            description,
            line: ln,
        });
    }
    let names: Vec<String> = items.iter().map(|i| i.original_mnemonic.clone()).collect();
    for (it, m) in items.iter_mut().zip(assign_unique(&names)) {
        it.mnemonic = m;
    }
    Ok(items)
}

fn short(s: &str) -> String {
    let mut out: String = s.chars().take(80).collect();
    if s.chars().nth(80).is_some() {
        out.push_str("...");
    }
    out
}

/// The single item with this (upper-case) original mnemonic; an error when it
/// occurs twice.
fn unique_item<'a>(
    ctx: &Ctx<'_>,
    items: &'a [HeaderItem],
    mnem: &str,
) -> Result<Option<&'a HeaderItem>> {
    let mut found: Option<&HeaderItem> = None;
    for it in items {
        if it.original_mnemonic.to_uppercase() == mnem {
            if let Some(prev) = found {
                return Err(ctx.err(
                    it.line,
                    format!(
                        "{mnem} is given twice (lines {} and {}); expected it once",
                        prev.line, it.line
                    ),
                ));
            }
            found = Some(it);
        }
    }
    Ok(found)
}

fn required_number(
    ctx: &Ctx<'_>,
    items: &[HeaderItem],
    mnem: &str,
    sec: &Section<'_>,
    what: &str,
) -> Result<(f64, usize)> {
    let Some(it) = unique_item(ctx, items, mnem)? else {
        return Err(ctx.err(
            sec.line,
            format!(
                "section {} has no {mnem} item; expected {what}",
                short(sec.title)
            ),
        ));
    };
    match parse_number(strip(&it.value)) {
        Some(v) => Ok((v, it.line)),
        None => Err(ctx.err(
            it.line,
            format!(
                "{mnem} value '{}' is not a number; expected {what}",
                it.value
            ),
        )),
    }
}

/// Text of a free-text section: body lines trimmed, joined with `\n` (lasio
/// keeps blank and `#` lines there too).
fn section_text(sec: &Section<'_>) -> String {
    sec.body
        .iter()
        .map(|(_, t)| *t)
        .collect::<Vec<_>>()
        .join("\n")
}

/// Parse a LAS 1.2 or 2.0 file from its bytes; `path` is used in messages only.
///
/// See the [module documentation](super) for what is accepted and refused.
pub fn parse_las(bytes: &[u8], path: &Path) -> Result<LasFile> {
    let mut ctx = Ctx {
        path,
        warnings: Vec::new(),
    };
    let text = decode(bytes).map_err(|e| Error::input(path, e.line, e.msg))?;
    if strip(&text).is_empty() {
        return Err(Error::input(
            path,
            None,
            "file is empty; expected a LAS file starting with a ~V (version) section",
        ));
    }
    let lines = split_lines(&text);

    // Sections.
    let mut sections: Vec<Section<'_>> = Vec::new();
    for (i, raw) in lines.iter().enumerate() {
        let ln = i + 1;
        let t = strip(raw);
        if t.starts_with('~') {
            let letter = t
                .chars()
                .nth(1)
                .map(|c| c.to_ascii_uppercase())
                .unwrap_or(' ');
            sections.push(Section {
                title: t,
                line: ln,
                letter,
                body: Vec::new(),
            });
        } else if let Some(sec) = sections.last_mut() {
            sec.body.push((ln, t));
        } else if !t.is_empty() && !t.starts_with('#') {
            return Err(ctx.err(
                ln,
                format!(
                    "text '{}' before the first section; a LAS file starts with a ~V (version) section",
                    short(t)
                ),
            ));
        }
    }
    let Some(first) = sections.first() else {
        return Err(Error::input(
            path,
            None,
            "no section (line starting with '~') found; this is not a LAS file",
        ));
    };

    // ~V first: the version decides everything else.
    if first.letter != 'V' {
        return Err(ctx.err(
            first.line,
            format!(
                "first section is '{}'; expected ~V (version information) first",
                short(first.title)
            ),
        ));
    }
    let vsec = first;
    let version_items = parse_items(&mut ctx, vsec, LineKind::Other, false)?;
    let Some(vers) = unique_item(&ctx, &version_items, "VERS")? else {
        return Err(ctx.err(
            vsec.line,
            "~V section has no VERS item; expected VERS. 1.2 or VERS. 2.0",
        ));
    };
    let version = match parse_number(strip(&vers.value)) {
        Some(1.2) => "1.2",
        Some(2.0) => "2.0",
        Some(v) if (3.0..4.0).contains(&v) => {
            return Err(Error::unsupported(
                path,
                Some(vers.line),
                format!(
                    "LAS {} is not supported; this reader reads LAS 1.2 and 2.0 (save the file as LAS 2.0)",
                    vers.value
                ),
            ))
        }
        _ => {
            return Err(ctx.err(
                vers.line,
                format!(
                    "VERS value '{}' is not a LAS version this reader knows; expected 1.2 or 2.0",
                    vers.value
                ),
            ))
        }
    };
    let Some(wrap) = unique_item(&ctx, &version_items, "WRAP")? else {
        return Err(ctx.err(
            vsec.line,
            "~V section has no WRAP item; expected WRAP. YES or WRAP. NO",
        ));
    };
    let wrapped = match strip(&wrap.value).to_uppercase().as_str() {
        "YES" => true,
        "NO" => false,
        _ => {
            return Err(ctx.err(
                wrap.line,
                format!("WRAP value '{}' is not YES or NO", wrap.value),
            ))
        }
    };
    if let Some(dlm) = unique_item(&ctx, &version_items, "DLM")? {
        if !strip(&dlm.value).eq_ignore_ascii_case("SPACE") {
            return Err(Error::unsupported(
                path,
                Some(dlm.line),
                format!(
                    "DLM '{}': only space-delimited data is supported",
                    dlm.value
                ),
            ));
        }
    }

    // Section kinds and order.
    let mut seen: Vec<(char, usize)> = Vec::new();
    let mut data_sec: Option<&Section<'_>> = None;
    for sec in &sections {
        let up = sec.title.to_uppercase();
        if ["_DATA", "_PARAMETER", "_DEFINITION"]
            .iter()
            .any(|k| up.contains(k))
        {
            return Err(Error::unsupported(
                path,
                Some(sec.line),
                format!(
                    "section '{}' is a LAS 3.0 section; LAS 3.0 is not supported",
                    short(sec.title)
                ),
            ));
        }
        if let Some(d) = data_sec {
            return Err(ctx.err(
                sec.line,
                format!(
                    "section '{}' follows the ~A section (line {}); ~A must be the last section",
                    short(sec.title),
                    d.line
                ),
            ));
        }
        if matches!(sec.letter, 'V' | 'W' | 'C' | 'P' | 'O' | 'A') {
            if let Some(&(_, l0)) = seen.iter().find(|(c, _)| *c == sec.letter) {
                return Err(ctx.err(
                    sec.line,
                    format!(
                        "second ~{} section (the first is at line {l0}); expected one",
                        sec.letter
                    ),
                ));
            }
            seen.push((sec.letter, sec.line));
        }
        if sec.letter == 'A' {
            data_sec = Some(sec);
        }
    }
    let find = |c: char| sections.iter().find(|s| s.letter == c);
    let Some(wsec) = find('W') else {
        return Err(Error::input(
            path,
            None,
            "no ~W (well information) section; expected one after ~V",
        ));
    };
    let Some(csec) = find('C') else {
        return Err(Error::input(
            path,
            None,
            "no ~C (curve information) section; expected one naming the data columns",
        ));
    };
    let Some(asec) = data_sec else {
        return Err(Error::input(
            path,
            None,
            "no ~A (data) section; expected it as the last section",
        ));
    };

    let well = parse_items(&mut ctx, wsec, LineKind::Other, version == "1.2")?;
    let (strt, strt_line) = required_number(&ctx, &well, "STRT", wsec, "the first index value")?;
    let (stop, stop_line) = required_number(&ctx, &well, "STOP", wsec, "the last index value")?;
    let (step, step_line) = required_number(
        &ctx,
        &well,
        "STEP",
        wsec,
        "the index step (0 when irregular)",
    )?;
    let (null_value, _) = required_number(
        &ctx,
        &well,
        "NULL",
        wsec,
        "the value that marks missing samples, e.g. -999.25",
    )?;

    let curve_items = parse_items(&mut ctx, csec, LineKind::Curves, false)?;
    if curve_items.is_empty() {
        return Err(ctx.err(
            csec.line,
            "~C section lists no curves; expected one line per data column, the index first",
        ));
    }
    for it in &curve_items {
        if strip(&it.original_mnemonic).is_empty() {
            ctx.warn(
                it.line,
                "curve with an empty mnemonic; named UNKNOWN (as lasio does)",
            );
        }
    }
    let parameters = match find('P') {
        Some(p) => parse_items(&mut ctx, p, LineKind::Parameter, false)?,
        None => Vec::new(),
    };
    let other = find('O').map(section_text);
    let extra = sections
        .iter()
        .filter(|s| !matches!(s.letter, 'V' | 'W' | 'C' | 'P' | 'O' | 'A'))
        .map(|s| (s.title.get(1..).unwrap_or("").to_string(), section_text(s)))
        .collect();

    // Data.
    let ncurves = curve_items.len();
    let cols = read_data(&ctx, asec, csec, ncurves, wrapped, null_value)?;

    // Consistency of STRT/STOP/STEP with the data: warnings only.
    let index: Vec<f64> = cols
        .first()
        .map(|c| c.iter().map(|v| v.unwrap_or(f64::NAN)).collect())
        .unwrap_or_default();
    check_range(
        &mut ctx,
        &index,
        (strt, strt_line),
        (stop, stop_line),
        (step, step_line),
        null_value,
    );
    let idx_unit = curve_items.first().map_or("", |c| c.unit.as_str());
    if let Some(s) = well
        .iter()
        .find(|i| i.original_mnemonic.eq_ignore_ascii_case("STRT"))
    {
        if !s.unit.is_empty() && !idx_unit.is_empty() && !s.unit.eq_ignore_ascii_case(idx_unit) {
            ctx.warn(
                s.line,
                format!(
                    "STRT is in '{}' but the index curve is in '{idx_unit}'",
                    s.unit
                ),
            );
        }
    }

    let curves: Vec<LasCurve> = curve_items
        .iter()
        .zip(cols)
        .map(|(it, data)| LasCurve {
            mnemonic: it.mnemonic.clone(),
            original_mnemonic: it.original_mnemonic.clone(),
            unit: it.unit.clone(),
            api_code: it.value.clone(),
            description: it.description.clone(),
            line: it.line,
            data,
        })
        .collect();

    Ok(LasFile {
        path: path.to_path_buf(),
        version: version.to_string(),
        wrapped,
        null_value,
        sections: LasSections {
            version: version_items,
            well,
            curves: curve_items,
            parameters,
            other,
            extra,
        },
        curves,
        warnings: ctx.warnings,
    })
}

/// Read `~A` into columns, checking row shape, numbers and the index.
fn read_data(
    ctx: &Ctx<'_>,
    asec: &Section<'_>,
    csec: &Section<'_>,
    ncurves: usize,
    wrapped: bool,
    null_value: f64,
) -> Result<Vec<Vec<Option<f64>>>> {
    let mut cols: Vec<Vec<Option<f64>>> = vec![Vec::new(); ncurves];
    // Current record: values and the line where it started.
    let mut rec: Vec<(f64, usize)> = Vec::with_capacity(ncurves);
    let mut rec_line = 0usize;
    let mut prev_index: Option<(f64, usize)> = None;
    let mut direction: Option<bool> = None;
    let mut rows = 0usize;

    let mut finish_record = |rec: &mut Vec<(f64, usize)>, rec_line: usize| -> Result<()> {
        let Some(&(depth, _)) = rec.first() else {
            return Ok(());
        };
        if depth == null_value {
            return Err(ctx.err(
                rec_line,
                format!("index value {depth} is the NULL value; every depth step needs its depth"),
            ));
        }
        if let Some((p, pl)) = prev_index {
            let up = depth > p;
            if depth == p {
                return Err(ctx.err(
                    rec_line,
                    format!("depth {depth} repeats the depth at line {pl}; the index must strictly increase or strictly decrease"),
                ));
            }
            match direction {
                None => direction = Some(up),
                Some(d) if d != up => {
                    return Err(ctx.err(
                        rec_line,
                        format!(
                            "depth {depth} after {p} (line {pl}) reverses the direction of the index; it must strictly {} throughout",
                            if d { "increase" } else { "decrease" }
                        ),
                    ));
                }
                _ => {}
            }
        }
        prev_index = Some((depth, rec_line));
        for (k, &(v, _)) in rec.iter().enumerate() {
            if let Some(col) = cols.get_mut(k) {
                col.push(if k > 0 && v == null_value {
                    None
                } else {
                    Some(v)
                });
            }
        }
        rows += 1;
        rec.clear();
        Ok(())
    };

    for &(ln, text) in &asec.body {
        if text.is_empty() || text.starts_with('#') {
            continue;
        }
        let mut vals: Vec<(f64, usize)> = Vec::new();
        for (k, tok) in tokens(text).enumerate() {
            match parse_number(tok) {
                Some(v) => vals.push((v, ln)),
                None => {
                    return Err(ctx.err(
                        ln,
                        format!(
                            "value '{}' (item {} on the line) is not a number; expected decimal numbers, with {} for missing samples",
                            short(tok),
                            k + 1,
                            null_value
                        ),
                    ))
                }
            }
        }
        if !wrapped {
            if vals.len() != ncurves {
                let what = if vals.len() < ncurves {
                    "too few"
                } else {
                    "too many"
                };
                return Err(ctx.err(
                    ln,
                    format!(
                        "data row has {} values ({what}); expected {ncurves}, one per curve of the ~C section (line {})",
                        vals.len(),
                        csec.line
                    ),
                ));
            }
            rec = vals;
            finish_record(&mut rec, ln)?;
            continue;
        }
        // Wrapped: the index alone on the first line of each depth step.
        if rec.is_empty() {
            if vals.len() != 1 {
                return Err(ctx.err(
                    ln,
                    format!(
                        "wrapped data: a depth step starts with the index alone on its line, but this line has {} values",
                        vals.len()
                    ),
                ));
            }
            rec_line = ln;
            rec.extend(vals);
        } else {
            let need = ncurves.saturating_sub(rec.len());
            if vals.len() > need {
                return Err(ctx.err(
                    ln,
                    format!(
                        "wrapped data: the depth step starting at line {rec_line} needs {need} more values but this line has {}; expected {ncurves} values per depth step (one per curve of ~C, line {})",
                        vals.len(),
                        csec.line
                    ),
                ));
            }
            rec.extend(vals);
        }
        if rec.len() == ncurves {
            finish_record(&mut rec, rec_line)?;
        }
    }
    if !rec.is_empty() {
        return Err(ctx.err(
            rec_line,
            format!(
                "wrapped data ends inside the depth step starting at line {rec_line}: it has {} of {ncurves} values",
                rec.len()
            ),
        ));
    }
    if rows == 0 {
        return Err(ctx.err(
            asec.line,
            "~A section has no data rows; expected one depth step per line (or per wrapped block)",
        ));
    }
    Ok(cols)
}

/// Warnings when STRT, STOP or STEP contradict the data (the data wins).
fn check_range(
    ctx: &mut Ctx<'_>,
    index: &[f64],
    strt: (f64, usize),
    stop: (f64, usize),
    step: (f64, usize),
    null_value: f64,
) {
    let (Some(&first), Some(&last)) = (index.first(), index.last()) else {
        return;
    };
    let close = |a: f64, b: f64| (a - b).abs() <= 1e-6 * a.abs().max(b.abs()).max(1.0);
    for (name, (v, ln), actual) in [("STRT", strt, first), ("STOP", stop, last)] {
        if v == null_value {
            ctx.warn(
                ln,
                format!("{name} is the NULL value; the data gives {actual}"),
            );
        } else if !close(v, actual) {
            ctx.warn(
                ln,
                format!(
                    "{name} is {v} but the data's {} depth is {actual}; the data is used",
                    if name == "STRT" { "first" } else { "last" }
                ),
            );
        }
    }
    let (sv, sl) = step;
    if sv != 0.0 && sv != null_value && index.len() >= 2 {
        let mut bad = 0usize;
        let mut first_bad: Option<(usize, f64)> = None;
        for (k, w) in index.windows(2).enumerate() {
            let d = w[1] - w[0];
            if (d - sv).abs() > 1e-3 * sv.abs() {
                bad += 1;
                if first_bad.is_none() {
                    first_bad = Some((k + 1, d));
                }
            }
        }
        if let Some((k, d)) = first_bad {
            ctx.warn(
                sl,
                format!(
                    "STEP is {sv} but {bad} of {} depth intervals differ from it (the first, after depth step {k}, is {d}); the data's depths are used",
                    index.len() - 1
                ),
            );
        }
    }
}
