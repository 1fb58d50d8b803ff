//! Horizon picks: scattered x y z points.
//!
//! # Format
//!
//! Plain text, one point a line: `x y z`, world easting and northing in metres and
//! depth in metres. The three values are separated by spaces, tabs or commas, in
//! any mix (`1000.0, 2000.0\t1500.0` is fine). Runs of spaces and tabs count as one
//! separator; a comma is one separator, so two commas in a row (an empty value) are
//! an error, as is a trailing comma.
//!
//! * `#` starts a comment, on its own line or after the values.
//! * Blank lines are skipped; CRLF line ends and a UTF-8 byte-order mark are accepted.
//! * The first line that is not blank or a comment may be a header of names that are
//!   not numbers (`x y z`, `X,Y,Z`, `easting northing depth`); it is skipped. A line
//!   of words anywhere else is an error.
//! * Exactly three columns; non-finite values (`nan`, `inf`) are errors.
//!
//! # Depth convention
//!
//! Inside the program z is TVDSS in metres, positive down. When the file holds
//! elevations (positive up), pass `z_is_elevation = true` and z is negated.
//!
//! # Duplicate positions
//!
//! Points with the same (x, y) (bit-for-bit equal after parsing) are merged into one
//! point at the position of the first of them:
//!
//! * same z: the copies are dropped, with one warning that counts them;
//! * different z: the merged point takes the mean of the z values, with one warning
//!   that counts the positions, gives the largest spread (max z - min z) and the lines
//!   where it occurs. Gridding cannot honour two depths at one position, and the mean
//!   is the least-squares compromise; the warning lets the user fix the picks instead.

use crate::error::{Error, Result};
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// Horizon picks read from one file.
#[derive(Debug, Clone, serde::Serialize)]
pub struct Picks {
    /// The file the picks came from.
    pub path: PathBuf,
    /// The points `[x, y, z]`: world x and y in metres, z in m TVDSS positive down,
    /// one per distinct (x, y), in the order of first occurrence in the file.
    pub points: Vec<[f64; 3]>,
    /// Things the reader accepted but the user should know (duplicates merged).
    pub warnings: Vec<String>,
}

/// Split the content of a line (comment removed) into its values.
fn split_values(content: &str) -> std::result::Result<Vec<&str>, String> {
    let mut out = Vec::new();
    let pieces: Vec<&str> = content.split(',').collect();
    let has_comma = pieces.len() > 1;
    for piece in pieces {
        let before = out.len();
        out.extend(piece.split_whitespace());
        if has_comma && out.len() == before {
            return Err(
                "empty value: two commas in a row, or a comma at the start or end of the line"
                    .to_string(),
            );
        }
    }
    Ok(out)
}

