//! The `inspect` command: show what the tool reads from one input file.
//!
//! Users reach for this first when a file looks wrong. It runs the same readers
//! as a full load, so a bad file gives the same error as everywhere else.

use crate::error::{Error, Result};
use crate::formats::las::{read_las, LasSummary};
use crate::formats::segy::{summarize, SegySummary};
use crate::ingest::picks::read_picks;
use crate::ingest::trajectory::Offset;
use crate::ingest::wells::{read_survey, read_tops, read_well_table, Top, WellEntry};
use serde::Serialize;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

/// The kinds of input file.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum FileKind {
    /// LAS well log.
    Las,
    /// SEG-Y volume.
    Segy,
    /// Horizon picks (x y z text).
    Picks,
    /// Well table CSV.
    WellTable,
    /// Deviation survey CSV.
    Survey,
    /// Tops CSV.
    Tops,
}

/// What `inspect` found, by kind.
#[derive(Debug, Clone, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Inspection {
    /// A LAS file.
    Las {
        /// The file.
        path: PathBuf,
        /// Header and curve summary.
        summary: LasSummary,
        /// Every curve's values in the file's own units, nulls as null
        /// (only when asked for, i.e. with `--json`).
        #[serde(skip_serializing_if = "Option::is_none")]
        values: Option<Vec<CurveValues>>,
    },
    /// A SEG-Y file.
    Segy {
        /// The file.
        path: PathBuf,
        /// Geometry, sampling and value range.
        summary: SegySummary,
    },
    /// Horizon picks.
    Picks {
        /// The file.
        path: PathBuf,
        /// Number of points.
        count: usize,
        /// x, y, z ranges (m; z TVDSS positive down, as read).
        x_range: (f64, f64),
        /// y range.
        y_range: (f64, f64),
        /// z range.
        z_range: (f64, f64),
        /// Reader warnings.
        warnings: Vec<String>,
    },
    /// A well table.
    WellTable {
        /// The file.
        path: PathBuf,
        /// Its rows.
        wells: Vec<WellEntry>,
    },
    /// A deviation survey.
    Survey {
        /// The file.
        path: PathBuf,
        /// Stations with their minimum-curvature positions.
        stations: Vec<SurveyRow>,
    },
    /// A tops table.
    Tops {
        /// The file.
        path: PathBuf,
        /// Its rows.
        tops: Vec<Top>,
    },
}

/// One LAS curve's values.
#[derive(Debug, Clone, Serialize)]
pub struct CurveValues {
    /// Mnemonic (made unique as lasio does for duplicates).
    pub mnemonic: String,
    /// Unit as in the file.
    pub unit: String,
    /// Values; `None` (JSON null) for nulls.
    pub values: Vec<Option<f64>>,
}

/// A survey station and where the minimum curvature method puts it.
#[derive(Debug, Clone, Serialize)]
pub struct SurveyRow {
    /// Measured depth, m.
    pub md: f64,
    /// Inclination, degrees.
    pub inclination: f64,
    /// Azimuth, degrees from grid north.
    pub azimuth: f64,
    /// Position offset from the surface location (m).
    pub position: Offset,
}

