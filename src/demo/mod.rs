//! The fictional demo basin generator.
//!
//! [`generate`] writes a complete, self-consistent demo study of the invented
//! Quarvenne Basin (Marrowick field, operator "Cindral Exploration
//! Cooperative"; every name is coined) under one folder:
//!
//! * `demo_wells/`: eight wells (`wells.csv`, LAS files in four flavours,
//!   deviation surveys of the two deviated wells, `tops.csv`);
//! * `demo_horizons/`: interpreter's picks of four horizons, with holes;
//! * `demo_volumes/`: a smooth background Vp0 and a facies-label volume (SEG-Y);
//! * `demo.toml`: the project file;
//! * `demo_truth/`: the truth on the survey grid (`.npy`) and `truth.json`
//!   describing it (not committed: the generator rewrites it).
//!
//! The truth is a set of continuous functions of world position (module
//! [`basin`]); the logs sample it along the trajectories rebuilt from the very
//! numbers written into the survey files, and the volumes sample it at the grid
//! nodes. Everything is drawn from ChaCha20 streams seeded by
//! [`DemoOptions::seed`] and computed with platform-independent `libm`
//! functions, so two runs give byte-identical files.

pub mod basin;
pub mod grf;
pub mod las_text;
pub mod picks;
pub mod volumes;
pub mod wells;

use crate::error::{Error, Result};
use crate::formats::las::{write_las2, Decimals, WriteCurve, WriteItem};
use crate::formats::segy::{write_volume, VolumeMeta};
use crate::io_util::write_atomic;
pub use basin::DemoSurvey;
use basin::{Basin, CELL_THICKNESS, FACIES, HORIZONS, HORIZON_FILES, LAYERING, ZONES};
use serde::Serialize;
use std::path::{Path, PathBuf};
use wells::{BuiltWell, LasFlavour};

/// Seed of the committed demo.
pub const DEFAULT_SEED: u64 = 20_261_202;

/// Where and with what seed to generate the demo.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct DemoOptions {
    /// Folder that receives `demo_wells/`, `demo_horizons/`, `demo_volumes/`,
    /// `demo.toml` and `demo_truth/`.
    pub out_dir: PathBuf,
    /// Seed of every random draw.
    pub seed: u64,
    /// The survey: the field survey of the committed demo, or the regional
    /// survey around it (same geology and wells, far-field checks).
    pub survey: DemoSurvey,
}

impl DemoOptions {
    /// The committed demo's survey with `seed`, written into `out_dir`.
    pub fn field(out_dir: impl Into<PathBuf>, seed: u64) -> Self {
        DemoOptions {
            out_dir: out_dir.into(),
            seed,
            survey: DemoSurvey::Field,
        }
    }
}

/// One file written.
#[derive(Debug, Clone, Serialize)]
pub struct FileEntry {
    /// Path relative to the output folder, `/`-separated.
    pub path: String,
    /// Size in bytes.
    pub bytes: u64,
    /// Whether the file belongs to the committed demo (false for `demo_truth/`).
    pub committed: bool,
}

/// One top of a well.
#[derive(Debug, Clone, Serialize)]
pub struct TopReport {
    /// Surface name as in the tops file.
    pub surface: String,
    /// Measured depth, m.
    pub md: f64,
    /// Depth, m TVDSS.
    pub tvdss: f64,
}

/// One well.
#[derive(Debug, Clone, Serialize)]
pub struct WellReport {
    /// Name.
    pub name: String,
    /// Kind (vertical, J, S ...).
    pub kind: String,
    /// LAS flavour.
    pub las: LasFlavour,
    /// LAS file, relative to the output folder.
    pub las_file: String,
    /// Surface x, y (m) and datum elevation (m).
    pub x: f64,
    /// Surface y, m.
    pub y: f64,
    /// Datum elevation above sea level, m.
    pub datum_elevation: f64,
    /// Total depth, m MD.
    pub td: f64,
    /// Largest survey inclination, deg.
    pub max_inclination: f64,
    /// Logged interval, m MD.
    pub logged_md: (f64, f64),
    /// Number of LAS rows.
    pub samples: usize,
    /// Logging gap (all-null rows), m MD.
    pub gap_md: Option<(f64, f64)>,
    /// Rows per facies code (1, 2, 3) over the non-null rows.
    pub facies_rows: [usize; 3],
    /// Tops.
    pub tops: Vec<TopReport>,
}

