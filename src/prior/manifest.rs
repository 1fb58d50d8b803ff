//! `manifest.json`: the description of everything a run wrote.
//!
//! Inversion codes and scripts find files through the manifest, never by
//! guessing names (design overview). Paths are relative to the manifest's folder.

use crate::error::{Error, Result};
use crate::grid::SurveyGrid;
use crate::io_util::write_atomic;
use crate::project::Project;
use serde::Serialize;
use std::path::Path;

/// The tool that wrote the manifest.
#[derive(Debug, Clone, Serialize)]
pub struct ToolInfo {
    /// "stratiprior".
    pub name: String,
    /// Crate version.
    pub version: String,
}

/// The grid as the manifest writes it.
#[derive(Debug, Clone, Serialize)]
pub struct ManifestGrid {
    /// World x of node (first inline, first crossline), m.
    pub x0: f64,
    /// World y of that node, m.
    pub y0: f64,
    /// Bearing of increasing crossline number, degrees from grid north.
    pub azimuth: f64,
    /// Distance between inlines, m.
    pub inline_spacing: f64,
    /// Distance between crosslines, m.
    pub xline_spacing: f64,
    /// First inline number, count.
    pub inlines: [i64; 2],
    /// First crossline number, count.
    pub xlines: [i64; 2],
    /// First depth (m TVDSS), interval (m), count.
    pub z: [f64; 3],
}

impl From<&SurveyGrid> for ManifestGrid {
    fn from(g: &SurveyGrid) -> Self {
        ManifestGrid {
            x0: g.x0,
            y0: g.y0,
            azimuth: g.azimuth,
            inline_spacing: g.inline_spacing,
            xline_spacing: g.xline_spacing,
            inlines: [i64::from(g.inline_first), g.inline_count as i64],
            xlines: [i64::from(g.xline_first), g.xline_count as i64],
            z: [g.z0, g.dz, g.z_count as f64],
        }
    }
}

/// A zone in the manifest.
#[derive(Debug, Clone, Serialize)]
pub struct ManifestZone {
    /// Name.
    pub name: String,
    /// Index, as in the zone volume.
    pub index: usize,
    /// Top horizon.
    pub top: String,
    /// Base horizon.
    pub base: String,
    /// Layering rule.
    pub layering: String,
    /// Stratigraphic cell thickness, m.
    pub cell_thickness: f64,
    /// The facies trend the mean volumes hold: per facies name, the offsets
    /// `t_f` of vp0 (m/s), epsilon and delta; the mean at a cell includes
    /// `sum_f p_f t_f` with `p_f` the facies probability volumes. Empty without
    /// facies or with `[kriging] facies_trend = false`.
    pub facies_trend: Vec<(String, [f64; 3])>,
}

/// A facies in the manifest.
#[derive(Debug, Clone, Serialize)]
pub struct ManifestFacies {
    /// Code.
    pub code: i32,
    /// Name.
    pub name: String,
}

/// A volume in the manifest.
#[derive(Debug, Clone, Serialize)]
pub struct ManifestVolume {
    /// `vp0`, `epsilon`, `delta`, `zone`, ...
    pub property: String,
    /// `mean`, `std` or `value`.
    pub statistic: String,
    /// `m/s`, `1`, `index`.
    pub unit: String,
    /// Path relative to the manifest.
    pub path: String,
}

/// A sample bank of one region (zone, facies) in the manifest.
#[derive(Debug, Clone, Serialize)]
pub struct ManifestBank {
    /// Zone name.
    pub zone: String,
    /// Zone index, as in the zone volume.
    pub zone_index: usize,
    /// Area name (`[[areas]]`, or `rest` for the zone's nodes in none of them);
    /// `None` for a zone without areas.
    pub area: Option<String>,
    /// Facies name (`None` in a project without facies: the whole zone).
    pub facies: Option<String>,
    /// Facies code.
    pub facies_code: Option<i32>,
    /// The bank: float32 `.npy`, shape (count, 7), path relative to the manifest.
    pub path: String,
    /// The residual pool: float32 `.npy`, shape (pool_count, 5).
    pub pool_path: String,
    /// Rows of the bank.
    pub count: usize,
    /// Rows of the pool.
    pub pool_count: usize,
    /// Wells contributing to the pool.
    pub wells: usize,
    /// `"region"`: the pool of this region's samples; `"area"`: too few wells or
    /// samples, the pool of the region's (zone, area) (all facies) is borrowed;
    /// `"zone"`: too few there too (or no areas), the pool of the whole zone.
    pub pool: String,
    /// Bank columns: vp0 (m/s), epsilon, delta, x, y (m), z (m TVDSS), s (m).
    pub columns: Vec<String>,
    /// Pool columns: vp0 (m/s), epsilon, delta residuals, weight, well index.
    pub pool_columns: Vec<String>,
    /// Facies offset d_f added to the mean volumes: vp0 (m/s), epsilon, delta.
    pub offset: [f64; 3],
    /// Project seed: the bank's generator is ChaCha8 seeded with it ...
    pub seed: u64,
    /// ... on stream `stream`: `zone_index * F + facies index` (F = facies
    /// count, at least 1) in a zone without areas; area regions are numbered
    /// after all of those, in manifest order.
    pub stream: u64,
    /// Probability mass of the region (sum of facies probabilities over its cells).
    pub mass: f64,
}

