//! The `check` command: load a project and summarise what was read.

use crate::error::Result;
use crate::frame::gridding::GriddingReport;
use crate::frame::horizons::{thickness_stats, CrossingReport};
use crate::study::{load, Study};
use serde::Serialize;
use std::fmt::Write as _;
use std::path::Path;

/// The grid part of the summary.
#[derive(Debug, Clone, Serialize)]
pub struct GridSummary {
    /// First and last inline number, count.
    pub inlines: (i32, i32, usize),
    /// First and last crossline number, count.
    pub xlines: (i32, i32, usize),
    /// First depth, interval, count, last depth (m TVDSS).
    pub z: (f64, f64, usize, f64),
    /// Inline and crossline spacing, m.
    pub spacing: (f64, f64),
    /// Azimuth of increasing crossline number, degrees from grid north.
    pub azimuth: f64,
    /// Corner nodes: inline, crossline, x, y.
    pub corners: Vec<(i32, i32, f64, f64)>,
    /// Map area, km2.
    pub area_km2: f64,
}

/// One property log of a well in the summary (SI units).
#[derive(Debug, Clone, Serialize)]
pub struct PropertySummary {
    /// Property key (vp, vs, density, epsilon, delta, facies).
    pub property: String,
    /// File mnemonic.
    pub mnemonic: String,
    /// Unit in the file / used for conversion.
    pub unit: String,
    /// Non-null samples.
    pub count: usize,
    /// Minimum in SI (m/s, kg/m3, 1).
    pub min: Option<f64>,
    /// Maximum in SI.
    pub max: Option<f64>,
}

/// Samples of a well inside one zone.
#[derive(Debug, Clone, Serialize)]
pub struct ZonePenetration {
    /// Zone name.
    pub zone: String,
    /// Log samples between the zone's top and base surfaces.
    pub samples: usize,
    /// Measured depth range of those samples, m.
    pub md_range: (f64, f64),
}

/// One well in the summary.
#[derive(Debug, Clone, Serialize)]
pub struct WellSummary {
    /// Name.
    pub name: String,
    /// LAS file.
    pub las: String,
    /// LAS version.
    pub las_version: String,
    /// Log samples.
    pub samples: usize,
    /// Measured depth range, m.
    pub md_range: (f64, f64),
    /// TVDSS range, m.
    pub tvdss_range: (f64, f64),
    /// Surface location x, y (m) and datum elevation (m).
    pub surface: (f64, f64, f64),
    /// All curves of the file, with their units.
    pub curves: Vec<(String, String)>,
    /// Mapped properties.
    pub properties: Vec<PropertySummary>,
    /// Whether the well is deviated (a station inclined 0.5 degree or more).
    pub deviated: bool,
    /// Largest inclination, degrees.
    pub max_inclination: f64,
    /// Largest horizontal distance of a log sample from the surface location, m.
    pub max_horizontal_offset: f64,
    /// Gaps in the vp log longer than 5 samples: MD from, to (m).
    pub gaps: Vec<(f64, f64)>,
    /// Zones the well penetrates.
    pub zones: Vec<ZonePenetration>,
}

/// A tie mistie at one well on one surface.
#[derive(Debug, Clone, Serialize)]
pub struct MistieRow {
    /// Well.
    pub well: String,
    /// Horizon.
    pub horizon: String,
    /// Depth of the top, m TVDSS.
    pub z_top: f64,
    /// `z_top - z_picks`: the top's depth minus the gridded picks' depth there, before the tie, m.
    pub mistie: f64,
    /// `z_top - z_final` after the tie and the order clipping, m.
    pub residual: f64,
}

/// One horizon in the summary.
#[derive(Debug, Clone, Serialize)]
pub struct HorizonSummary {
    /// Name.
    pub name: String,
    /// Gridding report.
    pub gridding: GriddingReport,
    /// Tops tied.
    pub tops_tied: usize,
    /// Largest |mistie| before the tie, m.
    pub max_abs_mistie: Option<f64>,
    /// Depth range of the final surface, m TVDSS.
    pub z_range: (f64, f64),
}