/// One horizon's picks.
#[derive(Debug, Clone, Serialize)]
pub struct HorizonReport {
    /// Horizon name.
    pub name: String,
    /// Picks file, relative to the output folder.
    pub file: String,
    /// Number of picks.
    pub picks: usize,
    /// Areas without picks.
    pub holes: Vec<picks::Hole>,
}

/// What [`generate`] wrote.
#[derive(Debug, Clone, Serialize)]
pub struct DemoReport {
    /// Seed used.
    pub seed: u64,
    /// Fictional basin, field and operator names.
    pub basin: String,
    /// Field name.
    pub field: String,
    /// Operator name.
    pub operator: String,
    /// Files written, in writing order.
    pub files: Vec<FileEntry>,
    /// Total bytes of the committed part (everything but `demo_truth/`).
    pub committed_bytes: u64,
    /// Total bytes of `demo_truth/`.
    pub truth_bytes: u64,
    /// Wells.
    pub wells: Vec<WellReport>,
    /// Horizons.
    pub horizons: Vec<HorizonReport>,
    /// Fraction of grid cells per facies code (1, 2, 3) inside each zone.
    pub zone_facies_fractions: Vec<(String, [f64; 3])>,
    /// Fraction of grid cells whose facies label differs from the truth.
    pub facies_label_error_fraction: f64,
    /// RMS relative difference between background and true Vp0 on the grid.
    pub background_rms_relative_error: f64,
}

/// Surface name of horizon `k` in the tops file. The base horizon is named
/// differently there (as tops databases often do), which the project file
/// maps with `tops_name`.
pub fn tops_name(k: usize) -> &'static str {
    match k {
        3 => "Base Kessimer Fm",
        _ => HORIZONS[k],
    }
}

struct Writer<'a> {
    root: &'a Path,
    files: Vec<(String, bool)>,
}

impl Writer<'_> {
    fn path(&self, rel: &str) -> PathBuf {
        self.root.join(rel)
    }
    fn text(&mut self, rel: &str, text: &str) -> Result<()> {
        write_atomic(self.path(rel), text.as_bytes())?;
        self.note(rel);
        Ok(())
    }
    fn bytes(&mut self, rel: &str, b: &[u8]) -> Result<()> {
        write_atomic(self.path(rel), b)?;
        self.note(rel);
        Ok(())
    }
    fn note(&mut self, rel: &str) {
        self.files
            .push((rel.to_string(), !rel.starts_with("demo_truth/")));
    }
}

