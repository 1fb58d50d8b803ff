//! Wells: the well table, deviation surveys and tops (CSV inputs of the design
//! overview), and the positions of log samples from trajectory and datum.
//!
//! * Well table: `name,las,x,y,datum_elevation,survey`; `las` and `survey` are
//!   paths relative to the table; `x,y` is the surface location (m); the datum
//!   elevation is the datum's height above sea level (m); an empty survey
//!   means a vertical well.
//! * Deviation survey: `md,inclination,azimuth` (m, degrees, degrees from grid north).
//! * Tops: `well,surface,md` (m measured depth from the datum).
//!
//! Depth convention: `TVDSS = TVD - datum_elevation`, positive down.

use crate::error::{Error, Result};
use crate::ingest::csvtab::{number, read_table};
use crate::ingest::trajectory::{Station, Trajectory};
use serde::Serialize;
use std::path::{Path, PathBuf};

/// One row of the well table.
#[derive(Debug, Clone, Serialize)]
pub struct WellEntry {
    /// Well name (unique in the table).
    pub name: String,
    /// LAS file (resolved against the table's folder).
    pub las: PathBuf,
    /// Surface x, m.
    pub x: f64,
    /// Surface y, m.
    pub y: f64,
    /// Datum height above sea level, m.
    pub datum_elevation: f64,
    /// Deviation survey file, if the well is not vertical.
    pub survey: Option<PathBuf>,
    /// 1-based line of the row in the table.
    pub line: usize,
}

fn resolve_near(table: &Path, p: &str) -> PathBuf {
    let p = PathBuf::from(p);
    if p.is_absolute() {
        return p;
    }
    match table.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.join(p),
        _ => p,
    }
}

/// Read the well table.
pub fn read_well_table(path: &Path) -> Result<Vec<WellEntry>> {
    let t = read_table(
        path,
        &["name", "las", "x", "y", "datum_elevation"],
        &["survey"],
    )?;
    let mut out: Vec<WellEntry> = Vec::with_capacity(t.rows.len());
    for (line, v) in &t.rows {
        let line = *line;
        let name = v[0].clone();
        if let Some(prev) = out.iter().find(|w| w.name == name) {
            return Err(Error::input(
                path,
                Some(line),
                format!(
                    "well \"{name}\" is listed twice (first on line {}); well names must be unique",
                    prev.line
                ),
            ));
        }
        out.push(WellEntry {
            las: resolve_near(path, &v[1]),
            x: number(path, line, "x", &v[2])?,
            y: number(path, line, "y", &v[3])?,
            datum_elevation: number(path, line, "datum_elevation", &v[4])?,
            survey: (!v[5].is_empty()).then(|| resolve_near(path, &v[5])),
            name,
            line,
        });
    }
    if out.is_empty() {
        return Err(Error::input(path, None, "the well table lists no wells"));
    }
    Ok(out)
}

/// Read a deviation survey and build its minimum-curvature trajectory.
pub fn read_survey(path: &Path) -> Result<Trajectory> {
    let t = read_table(path, &["md", "inclination", "azimuth"], &[])?;
    let mut stations = Vec::with_capacity(t.rows.len());
    let mut lines = Vec::with_capacity(t.rows.len());
    for (line, v) in &t.rows {
        stations.push(Station {
            md: number(path, *line, "md", &v[0])?,
            inclination: number(path, *line, "inclination", &v[1])?,
            azimuth: number(path, *line, "azimuth", &v[2])?,
        });
        lines.push(*line);
    }
    Trajectory::from_stations(&stations).map_err(|e| {
        use crate::ingest::trajectory::TrajectoryError as T;
        let idx = match &e {
            T::Empty => None,
            T::NotFinite { index }
            | T::MdNotIncreasing { index, .. }
            | T::BadInclination { index, .. }
            | T::NegativeMd { index, .. } => Some(*index),
        };
        let line = idx.and_then(|i| lines.get(i).copied());
        let msg = e.to_string();
        // the station index is replaced by the line number in the message
        let msg = match msg.split_once(": ") {
            Some((head, tail)) if head.starts_with("station") => tail.to_string(),
            _ => msg,
        };
        Error::input(path, line, msg)
    })
}

/// One well top.
#[derive(Debug, Clone, Serialize)]
pub struct Top {
    /// Well name, as in the well table.
    pub well: String,
    /// Surface name, as in the project's horizons (`tops_name`).
    pub surface: String,
    /// Measured depth, m from the datum.
    pub md: f64,
    /// 1-based line in the tops file.
    pub line: usize,
}

/// Read the tops table.
pub fn read_tops(path: &Path) -> Result<Vec<Top>> {
    let t = read_table(path, &["well", "surface", "md"], &[])?;
    let mut out: Vec<Top> = Vec::with_capacity(t.rows.len());
    for (line, v) in &t.rows {
        let md = number(path, *line, "md", &v[2])?;
        if md < 0.0 {
            return Err(Error::input(
                path,
                Some(*line),
                format!("md {md} is negative; expected metres measured depth from the datum"),
            ));
        }
        if let Some(prev) = out.iter().find(|t| t.well == v[0] && t.surface == v[1]) {
            return Err(Error::input(
                path,
                Some(*line),
                format!(
                    "well \"{}\" has a second top on \"{}\" (first on line {})",
                    v[0], v[1], prev.line
                ),
            ));
        }
        out.push(Top {
            well: v[0].clone(),
            surface: v[1].clone(),
            md,
            line: *line,
        });
    }
    Ok(out)
}

/// A point on a well path in world coordinates.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct WellPoint {
    /// World x, m.
    pub x: f64,
    /// World y, m.
    pub y: f64,
    /// Depth, m TVDSS, positive down.
    pub z: f64,
}

/// A well's surface location, datum and trajectory: positions every measured depth.
#[derive(Debug, Clone, Serialize)]
pub struct WellPath {
    /// Surface x, m.
    pub x: f64,
    /// Surface y, m.
    pub y: f64,
    /// Datum height above sea level, m.
    pub datum_elevation: f64,
    /// The trajectory (offsets from the surface location).
    pub trajectory: Trajectory,
}

impl WellPath {
    /// World position at measured depth `md` (m from the datum):
    /// `x = x_surface + east(md)`, `y = y_surface + north(md)`,
    /// `z = TVD(md) - datum_elevation` (design overview).
    pub fn point_at_md(&self, md: f64) -> WellPoint {
        let o = self.trajectory.position_at_md(md);
        WellPoint {
            x: self.x + o.east,
            y: self.y + o.north,
            z: o.tvd - self.datum_elevation,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn vertical_well_tvdss_is_md_minus_datum() {
        let p = WellPath {
            x: 10.0,
            y: 20.0,
            datum_elevation: 25.0,
            trajectory: Trajectory::vertical(),
        };
        let q = p.point_at_md(1000.0);
        assert_eq!((q.x, q.y, q.z), (10.0, 20.0, 975.0));
    }

    #[test]
    fn survey_errors_name_the_line() {
        let dir = tempfile::tempdir().unwrap();
        let s = dir.path().join("s.csv");
        std::fs::write(&s, "md,inclination,azimuth\n0,0,0\n100,5,10\n90,6,10\n").unwrap();
        let e = read_survey(&s).unwrap_err().to_string();
        assert!(
            e.contains("s.csv:4:") && e.contains("does not increase"),
            "{e}"
        );
        std::fs::write(&s, "md,inclination,azimuth\n0,0,0\n100,x,10\n").unwrap();
        let e = read_survey(&s).unwrap_err().to_string();
        assert!(e.contains(":3:") && e.contains("inclination"), "{e}");
    }
}
