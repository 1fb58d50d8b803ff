//! A study: the project and everything it names, loaded, checked and put
//! together (wells positioned in the survey, horizons gridded, tied to the tops
//! and put in stratigraphic order, input volumes checked against the grid).
//!
//! This is the common front of every command: `check` summarises it, later
//! stages (conditioning, kriging, banks, validation) start from it.

use crate::error::{Error, Result};
use crate::formats::las::{read_las, LasFile};
use crate::formats::segy::read_volume_on_grid;
use crate::frame::gridding::{grid_picks, GriddingReport, Surface};
use crate::frame::horizons::{enforce_order, CrossingReport};
use crate::frame::tie::{tie_surface, TiePoint, TieReport};
use crate::ingest::logs::{map_curves, FileCurve, PropertyLog};
use crate::ingest::picks::read_picks;
use crate::ingest::trajectory::Trajectory;
use crate::ingest::wells::{
    read_survey, read_tops, read_well_table, WellEntry, WellPath, WellPoint,
};
use crate::project::{CurveProperty, HorizonDef, Project};
use indicatif::{ProgressBar, ProgressStyle};
use serde::Serialize;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// A top of a well on one of the project's horizons.
#[derive(Debug, Clone, Serialize)]
pub struct WellTop {
    /// Index of the horizon in the project.
    pub horizon: usize,
    /// Measured depth, m.
    pub md: f64,
    /// Where the well path is at that depth.
    pub point: WellPoint,
}

/// A well with its path, its logs in SI and the position of every log sample.
#[derive(Debug, Clone, Serialize)]
pub struct Well {
    /// The row of the well table.
    pub entry: WellEntry,
    /// LAS version of its log file.
    pub las_version: String,
    /// All curve mnemonics of the LAS file (with units), for the summary.
    pub las_curves: Vec<(String, String)>,
    /// Surface location, datum and trajectory.
    pub path: WellPath,
    /// Measured depth of each log sample, m.
    pub md: Vec<f64>,
    /// Position of each log sample.
    pub points: Vec<WellPoint>,
    /// Mapped property logs in SI.
    pub logs: BTreeMap<CurveProperty, PropertyLog>,
    /// Tops on the project's horizons.
    pub tops: Vec<WellTop>,
    /// Further LAS curves the project names (e.g. in intrinsic-anisotropy
    /// relations), by mnemonic as written in the project, in file units.
    pub extra_logs: BTreeMap<String, Vec<Option<f64>>>,
}

impl Well {
    /// The well's name.
    pub fn name(&self) -> &str {
        &self.entry.name
    }
}

/// A horizon gridded on the survey and tied to the tops.
#[derive(Debug, Clone, Serialize)]
pub struct Horizon {
    /// Its definition in the project.
    pub def: HorizonDef,
    /// The final surface (gridded, tied, in stratigraphic order).
    #[serde(skip)]
    pub surface: Surface,
    /// The gridded surface before the tie and the order (kept so that a frame
    /// can be re-made without some well's tops, [`Study::without_well_tops`]).
    #[serde(skip)]
    pub gridded: Surface,
    /// How the picks were gridded.
    pub gridding: GriddingReport,
    /// The tie to the well tops, if the horizon has tops.
    pub tie: Option<TieReport>,
}

/// An input volume read and checked against the grid.
#[derive(Debug, Clone, Serialize)]
pub struct InputVolume {
    /// What it is (`background_vp0`, `facies`, `facies_probability:<name>`).
    pub role: String,
    /// The file.
    pub path: PathBuf,
    /// Unit of the samples.
    pub unit: String,
    /// Samples, trace-major (inline by inline, crossline fastest, depth fastest of all).
    #[serde(skip)]
    pub data: Vec<f32>,
}

/// Everything a project names, loaded and checked.
#[derive(Debug, Clone, Serialize)]
pub struct Study {
    /// The project.
    pub project: Project,
    /// Wells, in table order.
    pub wells: Vec<Well>,
    /// Horizons, shallow to deep.
    pub horizons: Vec<Horizon>,
    /// Where consecutive horizons crossed and were clipped.
    pub crossings: Vec<CrossingReport>,
    /// Input volumes.
    pub volumes: Vec<InputVolume>,
    /// Things worth a look that did not stop loading.
    pub warnings: Vec<String>,
}