/// What cells outside every zone hold.
#[derive(Debug, Clone, Serialize)]
pub struct OutsideFill {
    /// Zone index written there.
    pub zone: i32,
    /// How Vp0 mean is filled.
    pub vp0_mean: String,
    /// Fill of every standard deviation.
    pub std: f64,
    /// Fill of epsilon and delta means.
    pub epsilon_delta_mean: f64,
}

/// The whole manifest.
#[derive(Debug, Clone, Serialize)]
pub struct Manifest {
    /// The tool.
    pub tool: ToolInfo,
    /// The project file it came from.
    pub project: String,
    /// Grid.
    pub grid: ManifestGrid,
    /// Zones.
    pub zones: Vec<ManifestZone>,
    /// Facies.
    pub facies: Vec<ManifestFacies>,
    /// Volumes.
    pub volumes: Vec<ManifestVolume>,
    /// Sample banks, one per region (zone, facies).
    pub banks: Vec<ManifestBank>,
    /// Lateral areas that split zones into bank regions (`[[areas]]`; zone
    /// indices as in `zones`, polygons in world m, boxes in line numbers).
    pub areas: Vec<crate::project::AreaDef>,
    /// Seed.
    pub seed: u64,
    /// Fill outside every zone.
    pub outside_zones: OutsideFill,
    /// Further files (variogram models, summaries).
    pub files: Vec<ManifestFile>,
    /// The caution that goes with every output.
    pub caution: String,
}

/// Another file of the run.
#[derive(Debug, Clone, Serialize)]
pub struct ManifestFile {
    /// What it is.
    pub kind: String,
    /// Path relative to the manifest.
    pub path: String,
}

/// The caution printed in the README, reports and manifests.
pub const CAUTION: &str = "These priors are estimates for use in seismic inversion. They are uncertain, most of all far from wells, must be reviewed by a qualified geoscientist before they inform any decision, and do not replace local regulations or licensed professional practice.";

impl Manifest {
    /// A manifest for a project with no volumes yet.
    pub fn new(project: &Project, outside: OutsideFill) -> Manifest {
        Manifest {
            tool: ToolInfo {
                name: "stratiprior".into(),
                version: env!("CARGO_PKG_VERSION").into(),
            },
            project: project.path.display().to_string(),
            grid: (&project.grid).into(),
            zones: project
                .zones
                .iter()
                .enumerate()
                .map(|(k, z)| ManifestZone {
                    name: z.name.clone(),
                    index: k,
                    top: project.horizons[z.top].name.clone(),
                    base: project.horizons[z.base].name.clone(),
                    layering: z.layering.name().into(),
                    cell_thickness: z.cell_thickness,
                    facies_trend: Vec::new(),
                })
                .collect(),
            facies: project
                .facies
                .iter()
                .map(|f| ManifestFacies {
                    code: f.code,
                    name: f.name.clone(),
                })
                .collect(),
            volumes: Vec::new(),
            banks: Vec::new(),
            areas: project.areas.clone(),
            seed: project.seed,
            outside_zones: outside,
            files: Vec::new(),
            caution: CAUTION.into(),
        }
    }

    /// Write as pretty JSON to `path` (atomically).
    pub fn write(&self, path: &Path) -> Result<()> {
        let text = serde_json::to_string_pretty(self)
            .map_err(|e| Error::inconsistent(format!("cannot encode the manifest: {e}")))?;
        write_atomic(path, text.as_bytes())
    }
}
