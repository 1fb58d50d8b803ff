//! The project file (TOML) that describes one study.
//!
//! A project names the survey grid, the well inputs and how to read their
//! curves, the horizons in stratigraphic order, the zones between consecutive
//! horizons, the facies codes, optional input volumes, the output folder and the
//! seed. The README has a complete annotated example.
//!
//! Rules: unknown keys are errors naming the key; relative paths resolve against
//! the project file's folder; every value a user may get wrong is checked here,
//! with a message that says what was expected.

use crate::error::{Error, Result};
use crate::grid::SurveyGrid;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// The project file as written (before paths are resolved and values checked).
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawProject {
    name: Option<String>,
    output: Option<PathBuf>,
    seed: Option<u64>,
    grid: RawGrid,
    wells: RawWells,
    curves: RawCurves,
    horizons: Vec<RawHorizon>,
    tie: Option<RawTie>,
    zones: Vec<RawZone>,
    #[serde(default)]
    facies: Vec<FaciesDef>,
    #[serde(default)]
    volumes: RawVolumes,
    conditioning: Option<RawConditioning>,
    kriging: Option<RawKriging>,
    bounds: Option<RawBounds>,
    banks: Option<RawBanks>,
    #[serde(default)]
    areas: Vec<RawArea>,
    #[serde(default)]
    variograms: BTreeMap<String, BTreeMap<String, toml::Value>>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawConditioning {
    source: Option<String>,
    backus_window: Option<f64>,
    backus_number: Option<f64>,
    dominant_frequency: Option<f64>,
    #[serde(default)]
    intrinsic: Vec<RawIntrinsic>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawIntrinsic {
    facies: String,
    epsilon: Option<RawIntrinsicValue>,
    delta: Option<RawIntrinsicValue>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(untagged)]
enum RawIntrinsicValue {
    Constant(f64),
    Linear(RawLinear),
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawLinear {
    log: String,
    intercept: f64,
    slope: f64,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawKriging {
    neighbours: Option<i64>,
    per_well: Option<i64>,
    max_wells: Option<i64>,
    search_radius: Option<f64>,
    vp0: Option<String>,
    epsilon: Option<String>,
    delta: Option<String>,
    vp0_drift: Option<String>,
    facies_trend: Option<bool>,
    #[serde(default)]
    zones: BTreeMap<String, RawKrigingZone>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawKrigingZone {
    vp0: Option<String>,
    epsilon: Option<String>,
    delta: Option<String>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawBounds {
    epsilon: Option<(f64, f64)>,
    delta: Option<(f64, f64)>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawGrid {
    x0: f64,
    y0: f64,
    azimuth: f64,
    inline_spacing: f64,
    xline_spacing: f64,
    inlines: (i64, i64),
    xlines: (i64, i64),
    z: (f64, f64, i64),
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawWells {
    table: PathBuf,
    tops: Option<PathBuf>,
}

#[derive(Debug, Clone, Default, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawCurves {
    vp: Option<RawCurve>,
    vs: Option<RawCurve>,
    density: Option<RawCurve>,
    epsilon: Option<RawCurve>,
    delta: Option<RawCurve>,
    facies: Option<RawCurve>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawCurve {
    mnemonics: Vec<String>,
    unit: Option<String>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawHorizon {
    name: String,
    picks: PathBuf,
    tops_name: Option<String>,
    #[serde(default)]
    z_is_elevation: bool,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawBanks {
    count: Option<i64>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawArea {
    name: String,
    zones: Option<Vec<String>>,
    polygon: Option<Vec<Vec<f64>>>,
    #[serde(rename = "box")]
    bbox: Option<RawAreaBox>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawAreaBox {
    inlines: (i64, i64),
    xlines: (i64, i64),
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawTie {
    radius: f64,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawZone {
    name: String,
    top: String,
    base: String,
    layering: String,
    cell_thickness: f64,
}

#[derive(Debug, Clone, Default, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawVolumes {
    background_vp0: Option<RawVolume>,
    facies: Option<RawVolume>,
    #[serde(default)]
    facies_probability: BTreeMap<String, PathBuf>,
    blend_facies_with_wells: Option<bool>,
    calibrate_facies_labels: Option<bool>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawVolume {
    path: PathBuf,
    unit: Option<String>,
}

/// A property a log curve can carry.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum CurveProperty {
    /// Compressional velocity or slowness.
    Vp,
    /// Shear velocity or slowness.
    Vs,
    /// Bulk density.
    Density,
    /// Thomsen epsilon.
    Epsilon,
    /// Thomsen delta.
    Delta,
    /// Facies code.
    Facies,
}

impl CurveProperty {
    /// All properties, in a fixed order.
    pub const ALL: [CurveProperty; 6] = [
        CurveProperty::Vp,
        CurveProperty::Vs,
        CurveProperty::Density,
        CurveProperty::Epsilon,
        CurveProperty::Delta,
        CurveProperty::Facies,
    ];

    /// The key used in the project file.
    pub fn key(self) -> &'static str {
        match self {
            CurveProperty::Vp => "vp",
            CurveProperty::Vs => "vs",
            CurveProperty::Density => "density",
            CurveProperty::Epsilon => "epsilon",
            CurveProperty::Delta => "delta",
            CurveProperty::Facies => "facies",
        }
    }
}

/// The unit a curve is recorded in, and so how it converts to SI.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum CurveUnit {
    /// Slowness in microseconds per foot: `v = 304800 / DT` m/s.
    MicrosecondsPerFoot,
    /// Slowness in microseconds per metre: `v = 1e6 / DT` m/s.
    MicrosecondsPerMetre,
    /// Velocity in m/s.
    MetresPerSecond,
    /// Velocity in km/s.
    KilometresPerSecond,
    /// Velocity in ft/s.
    FeetPerSecond,
    /// Density in g/cm3 (x 1000 to kg/m3).
    GramsPerCubicCentimetre,
    /// Density in kg/m3.
    KilogramsPerCubicMetre,
    /// Dimensionless (epsilon, delta).
    Dimensionless,
    /// Integer codes (facies).
    Code,
}

impl CurveUnit {
    /// Parse a unit as written in a project file or a LAS header; `None` if not recognised.
    ///
    /// Accepts the spellings common in LAS headers (common practice): `US/F`,
    /// `US/FT`, `USEC/FT`, `G/C3`, `G/CC`, `K/M3`, ... in any case.
    pub fn parse(s: &str) -> Option<CurveUnit> {
        let u: String = s
            .trim()
            .to_ascii_lowercase()
            .chars()
            .filter(|c| !c.is_whitespace())
            .collect();
        Some(match u.as_str() {
            "us/ft" | "us/f" | "usec/ft" | "usec/f" | "µs/ft" | "microseconds/ft" => {
                CurveUnit::MicrosecondsPerFoot
            }
            "us/m" | "usec/m" | "µs/m" | "microseconds/m" => CurveUnit::MicrosecondsPerMetre,
            "m/s" | "m/sec" | "mps" => CurveUnit::MetresPerSecond,
            "km/s" | "km/sec" => CurveUnit::KilometresPerSecond,
            "ft/s" | "ft/sec" | "f/s" | "fps" => CurveUnit::FeetPerSecond,
            "g/cm3" | "g/cc" | "g/c3" | "gm/cc" | "g/cm^3" => CurveUnit::GramsPerCubicCentimetre,
            "kg/m3" | "k/m3" | "kg/m^3" => CurveUnit::KilogramsPerCubicMetre,
            "1" | "" | "v/v" | "frac" | "fraction" | "dimensionless" | "unitless" | "none" => {
                CurveUnit::Dimensionless
            }
            _ => return None,
        })
    }

    /// The units allowed for a property.
    pub fn allowed_for(p: CurveProperty) -> &'static [CurveUnit] {
        use CurveUnit::*;
        match p {
            CurveProperty::Vp | CurveProperty::Vs => &[
                MicrosecondsPerFoot,
                MicrosecondsPerMetre,
                MetresPerSecond,
                KilometresPerSecond,
                FeetPerSecond,
            ],
            CurveProperty::Density => &[GramsPerCubicCentimetre, KilogramsPerCubicMetre],
            CurveProperty::Epsilon | CurveProperty::Delta => &[Dimensionless],
            CurveProperty::Facies => &[Code],
        }
    }

    /// The unit's canonical spelling.
    pub fn name(self) -> &'static str {
        match self {
            CurveUnit::MicrosecondsPerFoot => "us/ft",
            CurveUnit::MicrosecondsPerMetre => "us/m",
            CurveUnit::MetresPerSecond => "m/s",
            CurveUnit::KilometresPerSecond => "km/s",
            CurveUnit::FeetPerSecond => "ft/s",
            CurveUnit::GramsPerCubicCentimetre => "g/cm3",
            CurveUnit::KilogramsPerCubicMetre => "kg/m3",
            CurveUnit::Dimensionless => "1",
            CurveUnit::Code => "code",
        }
    }

    /// Convert one value in this unit to SI (m/s, kg/m3, dimensionless).
    ///
    /// Slowness: `v = 304800 / DT` for us/ft (1 ft = 0.3048 m exactly, design
    /// overview), `v = 1e6 / DT` for us/m. Returns `None` for a non-positive
    /// slowness or velocity, which has no physical meaning.
    pub fn to_si(self, v: f64) -> Option<f64> {
        match self {
            CurveUnit::MicrosecondsPerFoot => (v > 0.0).then(|| 304_800.0 / v),
            CurveUnit::MicrosecondsPerMetre => (v > 0.0).then(|| 1.0e6 / v),
            CurveUnit::MetresPerSecond => (v > 0.0).then_some(v),
            CurveUnit::KilometresPerSecond => (v > 0.0).then_some(v * 1000.0),
            CurveUnit::FeetPerSecond => (v > 0.0).then_some(v * 0.3048),
            CurveUnit::GramsPerCubicCentimetre => (v > 0.0).then_some(v * 1000.0),
            CurveUnit::KilogramsPerCubicMetre => (v > 0.0).then_some(v),
            CurveUnit::Dimensionless | CurveUnit::Code => Some(v),
        }
    }
}

/// How to find one property's curve in the LAS files.
#[derive(Debug, Clone, Serialize)]
pub struct CurveSpec {
    /// The property.
    pub property: CurveProperty,
    /// Candidate mnemonics, first match wins (case-insensitive).
    pub mnemonics: Vec<String>,
    /// The unit the curve is recorded in.
    pub unit: CurveUnit,
}

/// A horizon, in stratigraphic order.
#[derive(Debug, Clone, Serialize)]
pub struct HorizonDef {
    /// Name used in the project.
    pub name: String,
    /// The picks file (resolved path).
    pub picks: PathBuf,
    /// The surface's name in the tops table.
    pub tops_name: String,
    /// Whether the picks' z is elevation (positive up).
    pub z_is_elevation: bool,
}

/// How stratigraphic coordinates follow the zone's bounding horizons.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Layering {
    /// Layers divide the zone proportionally between top and base.
    Proportional,
    /// Layers are parallel to the top horizon (onlap onto the base).
    ParallelToTop,
    /// Layers are parallel to the base horizon (truncation at the top).
    ParallelToBase,
}

impl Layering {
    /// The project-file spelling.
    pub fn name(self) -> &'static str {
        match self {
            Layering::Proportional => "proportional",
            Layering::ParallelToTop => "parallel_to_top",
            Layering::ParallelToBase => "parallel_to_base",
        }
    }
}

/// A zone between two consecutive horizons.
#[derive(Debug, Clone, Serialize)]
pub struct ZoneDef {
    /// Zone name.
    pub name: String,
    /// Index of the top horizon in [`Project::horizons`].
    pub top: usize,
    /// Index of the base horizon (always `top + 1`).
    pub base: usize,
    /// Layering rule.
    pub layering: Layering,
    /// Stratigraphic cell thickness, m.
    pub cell_thickness: f64,
}

/// A facies code and its name.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FaciesDef {
    /// Integer code as found in facies curves and volumes.
    pub code: i32,
    /// Name.
    pub name: String,
}

/// An optional input volume.
#[derive(Debug, Clone, Serialize)]
pub struct VolumeDef {
    /// Resolved path of the SEG-Y file.
    pub path: PathBuf,
    /// Unit of the samples.
    pub unit: String,
}

/// Optional input volumes on the survey grid.
#[derive(Debug, Clone, Default, Serialize)]
pub struct VolumeDefs {
    /// Background Vp0 (the inversion's starting model), m/s.
    pub background_vp0: Option<VolumeDef>,
    /// Facies labels, integer codes stored as floats.
    pub facies: Option<VolumeDef>,
    /// Per-facies probability volumes, by facies name.
    pub facies_probability: BTreeMap<String, PathBuf>,
    /// Whether facies probabilities from volumes are blended with indicator
    /// kriging of the wells near wells (default true); false uses the volumes alone.
    pub blend_facies_with_wells: bool,
    /// Whether the facies-label volume's labels are read through their
    /// confusion calibrated at the wells (default true); false takes them as
    /// certain.
    pub calibrate_facies_labels: bool,
}

/// Where Vp0, epsilon and delta of a log sample come from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum ConditioningSource {
    /// EPS/DELTA curves where a well has them, Backus averaging of Vp, Vs and density elsewhere.
    Auto,
    /// Only EPS/DELTA curves (wells without them give no epsilon or delta).
    Curves,
    /// Always Backus averaging, even where EPS/DELTA curves exist.
    Backus,
}

/// Length of the Backus averaging window.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum BackusWindowSpec {
    /// A fixed length, m.
    Metres(f64),
    /// From the Backus number `B = f L / Vs_min` (Liner and Fei 2007): `L = B Vs_min / f`.
    BackusNumber {
        /// Backus number B.
        b: f64,
        /// Dominant frequency f, Hz.
        frequency: f64,
    },
}

/// An intrinsic anisotropy term: a constant or a linear function of a named log.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum IntrinsicValue {
    /// A constant.
    Constant(f64),
    /// `intercept + slope * log`, the log named by its LAS mnemonic (file units).
    Linear {
        /// LAS mnemonic.
        log: String,
        /// Intercept.
        intercept: f64,
        /// Slope per unit of the log.
        slope: f64,
    },
}

/// Intrinsic anisotropy of one facies, added to the layer-induced part.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct IntrinsicSpec {
    /// Facies code.
    pub facies: i32,
    /// Added epsilon.
    pub epsilon: Option<IntrinsicValue>,
    /// Added delta.
    pub delta: Option<IntrinsicValue>,
}

/// Well-conditioning settings.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Conditioning {
    /// Source of epsilon and delta.
    pub source: ConditioningSource,
    /// Backus window.
    pub window: BackusWindowSpec,
    /// Intrinsic anisotropy per facies.
    pub intrinsic: Vec<IntrinsicSpec>,
}

/// Default Backus window when none is given: 10 m (common practice for surface
/// seismic frequencies, roughly B = 0.3 at 60 Hz and Vs 2000 m/s; from memory).
pub const DEFAULT_BACKUS_WINDOW: f64 = 10.0;

/// A kriging method.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum KrigingMethod {
    /// Simple kriging around the zone mean of the blocked well data.
    Simple,
    /// Simple kriging around a linear depth trend fitted to the zone's well data.
    SimpleTrend,
    /// Ordinary kriging.
    Ordinary,
    /// Kriging with an external drift.
    ExternalDrift,
}