fn progress_bar(show: bool, len: u64) -> ProgressBar {
    if !show {
        return ProgressBar::hidden();
    }
    let pb = ProgressBar::new(len);
    if let Ok(style) = ProgressStyle::with_template("{spinner} {pos}/{len} {wide_msg}") {
        pb.set_style(style);
    }
    pb
}

impl Study {
    /// The stratigraphic frame of the study's zones on its final horizons.
    pub fn strat_frame(&self) -> crate::frame::strat::StratFrame {
        let surfaces: Vec<&Surface> = self.horizons.iter().map(|h| &h.surface).collect();
        crate::frame::strat::StratFrame::new(&self.project.zones, &surfaces)
    }

    /// The study with its horizons re-tied to the tops of every well but well
    /// `well` (index in [`Study::wells`]) and put in stratigraphic order again,
    /// from the same gridded surfaces: the frame a leave-one-well-out
    /// validation predicts that well in. The well itself stays in the study
    /// (so its logs can be conditioned in this frame); callers leave its
    /// samples out of the kriging data. Warnings of the re-tie are added to the
    /// copy's `warnings`.
    pub fn without_well_tops(&self, well: usize) -> Result<Study> {
        if well >= self.wells.len() {
            return Err(Error::inconsistent(format!(
                "no well number {} in a study of {} wells",
                well + 1,
                self.wells.len()
            )));
        }
        let mut horizons = self.horizons.clone();
        let mut warnings = Vec::new();
        let crossings = tie_and_order(
            &self.project,
            &self.wells,
            &mut horizons,
            Some(well),
            &mut warnings,
        )?;
        let mut out = Study {
            project: self.project.clone(),
            wells: self.wells.clone(),
            horizons,
            crossings,
            volumes: self.volumes.clone(),
            warnings: self.warnings.clone(),
        };
        out.warnings.extend(warnings);
        Ok(out)
    }
}

/// Tie every horizon's gridded surface to the tops of `wells` (all but well
/// `exclude`), put the tied surfaces in stratigraphic order (clipping
/// crossings, [`enforce_order`]) and store them as the horizons' final
/// surfaces; the tie reports replace the horizons' old ones. Errors when a
/// horizon lies above the next one over more than half the map (the order
/// looks wrong).
fn tie_and_order(
    project: &Project,
    wells: &[Well],
    horizons: &mut [Horizon],
    exclude: Option<usize>,
    warnings: &mut Vec<String>,
) -> Result<Vec<CrossingReport>> {
    let grid = &project.grid;
    for (hi, h) in horizons.iter_mut().enumerate() {
        let ties: Vec<TiePoint> = wells
            .iter()
            .enumerate()
            .filter(|(wi, _)| Some(*wi) != exclude)
            .flat_map(|(_, w)| {
                w.tops.iter().filter(|t| t.horizon == hi).map(|t| TiePoint {
                    well: w.entry.name.clone(),
                    x: t.point.x,
                    y: t.point.y,
                    z: t.point.z,
                })
            })
            .collect();
        let mut surface = h.gridded.clone();
        h.tie = if ties.is_empty() {
            warnings.push(format!("horizon {}: no well tops, not tied", h.def.name));
            None
        } else {
            Some(tie_surface(&mut surface, grid, &ties, project.tie_radius)?)
        };
        h.surface = surface;
    }
    let mut surfaces: Vec<Surface> = horizons.iter().map(|h| h.surface.clone()).collect();
    let crossings = enforce_order(&mut surfaces, grid);
    let nodes = grid.trace_count();
    if let Some(c) = crossings.iter().find(|c| 2 * c.nodes_clipped > nodes) {
        return Err(Error::inconsistent(format!(
            "horizon {} lies above horizon {} at {} of {} map nodes (by up to {:.1} m): the [[horizons]] order (shallow to deep) looks wrong",
            c.lower, c.upper, c.nodes_clipped, nodes, c.max_overlap
        )));
    }
    for (h, s) in horizons.iter_mut().zip(surfaces) {
        h.surface = s;
    }
    Ok(crossings)
}