/// One zone in the summary.
#[derive(Debug, Clone, Serialize)]
pub struct ZoneSummary {
    /// Name.
    pub name: String,
    /// Top horizon.
    pub top: String,
    /// Base horizon.
    pub base: String,
    /// Layering rule.
    pub layering: String,
    /// Cell thickness, m.
    pub cell_thickness: f64,
    /// Thickness over the survey: min, mean, max (m).
    pub thickness: (f64, f64, f64),
    /// Wells with samples in the zone.
    pub wells: usize,
}

/// One input volume in the summary.
#[derive(Debug, Clone, Serialize)]
pub struct VolumeSummary {
    /// Role.
    pub role: String,
    /// File.
    pub path: String,
    /// Unit.
    pub unit: String,
    /// Minimum, mean, maximum.
    pub stats: (f64, f64, f64),
}

/// Everything `check` reports.
#[derive(Debug, Clone, Serialize)]
pub struct CheckReport {
    /// Project file.
    pub project: String,
    /// Project name.
    pub name: String,
    /// Grid.
    pub grid: GridSummary,
    /// Wells.
    pub wells: Vec<WellSummary>,
    /// Horizons.
    pub horizons: Vec<HorizonSummary>,
    /// Tie misties per well and surface.
    pub misties: Vec<MistieRow>,
    /// Horizon crossings clipped.
    pub crossings: Vec<CrossingReport>,
    /// Zones.
    pub zones: Vec<ZoneSummary>,
    /// Facies codes and names.
    pub facies: Vec<(i32, String)>,
    /// Input volumes.
    pub volumes: Vec<VolumeSummary>,
    /// Warnings.
    pub warnings: Vec<String>,
}

/// Load the project and build the summary.
pub fn run(project: &Path, progress: bool) -> Result<CheckReport> {
    let study = load(project, progress)?;
    Ok(summarize(&study))
}

fn minmax(it: impl Iterator<Item = f64>) -> (f64, f64) {
    it.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
        (a.min(v), b.max(v))
    })
}

/// Whether depth `z` lies in a zone whose top and base are at `top` and `base`
/// there (top inclusive, base exclusive, so a sample on a horizon belongs to the
/// zone below it).
fn in_zone(z: f64, top: f64, base: f64) -> bool {
    z >= top && z < base
}