impl KrigingMethod {
    fn parse(s: &str) -> Option<Self> {
        Some(match s.trim() {
            "simple" => KrigingMethod::Simple,
            "simple_trend" => KrigingMethod::SimpleTrend,
            "ordinary" => KrigingMethod::Ordinary,
            "external_drift" => KrigingMethod::ExternalDrift,
            _ => return None,
        })
    }

    /// The project-file spelling.
    pub fn name(self) -> &'static str {
        match self {
            KrigingMethod::Simple => "simple",
            KrigingMethod::SimpleTrend => "simple_trend",
            KrigingMethod::Ordinary => "ordinary",
            KrigingMethod::ExternalDrift => "external_drift",
        }
    }
}

/// The drift variable of external-drift kriging.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Drift {
    /// The background Vp0 volume (Vp0 only).
    BackgroundVp0,
    /// Depth (m TVDSS).
    Depth,
}

/// Kriging settings.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct KrigingSettings {
    /// Most neighbours in all.
    pub neighbours: usize,
    /// Most neighbours from any one well.
    pub per_well: usize,
    /// Most wells contributing.
    pub max_wells: usize,
    /// Search radius in units of the variogram ranges.
    pub search_radius: f64,
    /// Method per property (vp0, epsilon, delta) and zone name; key "" is the default.
    pub methods: BTreeMap<(String, String), KrigingMethod>,
    /// Drift of external-drift kriging of Vp0.
    pub vp0_drift: Drift,
    /// Whether the kriging mean follows the facies (projects with facies): the
    /// wells' facies offsets are removed before kriging and their
    /// probability-weighted sum added back at every cell (default true).
    pub facies_trend: bool,
}

