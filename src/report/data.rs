//! Plain records the report draws: captured by `build` while it writes the
//! volumes, and by `validate`. Values are SI (m/s for Vp0, dimensionless for
//! epsilon and delta; x, y and depths TVDSS in metres, depth positive down).

use crate::condition::blocking::BlockedSample;
use crate::study::Study;
use std::collections::BTreeMap;

/// One property on the mid-layer of one zone, on the survey grid's nodes.
#[derive(Debug, Clone)]
pub struct MapFigure {
    /// Zone name.
    pub zone: String,
    /// Zone index.
    pub zone_index: usize,
    /// `vp0`, `epsilon` or `delta`.
    pub property: String,
    /// `mean` or `sd`.
    pub statistic: String,
    /// Layer drawn (0-based, from the top of the zone's layering).
    pub layer: usize,
    /// Inline nodes.
    pub ni: usize,
    /// Crossline nodes.
    pub nj: usize,
    /// Values, inline-major (`i * nj + j`), NaN where the zone is absent.
    pub values: Vec<f64>,
}

impl MapFigure {
    /// A map of `ni x nj` nodes with no value yet.
    pub fn empty(
        zone: &str,
        zone_index: usize,
        property: &str,
        statistic: &str,
        layer: usize,
        ni: usize,
        nj: usize,
    ) -> MapFigure {
        MapFigure {
            zone: zone.to_string(),
            zone_index,
            property: property.to_string(),
            statistic: statistic.to_string(),
            layer,
            ni,
            nj,
            values: vec![f64::NAN; ni * nj],
        }
    }

    /// Colour-bar label with the unit, e.g. `Vp0 sd (m/s)`.
    pub fn unit_label(&self) -> String {
        let (name, unit) = match self.property.as_str() {
            "vp0" => ("Vp0", "m/s"),
            "epsilon" => ("epsilon", "1"),
            "delta" => ("delta", "1"),
            other => (other, "1"),
        };
        format!("{name} {} ({unit})", self.statistic)
    }
}

/// The Vp0 mean along one inline with the horizons.
#[derive(Debug, Clone)]
pub struct SectionFigure {
    /// Inline number (as in the SEG-Y headers).
    pub inline: i32,
    /// Traces (crossline nodes).
    pub nj: usize,
    /// Depth samples per trace.
    pub nz: usize,
    /// Vp0 mean, trace-major (`j * nz + k`), NaN outside every zone.
    pub values: Vec<f64>,
    /// Horizon name and depth TVDSS at each trace (NaN where undefined).
    pub horizons: Vec<(String, Vec<f64>)>,
}

/// Bank samples of one region beside the region's well samples.
#[derive(Debug, Clone)]
pub struct CrossPlotRegion {
    /// Region label, e.g. `zone Vostrand facies sand`.
    pub region: String,
    /// Bank rows: vp0 (m/s), epsilon, delta.
    pub bank: Vec<[f64; 3]>,
    /// The region's blocked well samples with all three properties.
    pub wells: Vec<[f64; 3]>,
    /// Wells contributing to `wells`.
    pub well_count: usize,
}

/// Position of each well in each zone: the mean x, y of its blocked samples
/// there, by zone index (a deviated well is drawn where it crosses the zone).
pub fn well_positions_by_zone(
    study: &Study,
    blocked: &[&BlockedSample],
) -> BTreeMap<usize, Vec<(String, f64, f64)>> {
    let mut acc: BTreeMap<(usize, usize), (f64, f64, usize)> = BTreeMap::new();
    for b in blocked {
        let e = acc.entry((b.zone, b.well)).or_insert((0.0, 0.0, 0));
        e.0 += b.x;
        e.1 += b.y;
        e.2 += 1;
    }
    let mut out: BTreeMap<usize, Vec<(String, f64, f64)>> = BTreeMap::new();
    for ((zone, well), (sx, sy, n)) in acc {
        let name = study
            .wells
            .get(well)
            .map_or_else(|| format!("well {well}"), |w| w.name().to_string());
        out.entry(zone)
            .or_default()
            .push((name, sx / n as f64, sy / n as f64));
    }
    out
}
