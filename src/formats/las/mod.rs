//! LAS 1.2 / 2.0 well-log files: strict reader and LAS 2.0 writer.
//!
//! LAS ("Log ASCII Standard") is the Canadian Well Logging Society's text format
//! for well logs (CWLS LAS 1.2, 1990; LAS 2.0, 1992). A file is a series of
//! sections, each opened by a line starting with `~` and a letter:
//! `~V` version, `~W` well, `~C` curves, `~P` parameters, `~O` other (free
//! text) and `~A` the data, one column per curve, the first column being the
//! index (depth).
//!
//! # Reading
//!
//! [`read_las`] / [`parse_las`] read a file strictly: where the file is well
//! formed they give what the reference library lasio (PyPI, version 0.31) gives
//! with its default settings (mnemonics upper-cased, duplicates renamed `GR:1`,
//! `GR:2`, ..., LAS 1.2 well items with the value in the description field,
//! header values up to the last colon); where lasio would guess (short or long
//! data rows, a wrapped record that runs on, a non-numeric sample, a missing
//! `NULL`) the reader stops with an [`Error::Input`](crate::error::Error::Input)
//! naming the file, the line and what was expected. Samples equal to `NULL`
//! become `None`. LAS 3.0 is refused with
//! [`Error::Unsupported`](crate::error::Error::Unsupported).
//!
//! Choices where lasio is silent or lenient (documented here once):
//! * `VERS` must be 1.2 or 2.0, `WRAP` must be `YES` or `NO` (any case), and
//!   `STRT`, `STOP`, `STEP` and `NULL` must be present and numeric in `~W`:
//!   a missing `NULL` would let null samples through as numbers.
//! * The index is taken from the data, never computed from `STRT`/`STEP`.
//!   A `STRT`/`STOP`/`STEP` that contradicts the data is reported in
//!   [`LasFile::warnings`], not as an error (lasio accepts such files; the
//!   numbers we return are the data's own).
//! * The index must be present at every depth step (not `NULL`) and strictly
//!   increasing or strictly decreasing.
//! * In wrapped files (`WRAP. YES`) the index stands alone on the first line of
//!   each depth step (LAS 2.0 specification, wrap mode; from memory) and a depth
//!   step never shares a line with the next one, so a missing value is caught
//!   where it happens instead of shifting every later sample.
//! * Text is UTF-8 (a byte-order mark is skipped); a file that is not valid
//!   UTF-8 is decoded as Latin-1, so descriptions with accented bytes never
//!   fail. Control characters other than tab are refused as binary data; a
//!   DOS end-of-file byte (0x1A) ends the text.
//! * Section letters are accepted in either case; sections other than
//!   V W C P O A are kept as text in [`LasSections::extra`].
//!
//! # Writing
//!
//! [`write_las2`] writes an unwrapped LAS 2.0 file that [`read_las`] and lasio
//! read back to the same numbers (the shortest decimal that round-trips each
//! f64 is written, unless a curve asks for a fixed number of decimals).

mod header;
mod reader;
mod text;
mod writer;

use crate::error::{Error, Result};
use serde::Serialize;
use std::path::{Path, PathBuf};

pub use reader::parse_las;
pub use writer::{render_las2, write_las2, Decimals, WriteCurve, WriteItem};

/// One line of a header section: `MNEM.UNIT  VALUE : DESCRIPTION`.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct HeaderItem {
    /// Mnemonic as lasio names it: upper case, `UNKNOWN` when empty, and
    /// `NAME:1`, `NAME:2`, ... when the mnemonic occurs more than once in
    /// the section.
    pub mnemonic: String,
    /// Mnemonic exactly as written in the file (case kept, no suffix).
    pub original_mnemonic: String,
    /// Unit (the text after the first dot up to the first space), without
    /// surrounding brackets.
    pub unit: String,
    /// Value as text. For LAS 1.2 `~W` items other than STRT/STOP/STEP/NULL it
    /// is the text after the colon (the LAS 1.2 convention, as lasio reads it).
    pub value: String,
    /// Description.
    pub description: String,
    /// 1-based line number in the file (0 for items not read from a file).
    pub line: usize,
}

impl HeaderItem {
    /// The value as a number, when it is one.
    pub fn number(&self) -> Option<f64> {
        text::parse_number(self.value.trim())
    }
}

/// The header sections of a LAS file.
#[derive(Debug, Clone, PartialEq, Default, Serialize)]
pub struct LasSections {
    /// `~V` items (VERS, WRAP, ...).
    pub version: Vec<HeaderItem>,
    /// `~W` items (STRT, STOP, STEP, NULL, WELL, ...).
    pub well: Vec<HeaderItem>,
    /// `~C` items, one a curve, in column order (the value field is the API code).
    pub curves: Vec<HeaderItem>,
    /// `~P` items.
    pub parameters: Vec<HeaderItem>,
    /// `~O` text: the lines between the `~O` line and the next section, each
    /// trimmed, joined with `\n`; `None` when the file has no `~O` section.
    pub other: Option<String>,
    /// Other sections (title line without `~`, text as for `other`).
    pub extra: Vec<(String, String)>,
}