impl KrigingSettings {
    /// The method for a property ("vp0", "epsilon", "delta") in a zone.
    pub fn method(&self, zone: &str, property: &str) -> KrigingMethod {
        self.methods
            .get(&(zone.to_string(), property.to_string()))
            .or_else(|| self.methods.get(&(String::new(), property.to_string())))
            .copied()
            .unwrap_or(KrigingMethod::Ordinary)
    }
}

/// Plausible ranges epsilon and delta are clipped to.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Bounds {
    /// Epsilon range.
    pub epsilon: (f64, f64),
    /// Delta range.
    pub delta: (f64, f64),
}

/// Default bounds: epsilon -0.05..0.5, delta -0.2..0.3 (common practice: the span of
/// sedimentary rocks in Thomsen 1986, Table 1, with a margin).
pub const DEFAULT_BOUNDS: Bounds = Bounds {
    epsilon: (-0.05, 0.5),
    delta: (-0.2, 0.3),
};

/// A checked project with resolved paths.
#[derive(Debug, Clone, Serialize)]
pub struct Project {
    /// The project file.
    pub path: PathBuf,
    /// Free-text name.
    pub name: String,
    /// Output folder (resolved).
    pub output: PathBuf,
    /// Seed of every random draw.
    pub seed: u64,
    /// The survey grid.
    pub grid: SurveyGrid,
    /// Well table CSV.
    pub well_table: PathBuf,
    /// Tops CSV, if any.
    pub tops: Option<PathBuf>,
    /// Curve mapping, one entry per property present.
    pub curves: Vec<CurveSpec>,
    /// Horizons, shallow to deep.
    pub horizons: Vec<HorizonDef>,
    /// Distance over which tie corrections fade, m.
    pub tie_radius: f64,
    /// Zones, shallow to deep.
    pub zones: Vec<ZoneDef>,
    /// Facies codes.
    pub facies: Vec<FaciesDef>,
    /// Input volumes.
    pub volumes: VolumeDefs,
    /// Well conditioning.
    pub conditioning: Conditioning,
    /// Kriging.
    pub kriging: KrigingSettings,
    /// Clipping bounds of epsilon and delta.
    pub bounds: Bounds,
    /// Samples per region bank (`[banks] count`).
    pub bank_count: usize,
    /// Lateral areas of zones (`[[areas]]`), in file order.
    pub areas: Vec<AreaDef>,
    /// Variogram settings per zone name and property, as written (checked by the
    /// geostatistics module, which knows the model syntax).
    #[serde(skip)]
    pub variograms: BTreeMap<String, BTreeMap<String, toml::Value>>,
}

/// Default number of samples per region bank when `[banks] count` is absent.
pub const DEFAULT_BANK_COUNT: usize = 20000;