/// Read one well's LAS and survey, map its curves and position its samples.
fn load_well(project: &Project, entry: &WellEntry, warnings: &mut Vec<String>) -> Result<Well> {
    let las: LasFile = read_las(&entry.las)?;
    let trajectory = match &entry.survey {
        Some(s) => read_survey(s)?,
        None => Trajectory::vertical(),
    };
    let path = WellPath {
        x: entry.x,
        y: entry.y,
        datum_elevation: entry.datum_elevation,
        trajectory,
    };
    let to_m = las.index_unit_to_metres()?;
    let index = las.index();
    let mut md = Vec::with_capacity(index.data.len());
    for (k, d) in index.data.iter().enumerate() {
        match d {
            Some(d) => md.push(d * to_m),
            None => {
                return Err(Error::input(
                    &entry.las,
                    None,
                    format!("depth sample {} of the index curve is null", k + 1),
                ))
            }
        }
    }
    let file_curves: Vec<FileCurve<'_>> = las
        .curves
        .iter()
        .skip(1)
        .map(|c| FileCurve {
            mnemonic: &c.mnemonic,
            unit: &c.unit,
            values: &c.data,
        })
        .collect();
    let (logs, w) = map_curves(
        &entry.name,
        &entry.las,
        &file_curves,
        &project.curves,
        &project.facies,
        &md,
    )?;
    warnings.extend(w);
    let mut extra_logs = BTreeMap::new();
    for spec in &project.conditioning.intrinsic {
        for v in [&spec.epsilon, &spec.delta].into_iter().flatten() {
            if let crate::project::IntrinsicValue::Linear { log, .. } = v {
                let c = las.curve(log).ok_or_else(|| {
                    Error::inconsistent(format!(
                        "well {} ({}): the intrinsic-anisotropy relation names curve {log}, which the file does not have",
                        entry.name,
                        entry.las.display()
                    ))
                })?;
                extra_logs.insert(log.clone(), c.data.clone());
            }
        }
    }
    let points: Vec<WellPoint> = md.iter().map(|&m| path.point_at_md(m)).collect();
    Ok(Well {
        entry: entry.clone(),
        las_version: las.version.clone(),
        las_curves: las
            .curves
            .iter()
            .map(|c| (c.mnemonic.clone(), c.unit.clone()))
            .collect(),
        path,
        md,
        points,
        logs,
        tops: Vec::new(),
        extra_logs,
    })
}