/// Generate the demo study under `opts.out_dir` (see the module docs).
pub fn generate(opts: &DemoOptions) -> Result<DemoReport> {
    let seed = opts.seed;
    let basin = Basin::on_survey(seed, opts.survey);
    let grid = basin.grid().clone();
    let mut w = Writer {
        root: &opts.out_dir,
        files: Vec::new(),
    };
    std::fs::create_dir_all(&opts.out_dir).map_err(|e| Error::io(&opts.out_dir, e))?;

    // Wells.
    let specs = wells::well_specs();
    let built: Vec<BuiltWell> = specs
        .iter()
        .enumerate()
        .map(|(k, s)| wells::build_well(&basin, s, seed, k))
        .collect::<Result<_>>()?;
    let mut table = String::from("name,las,x,y,datum_elevation,survey\n");
    let mut tops = String::from("well,surface,md\n");
    let mut well_reports = Vec::with_capacity(built.len());
    for (index, b) in built.iter().enumerate() {
        let name = b.spec.name;
        let las_rel = format!("{name}.las");
        write_las(&mut w, &format!("demo_wells/{las_rel}"), b, index)?;
        let survey_rel = match &b.stations {
            Some(st) => {
                let rel = format!("{name}_survey.csv");
                let mut t = String::from("md,inclination,azimuth\n");
                for s in st {
                    t.push_str(&format!(
                        "{:.2},{:.2},{:.2}\n",
                        s.md, s.inclination, s.azimuth
                    ));
                }
                w.text(&format!("demo_wells/{rel}"), &t)?;
                rel
            }
            None => String::new(),
        };
        table.push_str(&format!(
            "{name},{las_rel},{:.2},{:.2},{:.2},{survey_rel}\n",
            b.x, b.y, b.path.datum_elevation
        ));
        let mut top_reports = Vec::new();
        for (k, md) in b.tops.iter().enumerate() {
            tops.push_str(&format!("{name},{},{md:.2}\n", tops_name(k)));
            top_reports.push(TopReport {
                surface: tops_name(k).to_string(),
                md: *md,
                tvdss: b.path.point_at_md(*md).z,
            });
        }
        let mut facies_rows = [0usize; 3];
        if let Some(fc) = b.logs.curves.iter().find(|c| c.mnemonic == "FACIES") {
            for v in fc.values.iter().flatten() {
                let k = (*v as usize).clamp(1, 3) - 1;
                facies_rows[k] += 1;
            }
        }
        well_reports.push(WellReport {
            name: name.to_string(),
            kind: b.spec.kind.to_string(),
            las: b.spec.flavour,
            las_file: format!("demo_wells/{las_rel}"),
            x: b.x,
            y: b.y,
            datum_elevation: b.path.datum_elevation,
            td: b.td,
            max_inclination: b.path.trajectory.max_inclination(),
            logged_md: (
                wells::as_written(b.logged.0, 4),
                wells::as_written(b.logged.1, 4),
            ),
            samples: b.logs.depth.len(),
            gap_md: b.gap,
            facies_rows,
            tops: top_reports,
        });
    }
    w.text("demo_wells/wells.csv", &table)?;
    w.text("demo_wells/tops.csv", &tops)?;

    // Horizon picks.
    let all_picks = picks::make_picks(&basin, seed);
    let mut horizon_reports = Vec::new();
    for p in &all_picks {
        let rel = format!("demo_horizons/{}.xyz", HORIZON_FILES[p.horizon]);
        w.text(&rel, &p.text)?;
        horizon_reports.push(HorizonReport {
            name: HORIZONS[p.horizon].to_string(),
            file: rel,
            picks: p.points.len(),
            holes: picks::holes(p.horizon),
        });
    }

    // Truth on the grid and the input volumes.
    let truth = volumes::sample_truth(&basin);
    let background = volumes::background_vp0(&basin, &truth, seed);
    let (labels, label_error) = volumes::facies_labels(&basin, &truth, seed);
    let bg_err = {
        let s: f64 = background
            .iter()
            .zip(&truth.vp)
            .map(|(b, t)| (f64::from(*b) / t - 1.0).powi(2))
            .sum();
        (s / truth.vp.len().max(1) as f64).sqrt()
    };
    let volume_notes = |what: &str| {
        vec![
            format!("{} demo, {} field (fictional).", basin::BASIN, basin::FIELD),
            what.to_string(),
            format!("Generated by the stratiprior demo generator, seed {seed}."),
        ]
    };
    let rel = "demo_volumes/background_vp0.sgy";
    write_volume(
        &w.path(rel),
        &grid,
        &VolumeMeta {
            property: "vp0".into(),
            statistic: "value".into(),
            unit: "m/s".into(),
            notes: volume_notes(
                "Background (starting-model) Vp0: low-passed truth with a few per cent smooth error.",
            ),
        },
        &background,
    )?;
    w.note(rel);
    let rel = "demo_volumes/facies.sgy";
    write_volume(
        &w.path(rel),
        &grid,
        &VolumeMeta {
            property: "facies".into(),
            statistic: "value".into(),
            unit: "code".into(),
            notes: volume_notes(
                "Facies labels as float32 codes: 1 channel sand, 2 shale, 3 heterolithic.",
            ),
        },
        &labels,
    )?;
    w.note(rel);

    // Truth files.
    let shape = [grid.inline_count, grid.xline_count, grid.z_count];
    let f32s = |v: &[f64]| v.iter().map(|x| *x as f32).collect::<Vec<f32>>();
    let truth_arrays: Vec<(&str, Vec<f32>)> = vec![
        ("vp0", f32s(&truth.vp)),
        ("vs", truth.vs.clone()),
        ("density", truth.rho.clone()),
        ("epsilon", truth.eps.clone()),
        ("delta", truth.delta.clone()),
        (
            "facies",
            truth.facies.iter().map(|f| f32::from(*f)).collect(),
        ),
        ("zone", truth.zone.iter().map(|z| *z as f32).collect()),
    ];
    for (name, data) in &truth_arrays {
        let rel = format!("demo_truth/{name}.npy");
        w.bytes(&rel, &volumes::npy_f32(&shape, data))?;
    }
    for (k, f) in HORIZON_FILES.iter().enumerate() {
        let rel = format!("demo_truth/horizon_{f}.npy");
        w.bytes(
            &rel,
            &volumes::npy_f32(
                &[grid.inline_count, grid.xline_count],
                &f32s(&truth.horizons[k]),
            ),
        )?;
    }
    let mut zone_fractions = Vec::new();
    for (z, name) in ZONES.iter().enumerate() {
        let mut c = [0usize; 3];
        for (zi, f) in truth.zone.iter().zip(&truth.facies) {
            if *zi == z as i32 {
                c[(*f as usize).clamp(1, 3) - 1] += 1;
            }
        }
        let n = c.iter().sum::<usize>().max(1) as f64;
        zone_fractions.push((
            name.to_string(),
            [c[0] as f64 / n, c[1] as f64 / n, c[2] as f64 / n],
        ));
    }
    let truth_json = truth_description(&basin, seed, &zone_fractions, label_error, bg_err);
    let text = serde_json::to_string_pretty(&truth_json)
        .map_err(|e| Error::inconsistent(format!("truth.json: {e}")))?;
    w.text("demo_truth/truth.json", &(text + "\n"))?;

    // Project file.
    w.text("demo.toml", &project_text(&grid, seed))?;

    let mut files = Vec::with_capacity(w.files.len());
    for (rel, committed) in &w.files {
        let p = w.path(rel);
        let bytes = std::fs::metadata(&p).map_err(|e| Error::io(&p, e))?.len();
        files.push(FileEntry {
            path: rel.clone(),
            bytes,
            committed: *committed,
        });
    }
    let committed_bytes = files.iter().filter(|f| f.committed).map(|f| f.bytes).sum();
    let truth_bytes = files.iter().filter(|f| !f.committed).map(|f| f.bytes).sum();
    Ok(DemoReport {
        seed,
        basin: basin::BASIN.into(),
        field: basin::FIELD.into(),
        operator: basin::OPERATOR.into(),
        files,
        committed_bytes,
        truth_bytes,
        wells: well_reports,
        horizons: horizon_reports,
        zone_facies_fractions: zone_fractions,
        facies_label_error_fraction: label_error,
        background_rms_relative_error: bg_err,
    })
}