/// Largest accepted `[banks] count` (a bank of 7 float32 columns is then 280 MB).
pub const MAX_BANK_COUNT: usize = 10_000_000;

/// Default tie radius when `[tie]` is absent, m.
pub const DEFAULT_TIE_RADIUS: f64 = 2000.0;

impl Project {
    /// Read and check a project file.
    pub fn load(path: &Path) -> Result<Project> {
        let text = std::fs::read_to_string(path).map_err(|e| Error::io(path, e))?;
        Project::from_toml(&text, path)
    }

    /// Parse and check project text; `path` is used for messages and to resolve
    /// relative paths.
    pub fn from_toml(text: &str, path: &Path) -> Result<Project> {
        let raw: RawProject = toml::from_str(text).map_err(|e| {
            let line = e
                .span()
                .map(|s| text[..s.start.min(text.len())].matches('\n').count() + 1);
            let msg = e.message().to_string();
            Error::input(path, line, msg)
        })?;
        let base = match path.parent() {
            Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
            _ => PathBuf::from("."),
        };
        let resolve = |p: &Path| -> PathBuf {
            if p.is_absolute() {
                p.to_path_buf()
            } else {
                base.join(p)
            }
        };
        let perr = |msg: String| Error::project(path, msg);

        // grid
        let g = &raw.grid;
        let count = |key: &str, n: i64| -> Result<usize> {
            if n < 2 {
                return Err(perr(format!(
                    "grid.{key}: the count (second number) must be at least 2, got {n}"
                )));
            }
            usize::try_from(n).map_err(|_| perr(format!("grid.{key}: count {n} is too large")))
        };
        let first = |key: &str, n: i64| -> Result<i32> {
            i32::try_from(n).map_err(|_| {
                perr(format!(
                    "grid.{key}: the first number {n} does not fit a 32-bit line number"
                ))
            })
        };
        let grid = SurveyGrid {
            x0: g.x0,
            y0: g.y0,
            azimuth: g.azimuth,
            inline_spacing: g.inline_spacing,
            xline_spacing: g.xline_spacing,
            inline_first: first("inlines", g.inlines.0)?,
            inline_count: count("inlines", g.inlines.1)?,
            xline_first: first("xlines", g.xlines.0)?,
            xline_count: count("xlines", g.xlines.1)?,
            z0: g.z.0,
            dz: g.z.1,
            z_count: count("z", g.z.2)?,
        };
        grid.validate().map_err(|m| perr(format!("grid: {m}")))?;
        if i64::from(grid.inline_first) + grid.inline_count as i64 > i64::from(i32::MAX)
            || i64::from(grid.xline_first) + grid.xline_count as i64 > i64::from(i32::MAX)
        {
            return Err(perr("grid: line numbers overflow 32 bits".into()));
        }

        // curves
        let mut curves = Vec::new();
        let c = &raw.curves;
        for (prop, spec) in [
            (CurveProperty::Vp, &c.vp),
            (CurveProperty::Vs, &c.vs),
            (CurveProperty::Density, &c.density),
            (CurveProperty::Epsilon, &c.epsilon),
            (CurveProperty::Delta, &c.delta),
            (CurveProperty::Facies, &c.facies),
        ] {
            let Some(spec) = spec else { continue };
            let key = prop.key();
            if spec.mnemonics.is_empty() || spec.mnemonics.iter().any(|m| m.trim().is_empty()) {
                return Err(perr(format!(
                    "curves.{key}.mnemonics: expected a list of one or more curve mnemonics, e.g. [\"DT\"]"
                )));
            }
            let unit = if prop == CurveProperty::Facies {
                match spec.unit.as_deref() {
                    None => CurveUnit::Code,
                    Some(u) if u.trim().is_empty() || u.trim() == "code" => CurveUnit::Code,
                    Some(u) => {
                        return Err(perr(format!(
                            "curves.facies.unit: facies curves hold integer codes; leave unit out or write \"code\", got \"{u}\""
                        )))
                    }
                }
            } else {
                let allowed = CurveUnit::allowed_for(prop);
                let names: Vec<&str> = allowed.iter().map(|u| u.name()).collect();
                let u = spec.unit.as_deref().ok_or_else(|| {
                    perr(format!(
                        "curves.{key}: missing unit; expected one of {}",
                        names.join(", ")
                    ))
                })?;
                match CurveUnit::parse(u) {
                    Some(cu) if allowed.contains(&cu) => cu,
                    _ => {
                        return Err(perr(format!(
                        "curves.{key}.unit: \"{u}\" is not a unit for {key}; expected one of {}",
                        names.join(", ")
                    )))
                    }
                }
            };
            curves.push(CurveSpec {
                property: prop,
                mnemonics: spec
                    .mnemonics
                    .iter()
                    .map(|m| m.trim().to_string())
                    .collect(),
                unit,
            });
        }
        let has = |p: CurveProperty| curves.iter().any(|c| c.property == p);
        if !has(CurveProperty::Vp) {
            return Err(perr(
                "curves.vp: a compressional sonic or velocity curve is required".into(),
            ));
        }

        // horizons
        if raw.horizons.len() < 2 {
            return Err(perr(format!(
                "horizons: at least two [[horizons]] are needed to bound a zone, got {}",
                raw.horizons.len()
            )));
        }
        let mut horizons: Vec<HorizonDef> = Vec::new();
        for (k, h) in raw.horizons.iter().enumerate() {
            let name = h.name.trim().to_string();
            if name.is_empty() {
                return Err(perr(format!("horizons[{k}].name: must not be empty")));
            }
            if horizons.iter().any(|o| o.name == name) {
                return Err(perr(format!(
                    "horizons[{k}].name: horizon \"{name}\" is defined twice"
                )));
            }
            horizons.push(HorizonDef {
                tops_name: h
                    .tops_name
                    .as_deref()
                    .map(|s| s.trim().to_string())
                    .unwrap_or_else(|| name.clone()),
                name,
                picks: resolve(&h.picks),
                z_is_elevation: h.z_is_elevation,
            });
        }

        // zones
        let horizon_index = |key: &str, n: &str| -> Result<usize> {
            horizons
                .iter()
                .position(|h| h.name == n.trim())
                .ok_or_else(|| {
                    perr(format!(
                        "{key}: no horizon named \"{n}\"; horizons are {}",
                        horizons
                            .iter()
                            .map(|h| format!("\"{}\"", h.name))
                            .collect::<Vec<_>>()
                            .join(", ")
                    ))
                })
        };
        let mut zones: Vec<ZoneDef> = Vec::new();
        for (k, z) in raw.zones.iter().enumerate() {
            let name = z.name.trim().to_string();
            if name.is_empty() {
                return Err(perr(format!("zones[{k}].name: must not be empty")));
            }
            if zones.iter().any(|o| o.name == name) {
                return Err(perr(format!(
                    "zones[{k}]: zone \"{name}\" is defined twice"
                )));
            }
            let top = horizon_index(&format!("zones[{k}].top"), &z.top)?;
            let base = horizon_index(&format!("zones[{k}].base"), &z.base)?;
            if base != top + 1 {
                return Err(perr(format!(
                    "zones[{k}] (\"{name}\"): top \"{}\" and base \"{}\" must be consecutive horizons in the [[horizons]] order (shallow to deep)",
                    z.top, z.base
                )));
            }
            let layering = match z.layering.trim() {
                "proportional" => Layering::Proportional,
                "parallel_to_top" => Layering::ParallelToTop,
                "parallel_to_base" => Layering::ParallelToBase,
                other => {
                    return Err(perr(format!(
                        "zones[{k}].layering: \"{other}\" is not a layering rule; expected proportional, parallel_to_top or parallel_to_base"
                    )))
                }
            };
            if !(z.cell_thickness.is_finite() && z.cell_thickness > 0.0) {
                return Err(perr(format!(
                    "zones[{k}].cell_thickness: expected a positive thickness in metres, got {}",
                    z.cell_thickness
                )));
            }
            zones.push(ZoneDef {
                name,
                top,
                base,
                layering,
                cell_thickness: z.cell_thickness,
            });
        }
        if zones.is_empty() {
            return Err(perr("zones: at least one [[zones]] entry is needed".into()));
        }
        zones.sort_by_key(|z| z.top);
        for w in zones.windows(2) {
            if w[0].top == w[1].top {
                return Err(perr(format!(
                    "zones \"{}\" and \"{}\" share the top horizon \"{}\"",
                    w[0].name, w[1].name, horizons[w[0].top].name
                )));
            }
        }

        // facies
        let mut facies: Vec<FaciesDef> = Vec::new();
        for (k, f) in raw.facies.iter().enumerate() {
            if f.name.trim().is_empty() {
                return Err(perr(format!("facies[{k}].name: must not be empty")));
            }
            if facies.iter().any(|o| o.code == f.code) {
                return Err(perr(format!(
                    "facies[{k}]: code {} is defined twice",
                    f.code
                )));
            }
            if facies.iter().any(|o| o.name == f.name.trim()) {
                return Err(perr(format!(
                    "facies[{k}]: name \"{}\" is defined twice",
                    f.name
                )));
            }
            facies.push(FaciesDef {
                code: f.code,
                name: f.name.trim().to_string(),
            });
        }
        if has(CurveProperty::Facies) && facies.is_empty() {
            return Err(perr(
                "curves.facies is set but no [[facies]] codes are defined".into(),
            ));
        }

        // tie
        let tie_radius = match &raw.tie {
            Some(t) if !(t.radius.is_finite() && t.radius > 0.0) => {
                return Err(perr(format!(
                    "tie.radius: expected a positive distance in metres, got {}",
                    t.radius
                )))
            }
            Some(t) => t.radius,
            None => DEFAULT_TIE_RADIUS,
        };

        // sample banks
        let bank_count = match raw.banks.as_ref().and_then(|b| b.count) {
            Some(c) if c < 1 || c as u64 > MAX_BANK_COUNT as u64 => {
                return Err(perr(format!(
                    "banks.count: expected a whole number of samples per region from 1 to {MAX_BANK_COUNT}, got {c}"
                )))
            }
            Some(c) => c as usize,
            None => DEFAULT_BANK_COUNT,
        };

        // lateral areas of zones
        let areas = check_areas(&raw.areas, &zones, &grid, &perr)?;

        // volumes
        let v = &raw.volumes;
        let background_vp0 = match &v.background_vp0 {
            None => None,
            Some(b) => {
                let unit = b.unit.clone().unwrap_or_else(|| "m/s".into());
                match CurveUnit::parse(&unit) {
                    Some(CurveUnit::MetresPerSecond) => {}
                    _ => {
                        return Err(perr(format!(
                            "volumes.background_vp0.unit: expected \"m/s\", got \"{unit}\""
                        )))
                    }
                }
                Some(VolumeDef {
                    path: resolve(&b.path),
                    unit: "m/s".into(),
                })
            }
        };
        let facies_vol = match &v.facies {
            None => None,
            Some(f) => {
                if let Some(u) = &f.unit {
                    if u.trim() != "code" && !u.trim().is_empty() {
                        return Err(perr(format!(
                            "volumes.facies.unit: a facies volume holds codes; leave unit out, got \"{u}\""
                        )));
                    }
                }
                if facies.is_empty() {
                    return Err(perr(
                        "volumes.facies is set but no [[facies]] codes are defined".into(),
                    ));
                }
                Some(VolumeDef {
                    path: resolve(&f.path),
                    unit: "code".into(),
                })
            }
        };
        let mut facies_probability = BTreeMap::new();
        for (name, p) in &v.facies_probability {
            if !facies.iter().any(|f| &f.name == name) {
                return Err(perr(format!(
                    "volumes.facies_probability: \"{name}\" is not a facies name; facies are {}",
                    facies
                        .iter()
                        .map(|f| format!("\"{}\"", f.name))
                        .collect::<Vec<_>>()
                        .join(", ")
                )));
            }
            facies_probability.insert(name.clone(), resolve(p));
        }

        // conditioning
        let conditioning = {
            let c = raw.conditioning.clone();
            let source = match c.as_ref().and_then(|c| c.source.as_deref()).map(str::trim) {
                None | Some("auto") => ConditioningSource::Auto,
                Some("curves") => ConditioningSource::Curves,
                Some("backus") => ConditioningSource::Backus,
                Some(o) => {
                    return Err(perr(format!(
                    "conditioning.source: \"{o}\" is not a source; expected auto, curves or backus"
                )))
                }
            };
            let pos = |key: &str, v: f64| -> Result<f64> {
                if v.is_finite() && v > 0.0 {
                    Ok(v)
                } else {
                    Err(perr(format!(
                        "conditioning.{key}: expected a positive number, got {v}"
                    )))
                }
            };
            let window = match c.as_ref().map(|c| (c.backus_window, c.backus_number, c.dominant_frequency)) {
                None | Some((None, None, None)) => BackusWindowSpec::Metres(DEFAULT_BACKUS_WINDOW),
                Some((Some(l), None, None)) => BackusWindowSpec::Metres(pos("backus_window", l)?),
                Some((None, Some(b), Some(f))) => BackusWindowSpec::BackusNumber {
                    b: pos("backus_number", b)?,
                    frequency: pos("dominant_frequency", f)?,
                },
                Some((None, _, _)) => {
                    return Err(perr(
                        "conditioning: backus_number and dominant_frequency go together (L = B * Vs_min / f)".into(),
                    ))
                }
                Some((Some(_), _, _)) => {
                    return Err(perr(
                        "conditioning: give either backus_window (m) or backus_number with dominant_frequency, not both".into(),
                    ))
                }
            };
            let mut intrinsic = Vec::new();
            for (k, i) in c.iter().flat_map(|c| c.intrinsic.iter()).enumerate() {
                let Some(f) = facies.iter().find(|f| f.name == i.facies.trim()) else {
                    return Err(perr(format!(
                        "conditioning.intrinsic[{k}].facies: \"{}\" is not a facies name",
                        i.facies
                    )));
                };
                if intrinsic.iter().any(|x: &IntrinsicSpec| x.facies == f.code) {
                    return Err(perr(format!(
                        "conditioning.intrinsic[{k}]: facies \"{}\" is given twice",
                        f.name
                    )));
                }
                let conv = |v: &Option<RawIntrinsicValue>| -> Option<IntrinsicValue> {
                    v.as_ref().map(|v| match v {
                        RawIntrinsicValue::Constant(c) => IntrinsicValue::Constant(*c),
                        RawIntrinsicValue::Linear(l) => IntrinsicValue::Linear {
                            log: l.log.trim().to_string(),
                            intercept: l.intercept,
                            slope: l.slope,
                        },
                    })
                };
                intrinsic.push(IntrinsicSpec {
                    facies: f.code,
                    epsilon: conv(&i.epsilon),
                    delta: conv(&i.delta),
                });
            }
            Conditioning {
                source,
                window,
                intrinsic,
            }
        };

        // kriging
        let kriging = {
            let k = raw.kriging.clone();
            let count = |key: &str, v: Option<i64>, d: usize| -> Result<usize> {
                match v {
                    None => Ok(d),
                    Some(n) if (1..=1000).contains(&n) => Ok(n as usize),
                    Some(n) => Err(perr(format!(
                        "kriging.{key}: expected a whole number 1..1000, got {n}"
                    ))),
                }
            };
            let neighbours = count("neighbours", k.as_ref().and_then(|k| k.neighbours), 32)?;
            let per_well = count("per_well", k.as_ref().and_then(|k| k.per_well), 8)?;
            let max_wells = count("max_wells", k.as_ref().and_then(|k| k.max_wells), 8)?;
            let search_radius = match k.as_ref().and_then(|k| k.search_radius) {
                None => 3.0,
                Some(r) if r.is_finite() && r > 0.0 => r,
                Some(r) => return Err(perr(format!("kriging.search_radius: expected a positive number of variogram ranges, got {r}"))),
            };
            let mut methods = BTreeMap::new();
            let mut put = |zone: &str, prop: &str, v: &Option<String>, key: String| -> Result<()> {
                if let Some(m) = v {
                    let km = KrigingMethod::parse(m).ok_or_else(|| {
                        perr(format!(
                            "{key}: \"{m}\" is not a kriging method; expected simple, simple_trend, ordinary or external_drift"
                        ))
                    })?;
                    methods.insert((zone.to_string(), prop.to_string()), km);
                }
                Ok(())
            };
            put(
                "",
                "vp0",
                &Some(k.as_ref().and_then(|k| k.vp0.clone()).unwrap_or_else(|| {
                    if raw.volumes.background_vp0.is_some() {
                        "simple_trend".into()
                    } else {
                        "ordinary".into()
                    }
                })),
                "kriging.vp0".into(),
            )?;
            put(
                "",
                "epsilon",
                &Some(
                    k.as_ref()
                        .and_then(|k| k.epsilon.clone())
                        .unwrap_or_else(|| "ordinary".into()),
                ),
                "kriging.epsilon".into(),
            )?;
            put(
                "",
                "delta",
                &Some(
                    k.as_ref()
                        .and_then(|k| k.delta.clone())
                        .unwrap_or_else(|| "ordinary".into()),
                ),
                "kriging.delta".into(),
            )?;
            if let Some(k) = &k {
                for (zn, z) in &k.zones {
                    if !zones.iter().any(|d| &d.name == zn) {
                        return Err(perr(format!("kriging.zones.{zn}: no zone of that name")));
                    }
                    put(zn, "vp0", &z.vp0, format!("kriging.zones.{zn}.vp0"))?;
                    put(
                        zn,
                        "epsilon",
                        &z.epsilon,
                        format!("kriging.zones.{zn}.epsilon"),
                    )?;
                    put(zn, "delta", &z.delta, format!("kriging.zones.{zn}.delta"))?;
                }
            }
            let vp0_drift = match k
                .as_ref()
                .and_then(|k| k.vp0_drift.as_deref())
                .map(str::trim)
            {
                None => {
                    if raw.volumes.background_vp0.is_some() {
                        Drift::BackgroundVp0
                    } else {
                        Drift::Depth
                    }
                }
                Some("background_vp0") => {
                    if raw.volumes.background_vp0.is_none() {
                        return Err(perr(
                            "kriging.vp0_drift = \"background_vp0\" needs [volumes.background_vp0]"
                                .into(),
                        ));
                    }
                    Drift::BackgroundVp0
                }
                Some("depth") => Drift::Depth,
                Some(o) => {
                    return Err(perr(format!(
                    "kriging.vp0_drift: \"{o}\" is not a drift; expected background_vp0 or depth"
                )))
                }
            };
            KrigingSettings {
                neighbours,
                per_well: per_well.min(neighbours),
                max_wells,
                search_radius,
                methods,
                vp0_drift,
                facies_trend: k.as_ref().and_then(|k| k.facies_trend).unwrap_or(true),
            }
        };

        // bounds
        let bounds = {
            let b = raw.bounds.clone();
            let check = |key: &str, v: Option<(f64, f64)>, d: (f64, f64)| -> Result<(f64, f64)> {
                match v {
                    None => Ok(d),
                    Some((lo, hi)) if lo.is_finite() && hi.is_finite() && lo < hi => Ok((lo, hi)),
                    Some((lo, hi)) => Err(perr(format!(
                        "bounds.{key}: expected [low, high] with low < high, got [{lo}, {hi}]"
                    ))),
                }
            };
            Bounds {
                epsilon: check(
                    "epsilon",
                    b.as_ref().and_then(|b| b.epsilon),
                    DEFAULT_BOUNDS.epsilon,
                )?,
                delta: check(
                    "delta",
                    b.as_ref().and_then(|b| b.delta),
                    DEFAULT_BOUNDS.delta,
                )?,
            }
        };

        for (zn, props) in &raw.variograms {
            if !zones.iter().any(|d| &d.name == zn) {
                return Err(perr(format!("variograms.{zn}: no zone of that name")));
            }
            for p in props.keys() {
                if !["vp0", "epsilon", "delta"].contains(&p.as_str()) {
                    return Err(perr(format!(
                        "variograms.{zn}.{p}: not a property; expected vp0, epsilon or delta"
                    )));
                }
            }
        }

        Ok(Project {
            path: path.to_path_buf(),
            name: raw.name.unwrap_or_else(|| {
                path.file_stem()
                    .map(|s| s.to_string_lossy().into_owned())
                    .unwrap_or_default()
            }),
            output: resolve(&raw.output.unwrap_or_else(|| PathBuf::from("out"))),
            seed: raw.seed.unwrap_or(0),
            grid,
            well_table: resolve(&raw.wells.table),
            tops: raw.wells.tops.as_deref().map(resolve),
            curves,
            horizons,
            tie_radius,
            zones,
            facies,
            volumes: VolumeDefs {
                background_vp0,
                facies: facies_vol,
                facies_probability,
                blend_facies_with_wells: v.blend_facies_with_wells.unwrap_or(true),
                calibrate_facies_labels: v.calibrate_facies_labels.unwrap_or(true),
            },
            conditioning,
            kriging,
            bounds,
            bank_count,
            areas,
            variograms: raw.variograms,
        })
    }