/// Guess a file's kind from its name and first bytes.
pub fn guess_kind(path: &Path) -> Result<FileKind> {
    let ext = path
        .extension()
        .map(|e| e.to_string_lossy().to_ascii_lowercase())
        .unwrap_or_default();
    match ext.as_str() {
        "las" => return Ok(FileKind::Las),
        "sgy" | "segy" => return Ok(FileKind::Segy),
        "xyz" | "pts" => return Ok(FileKind::Picks),
        _ => {}
    }
    let mut head = vec![0u8; 4096];
    let n = {
        use std::io::Read;
        let mut f = std::fs::File::open(path).map_err(|e| Error::io(path, e))?;
        f.read(&mut head).map_err(|e| Error::io(path, e))?
    };
    head.truncate(n);
    let text = String::from_utf8_lossy(&head);
    let first = text
        .lines()
        .map(str::trim)
        .find(|l| !l.is_empty() && !l.starts_with('#'))
        .unwrap_or("")
        .to_ascii_lowercase();
    if first.starts_with('~') {
        return Ok(FileKind::Las);
    }
    let cols: Vec<String> = first.split(',').map(|c| c.trim().to_string()).collect();
    let has = |c: &str| cols.iter().any(|x| x == c);
    if has("inclination") && has("azimuth") {
        return Ok(FileKind::Survey);
    }
    if has("surface") && has("well") {
        return Ok(FileKind::Tops);
    }
    if has("las") && has("datum_elevation") {
        return Ok(FileKind::WellTable);
    }
    let binary = head
        .iter()
        .take(3600)
        .filter(|&&b| b == 0 || b >= 0x80)
        .count();
    if n >= 3600 && binary > 100 {
        return Ok(FileKind::Segy);
    }
    if ext == "txt"
        || ext == "dat"
        || first
            .split([' ', '\t', ','])
            .filter(|s| !s.is_empty())
            .count()
            == 3
    {
        return Ok(FileKind::Picks);
    }
    Err(Error::input(
        path,
        None,
        "cannot tell what kind of file this is; give --kind (las, segy, picks, well-table, survey, tops)",
    ))
}

fn range(it: impl Iterator<Item = f64>) -> (f64, f64) {
    it.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
        (a.min(v), b.max(v))
    })
}

/// Read `path` as `kind` (guessed when `None`). `with_values` adds every LAS
/// curve's values.
pub fn inspect(path: &Path, kind: Option<FileKind>, with_values: bool) -> Result<Inspection> {
    let kind = match kind {
        Some(k) => k,
        None => guess_kind(path)?,
    };
    let path_buf = path.to_path_buf();
    Ok(match kind {
        FileKind::Las => {
            let las = read_las(path)?;
            let values = with_values.then(|| {
                las.curves
                    .iter()
                    .map(|c| CurveValues {
                        mnemonic: c.mnemonic.clone(),
                        unit: c.unit.clone(),
                        values: c.data.clone(),
                    })
                    .collect()
            });
            Inspection::Las {
                path: path_buf,
                summary: las.summary(),
                values,
            }
        }
        FileKind::Segy => Inspection::Segy {
            path: path_buf,
            summary: summarize(path)?,
        },
        FileKind::Picks => {
            let p = read_picks(path, false)?;
            Inspection::Picks {
                path: path_buf,
                count: p.points.len(),
                x_range: range(p.points.iter().map(|q| q[0])),
                y_range: range(p.points.iter().map(|q| q[1])),
                z_range: range(p.points.iter().map(|q| q[2])),
                warnings: p.warnings.clone(),
            }
        }
        FileKind::WellTable => Inspection::WellTable {
            path: path_buf,
            wells: read_well_table(path)?,
        },
        FileKind::Survey => {
            let t = read_survey(path)?;
            let stations = t
                .stations()
                .iter()
                .zip(t.station_positions())
                .map(|(s, p)| SurveyRow {
                    md: s.md,
                    inclination: s.inclination,
                    azimuth: s.azimuth,
                    position: *p,
                })
                .collect();
            Inspection::Survey {
                path: path_buf,
                stations,
            }
        }
        FileKind::Tops => Inspection::Tops {
            path: path_buf,
            tops: read_tops(path)?,
        },
    })
}

