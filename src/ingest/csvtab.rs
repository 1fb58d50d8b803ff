//! Reading the small CSV inputs (well table, deviation surveys, tops) with
//! named columns and errors that name the file, line and column.

use crate::error::{Error, Result};
use std::path::{Path, PathBuf};

/// A CSV file read into rows of the requested columns.
#[derive(Debug, Clone)]
pub struct Table {
    /// The file.
    pub path: PathBuf,
    /// Rows: 1-based line number and the requested columns' text, trimmed.
    pub rows: Vec<(usize, Vec<String>)>,
    /// The requested column names, in the order of the row values.
    pub columns: Vec<String>,
}

/// Read `path` as CSV with a header row holding at least the `required`
/// columns (case-insensitive, any order, extra columns ignored) and optionally
/// the `optional` ones (empty strings where absent). Blank lines and lines
/// starting with `#` are skipped.
pub fn read_table(path: &Path, required: &[&str], optional: &[&str]) -> Result<Table> {
    let bytes = std::fs::read(path).map_err(|e| Error::io(path, e))?;
    let text = String::from_utf8(bytes).map_err(|e| {
        let line = 1 + e.as_bytes()[..e.utf8_error().valid_up_to()]
            .iter()
            .filter(|&&b| b == b'\n')
            .count();
        Error::input(path, Some(line), "not UTF-8 text; expected a CSV file")
    })?;
    let text = text.strip_prefix('\u{feff}').unwrap_or(&text);
    let mut header: Option<(usize, Vec<Option<usize>>)> = None;
    let mut rows = Vec::new();
    let mut header_len = 0usize;
    let all: Vec<&str> = required.iter().chain(optional).copied().collect();
    for (k, raw_line) in text.lines().enumerate() {
        let line = k + 1;
        let t = raw_line.trim();
        if t.is_empty() || t.starts_with('#') {
            continue;
        }
        let rec = split_csv_line(t).map_err(|m| Error::input(path, Some(line), m))?;
        if rec.iter().all(|f| f.is_empty()) {
            continue;
        }
        match &header {
            None => {
                let names: Vec<String> = rec.iter().map(|f| f.to_ascii_lowercase()).collect();
                let mut idx = Vec::with_capacity(all.len());
                for (k, want) in all.iter().enumerate() {
                    let pos = names.iter().position(|n| n == want);
                    if pos.is_none() && k < required.len() {
                        return Err(Error::input(
                            path,
                            Some(line),
                            format!(
                                "header row has no column \"{want}\"; expected columns {} (found {})",
                                required.join(","),
                                names.join(",")
                            ),
                        ));
                    }
                    idx.push(pos);
                }
                header_len = names.len();
                header = Some((line, idx));
            }
            Some((_, idx)) => {
                if rec.len() > header_len {
                    return Err(Error::input(
                        path,
                        Some(line),
                        format!(
                            "{} fields but the header has {header_len} columns",
                            rec.len()
                        ),
                    ));
                }
                let mut vals = Vec::with_capacity(idx.len());
                for (k, pos) in idx.iter().enumerate() {
                    let v = pos
                        .and_then(|p| rec.get(p))
                        .map(String::as_str)
                        .unwrap_or("");
                    if k < required.len() && v.is_empty() {
                        return Err(Error::input(
                            path,
                            Some(line),
                            format!("column \"{}\" is empty", all[k]),
                        ));
                    }
                    vals.push(v.to_string());
                }
                rows.push((line, vals));
            }
        }
    }
    if header.is_none() {
        return Err(Error::input(
            path,
            None,
            format!(
                "the file is empty; expected a header row with columns {}",
                required.join(",")
            ),
        ));
    }
    Ok(Table {
        path: path.to_path_buf(),
        rows,
        columns: all.iter().map(|s| s.to_string()).collect(),
    })
}

/// Split one CSV line into trimmed fields; double quotes group a field and
/// `""` inside quotes is a literal quote (RFC 4180, without multi-line fields).
fn split_csv_line(line: &str) -> std::result::Result<Vec<String>, String> {
    let mut out = Vec::new();
    let mut cur = String::new();
    let mut chars = line.chars().peekable();
    let mut in_quotes = false;
    while let Some(c) = chars.next() {
        match (c, in_quotes) {
            ('"', false) if cur.trim().is_empty() => {
                cur.clear();
                in_quotes = true;
            }
            ('"', true) => {
                if chars.peek() == Some(&'"') {
                    chars.next();
                    cur.push('"');
                } else {
                    in_quotes = false;
                }
            }
            (',', false) => out.push(std::mem::take(&mut cur).trim().to_string()),
            (c, _) => cur.push(c),
        }
    }
    if in_quotes {
        return Err("a quoted field is not closed".into());
    }
    out.push(cur.trim().to_string());
    Ok(out)
}

/// Parse a finite number from a CSV field, naming file, line and column on failure.
pub fn number(path: &Path, line: usize, column: &str, text: &str) -> Result<f64> {
    match text.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        _ => Err(Error::input(
            path,
            Some(line),
            format!("column \"{column}\": \"{text}\" is not a finite number"),
        )),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn columns_any_order_extra_ignored_errors_name_line() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("t.csv");
        std::fs::write(&p, "# comment\nB,extra,A\n1,x,2\n\n3,y,4\n").unwrap();
        let t = read_table(&p, &["a", "b"], &["c"]).unwrap();
        assert_eq!(t.rows.len(), 2);
        assert_eq!(t.rows[0].1, vec!["2", "1", ""]);
        assert_eq!(t.rows[1].0, 5);
        std::fs::write(&p, "a,b\n1\n").unwrap();
        let e = read_table(&p, &["a", "b"], &[]).unwrap_err().to_string();
        assert!(e.contains(":2:") && e.contains("\"b\" is empty"), "{e}");
        std::fs::write(&p, "a,c\n1,2\n").unwrap();
        let e = read_table(&p, &["a", "b"], &[]).unwrap_err().to_string();
        assert!(e.contains("no column \"b\""), "{e}");
    }
}