    /// The curve mapping of a property, if the project has one.
    pub fn curve(&self, p: CurveProperty) -> Option<&CurveSpec> {
        self.curves.iter().find(|c| c.property == p)
    }

    /// Every input file the project names (used to refuse overwriting inputs).
    pub fn input_paths(&self) -> Vec<PathBuf> {
        let mut v = vec![self.path.clone(), self.well_table.clone()];
        v.extend(self.tops.clone());
        v.extend(self.horizons.iter().map(|h| h.picks.clone()));
        v.extend(self.volumes.background_vp0.iter().map(|b| b.path.clone()));
        v.extend(self.volumes.facies.iter().map(|b| b.path.clone()));
        v.extend(self.volumes.facies_probability.values().cloned());
        v
    }
}

/// The implicit area of a zone's nodes in none of its `[[areas]]`.
pub const REST_AREA: &str = "rest";

/// The lateral outline of an area.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub enum AreaShape {
    /// A simple polygon of world (x, y) vertices, m (closed implicitly).
    Polygon(Vec<[f64; 2]>),
    /// Inclusive inline and crossline number ranges.
    Box {
        /// First and last inline number.
        inlines: (i32, i32),
        /// First and last crossline number.
        xlines: (i32, i32),
    },
}

/// A named lateral part of one or more zones (`[[areas]]`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AreaDef {
    /// Area name (unique, not `rest`).
    pub name: String,
    /// Indices of the zones it splits, in [`Project::zones`].
    pub zones: Vec<usize>,
    /// Its outline.
    pub shape: AreaShape,
}