fn info_items(b: &BuiltWell, index: usize) -> Vec<las_text::InfoItem> {
    use las_text::InfoItem;
    // invented logging dates, one well a month
    let date = format!("2024-{:02}-{:02}", 1 + index, 3 + 3 * index);
    vec![
        InfoItem {
            mnemonic: "COMP",
            description: "COMPANY",
            value: basin::OPERATOR.into(),
        },
        InfoItem {
            mnemonic: "WELL",
            description: "WELL",
            value: b.spec.name.into(),
        },
        InfoItem {
            mnemonic: "FLD",
            description: "FIELD",
            value: basin::FIELD.into(),
        },
        InfoItem {
            mnemonic: "LOC",
            description: "LOCATION",
            value: format!("X {:.2} Y {:.2}", b.x, b.y),
        },
        InfoItem {
            mnemonic: "PROV",
            description: "PROVINCE",
            value: basin::BASIN.into(),
        },
        InfoItem {
            mnemonic: "SRVC",
            description: "SERVICE COMPANY",
            value: "Cindral Petrophysics Unit".into(),
        },
        InfoItem {
            mnemonic: "DATE",
            description: "LOG DATE",
            value: date,
        },
        InfoItem {
            mnemonic: "UWI",
            description: "UNIQUE WELL ID",
            value: format!("QV-{:03}-{}", 417 + 23 * index, b.spec.name),
        },
    ]
}

