//! Conditioned wells written as LAS 2.0, one file per well, for any log viewer.
//!
//! Curves (index first): `DEPT` measured depth (M), `TVDSS` (M), `X`, `Y` (M),
//! `VP0` (M/S), `EPS`, `DELTA` (dimensionless), `ZONE` (zone index from 0, as in
//! the manifest; null outside every zone), `STRAT_S` (stratigraphic coordinate, M),
//! `LAYER` (stratigraphic layer index in the zone), `FACIES` (code). Null value -999.25.

use crate::condition::logs::ConditionedWell;
use crate::error::Result;
use crate::formats::las::{write_las2, Decimals, WriteCurve, WriteItem};
use std::path::{Path, PathBuf};

/// The null value written into conditioned LAS files.
pub const LAS_NULL: f64 = -999.25;

/// A file-name-safe version of a well name.
pub fn file_stem(name: &str) -> String {
    name.chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || c == '-' || c == '_' || c == '.' {
                c
            } else {
                '_'
            }
        })
        .collect()
}

fn curve<'a>(
    mnemonic: &'a str,
    unit: &'a str,
    description: &'a str,
    data: &'a [Option<f64>],
    decimals: Decimals,
) -> WriteCurve<'a> {
    WriteCurve {
        mnemonic,
        unit,
        description,
        data,
        decimals,
    }
}

/// Write one conditioned well into `dir`; returns the path written.
pub fn write_conditioned_las(
    dir: &Path,
    w: &ConditionedWell,
    zone_names: &[String],
) -> Result<PathBuf> {
    let path = dir.join(format!("{}.las", file_stem(&w.name)));
    let opt = |v: &[f64]| v.iter().map(|&x| Some(x)).collect::<Vec<_>>();
    let md = opt(&w.md);
    let tvd: Vec<Option<f64>> = w.points.iter().map(|p| Some(p.z)).collect();
    let x: Vec<Option<f64>> = w.points.iter().map(|p| Some(p.x)).collect();
    let y: Vec<Option<f64>> = w.points.iter().map(|p| Some(p.y)).collect();
    let zone: Vec<Option<f64>> = w.strat.iter().map(|s| s.map(|s| s.zone as f64)).collect();
    let s: Vec<Option<f64>> = w.strat.iter().map(|s| s.map(|s| s.s)).collect();
    let layer: Vec<Option<f64>> = w.strat.iter().map(|s| s.map(|s| s.layer as f64)).collect();
    let facies: Vec<Option<f64>> = w.facies.iter().map(|f| f.map(f64::from)).collect();
    let curves = [
        curve("DEPT", "M", "measured depth", &md, Decimals::Shortest),
        curve(
            "TVDSS",
            "M",
            "true vertical depth below sea level",
            &tvd,
            Decimals::Fixed(3),
        ),
        curve("X", "M", "world x", &x, Decimals::Fixed(2)),
        curve("Y", "M", "world y", &y, Decimals::Fixed(2)),
        curve(
            "VP0",
            "M/S",
            "vertical P velocity",
            &w.vp0,
            Decimals::Fixed(2),
        ),
        curve("EPS", "", "Thomsen epsilon", &w.epsilon, Decimals::Fixed(5)),
        curve("DELTA", "", "Thomsen delta", &w.delta, Decimals::Fixed(5)),
        curve(
            "ZONE",
            "",
            "zone index (manifest order)",
            &zone,
            Decimals::Fixed(0),
        ),
        curve(
            "STRAT_S",
            "M",
            "stratigraphic coordinate in the zone",
            &s,
            Decimals::Fixed(3),
        ),
        curve(
            "LAYER",
            "",
            "stratigraphic layer index in the zone",
            &layer,
            Decimals::Fixed(0),
        ),
        curve("FACIES", "", "facies code", &facies, Decimals::Fixed(0)),
    ];
    let source = format!("{:?}", w.source).to_ascii_lowercase();
    let window = w
        .backus_window
        .map(|l| format!("{l:.3}"))
        .unwrap_or_else(|| "none".into());
    let zones = zone_names
        .iter()
        .enumerate()
        .map(|(k, n)| format!("{k}={}", n.replace([':', ' '], "_")))
        .collect::<Vec<_>>()
        .join(",");
    let items = [
        WriteItem {
            mnemonic: "WELL",
            unit: "",
            value: &w.name,
            description: "well name",
        },
        WriteItem {
            mnemonic: "SRC",
            unit: "",
            value: &source,
            description: "source of epsilon and delta",
        },
        WriteItem {
            mnemonic: "BWIN",
            unit: "M",
            value: &window,
            description: "Backus window length",
        },
        WriteItem {
            mnemonic: "ZONES",
            unit: "",
            value: &zones,
            description: "zone indices",
        },
        WriteItem {
            mnemonic: "PROG",
            unit: "",
            value: concat!("stratiprior-", env!("CARGO_PKG_VERSION")),
            description: "written by",
        },
    ];
    write_las2(&path, &items, &curves, LAS_NULL)?;
    Ok(path)
}