/// Whether (x, y) lies inside the polygon `poly` by the even-odd ray-casting
/// rule (a ray towards +x crosses the boundary an odd number of times; common
/// practice, e.g. W. R. Franklin's PNPOLY test).
pub fn point_in_polygon(poly: &[[f64; 2]], x: f64, y: f64) -> bool {
    let mut inside = false;
    let n = poly.len();
    for a in 0..n {
        let (p, q) = (poly[a], poly[(a + n - 1) % n]);
        if (p[1] > y) != (q[1] > y) && x < (q[0] - p[0]) * (y - p[1]) / (q[1] - p[1]) + p[0] {
            inside = !inside;
        }
    }
    inside
}

impl AreaDef {
    /// Whether world point (x, y) (m) lies in the area: point in polygon, or for
    /// a box the fractional inline/crossline of (x, y) within the box +-0.5 lines.
    pub fn contains_xy(&self, grid: &SurveyGrid, x: f64, y: f64) -> bool {
        match &self.shape {
            AreaShape::Polygon(p) => point_in_polygon(p, x, y),
            AreaShape::Box { inlines, xlines } => {
                let (i, j) = grid.xy_to_ij(x, y);
                let il = f64::from(grid.inline_first) + i;
                let xl = f64::from(grid.xline_first) + j;
                il >= f64::from(inlines.0) - 0.5
                    && il <= f64::from(inlines.1) + 0.5
                    && xl >= f64::from(xlines.0) - 0.5
                    && xl <= f64::from(xlines.1) + 0.5
            }
        }
    }