/// Write one well's LAS file in its flavour.
fn write_las(w: &mut Writer<'_>, rel: &str, b: &BuiltWell, index: usize) -> Result<()> {
    let items = info_items(b, index);
    let ekb = format!("{:.2}", b.path.datum_elevation);
    let params = vec![(
        "EKB",
        "M",
        ekb.clone(),
        "Elevation of kelly bushing above sea level",
    )];
    match b.spec.flavour {
        LasFlavour::Las12 => w.text(rel, &las_text::render_las12(&b.logs, &items, &params)),
        LasFlavour::Las20Wrapped => w.text(
            rel,
            &las_text::render_las20_wrapped(&b.logs, &items, &params),
        ),
        LasFlavour::Las20Metres | LasFlavour::Las20Feet => {
            let depth: Vec<Option<f64>> = b.logs.depth.iter().map(|d| Some(*d)).collect();
            let mut curves = vec![WriteCurve {
                mnemonic: "DEPT",
                unit: b.logs.depth_unit,
                description: "Measured depth",
                data: &depth,
                decimals: Decimals::Fixed(if b.logs.depth_unit == "FT" { 1 } else { 2 }),
            }];
            for c in &b.logs.curves {
                curves.push(WriteCurve {
                    mnemonic: &c.mnemonic,
                    unit: &c.unit,
                    description: &c.description,
                    data: &c.values,
                    decimals: Decimals::Fixed(c.decimals as u8),
                });
            }
            let mut witems: Vec<WriteItem<'_>> = items
                .iter()
                .map(|i| WriteItem {
                    mnemonic: i.mnemonic,
                    unit: "",
                    value: &i.value,
                    description: i.description,
                })
                .collect();
            witems.push(WriteItem {
                mnemonic: "EKB",
                unit: "M",
                value: &ekb,
                description: "Elevation of kelly bushing above sea level",
            });
            write_las2(&w.path(rel), &witems, &curves, las_text::NULL)?;
            w.note(rel);
            Ok(())
        }
    }
}

/// The project file of the demo, following the project schema.
fn project_text(g: &crate::grid::SurveyGrid, seed: u64) -> String {
    let mut t = String::new();
    t.push_str(&format!(
        "# {} demo: a fictional basin ({} field) made by the stratiprior demo generator.\n\
         # Every name in it is invented. Regenerate with the generator, seed {seed}.\n\
         name = \"{} demo ({} field)\"\n\
         output = \"out\"\n\
         seed = {seed}\n\n",
        basin::BASIN,
        basin::FIELD,
        basin::BASIN,
        basin::FIELD
    ));
    t.push_str(&format!(
        "[grid]\nx0 = {:.1}\ny0 = {:.1}\nazimuth = {:.1}\ninline_spacing = {:.1}\nxline_spacing = {:.1}\n\
         inlines = [{}, {}]\nxlines = [{}, {}]\nz = [{:.1}, {:.1}, {}]\n\n",
        g.x0,
        g.y0,
        g.azimuth,
        g.inline_spacing,
        g.xline_spacing,
        g.inline_first,
        g.inline_count,
        g.xline_first,
        g.xline_count,
        g.z0,
        g.dz,
        g.z_count
    ));
    t.push_str(
        "[wells]\ntable = \"demo_wells/wells.csv\"\ntops = \"demo_wells/tops.csv\"\n\n\
         [curves.vp]\nmnemonics = [\"DTC\", \"DT\"]\nunit = \"us/ft\"\n\
         [curves.vs]\nmnemonics = [\"DTS\"]\nunit = \"us/ft\"\n\
         [curves.density]\nmnemonics = [\"RHOB\"]\nunit = \"g/cm3\"\n\
         [curves.epsilon]\nmnemonics = [\"EPS\"]\nunit = \"1\"\n\
         [curves.delta]\nmnemonics = [\"DELTA\"]\nunit = \"1\"\n\
         [curves.facies]\nmnemonics = [\"FACIES\"]\n\n",
    );
    for (k, name) in HORIZONS.iter().enumerate() {
        t.push_str(&format!(
            "[[horizons]]\nname = \"{name}\"\npicks = \"demo_horizons/{}.xyz\"\n",
            HORIZON_FILES[k]
        ));
        if tops_name(k) != *name {
            t.push_str(&format!("tops_name = \"{}\"\n", tops_name(k)));
        }
        if k == 0 {
            t.push_str("z_is_elevation = false\n");
        }
        t.push('\n');
    }
    t.push_str("[tie]\nradius = 1500.0\n\n");
    for (k, z) in ZONES.iter().enumerate() {
        t.push_str(&format!(
            "[[zones]]\nname = \"{z}\"\ntop = \"{}\"\nbase = \"{}\"\nlayering = \"{}\"\ncell_thickness = {:.1}\n\n",
            HORIZONS[k],
            HORIZONS[k + 1],
            LAYERING[k],
            CELL_THICKNESS[k]
        ));
    }
    for (code, name) in FACIES {
        t.push_str(&format!("[[facies]]\ncode = {code}\nname = \"{name}\"\n\n"));
    }
    t.push_str(
        "[volumes.background_vp0]\npath = \"demo_volumes/background_vp0.sgy\"\nunit = \"m/s\"\n\
         [volumes.facies]\npath = \"demo_volumes/facies.sgy\"\n",
    );
    t
}

