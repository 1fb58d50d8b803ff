//! The demo wells: plans, deviation surveys, tops and logs sampled from the
//! truth along the trajectories exactly where the well reader will place them.

use super::basin::{Basin, HORIZONS};
use super::grf::normal;
use crate::error::{Error, Result};
use crate::ingest::trajectory::{Station, Trajectory};
use crate::ingest::wells::WellPath;
use rand::SeedableRng;
use rand_chacha::ChaCha20Rng;
use serde::Serialize;

/// How a well's LAS file is written.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum LasFlavour {
    /// LAS 2.0, unwrapped, depth in metres.
    Las20Metres,
    /// LAS 2.0, unwrapped, depth in feet.
    Las20Feet,
    /// LAS 1.2, unwrapped, depth in metres.
    Las12,
    /// LAS 2.0, wrapped, depth in metres.
    Las20Wrapped,
}

/// The curves of a demo LAS file.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum Curve {
    /// Compressional slowness, us/ft (mnemonic DTC, or DT in one well).
    Dtc,
    /// Shear slowness, us/ft.
    Dts,
    /// Bulk density, g/cm3.
    Rhob,
    /// Gamma ray, API.
    Gr,
    /// Thomsen epsilon.
    Eps,
    /// Thomsen delta.
    Delta,
    /// Facies code.
    Facies,
}

/// Directional plan: vertical to `kop`, then inclination and azimuth change
/// linearly in MD between the `legs` points `(md, inclination, azimuth)` (a
/// constant build/turn rate, i.e. circular arcs), holding after the last one.
#[derive(Debug, Clone, Serialize)]
pub struct Directional {
    /// Kick-off point, m MD.
    pub kop: f64,
    /// Azimuth at kick-off, deg from grid north.
    pub azimuth: f64,
    /// Leg ends (md m, inclination deg, azimuth deg).
    pub legs: Vec<(f64, f64, f64)>,
}

impl Directional {
    fn at(&self, md: f64) -> (f64, f64) {
        let mut prev = (self.kop, 0.0, self.azimuth);
        if md <= self.kop {
            return (0.0, self.azimuth);
        }
        for &(m, inc, az) in &self.legs {
            if md <= m {
                let f = (md - prev.0) / (m - prev.0);
                return (prev.1 + f * (inc - prev.1), prev.2 + f * (az - prev.2));
            }
            prev = (m, inc, az);
        }
        (prev.1, prev.2)
    }
}

/// The design of one demo well.
#[derive(Debug, Clone, Serialize)]
pub struct WellSpec {
    /// Well name.
    pub name: &'static str,
    /// Surface position in local survey coordinates (u, v), m.
    pub uv: (f64, f64),
    /// Datum (kelly bushing) height above sea level, m.
    pub datum: f64,
    /// Directional plan; `None` for a vertical well.
    pub plan: Option<Directional>,
    /// LAS flavour.
    pub flavour: LasFlavour,
    /// Curve order after the depth curve.
    pub order: Vec<Curve>,
    /// Mnemonic of the compressional slowness (DTC or DT).
    pub vp_mnemonic: &'static str,
    /// Whether the well has a 60 m logging gap (all-null rows).
    pub gap: bool,
    /// Short description for the report.
    pub kind: &'static str,
}

