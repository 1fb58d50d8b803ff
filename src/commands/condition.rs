//! `stratiprior condition PROJECT --out DIR`: each conditioned well as LAS 2.0.

use crate::condition::logs::{condition_all, AnisotropySource};
use crate::condition::output::write_conditioned_las;
use crate::error::Result;
use crate::io_util::refuse_overwrite_input;
use crate::study::load;
use serde::Serialize;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

/// One well in the conditioning summary.
#[derive(Debug, Clone, Serialize)]
pub struct ConditionedSummary {
    /// Well name.
    pub well: String,
    /// File written.
    pub path: PathBuf,
    /// Source of epsilon and delta.
    pub source: AnisotropySource,
    /// Backus window, m.
    pub backus_window: Option<f64>,
    /// Log samples inside a zone.
    pub samples_in_zones: usize,
    /// Blocked samples (stratigraphic cells with data).
    pub blocked: usize,
    /// Notes.
    pub notes: Vec<String>,
}

/// What `condition` did.
#[derive(Debug, Clone, Serialize)]
pub struct ConditionReport {
    /// Output folder.
    pub out: PathBuf,
    /// Wells.
    pub wells: Vec<ConditionedSummary>,
}

/// Condition every well of the project and write them into `out`.
pub fn run(project: &Path, out: &Path, progress: bool) -> Result<ConditionReport> {
    let study = load(project, progress)?;
    let frame = study.strat_frame();
    let wells = condition_all(&study, &frame)?;
    let zone_names: Vec<String> = study.project.zones.iter().map(|z| z.name.clone()).collect();
    let inputs = study.project.input_paths();
    let mut summary = Vec::with_capacity(wells.len());
    for w in &wells {
        let target = out.join(format!(
            "{}.las",
            crate::condition::output::file_stem(&w.name)
        ));
        refuse_overwrite_input(&target, &inputs)?;
        let path = write_conditioned_las(out, w, &zone_names)?;
        summary.push(ConditionedSummary {
            well: w.name.clone(),
            path,
            source: w.source,
            backus_window: w.backus_window,
            samples_in_zones: w.strat.iter().filter(|s| s.is_some()).count(),
            blocked: w.blocked.len(),
            notes: w.notes.clone(),
        });
    }
    Ok(ConditionReport {
        out: out.to_path_buf(),
        wells: summary,
    })
}

impl ConditionReport {
    /// A readable text rendering.
    pub fn render_text(&self) -> String {
        let mut s = String::new();
        let _ = writeln!(s, "Conditioned wells written to {}", self.out.display());
        for w in &self.wells {
            let src = match w.source {
                AnisotropySource::Curves => "EPS/DELTA curves".to_string(),
                AnisotropySource::Backus => format!(
                    "Backus averaging over {:.2} m",
                    w.backus_window.unwrap_or(f64::NAN)
                ),
                AnisotropySource::Missing => "none (no EPS/DELTA, no Vs and density)".into(),
            };
            let _ = writeln!(
                s,
                "  {:<12} {} samples in zones, {} blocked cells, epsilon/delta from {}  -> {}",
                w.well,
                w.samples_in_zones,
                w.blocked,
                src,
                w.path.display()
            );
            for n in &w.notes {
                let _ = writeln!(s, "    note: {n}");
            }
        }
        s
    }
}