/// Everything `truth.json` says about the truth.
#[derive(Serialize)]
struct TruthDescription {
    basin: &'static str,
    field: &'static str,
    operator: &'static str,
    seed: u64,
    grid: crate::grid::SurveyGrid,
    arrays: serde_json::Value,
    horizons: Vec<serde_json::Value>,
    zones: Vec<serde_json::Value>,
    zone_codes: serde_json::Value,
    facies: Vec<serde_json::Value>,
    vp0_laws: serde_json::Value,
    rock_physics: serde_json::Value,
    random_fields: serde_json::Value,
    channels: Vec<basin::Channel>,
    log_noise: serde_json::Value,
    picks: serde_json::Value,
    volumes: serde_json::Value,
    zone_facies_fractions: Vec<(String, [f64; 3])>,
}

fn truth_description(
    b: &Basin,
    seed: u64,
    zone_fractions: &[(String, [f64; 3])],
    label_error: f64,
    bg_err: f64,
) -> TruthDescription {
    use serde_json::json;
    TruthDescription {
        basin: basin::BASIN,
        field: basin::FIELD,
        operator: basin::OPERATOR,
        seed,
        grid: b.grid().clone(),
        arrays: json!({
            "layout": "NumPy .npy float32, C order, shape (inline, crossline, depth sample) for volumes and (inline, crossline) for horizons; index (i, j, k) is inline first+i, crossline first+j, depth z0+k*dz, the SEG-Y trace order",
            "vp0": {"file": "vp0.npy", "unit": "m/s"},
            "vs": {"file": "vs.npy", "unit": "m/s"},
            "density": {"file": "density.npy", "unit": "kg/m3"},
            "epsilon": {"file": "epsilon.npy", "unit": "1"},
            "delta": {"file": "delta.npy", "unit": "1"},
            "facies": {"file": "facies.npy", "unit": "code"},
            "zone": {"file": "zone.npy", "unit": "index"},
        }),
        horizons: HORIZONS
            .iter()
            .enumerate()
            .map(|(k, h)| {
                json!({"name": h, "tops_name": tops_name(k), "file": format!("horizon_{}.npy", HORIZON_FILES[k]),
                       "unit": "m TVDSS", "picks": format!("demo_horizons/{}.xyz", HORIZON_FILES[k]),
                       "pick_bias_mean_m": picks::BIAS_MEAN[k]})
            })
            .collect(),
        zones: ZONES
            .iter()
            .enumerate()
            .map(|(k, z)| {
                json!({"index": k, "name": z, "top": HORIZONS[k], "base": HORIZONS[k + 1], "layering": LAYERING[k],
                       "stratigraphic_coordinate": match k {
                           0 => "s = (z - top)/(base - top), scaled by 165 m for the random fields",
                           1 => "height above the base, m (the top erodes the layers: a wedge pinching out towards growing inline)",
                           _ => "depth below the top, m",
                       }})
            })
            .collect(),
        zone_codes: json!({"above_top_horizon": basin::ZONE_ABOVE, "below_base_horizon": basin::ZONE_BELOW,
                           "rock_outside_zones": "shale (facies 2)"}),
        facies: FACIES
            .iter()
            .map(|(c, n)| json!({"code": c, "name": n}))
            .collect(),
        vp0_laws: json!({
            "formula": "Vp0 = a + b (z - 2000 m) + zone offset + sd * G, G a unit Matern-3/2 random field",
            "laws": basin::VP_LAWS.iter().map(|(c, l)| json!({"facies": c, "a_m_s": l.a, "b_per_m": l.b, "sd_m_s": l.sd})).collect::<Vec<_>>(),
            "zone_offsets_m_s": {"above": -40.0, "Pellarin": 0.0, "Vostrand": 50.0, "Kessimer": 110.0, "below": 200.0},
            "epsilon": {"sand": "0.02 + 0.01 G, clipped to 0..0.05", "shale": "0.15 + 5e-5 (z - 2000) + zone offset + 0.025 G', clipped to 0.10..0.25",
                        "heterolithic": "0.075 + zone offset + 0.018 G', clipped to 0.03..0.14", "zone_offsets": {"Vostrand": -0.01, "Kessimer": 0.02, "below": 0.01},
                        "G'": "0.9 G_eps - 0.436 G_vp (anti-correlated with the Vp residual)"},
            "delta": {"sand": "0.004 + 0.008 G, clipped to -0.02..0.03", "shale": "0.065 + 0.3 (eps - mean) + 0.012 G, clipped to 0.03..0.12",
                      "heterolithic": "0.032 + 0.3 (eps - mean) + 0.01 G, clipped to 0..0.07"},
        }),
        rock_physics: json!({
            "vs": "shale: Castagna et al. (1985) mudrock line Vs = (Vp - 1360)/1.16; sand: Castagna et al. (1993) Vs = 0.8042 Vp - 855.9; heterolithic: their mean (m/s)",
            "density": "Gardner et al. (1974) rho = 310 Vp^0.25 kg/m3 (Vp in m/s)",
            "logs": "DTC/DT = 304800/Vp0 (us/ft, the vertical velocity, as if anisotropy-corrected), DTS = 304800/Vs, RHOB = rho/1000",
        }),
        random_fields: json!({
            "method": "random Fourier modes (128 per field) of a Matern-3/2 covariance, geometric anisotropy; ranges are practical (5 %) ranges",
            "facies_indicator_ranges_m": {"major": 1400.0, "minor": 700.0, "vertical": 8.0},
            "property_ranges_m": {"major": 1300.0, "minor": 600.0, "angle_deg_from_u": 15.0, "vertical": 4.0},
        }),
        channels: b.channels.clone(),
        log_noise: json!(wells::LOG_NOISE.iter().map(|(m, s)| json!({"curve": m, "sd": s})).collect::<Vec<_>>()),
        picks: json!({"model": "true horizon + bias (mean per horizon + 1.8 m common field + 1.2 m own field) + white noise",
                      "noise_sd_m": picks::PICK_NOISE,
                      "holes": (0..HORIZONS.len()).map(|k| json!({"horizon": HORIZONS[k], "holes": picks::holes(k)})).collect::<Vec<_>>()}),
        volumes: json!({
            "background_vp0": {"file": "demo_volumes/background_vp0.sgy", "lowpass_gaussian_sigma_m": {"lateral": volumes::BACKGROUND_SIGMA.0, "vertical": volumes::BACKGROUND_SIGMA.1},
                               "relative_error_sd": volumes::BACKGROUND_ERROR, "rms_relative_error": bg_err},
            "facies": {"file": "demo_volumes/facies.sgy", "misclassified_fraction": label_error,
                       "errors": "patches of a random field (600 x 400 m, 30 m): sand and shale labelled heterolithic, heterolithic labelled sand or shale"},
        }),
        zone_facies_fractions: zone_fractions.to_vec(),
    }
}