    /// Whether map node (i, j) (grid indices) lies in the area.
    pub fn contains_node(&self, grid: &SurveyGrid, i: usize, j: usize) -> bool {
        match &self.shape {
            AreaShape::Polygon(p) => {
                let (x, y) = grid.node_xy(i as f64, j as f64);
                point_in_polygon(p, x, y)
            }
            AreaShape::Box { inlines, xlines } => {
                let (il, xl) = (grid.inline_number(i), grid.xline_number(j));
                il >= inlines.0 && il <= inlines.1 && xl >= xlines.0 && xl <= xlines.1
            }
        }
    }
}

/// Index in `areas` of the area of zone `zone` holding map node (i, j), `None`
/// when the node is in none of the zone's areas (the implicit area `rest`, or the
/// whole zone when it has no areas).
pub fn area_of_node(
    areas: &[AreaDef],
    grid: &SurveyGrid,
    zone: usize,
    i: usize,
    j: usize,
) -> Option<usize> {
    areas
        .iter()
        .position(|a| a.zones.contains(&zone) && a.contains_node(grid, i, j))
}

/// Index in `areas` of the area of zone `zone` holding world point (x, y), m.
pub fn area_of_xy(
    areas: &[AreaDef],
    grid: &SurveyGrid,
    zone: usize,
    x: f64,
    y: f64,
) -> Option<usize> {
    areas
        .iter()
        .position(|a| a.zones.contains(&zone) && a.contains_xy(grid, x, y))
}