/// Build the summary of a loaded study.
pub fn summarize(study: &Study) -> CheckReport {
    let p = &study.project;
    let g = &p.grid;
    let corners = g.corners();
    let idx = [
        (0usize, 0usize),
        (0, g.xline_count - 1),
        (g.inline_count - 1, g.xline_count - 1),
        (g.inline_count - 1, 0),
    ];
    let grid = GridSummary {
        inlines: (
            g.inline_first,
            g.inline_number(g.inline_count - 1),
            g.inline_count,
        ),
        xlines: (
            g.xline_first,
            g.xline_number(g.xline_count - 1),
            g.xline_count,
        ),
        z: (g.z0, g.dz, g.z_count, g.z_last()),
        spacing: (g.inline_spacing, g.xline_spacing),
        azimuth: g.azimuth,
        corners: idx
            .iter()
            .zip(corners)
            .map(|(&(i, j), (x, y))| (g.inline_number(i), g.xline_number(j), x, y))
            .collect(),
        area_km2: (g.inline_count - 1) as f64
            * g.inline_spacing
            * (g.xline_count - 1) as f64
            * g.xline_spacing
            / 1e6,
    };

    let mut zone_wells = vec![0usize; p.zones.len()];
    let wells: Vec<WellSummary> = study
        .wells
        .iter()
        .map(|w| {
            let md_range = minmax(w.md.iter().copied());
            let tvdss_range = minmax(w.points.iter().map(|q| q.z));
            let max_off = w
                .points
                .iter()
                .map(|q| ((q.x - w.path.x).powi(2) + (q.y - w.path.y).powi(2)).sqrt())
                .fold(0.0, f64::max);
            let properties = w
                .logs
                .values()
                .map(|l| {
                    let r = l.range();
                    PropertySummary {
                        property: l.property.key().into(),
                        mnemonic: l.mnemonic.clone(),
                        unit: l.unit.name().into(),
                        count: l.count(),
                        min: r.map(|r| r.0),
                        max: r.map(|r| r.1),
                    }
                })
                .collect();
            let mut gaps = Vec::new();
            if let Some(vp) = w.logs.get(&crate::project::CurveProperty::Vp) {
                let first = vp.values.iter().position(|v| v.is_some());
                let last = vp.values.iter().rposition(|v| v.is_some());
                if let (Some(a), Some(b)) = (first, last) {
                    let mut k = a;
                    while k <= b {
                        if vp.values[k].is_none() {
                            let s = k;
                            while k <= b && vp.values[k].is_none() {
                                k += 1;
                            }
                            if k - s > 5 {
                                gaps.push((w.md[s], w.md[k - 1]));
                            }
                        } else {
                            k += 1;
                        }
                    }
                }
            }
            let mut zones = Vec::new();
            for (zi, z) in p.zones.iter().enumerate() {
                let top = &study.horizons[z.top].surface;
                let base = &study.horizons[z.base].surface;
                let mut n = 0usize;
                let mut r = (f64::INFINITY, f64::NEG_INFINITY);
                for (k, q) in w.points.iter().enumerate() {
                    if let (Some(t), Some(b)) =
                        (top.z_at_xy(g, q.x, q.y), base.z_at_xy(g, q.x, q.y))
                    {
                        if in_zone(q.z, t, b) {
                            n += 1;
                            r = (r.0.min(w.md[k]), r.1.max(w.md[k]));
                        }
                    }
                }
                if n > 0 {
                    zone_wells[zi] += 1;
                    zones.push(ZonePenetration {
                        zone: z.name.clone(),
                        samples: n,
                        md_range: r,
                    });
                }
            }
            WellSummary {
                name: w.entry.name.clone(),
                las: w.entry.las.display().to_string(),
                las_version: w.las_version.clone(),
                samples: w.md.len(),
                md_range,
                tvdss_range,
                surface: (w.path.x, w.path.y, w.path.datum_elevation),
                curves: w.las_curves.clone(),
                properties,
                deviated: !w.path.trajectory.is_vertical(),
                max_inclination: w.path.trajectory.max_inclination(),
                max_horizontal_offset: max_off,
                gaps,
                zones,
            }
        })
        .collect();

    let mut misties = Vec::new();
    for h in &study.horizons {
        if let Some(t) = &h.tie {
            for wt in &t.wells {
                let z_final = h.surface.z_at_xy(g, wt.x, wt.y).unwrap_or(f64::NAN);
                misties.push(MistieRow {
                    well: wt.well.clone(),
                    horizon: h.def.name.clone(),
                    z_top: wt.z_top,
                    mistie: wt.mistie,
                    residual: wt.z_top - z_final,
                });
            }
        }
    }

    let horizons = study
        .horizons
        .iter()
        .map(|h| {
            let zr = minmax(h.surface.z.iter().copied());
            HorizonSummary {
                name: h.def.name.clone(),
                gridding: h.gridding.clone(),
                tops_tied: h.tie.as_ref().map_or(0, |t| t.wells.len()),
                max_abs_mistie: h.tie.as_ref().map(|t| t.max_abs_mistie),
                z_range: zr,
            }
        })
        .collect();

    let zones = p
        .zones
        .iter()
        .enumerate()
        .map(|(zi, z)| ZoneSummary {
            name: z.name.clone(),
            top: p.horizons[z.top].name.clone(),
            base: p.horizons[z.base].name.clone(),
            layering: z.layering.name().into(),
            cell_thickness: z.cell_thickness,
            thickness: thickness_stats(
                &study.horizons[z.top].surface,
                &study.horizons[z.base].surface,
            ),
            wells: zone_wells[zi],
        })
        .collect();

    let volumes = study
        .volumes
        .iter()
        .map(|v| {
            let (lo, hi) = minmax(v.data.iter().map(|&x| f64::from(x)));
            let mean = if v.data.is_empty() {
                f64::NAN
            } else {
                v.data.iter().map(|&x| f64::from(x)).sum::<f64>() / v.data.len() as f64
            };
            VolumeSummary {
                role: v.role.clone(),
                path: v.path.display().to_string(),
                unit: v.unit.clone(),
                stats: (lo, mean, hi),
            }
        })
        .collect();

    CheckReport {
        project: p.path.display().to_string(),
        name: p.name.clone(),
        grid,
        wells,
        horizons,
        misties,
        crossings: study.crossings.clone(),
        zones,
        facies: p.facies.iter().map(|f| (f.code, f.name.clone())).collect(),
        volumes,
        warnings: study.warnings.clone(),
    }
}