/// One curve (one column of `~A`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LasCurve {
    /// Unique mnemonic, lasio-style (upper case, duplicates `GR:1`, `GR:2`, ...).
    pub mnemonic: String,
    /// Mnemonic as written in `~C`.
    pub original_mnemonic: String,
    /// Unit as written in `~C` (brackets removed).
    pub unit: String,
    /// The `~C` value field (API code in LAS 2.0), often empty.
    pub api_code: String,
    /// Description.
    pub description: String,
    /// 1-based line of the curve's `~C` item.
    pub line: usize,
    /// Samples, one per depth step; `None` where the file has the NULL value.
    /// The index curve has no `None`.
    pub data: Vec<Option<f64>>,
}

/// Sample counts and range of one curve.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct CurveStats {
    /// Number of depth steps.
    pub samples: usize,
    /// Number of samples that are not null.
    pub non_null: usize,
    /// Smallest non-null sample.
    pub min: Option<f64>,
    /// Largest non-null sample.
    pub max: Option<f64>,
}

impl LasCurve {
    /// Counts and range of the samples (in the curve's own unit).
    pub fn stats(&self) -> CurveStats {
        let mut non_null = 0;
        let mut min: Option<f64> = None;
        let mut max: Option<f64> = None;
        for v in self.data.iter().flatten() {
            non_null += 1;
            min = Some(min.map_or(*v, |m| m.min(*v)));
            max = Some(max.map_or(*v, |m| m.max(*v)));
        }
        CurveStats {
            samples: self.data.len(),
            non_null,
            min,
            max,
        }
    }
}

/// A LAS file as read by [`read_las`].
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LasFile {
    /// The path the file was read from (as given to [`parse_las`]).
    pub path: PathBuf,
    /// `"1.2"` or `"2.0"`.
    pub version: String,
    /// `WRAP. YES`.
    pub wrapped: bool,
    /// The `NULL` value of `~W` (samples equal to it are `None`).
    pub null_value: f64,
    /// All header items, by section.
    pub sections: LasSections,
    /// Curves in column order; the first is the index. A file read by
    /// [`read_las`] always has at least one curve and one depth step.
    pub curves: Vec<LasCurve>,
    /// Things that are odd but do not make the numbers wrong (STRT not equal
    /// to the first depth, STEP not matching the data, ...), each naming the line.
    pub warnings: Vec<String>,
}

/// What the `inspect` command shows about one curve.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CurveSummary {
    /// Unique mnemonic.
    pub mnemonic: String,
    /// Unit as written.
    pub unit: String,
    /// Description.
    pub description: String,
    /// Counts and range.
    #[serde(flatten)]
    pub stats: CurveStats,
}

/// What the `inspect` command shows about one LAS file.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LasSummary {
    /// `"1.2"` or `"2.0"`.
    pub version: String,
    /// Wrapped data.
    pub wrapped: bool,
    /// NULL value.
    pub null_value: f64,
    /// Unit of the index as written (see [`LasFile::index_unit`]).
    pub index_unit: String,
    /// First index value (file unit).
    pub index_first: Option<f64>,
    /// Last index value (file unit).
    pub index_last: Option<f64>,
    /// Number of depth steps.
    pub samples: usize,
    /// All header items.
    pub sections: LasSections,
    /// One entry per curve, index first.
    pub curves: Vec<CurveSummary>,
    /// Warnings from reading.
    pub warnings: Vec<String>,
}

static EMPTY_CURVE: LasCurve = LasCurve {
    mnemonic: String::new(),
    original_mnemonic: String::new(),
    unit: String::new(),
    api_code: String::new(),
    description: String::new(),
    line: 0,
    data: Vec::new(),
};

/// Metres per unit of a depth unit as LAS files write it, or `None` when the
/// unit is not a length unit we know.
///
/// `M`, `METER(S)`, `METRE(S)` are 1; `FT`, `F`, `FEET`, `FOOT` are 0.3048 (the
/// international foot, exact by definition, NIST SP 811); `.1IN`/`0.1IN` (tenths
/// of an inch, seen in old LAS files; the unit list of lasio's
/// `defaults.DEPTH_UNITS`) are 0.00254. Case does not matter.
pub fn depth_unit_to_metres(unit: &str) -> Option<f64> {
    let u = unit.trim().to_uppercase();
    match u.as_str() {
        "M" | "METER" | "METERS" | "METRE" | "METRES" => Some(1.0),
        "FT" | "F" | "FEET" | "FOOT" => Some(crate::units::FT),
        ".1IN" | "0.1IN" | ".1INCH" | "0.1INCH" => Some(0.00254),
        _ => None,
    }
}