/// Whether closed segments ab and cd share a point (orientation tests, common practice).
fn segments_touch(a: [f64; 2], b: [f64; 2], c: [f64; 2], d: [f64; 2]) -> bool {
    let orient = |p: [f64; 2], q: [f64; 2], r: [f64; 2]| -> f64 {
        (q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0])
    };
    let on = |p: [f64; 2], q: [f64; 2], r: [f64; 2]| -> bool {
        r[0] >= p[0].min(q[0])
            && r[0] <= p[0].max(q[0])
            && r[1] >= p[1].min(q[1])
            && r[1] <= p[1].max(q[1])
    };
    let (d1, d2, d3, d4) = (
        orient(c, d, a),
        orient(c, d, b),
        orient(a, b, c),
        orient(a, b, d),
    );
    if ((d1 > 0.0 && d2 < 0.0) || (d1 < 0.0 && d2 > 0.0))
        && ((d3 > 0.0 && d4 < 0.0) || (d3 < 0.0 && d4 > 0.0))
    {
        return true;
    }
    (d1 == 0.0 && on(c, d, a))
        || (d2 == 0.0 && on(c, d, b))
        || (d3 == 0.0 && on(a, b, c))
        || (d4 == 0.0 && on(a, b, d))
}

/// Check `[[areas]]`: names, zones, exactly one outline, and no two areas of one
/// zone sharing a map node.
fn check_areas(
    raw: &[RawArea],
    zones: &[ZoneDef],
    grid: &SurveyGrid,
    perr: &dyn Fn(String) -> Error,
) -> Result<Vec<AreaDef>> {
    let mut out: Vec<AreaDef> = Vec::with_capacity(raw.len());
    for (k, a) in raw.iter().enumerate() {
        let key = format!("areas[{k}]");
        if a.name.trim().is_empty() {
            return Err(perr(format!("{key}.name: the name is empty")));
        }
        if a.name == REST_AREA {
            return Err(perr(format!(
                "{key}.name: `{REST_AREA}` is reserved for the nodes of a zone in none of its areas"
            )));
        }
        if out.iter().any(|o| o.name == a.name) {
            return Err(perr(format!(
                "{key}.name: area `{}` is defined twice; area names must be unique",
                a.name
            )));
        }
        let zone_idx: Vec<usize> = match &a.zones {
            None => (0..zones.len()).collect(),
            Some(names) if names.is_empty() => {
                return Err(perr(format!(
                    "{key}.zones: the list is empty; name at least one zone or leave the key out for all zones"
                )))
            }
            Some(names) => {
                let mut v = Vec::with_capacity(names.len());
                for n in names {
                    let Some(z) = zones.iter().position(|z| &z.name == n) else {
                        let known: Vec<&str> = zones.iter().map(|z| z.name.as_str()).collect();
                        return Err(perr(format!(
                            "{key}.zones: unknown zone `{n}`; the zones are {}",
                            known.join(", ")
                        )));
                    };
                    if v.contains(&z) {
                        return Err(perr(format!("{key}.zones: zone `{n}` is listed twice")));
                    }
                    v.push(z);
                }
                v
            }
        };
        let shape = match (&a.polygon, &a.bbox) {
            (Some(_), Some(_)) => {
                return Err(perr(format!(
                    "{key}: both `polygon` and `box` are given; an area has exactly one of them"
                )))
            }
            (None, None) => {
                return Err(perr(format!(
                    "{key}: neither `polygon` nor `box` is given; an area has exactly one of them"
                )))
            }
            (Some(p), None) => {
                let key = format!("{key}.polygon");
                let mut v: Vec<[f64; 2]> = Vec::with_capacity(p.len());
                for (n, xy) in p.iter().enumerate() {
                    match xy.as_slice() {
                        [x, y] if x.is_finite() && y.is_finite() => v.push([*x, *y]),
                        _ => {
                            return Err(perr(format!(
                                "{key}[{n}]: expected a vertex [x, y] of two finite world coordinates in metres, got {xy:?}"
                            )))
                        }
                    }
                }
                if v.len() < 3 {
                    return Err(perr(format!(
                        "{key}: a polygon needs at least 3 vertices, got {}",
                        v.len()
                    )));
                }
                let n = v.len();
                for e in 0..n {
                    if v[e] == v[(e + 1) % n] {
                        return Err(perr(format!(
                            "{key}: vertices {e} and {} are the same point; give each vertex once (the polygon closes itself)",
                            (e + 1) % n
                        )));
                    }
                }
                for e in 0..n {
                    for f in e + 1..n {
                        // adjacent edges share a vertex by construction
                        if f == e + 1 || (e == 0 && f == n - 1) {
                            continue;
                        }
                        if segments_touch(v[e], v[(e + 1) % n], v[f], v[(f + 1) % n]) {
                            return Err(perr(format!(
                                "{key}: edge {e}-{} crosses or touches edge {f}-{}; the polygon must be simple (not self-intersecting)",
                                (e + 1) % n,
                                (f + 1) % n
                            )));
                        }
                    }
                }
                if n == 3 {
                    // three distinct collinear vertices enclose nothing
                    let [a, b, c] = [v[0], v[1], v[2]];
                    if (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]) == 0.0 {
                        return Err(perr(format!("{key}: the 3 vertices are collinear")));
                    }
                }
                AreaShape::Polygon(v)
            }
            (None, Some(b)) => {
                let lines = |sub: &str, r: (i64, i64), first: i32, count: usize| {
                    let last = i64::from(first) + count as i64 - 1;
                    if r.0 > r.1 || r.0 < i64::from(first) || r.1 > last {
                        return Err(perr(format!(
                            "{key}.box.{sub}: expected [first, last] line numbers with first <= last within the survey's {first}..={last}, got [{}, {}]",
                            r.0, r.1
                        )));
                    }
                    Ok((r.0 as i32, r.1 as i32))
                };
                let inlines = lines("inlines", b.inlines, grid.inline_first, grid.inline_count)?;
                let xlines = lines("xlines", b.xlines, grid.xline_first, grid.xline_count)?;
                AreaShape::Box { inlines, xlines }
            }
        };
        out.push(AreaDef {
            name: a.name.clone(),
            zones: zone_idx,
            shape,
        });
    }
    // no two areas of a zone share a map node
    for (zi, z) in zones.iter().enumerate() {
        let of_zone: Vec<usize> = (0..out.len())
            .filter(|&a| out[a].zones.contains(&zi))
            .collect();
        if of_zone.len() < 2 {
            continue;
        }
        for i in 0..grid.inline_count {
            for j in 0..grid.xline_count {
                let mut hit = of_zone
                    .iter()
                    .filter(|&&a| out[a].contains_node(grid, i, j));
                if let (Some(&a), Some(&b)) = (hit.next(), hit.next()) {
                    return Err(perr(format!(
                        "areas[{b}]: areas `{}` and `{}` overlap in zone `{}` at node inline {}, crossline {}; the areas of a zone must not overlap",
                        out[a].name,
                        out[b].name,
                        z.name,
                        grid.inline_number(i),
                        grid.xline_number(j)
                    )));
                }
            }
        }
    }
    Ok(out)
}