/// Load a project file and everything it names.
///
/// `progress` shows a progress bar on standard error (callers pass `true` only
/// on a terminal).
pub fn load(project_path: &Path, progress: bool) -> Result<Study> {
    let project = Project::load(project_path)?;
    let grid = &project.grid;
    let mut warnings = Vec::new();

    let entries = read_well_table(&project.well_table)?;
    let pb = progress_bar(
        progress,
        (entries.len() + project.horizons.len() + 2) as u64,
    );
    let mut wells = Vec::with_capacity(entries.len());
    for e in &entries {
        pb.set_message(format!("well {}", e.name));
        let w = load_well(&project, e, &mut warnings)?;
        // A well must reach the survey with its logged samples.
        let vp = w.logs.get(&CurveProperty::Vp);
        let logged_inside = w
            .points
            .iter()
            .enumerate()
            .filter(|(k, p)| {
                vp.is_some_and(|l| l.values.get(*k).copied().flatten().is_some())
                    && grid.contains_xy(p.x, p.y)
            })
            .count();
        if logged_inside == 0 {
            let (i, j) = grid.xy_to_ij(e.x, e.y);
            return Err(Error::inconsistent(format!(
                "well {} ({} line {}): no logged sample lies inside the survey grid (surface location x {:.1}, y {:.1} is at inline index {:.1}, crossline index {:.1}; the grid has {} x {} nodes)",
                e.name,
                project.well_table.display(),
                e.line,
                e.x,
                e.y,
                i,
                j,
                grid.inline_count,
                grid.xline_count
            )));
        }
        wells.push(w);
        pb.inc(1);
    }

    // tops
    if let Some(tops_path) = &project.tops {
        let tops = read_tops(tops_path)?;
        for t in &tops {
            let Some(w) = wells.iter_mut().find(|w| w.entry.name == t.well) else {
                warnings.push(format!(
                    "{}:{}: top of well \"{}\" ignored: the well is not in the well table",
                    tops_path.display(),
                    t.line,
                    t.well
                ));
                continue;
            };
            let Some(h) = project
                .horizons
                .iter()
                .position(|h| h.tops_name == t.surface)
            else {
                warnings.push(format!(
                    "{}:{}: top \"{}\" of well {} ignored: no horizon has this tops_name",
                    tops_path.display(),
                    t.line,
                    t.surface,
                    t.well
                ));
                continue;
            };
            let point = w.path.point_at_md(t.md);
            w.tops.push(WellTop {
                horizon: h,
                md: t.md,
                point,
            });
        }
        for w in &mut wells {
            w.tops.sort_by_key(|t| t.horizon);
            for pair in w.tops.windows(2) {
                if pair[1].md < pair[0].md {
                    return Err(Error::inconsistent(format!(
                        "well {}: top \"{}\" at MD {:.2} m is above top \"{}\" at MD {:.2} m, against the [[horizons]] order",
                        w.entry.name,
                        project.horizons[pair[1].horizon].tops_name,
                        pair[1].md,
                        project.horizons[pair[0].horizon].tops_name,
                        pair[0].md
                    )));
                }
            }
        }
    } else {
        warnings.push("no tops file: horizons are not tied to the wells".into());
    }

    // horizons
    let mut horizons = Vec::with_capacity(project.horizons.len());
    for def in &project.horizons {
        pb.set_message(format!("horizon {}", def.name));
        let picks = read_picks(&def.picks, def.z_is_elevation)?;
        warnings.extend(picks.warnings.iter().cloned());
        let (surface, gridding) = grid_picks(&def.name, &picks, grid)?;
        horizons.push(Horizon {
            def: def.clone(),
            surface: surface.clone(),
            gridded: surface,
            gridding,
            tie: None,
        });
        pb.inc(1);
    }
    let crossings = tie_and_order(&project, &wells, &mut horizons, None, &mut warnings)?;
    pb.inc(1);

    // volumes
    let mut volumes = Vec::new();
    let v = &project.volumes;
    let mut named: Vec<(String, PathBuf, String)> = Vec::new();
    if let Some(b) = &v.background_vp0 {
        named.push(("background_vp0".into(), b.path.clone(), b.unit.clone()));
    }
    if let Some(f) = &v.facies {
        named.push(("facies".into(), f.path.clone(), "code".into()));
    }
    for (name, p) in &v.facies_probability {
        named.push((format!("facies_probability:{name}"), p.clone(), "1".into()));
    }
    for (role, path, unit) in named {
        pb.set_message(format!("volume {role}"));
        let data = read_volume_on_grid(&path, grid)?;
        check_volume_values(&project, &role, &path, &data)?;
        volumes.push(InputVolume {
            role,
            path,
            unit,
            data,
        });
    }
    pb.inc(1);
    pb.finish_and_clear();

    Ok(Study {
        project,
        wells,
        horizons,
        crossings,
        volumes,
        warnings,
    })
}

/// Values of an input volume must make sense for its role: finite, facies codes
/// among the defined codes, probabilities within 0..1, velocities plausible.
fn check_volume_values(project: &Project, role: &str, path: &Path, data: &[f32]) -> Result<()> {
    let bad = |k: usize, v: f32, what: &str| {
        let g = &project.grid;
        let trace = k / g.z_count;
        let (i, j) = (trace / g.xline_count, trace % g.xline_count);
        Error::input(
            path,
            None,
            format!(
                "{role}: sample {v} at inline {}, crossline {}, z {:.1} m is {what}",
                g.inline_number(i),
                g.xline_number(j),
                g.z_at(k % g.z_count)
            ),
        )
    };
    for (k, &v) in data.iter().enumerate() {
        if !v.is_finite() {
            return Err(bad(k, v, "not a finite number"));
        }
        if role == "facies" && !project.facies.iter().any(|f| f.code as f32 == v) {
            return Err(bad(k, v, "not one of the [[facies]] codes"));
        }
        if role.starts_with("facies_probability") && !(0.0..=1.0).contains(&v) {
            return Err(bad(k, v, "not a probability in 0..1"));
        }
        if role == "background_vp0" && !(500.0..=10000.0).contains(&v) {
            return Err(bad(k, v, "not a plausible Vp0 in m/s (500..10000)"));
        }
    }
    Ok(())
}