/// The eight demo wells.
pub fn well_specs() -> Vec<WellSpec> {
    use Curve::*;
    let std_order = vec![Dtc, Dts, Rhob, Gr, Eps, Delta, Facies];
    vec![
        WellSpec {
            name: "MRW-1",
            uv: (650.0, 500.0),
            datum: 212.4,
            plan: None,
            flavour: LasFlavour::Las20Metres,
            order: std_order.clone(),
            vp_mnemonic: "DTC",
            gap: false,
            kind: "vertical",
        },
        WellSpec {
            name: "MRW-2",
            uv: (1850.0, 2050.0),
            datum: 188.0,
            plan: None,
            flavour: LasFlavour::Las20Metres,
            order: vec![Gr, Rhob, Dtc, Dts, Facies, Eps, Delta],
            vp_mnemonic: "DT",
            gap: false,
            kind: "vertical",
        },
        WellSpec {
            name: "MRW-3",
            uv: (900.0, 800.0),
            datum: 241.7,
            plan: Some(Directional {
                kop: 1250.0,
                azimuth: 75.0,
                legs: vec![(1706.0, 38.0, 76.0)],
            }),
            flavour: LasFlavour::Las20Metres,
            order: vec![Dtc, Rhob, Dts, Gr, Facies, Eps, Delta],
            vp_mnemonic: "DTC",
            gap: false,
            kind: "deviated: build-and-hold (J) to 38 deg",
        },
        WellSpec {
            name: "MRW-4",
            uv: (2900.0, 900.0),
            datum: 205.3,
            plan: Some(Directional {
                kop: 800.0,
                azimuth: 210.0,
                legs: vec![
                    (1160.0, 24.0, 211.0),
                    (1500.0, 24.0, 212.0),
                    (1900.0, 4.0, 214.0),
                ],
            }),
            flavour: LasFlavour::Las20Metres,
            order: std_order.clone(),
            vp_mnemonic: "DTC",
            gap: false,
            kind: "deviated: S-shaped, build to 24 deg, drop to 4 deg",
        },
        WellSpec {
            name: "MRW-5",
            uv: (3150.0, 2200.0),
            datum: 176.9,
            plan: None,
            flavour: LasFlavour::Las20Feet,
            order: vec![Dtc, Rhob, Dts, Gr, Delta, Eps, Facies],
            vp_mnemonic: "DTC",
            gap: false,
            kind: "vertical, LAS depth in feet",
        },
        WellSpec {
            name: "MRW-6",
            uv: (350.0, 2250.0),
            datum: 233.0,
            plan: None,
            flavour: LasFlavour::Las12,
            order: std_order.clone(),
            vp_mnemonic: "DTC",
            gap: false,
            kind: "vertical, LAS 1.2",
        },
        WellSpec {
            name: "MRW-7",
            uv: (2250.0, 1350.0),
            datum: 198.6,
            plan: None,
            flavour: LasFlavour::Las20Wrapped,
            order: std_order,
            vp_mnemonic: "DTC",
            gap: false,
            kind: "vertical, wrapped LAS 2.0",
        },
        WellSpec {
            name: "MRW-8",
            uv: (1450.0, 250.0),
            datum: 220.2,
            plan: None,
            flavour: LasFlavour::Las20Metres,
            order: vec![Facies, Gr, Dtc, Dts, Rhob, Eps, Delta],
            vp_mnemonic: "DTC",
            gap: true,
            kind: "vertical, 60 m logging gap",
        },
    ]
}

/// One log curve: mnemonic, unit, description, values (`None` = null) and the
/// number of decimals it is written with.
#[derive(Debug, Clone, Serialize)]
pub struct LogCurve {
    /// Mnemonic.
    pub mnemonic: String,
    /// Unit as written in the LAS header.
    pub unit: String,
    /// Description.
    pub description: String,
    /// Decimals written.
    pub decimals: usize,
    /// Values in the file's unit; `None` where null.
    pub values: Vec<Option<f64>>,
}

/// The logs of one well, ready for a LAS writer.
#[derive(Debug, Clone, Serialize)]
pub struct LogTable {
    /// Depth unit of the file, "M" or "FT".
    pub depth_unit: &'static str,
    /// Depth step in the file's unit.
    pub step: f64,
    /// Measured depths in the file's unit.
    pub depth: Vec<f64>,
    /// Curves after the depth, in file order.
    pub curves: Vec<LogCurve>,
}

/// A finished demo well.
#[derive(Debug, Clone)]
pub struct BuiltWell {
    /// Its design.
    pub spec: WellSpec,
    /// Surface x, y (m) and datum (m), as written in the well table.
    pub x: f64,
    /// Surface y, m.
    pub y: f64,
    /// Survey stations as written (`None` for vertical wells).
    pub stations: Option<Vec<Station>>,
    /// The path as the well reader rebuilds it from the written numbers.
    pub path: WellPath,
    /// Tops: MD (m, as written) of each horizon.
    pub tops: Vec<f64>,
    /// Total depth, m MD.
    pub td: f64,
    /// Logged interval, m MD.
    pub logged: (f64, f64),
    /// Logging gap, m MD, if any.
    pub gap: Option<(f64, f64)>,
    /// The logs.
    pub logs: LogTable,
}

/// Round to `d` decimals through the text a file will hold, so the value used
/// here is the value a reader gets back.
pub fn as_written(v: f64, d: usize) -> f64 {
    format!("{v:.d$}").parse::<f64>().unwrap_or(v)
}