impl Inspection {
    /// A readable text rendering.
    pub fn render_text(&self) -> String {
        let mut s = String::new();
        match self {
            Inspection::Las { path, summary, .. } => {
                let _ = writeln!(s, "LAS file {}", path.display());
                let _ = writeln!(
                    s,
                    "  version {}, wrapped {}, null value {}",
                    summary.version,
                    if summary.wrapped { "yes" } else { "no" },
                    summary.null_value
                );
                let _ = writeln!(
                    s,
                    "  index {} to {} {} ({} samples)",
                    fmt_opt(summary.index_first),
                    fmt_opt(summary.index_last),
                    summary.index_unit,
                    summary.samples
                );
                for (title, items) in [
                    ("~Version", &summary.sections.version),
                    ("~Well", &summary.sections.well),
                    ("~Parameter", &summary.sections.parameters),
                ] {
                    if items.is_empty() {
                        continue;
                    }
                    let _ = writeln!(s, "  {title}");
                    for it in items {
                        let _ = writeln!(
                            s,
                            "    {:<10} {:<8} {:<28} {}",
                            it.mnemonic, it.unit, it.value, it.description
                        );
                    }
                }
                let _ = writeln!(s, "  ~Curves");
                let _ = writeln!(
                    s,
                    "    {:<10} {:<8} {:>8} {:>8} {:>14} {:>14}  description",
                    "mnemonic", "unit", "samples", "non-null", "min", "max"
                );
                for c in &summary.curves {
                    let _ = writeln!(
                        s,
                        "    {:<10} {:<8} {:>8} {:>8} {:>14} {:>14}  {}",
                        c.mnemonic,
                        c.unit,
                        c.stats.samples,
                        c.stats.non_null,
                        fmt_opt(c.stats.min),
                        fmt_opt(c.stats.max),
                        c.description
                    );
                }
                for w in &summary.warnings {
                    let _ = writeln!(s, "  warning: {w}");
                }
            }
            Inspection::Segy { path, summary } => {
                let _ = writeln!(s, "SEG-Y file {}", path.display());
                let _ = write!(s, "{summary}");
            }
            Inspection::Picks {
                path,
                count,
                x_range,
                y_range,
                z_range,
                warnings,
            } => {
                let _ = writeln!(s, "Horizon picks {}", path.display());
                let _ = writeln!(s, "  {count} points");
                let _ = writeln!(s, "  x {:.2} .. {:.2} m", x_range.0, x_range.1);
                let _ = writeln!(s, "  y {:.2} .. {:.2} m", y_range.0, y_range.1);
                let _ = writeln!(s, "  z {:.2} .. {:.2} m", z_range.0, z_range.1);
                for w in warnings {
                    let _ = writeln!(s, "  warning: {w}");
                }
            }
            Inspection::WellTable { path, wells } => {
                let _ = writeln!(s, "Well table {}", path.display());
                for w in wells {
                    let _ = writeln!(
                        s,
                        "  {:<12} x {:.2} y {:.2} datum {:.2} m  las {}  survey {}",
                        w.name,
                        w.x,
                        w.y,
                        w.datum_elevation,
                        w.las.display(),
                        w.survey
                            .as_ref()
                            .map(|p| p.display().to_string())
                            .unwrap_or_else(|| "(vertical)".into())
                    );
                }
            }
            Inspection::Survey { path, stations } => {
                let _ = writeln!(s, "Deviation survey {}", path.display());
                let _ = writeln!(
                    s,
                    "  {:>10} {:>8} {:>8} {:>11} {:>11} {:>11}",
                    "md m", "inc deg", "azi deg", "north m", "east m", "tvd m"
                );
                for r in stations {
                    let _ = writeln!(
                        s,
                        "  {:>10.2} {:>8.2} {:>8.2} {:>11.3} {:>11.3} {:>11.3}",
                        r.md,
                        r.inclination,
                        r.azimuth,
                        r.position.north,
                        r.position.east,
                        r.position.tvd
                    );
                }
            }
            Inspection::Tops { path, tops } => {
                let _ = writeln!(s, "Tops {}", path.display());
                for t in tops {
                    let _ = writeln!(s, "  {:<12} {:<24} md {:.2} m", t.well, t.surface, t.md);
                }
            }
        }
        s
    }
}

fn fmt_opt(v: Option<f64>) -> String {
    v.map(|x| format!("{x}")).unwrap_or_else(|| "-".into())
}
