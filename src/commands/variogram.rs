//! `stratiprior variogram PROJECT --out DIR`: experimental variograms and fitted
//! models per zone and property, as JSON and SVG, and the models in project-file
//! syntax (printed, and in `variograms.toml`) so a user can paste and edit them.

use crate::error::Result;
use crate::geostat::variogram::{plot_svg, write_json, write_svg, PlotOptions};
use crate::io_util::{refuse_overwrite_input, write_atomic};
use crate::prior::build::variogram_records;
use crate::prior::variograms::VariogramRecord;
use crate::study::load;
use serde::Serialize;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

/// What `variogram` wrote.
#[derive(Debug, Clone, Serialize)]
pub struct VariogramCommandReport {
    /// Output folder.
    pub out: PathBuf,
    /// One entry per zone and property.
    pub variograms: Vec<VariogramFiles>,
    /// The models in project-file syntax.
    pub toml: String,
    /// Warnings (pair counts, fits).
    pub warnings: Vec<String>,
}

/// Files of one zone and property.
#[derive(Debug, Clone, Serialize)]
pub struct VariogramFiles {
    /// Zone.
    pub zone: String,
    /// Property.
    pub property: String,
    /// JSON with the experimental points, the model and the fit.
    pub json: PathBuf,
    /// SVG plot.
    pub svg: PathBuf,
    /// The record.
    pub record: VariogramRecord,
}

fn unit_squared(prop: &str) -> &'static str {
    if prop == "vp0" {
        "(m/s)^2"
    } else {
        "1"
    }
}

/// Compute and write the variograms of the project at `project` into `out`.
pub fn run(project: &Path, out: &Path, progress: bool) -> Result<VariogramCommandReport> {
    let study = load(project, progress)?;
    let (records, warnings) = variogram_records(&study)?;
    let inputs = study.project.input_paths();
    let mut files = Vec::with_capacity(records.len());
    let mut toml = String::from(
        "# Variogram models in project-file syntax: paste into the project file to fix or edit them.\n",
    );
    for r in records {
        let stem = format!(
            "{}_{}",
            crate::condition::output::file_stem(&r.zone),
            r.property
        );
        let json = out.join(format!("{stem}.json"));
        let svg = out.join(format!("{stem}.svg"));
        refuse_overwrite_input(&json, &inputs)?;
        refuse_overwrite_input(&svg, &inputs)?;
        write_json(&json, &r)?;
        let plot = plot_svg(
            &r.experimental,
            Some(&r.model),
            &PlotOptions {
                title: format!("{} {} ({})", r.zone, r.property, r.source),
                value_unit: unit_squared(&r.property).into(),
                width: 720,
                height: 440,
                label_pairs: true,
            },
        )?;
        write_svg(&svg, &plot)?;
        let _ = writeln!(toml, "\n{}", r.toml.trim_end());
        files.push(VariogramFiles {
            zone: r.zone.clone(),
            property: r.property.clone(),
            json,
            svg,
            record: r,
        });
    }
    write_atomic(out.join("variograms.toml"), toml.as_bytes())?;
    Ok(VariogramCommandReport {
        out: out.to_path_buf(),
        variograms: files,
        toml,
        warnings,
    })
}

impl VariogramCommandReport {
    /// A readable text rendering: the files, then the models in project syntax.
    pub fn render_text(&self) -> String {
        let mut s = String::new();
        let _ = writeln!(s, "Variograms written to {}", self.out.display());
        for f in &self.variograms {
            let n: u64 = f.record.experimental.iter().map(|e| e.total_pairs()).sum();
            let _ = writeln!(
                s,
                "  {:<12} {:<8} {:<30} {:>9} pairs  {}",
                f.zone,
                f.property,
                f.record.source,
                n,
                f.svg.display()
            );
        }
        if !self.warnings.is_empty() {
            let _ = writeln!(s, "\nWarnings");
            for w in &self.warnings {
                let _ = writeln!(s, "  {w}");
            }
        }
        let _ = writeln!(s, "\n{}", self.toml);
        s
    }
}