/// Standard deviations of the measurement noise added to the logs, in log units:
/// DTC us/ft, DTS us/ft, RHOB g/cm3, GR API, EPS, DELTA.
pub const LOG_NOISE: [(&str, f64); 6] = [
    ("DTC", 0.25),
    ("DTS", 0.6),
    ("RHOB", 0.008),
    ("GR", 2.5),
    ("EPS", 0.003),
    ("DELTA", 0.002),
];

/// Description of the FACIES curve (codes of [`super::basin::FACIES`]).
const FACIES_DESCRIPTION: &str = "Facies code (1 channel sand, 2 shale, 3 heterolithic)";

/// Margin of log coverage above the top horizon and below the base, m TVD.
const LOG_MARGIN: f64 = 50.0;

/// First MD (m) at or below `from` where `f(md) >= 0`, by a 5 m scan then bisection.
fn first_crossing(from: f64, to: f64, f: impl Fn(f64) -> f64) -> Option<f64> {
    let mut a = from;
    if f(a) >= 0.0 {
        return Some(a);
    }
    while a < to {
        let b = (a + 5.0).min(to);
        if f(b) >= 0.0 {
            let (mut lo, mut hi) = (a, b);
            for _ in 0..60 {
                let m = 0.5 * (lo + hi);
                if f(m) >= 0.0 {
                    hi = m;
                } else {
                    lo = m;
                }
            }
            return Some(hi);
        }
        a = b;
    }
    None
}