impl CheckReport {
    /// A readable text rendering for the terminal.
    pub fn render_text(&self) -> String {
        let mut s = String::new();
        let g = &self.grid;
        let _ = writeln!(s, "Project {} ({})", self.name, self.project);
        let _ = writeln!(s, "\nSurvey grid");
        let _ = writeln!(
            s,
            "  inlines {}..{} ({}), crosslines {}..{} ({}), spacing {} m x {} m, azimuth {} deg, {:.2} km2",
            g.inlines.0, g.inlines.1, g.inlines.2, g.xlines.0, g.xlines.1, g.xlines.2,
            g.spacing.0, g.spacing.1, g.azimuth, g.area_km2
        );
        let _ = writeln!(
            s,
            "  depth {} .. {} m TVDSS every {} m ({} samples)",
            g.z.0, g.z.3, g.z.1, g.z.2
        );
        for (il, xl, x, y) in &g.corners {
            let _ = writeln!(s, "  corner il {il} xl {xl}: x {x:.2} y {y:.2}");
        }

        let _ = writeln!(s, "\nWells ({})", self.wells.len());
        for w in &self.wells {
            let _ = writeln!(
                s,
                "  {}  LAS {} ({} samples), MD {:.1}..{:.1} m, TVDSS {:.1}..{:.1} m, {}",
                w.name,
                w.las_version,
                w.samples,
                w.md_range.0,
                w.md_range.1,
                w.tvdss_range.0,
                w.tvdss_range.1,
                if w.deviated {
                    format!(
                        "deviated (max inclination {:.1} deg, {:.0} m from the surface location)",
                        w.max_inclination, w.max_horizontal_offset
                    )
                } else {
                    "vertical".into()
                }
            );
            let curves: Vec<String> = w
                .curves
                .iter()
                .map(|(m, u)| {
                    if u.is_empty() {
                        m.clone()
                    } else {
                        format!("{m} [{u}]")
                    }
                })
                .collect();
            let _ = writeln!(s, "    curves: {}", curves.join(", "));
            for p in &w.properties {
                let _ = writeln!(
                    s,
                    "    {:<8} from {:<8} ({:<5}) {:>6} samples, SI range {} .. {}",
                    p.property,
                    p.mnemonic,
                    p.unit,
                    p.count,
                    p.min.map(|v| format!("{v:.4}")).unwrap_or("-".into()),
                    p.max.map(|v| format!("{v:.4}")).unwrap_or("-".into())
                );
            }
            for (a, b) in &w.gaps {
                let _ = writeln!(s, "    log gap: MD {a:.1} .. {b:.1} m");
            }
            let zs: Vec<String> = w
                .zones
                .iter()
                .map(|z| format!("{} ({} samples)", z.zone, z.samples))
                .collect();
            let _ = writeln!(
                s,
                "    zones: {}",
                if zs.is_empty() {
                    "none".into()
                } else {
                    zs.join(", ")
                }
            );
        }

        let _ = writeln!(s, "\nHorizons ({}, shallow to deep)", self.horizons.len());
        for h in &self.horizons {
            let r = &h.gridding;
            let _ = writeln!(
                s,
                "  {}  {} picks, z {:.1}..{:.1} m TVDSS, {:.1}% of nodes inside the picks' hull, {:.1}% within {:.0} m of a pick",
                h.name,
                r.pick_count,
                h.z_range.0,
                h.z_range.1,
                100.0 * r.hull_fraction,
                100.0 * r.covered_fraction,
                r.hole_threshold
            );
            let _ = writeln!(s, "    inside the hull: {}", r.interpolation_method);
            let _ = writeln!(
                s,
                "    outside the hull ({} nodes, up to {:.0} m away): {}",
                r.nodes_extrapolated, r.max_extrapolation_distance, r.extrapolation_method
            );
            if r.hole_nodes > 0 {
                let _ = writeln!(
                    s,
                    "    holes: {} ({} nodes, largest {} nodes, largest gap {:.0} m), filled by the same interpolation",
                    r.hole_count, r.hole_nodes, r.largest_hole_nodes, r.largest_gap
                );
            }
            match h.max_abs_mistie {
                Some(m) => {
                    let _ = writeln!(
                        s,
                        "    tied to {} tops, largest |mistie| {m:.2} m",
                        h.tops_tied
                    );
                }
                None => {
                    let _ = writeln!(s, "    not tied (no tops)");
                }
            }
        }
        if self.crossings.iter().any(|c| c.nodes_clipped > 0) {
            let _ = writeln!(s, "\nHorizon crossings clipped");
            for c in self.crossings.iter().filter(|c| c.nodes_clipped > 0) {
                let at = c
                    .max_overlap_at
                    .as_ref()
                    .map(|n| {
                        format!(
                            " (largest at il {} xl {}, x {:.1} y {:.1})",
                            n.inline, n.xline, n.x, n.y
                        )
                    })
                    .unwrap_or_default();
                let _ = writeln!(
                    s,
                    "  {} was above {} at {} nodes, by up to {:.2} m{at}; clipped to {}",
                    c.lower, c.upper, c.nodes_clipped, c.max_overlap, c.upper
                );
            }
        } else {
            let _ = writeln!(s, "\nNo horizon crossings.");
        }

        if !self.misties.is_empty() {
            let _ = writeln!(
                s,
                "\nTie misties (top minus gridded picks; positive: top deeper)"
            );
            let _ = writeln!(
                s,
                "  {:<12} {:<24} {:>10} {:>10} {:>12}",
                "well", "horizon", "z top m", "mistie m", "after tie m"
            );
            for m in &self.misties {
                let _ = writeln!(
                    s,
                    "  {:<12} {:<24} {:>10.2} {:>10.2} {:>12.2e}",
                    m.well, m.horizon, m.z_top, m.mistie, m.residual
                );
            }
        }

        let _ = writeln!(s, "\nZones");
        for z in &self.zones {
            let _ = writeln!(
                s,
                "  {} ({} .. {}), {}, cells {} m, thickness {:.1} / {:.1} / {:.1} m (min / mean / max), {} wells",
                z.name, z.top, z.base, z.layering, z.cell_thickness, z.thickness.0, z.thickness.1, z.thickness.2, z.wells
            );
        }
        if !self.facies.is_empty() {
            let f: Vec<String> = self
                .facies
                .iter()
                .map(|(c, n)| format!("{c} = {n}"))
                .collect();
            let _ = writeln!(s, "\nFacies: {}", f.join(", "));
        }
        if !self.volumes.is_empty() {
            let _ = writeln!(s, "\nInput volumes (geometry matches the survey grid)");
            for v in &self.volumes {
                let _ = writeln!(
                    s,
                    "  {} {} [{}]: min {:.3}, mean {:.3}, max {:.3}",
                    v.role, v.path, v.unit, v.stats.0, v.stats.1, v.stats.2
                );
            }
        }
        if !self.warnings.is_empty() {
            let _ = writeln!(s, "\nWarnings");
            for w in &self.warnings {
                let _ = writeln!(s, "  {w}");
            }
        }
        s
    }
}