fn find_item<'a>(items: &'a [HeaderItem], mnemonic: &str) -> Option<&'a HeaderItem> {
    let want = mnemonic.trim().to_uppercase();
    items
        .iter()
        .find(|i| i.mnemonic.to_uppercase() == want)
        .or_else(|| {
            items
                .iter()
                .find(|i| i.original_mnemonic.trim().to_uppercase() == want)
        })
}

impl LasFile {
    /// The index curve (the first column). For a `LasFile` that was built by
    /// hand with no curves this is an empty curve.
    pub fn index(&self) -> &LasCurve {
        self.curves.first().unwrap_or(&EMPTY_CURVE)
    }

    /// The curve with this mnemonic, ignoring case: the unique mnemonic
    /// (`GR:2`) first, else the first curve with that original mnemonic.
    pub fn curve(&self, mnemonic: &str) -> Option<&LasCurve> {
        let want = mnemonic.trim().to_uppercase();
        self.curves
            .iter()
            .find(|c| c.mnemonic.to_uppercase() == want)
            .or_else(|| {
                self.curves
                    .iter()
                    .find(|c| c.original_mnemonic.trim().to_uppercase() == want)
            })
    }

    /// The `~W` item with this mnemonic, ignoring case (as for [`LasFile::curve`]).
    pub fn well_item(&self, mnemonic: &str) -> Option<&HeaderItem> {
        find_item(&self.sections.well, mnemonic)
    }

    /// The `~P` item with this mnemonic, ignoring case.
    pub fn parameter(&self, mnemonic: &str) -> Option<&HeaderItem> {
        find_item(&self.sections.parameters, mnemonic)
    }

    /// Unit of the index as written: the index curve's unit, or the unit of
    /// `STRT` when the curve has none.
    pub fn index_unit(&self) -> &str {
        let u = self.index().unit.trim();
        if !u.is_empty() {
            return u;
        }
        self.well_item("STRT").map_or("", |i| i.unit.trim())
    }

    /// Metres per index unit: 1 for M/METRES/METERS, 0.3048 for FT/F/FEET (see
    /// [`depth_unit_to_metres`]). An error names the unit when it is not a depth
    /// unit, or both units when the index curve and `STRT` disagree.
    pub fn index_unit_to_metres(&self) -> Result<f64> {
        let unit = self.index_unit();
        let curve = self.index();
        let Some(factor) = depth_unit_to_metres(unit) else {
            return Err(Error::input(
                &self.path,
                (curve.line > 0).then_some(curve.line),
                format!(
                    "index curve {} has unit '{}', which is not a depth unit; expected M, METRES, FT or FEET",
                    curve.mnemonic, unit
                ),
            ));
        };
        if let Some(strt) = self.well_item("STRT") {
            if !strt.unit.trim().is_empty() {
                if let Some(f2) = depth_unit_to_metres(&strt.unit) {
                    if f2 != factor {
                        return Err(Error::input(
                            &self.path,
                            Some(strt.line),
                            format!(
                                "index curve {} is in '{}' but STRT is in '{}'; the depth unit is ambiguous",
                                curve.mnemonic, unit, strt.unit
                            ),
                        ));
                    }
                }
            }
        }
        Ok(factor)
    }

    /// The index converted to metres (`value * index_unit_to_metres()`).
    pub fn index_in_metres(&self) -> Result<Vec<f64>> {
        let f = self.index_unit_to_metres()?;
        let idx = self.index();
        idx.data
            .iter()
            .enumerate()
            .map(|(k, v)| {
                v.map(|x| x * f).ok_or_else(|| {
                    Error::inconsistent(format!(
                        "index curve {} has no value at depth step {}",
                        idx.mnemonic,
                        k + 1
                    ))
                })
            })
            .collect()
    }

    /// Number of depth steps.
    pub fn samples(&self) -> usize {
        self.index().data.len()
    }

    /// Everything the `inspect` command shows.
    pub fn summary(&self) -> LasSummary {
        let idx = self.index();
        LasSummary {
            version: self.version.clone(),
            wrapped: self.wrapped,
            null_value: self.null_value,
            index_unit: self.index_unit().to_string(),
            index_first: idx.data.first().copied().flatten(),
            index_last: idx.data.last().copied().flatten(),
            samples: idx.data.len(),
            sections: self.sections.clone(),
            curves: self
                .curves
                .iter()
                .map(|c| CurveSummary {
                    mnemonic: c.mnemonic.clone(),
                    unit: c.unit.clone(),
                    description: c.description.clone(),
                    stats: c.stats(),
                })
                .collect(),
            warnings: self.warnings.clone(),
        }
    }
}

/// Read the LAS file at `path` (see the module documentation for what is
/// accepted).
pub fn read_las(path: &Path) -> Result<LasFile> {
    let bytes = std::fs::read(path).map_err(|e| Error::io(path, e))?;
    parse_las(&bytes, path)
}