/// Build one well: stations, trajectory, tops, logs.
pub fn build_well(basin: &Basin, spec: &WellSpec, seed: u64, index: usize) -> Result<BuiltWell> {
    // well positions are fixed in the field frame, whatever the survey
    let grid = basin.frame();
    let (xs, ys) = grid.node_xy(
        spec.uv.1 / grid.inline_spacing,
        spec.uv.0 / grid.xline_spacing,
    );
    let x = as_written(xs, 2);
    let y = as_written(ys, 2);
    let datum = as_written(spec.datum, 2);
    let mut rng = ChaCha20Rng::seed_from_u64(seed.wrapping_add(0x57e1_1000 + index as u64));
    let fail = |m: String| Error::inconsistent(format!("demo well {}: {m}", spec.name));

    // Provisional path to find the total depth.
    let station_noise: Vec<(f64, f64)> = (0..200)
        .map(|_| (0.04 * normal(&mut rng), 0.08 * normal(&mut rng)))
        .collect();
    let make_stations = |td: f64| -> Option<Vec<Station>> {
        let plan = spec.plan.as_ref()?;
        let mut mds: Vec<f64> = (0..)
            .map(|k| k as f64 * 30.0)
            .take_while(|m| *m < td)
            .collect();
        mds.push(td);
        Some(
            mds.iter()
                .enumerate()
                .map(|(k, &md)| {
                    let (inc, az) = plan.at(md);
                    let (ni, na) = if md > plan.kop {
                        station_noise[k.min(station_noise.len() - 1)]
                    } else {
                        (0.0, 0.0)
                    };
                    Station {
                        md: as_written(md, 2),
                        inclination: as_written((inc + ni).max(0.0), 2),
                        azimuth: as_written(
                            (az + if inc > 0.5 { na } else { 0.0 }).rem_euclid(360.0),
                            2,
                        ),
                    }
                })
                .collect(),
        )
    };
    let path_of = |st: &Option<Vec<Station>>| -> Result<WellPath> {
        let trajectory = match st {
            None => Trajectory::vertical(),
            Some(s) => Trajectory::from_stations(s).map_err(|e| fail(e.to_string()))?,
        };
        Ok(WellPath {
            x,
            y,
            datum_elevation: datum,
            trajectory,
        })
    };
    let target = |p: &WellPath, md: f64, k: usize, off: f64| -> f64 {
        let q = p.point_at_md(md);
        q.z - (basin.horizons(q.x, q.y)[k] + off)
    };
    let provisional = path_of(&make_stations(5000.0))?;
    let bottom = first_crossing(0.0, 5000.0, |m| {
        target(&provisional, m, 3, LOG_MARGIN + 25.0)
    })
    .ok_or_else(|| fail("never reaches the base horizon".into()))?;
    let td = (bottom / 10.0).ceil() * 10.0;
    let stations = make_stations(td);
    let path = path_of(&stations)?;

    let mut tops = Vec::with_capacity(HORIZONS.len());
    for (k, name) in HORIZONS.iter().enumerate() {
        let md = first_crossing(0.0, td, |m| target(&path, m, k, 0.0))
            .ok_or_else(|| fail(format!("does not reach {name}")))?;
        tops.push(as_written(md, 2));
    }
    let log_top = first_crossing(0.0, td, |m| target(&path, m, 0, -LOG_MARGIN))
        .ok_or_else(|| fail("log top not found".into()))?;
    let log_base = first_crossing(log_top, td, |m| target(&path, m, 3, LOG_MARGIN))
        .ok_or_else(|| fail("log base above TD".into()))?;

    // Sample depths in the file's unit.
    let (unit, step, to_m) = match spec.flavour {
        LasFlavour::Las20Feet => ("FT", 1.5, 0.3048),
        _ => ("M", 0.5, 1.0),
    };
    let k0 = (log_top / to_m / step).floor() as i64;
    let k1 = (log_base / to_m / step).ceil() as i64;
    let depth: Vec<f64> = (k0..=k1).map(|k| k as f64 * step).collect();
    let gap = spec.gap.then(|| {
        let a = ((tops[0] + 45.0) / step).round() * step;
        (a, a + 60.0)
    });

    let mut cols: Vec<Vec<Option<f64>>> = vec![Vec::with_capacity(depth.len()); spec.order.len()];
    for &d in &depth {
        let md = d * to_m;
        let q = path.point_at_md(md);
        if !basin.grid().contains_xy(q.x, q.y) {
            return Err(fail(format!("leaves the survey at MD {md:.1} m")));
        }
        let r = basin.rock(q.x, q.y, q.z);
        // noise is drawn for every sample, in a fixed order, null or not
        let n: Vec<f64> = LOG_NOISE
            .iter()
            .map(|(_, s)| s * normal(&mut rng))
            .collect();
        let null = matches!(gap, Some((a, b)) if md >= a && md < b);
        for (c, col) in spec.order.iter().zip(cols.iter_mut()) {
            let v = match c {
                Curve::Dtc => 304_800.0 / r.vp + n[0],
                Curve::Dts => 304_800.0 / r.vs + n[1],
                Curve::Rhob => r.rho / 1000.0 + n[2],
                Curve::Gr => r.gr + n[3],
                Curve::Eps => r.eps + n[4],
                Curve::Delta => r.delta + n[5],
                Curve::Facies => f64::from(r.facies),
            };
            col.push((!null).then(|| as_written(v, decimals(*c))));
        }
    }
    let curves = spec
        .order
        .iter()
        .zip(cols)
        .map(|(c, values)| {
            let (mn, unit, description) = describe(*c, spec);
            LogCurve {
                mnemonic: mn.to_string(),
                unit: unit.to_string(),
                description: description.to_string(),
                decimals: decimals(*c),
                values,
            }
        })
        .collect();
    Ok(BuiltWell {
        spec: spec.clone(),
        x,
        y,
        stations,
        path,
        tops,
        td,
        logged: (depth[0] * to_m, depth[depth.len() - 1] * to_m),
        gap,
        logs: LogTable {
            depth_unit: unit,
            step,
            depth,
            curves,
        },
    })
}

fn decimals(c: Curve) -> usize {
    match c {
        Curve::Dtc | Curve::Dts => 3,
        Curve::Rhob => 4,
        Curve::Gr => 2,
        Curve::Eps | Curve::Delta => 4,
        Curve::Facies => 0,
    }
}

fn describe(c: Curve, spec: &WellSpec) -> (&'static str, &'static str, &'static str) {
    match c {
        Curve::Dtc => (
            spec.vp_mnemonic,
            "US/F",
            "Compressional slowness (vertical, anisotropy-corrected)",
        ),
        Curve::Dts => ("DTS", "US/F", "Shear slowness"),
        Curve::Rhob => ("RHOB", "G/C3", "Bulk density"),
        Curve::Gr => ("GR", "GAPI", "Gamma ray"),
        Curve::Eps => (
            "EPS",
            "",
            "Thomsen epsilon from core and anisotropy processing",
        ),
        Curve::Delta => (
            "DELTA",
            "",
            "Thomsen delta from core and anisotropy processing",
        ),
        Curve::Facies => ("FACIES", "", FACIES_DESCRIPTION),
    }
}