/// Read horizon picks from `path`.
///
/// `z_is_elevation`: the file's z is elevation (positive up); it is negated to
/// TVDSS positive down. Otherwise the file's z is taken as m TVDSS positive down.
///
/// Errors name the file and the 1-based line: a line that is not three numbers,
/// a non-finite value, a header that is not the first line, a file with no points.
/// See the module documentation for duplicates.
pub fn read_picks(path: &Path, z_is_elevation: bool) -> Result<Picks> {
    let bytes = std::fs::read(path).map_err(|e| Error::io(path, e))?;
    let text = match std::str::from_utf8(&bytes) {
        Ok(t) => t,
        Err(e) => {
            let line = bytes[..e.valid_up_to()]
                .iter()
                .filter(|&&b| b == b'\n')
                .count()
                + 1;
            return Err(Error::input(
                path,
                Some(line),
                "not UTF-8 text; expected lines of x y z numbers",
            ));
        }
    };
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);

    let mut raw: Vec<([f64; 3], usize)> = Vec::new();
    let mut seen_content = false;
    for (idx, line) in text.split('\n').enumerate() {
        let line_no = idx + 1;
        let line = line.strip_suffix('\r').unwrap_or(line);
        let content = match line.find('#') {
            Some(p) => &line[..p],
            None => line,
        };
        if content.trim().is_empty() {
            continue;
        }
        let first_content = !seen_content;
        seen_content = true;
        let values = split_values(content).map_err(|m| Error::input(path, Some(line_no), m))?;
        let parsed: Vec<Option<f64>> = values.iter().map(|v| v.parse::<f64>().ok()).collect();
        if parsed.iter().all(|p| p.is_none()) {
            if first_content {
                continue; // header line of column names
            }
            return Err(Error::input(
                path,
                Some(line_no),
                format!(
                    "expected three numbers x y z, found words ({}); a header of column names \
                     is allowed only as the first line",
                    values.join(" ")
                ),
            ));
        }
        if values.len() != 3 {
            return Err(Error::input(
                path,
                Some(line_no),
                format!(
                    "expected 3 columns x y z, found {} value{}{}",
                    values.len(),
                    if values.len() == 1 { "" } else { "s" },
                    if content.contains(',') {
                        " (a comma always separates values; decimal commas are not supported)"
                    } else {
                        ""
                    }
                ),
            ));
        }
        let mut p = [0.0f64; 3];
        for (k, (text, val)) in values.iter().zip(&parsed).enumerate() {
            let name = ["x", "y", "z"][k];
            match val {
                Some(v) if v.is_finite() => p[k] = *v,
                Some(_) => {
                    return Err(Error::input(
                        path,
                        Some(line_no),
                        format!("{name} is not a finite number: {text}"),
                    ))
                }
                None => {
                    return Err(Error::input(
                        path,
                        Some(line_no),
                        format!("{name} is not a number: {text:?}; expected three numbers x y z"),
                    ))
                }
            }
        }
        if z_is_elevation {
            p[2] = -p[2];
        }
        raw.push((p, line_no));
    }
    if raw.is_empty() {
        return Err(Error::input(
            path,
            None,
            "no x y z points found (only blank lines, comments or a header)",
        ));
    }
    let (points, warnings) = merge_duplicates(&raw);
    Ok(Picks {
        path: path.to_path_buf(),
        points,
        warnings,
    })
}

/// Merge points with bit-identical (x, y); see the module documentation.
fn merge_duplicates(raw: &[([f64; 3], usize)]) -> (Vec<[f64; 3]>, Vec<String>) {
    // -0.0 + 0.0 == +0.0, so both zeros share a key.
    let key = |p: &[f64; 3]| ((p[0] + 0.0).to_bits(), (p[1] + 0.0).to_bits());
    let mut index: HashMap<(u64, u64), usize> = HashMap::with_capacity(raw.len());
    // per merged point: sum of z, count, min z, max z, first line, last line
    struct Acc {
        p: [f64; 3],
        sum: f64,
        n: usize,
        zmin: f64,
        zmax: f64,
        first_line: usize,
        last_line: usize,
    }
    let mut acc: Vec<Acc> = Vec::with_capacity(raw.len());
    for (p, line) in raw {
        match index.get(&key(p)) {
            Some(&k) => {
                if let Some(a) = acc.get_mut(k) {
                    a.sum += p[2];
                    a.n += 1;
                    a.zmin = a.zmin.min(p[2]);
                    a.zmax = a.zmax.max(p[2]);
                    a.last_line = *line;
                }
            }
            None => {
                index.insert(key(p), acc.len());
                acc.push(Acc {
                    p: *p,
                    sum: p[2],
                    n: 1,
                    zmin: p[2],
                    zmax: p[2],
                    first_line: *line,
                    last_line: *line,
                });
            }
        }
    }
    let mut warnings = Vec::new();
    let mut same_dropped = 0usize;
    let mut averaged = 0usize;
    let mut worst: Option<(f64, usize, usize)> = None;
    let mut points = Vec::with_capacity(acc.len());
    for a in &acc {
        let mut p = a.p;
        if a.n > 1 {
            let spread = a.zmax - a.zmin;
            if spread == 0.0 {
                same_dropped += a.n - 1;
            } else {
                averaged += 1;
                p[2] = a.sum / a.n as f64;
                if worst.map_or(true, |(s, _, _)| spread > s) {
                    worst = Some((spread, a.first_line, a.last_line));
                }
            }
        }
        points.push(p);
    }
    if same_dropped > 0 {
        warnings.push(format!(
            "{same_dropped} repeated point{} with the same x, y and z dropped",
            if same_dropped == 1 { "" } else { "s" }
        ));
    }
    if let Some((spread, l1, l2)) = worst {
        warnings.push(format!(
            "{averaged} position{} picked more than once with different z: the mean z is used; \
             largest spread {spread} m (lines {l1} and {l2})",
            if averaged == 1 { "" } else { "s" }
        ));
    }
    (points, warnings)
}
