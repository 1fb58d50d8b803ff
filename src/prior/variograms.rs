//! The variogram of one zone and property: taken from the project, or fitted to
//! the experimental variograms of the well data (and, for Vp0, of the
//! background volume).
//!
//! Evidence used for a fit, on the residuals of the kriging's own mean, trend or
//! drift:
//!
//! * vertical: pairs along each well (dense); fixes the nugget, the sill and the
//!   vertical range (first stage of the sequential fit);
//! * horizontal between wells (sparse), pooled over layers within 1.5 cells;
//! * horizontal from the background Vp0 volume on the zone's layer centres
//!   (dense laterally; Vp0 only), rescaled so that its variance equals the well
//!   residual variance, since the background is smoother than the wells: it
//!   gives the shape of lateral correlation, the wells its size.
//!
//! Where the horizontal evidence cannot be fitted, the horizontal range of the
//! zone's Vp0 model is used (facies-controlled properties share their lateral
//! continuity; a documented assumption), and a warning says so.
//!
//! Project syntax, under `[variograms.<zone>]`:
//! `vp0 = { nugget = .., structures = [{ kind = "spherical", sill = .., range_major = ..,
//! range_minor = .., azimuth = .., range_vertical = .. }] }` uses the model as is;
//! `vp0 = { kinds = ["spherical"], fixed = { nugget = 0.0, structures = [{ range_vertical = 8.0 }] } }`
//! fits with the given parameters fixed.

use crate::error::{Error, Result};
use crate::frame::strat::StratFrame;
use crate::geostat::kriging::Sample;
use crate::geostat::variogram::{
    fit_model, gridded_variogram, horizontal_variogram, vertical_variogram, ExperimentalVariogram,
    FitReport, FitSpec, GridDirection, GridValues, HorizontalOptions, LagBins, StructureKind,
    VariogramModel, WellSeries, DEFAULT_MIN_PAIRS,
};
use crate::study::{InputVolume, Study};
use serde::Serialize;

/// What was used for one zone and property.
#[derive(Debug, Clone, Serialize)]
pub struct VariogramRecord {
    /// Zone name.
    pub zone: String,
    /// Property.
    pub property: String,
    /// `project`, `fitted` or `fitted with fixed parameters`.
    pub source: String,
    /// The model.
    pub model: VariogramModel,
    /// The model in project-file syntax.
    pub toml: String,
    /// Experimental variograms (residuals), if computed.
    pub experimental: Vec<ExperimentalVariogram>,
    /// The fit, if fitted.
    pub fit: Option<FitReport>,
    /// Warnings.
    pub warnings: Vec<String>,
}

enum Setting {
    Model(VariogramModel),
    Fit(FitSpec),
}

fn project_setting(study: &Study, zone: &str, prop: &str) -> Result<Option<Setting>> {
    let p = &study.project;
    let Some(v) = p.variograms.get(zone).and_then(|t| t.get(prop)) else {
        return Ok(None);
    };
    let key = format!("variograms.{zone}.{prop}");
    let is_fit = v
        .as_table()
        .is_some_and(|t| t.contains_key("kinds") || t.contains_key("fixed"));
    if is_fit {
        let spec: FitSpec = v
            .clone()
            .try_into()
            .map_err(|e| Error::project(&p.path, format!("{key}: {e}")))?;
        Ok(Some(Setting::Fit(spec)))
    } else {
        let m: VariogramModel = v
            .clone()
            .try_into()
            .map_err(|e| Error::project(&p.path, format!("{key}: {e}")))?;
        m.validate()
            .map_err(|e| Error::project(&p.path, format!("{key}: {e}")))?;
        Ok(Some(Setting::Model(m)))
    }
}

fn variance(v: &[f64]) -> f64 {
    let n = v.len() as f64;
    if v.len() < 2 {
        return 0.0;
    }
    let m = v.iter().sum::<f64>() / n;
    v.iter().map(|x| (x - m).powi(2)).sum::<f64>() / (n - 1.0)
}

/// The model for zone `zi` and property `prop`, with what was used to get it.
///
/// `samples` are the kriging data of the zone (positions and well ids) and
/// `residuals` their values relative to the kriging's mean, trend or drift.
/// `fallback_horizontal` is the horizontal range (major, minor, azimuth) to use
/// when the horizontal evidence cannot be fitted.
#[allow(clippy::too_many_arguments)]
pub fn zone_property_variogram(
    study: &Study,
    frame: &StratFrame,
    zi: usize,
    prop: &str,
    samples: &[Sample],
    residuals: &[f64],
    background: Option<&InputVolume>,
    fallback_horizontal: Option<(f64, f64, f64)>,
) -> Result<(VariogramModel, VariogramRecord)> {
    let p = &study.project;
    let g = &p.grid;
    let zf = &frame.zones[zi];
    let zone = &p.zones[zi].name;
    let mut warnings = Vec::new();
    let setting = project_setting(study, zone, prop)?;
    if let Some(Setting::Model(m)) = setting {
        let toml = m.to_toml_entry(&format!("variograms.{}.{prop}", toml_key(zone)));
        return Ok((
            m.clone(),
            VariogramRecord {
                zone: zone.clone(),
                property: prop.into(),
                source: "project".into(),
                model: m,
                toml,
                experimental: Vec::new(),
                fit: None,
                warnings,
            },
        ));
    }
    let (spec, source) = match setting {
        Some(Setting::Fit(s)) => (s, "fitted with fixed parameters"),
        _ => (FitSpec::new(vec![StructureKind::Spherical]), "fitted"),
    };

    // vertical: along each well
    let mut series: Vec<WellSeries> = Vec::new();
    for (s, r) in samples.iter().zip(residuals) {
        let name = study.wells[s.well as usize].name().to_string();
        match series.iter_mut().find(|w| w.well == name) {
            Some(w) => {
                w.s.push(s.pos[2]);
                w.values.push(*r);
            }
            None => series.push(WellSeries {
                well: name,
                s: vec![s.pos[2]],
                values: vec![*r],
            }),
        }
    }
    let h = zf.cell_thickness;
    let vmax = (zf.reference_thickness / 2.0).max(4.0 * h);
    // classes centred on whole numbers of cells: blocked samples are one cell apart
    let nv = ((vmax / h).ceil() as usize).clamp(3, 60);
    let vbins = LagBins::from_edges((0..=nv).map(|k| (k as f64 + 0.5) * h).collect())?;
    let vert = vertical_variogram(&series, &vbins, DEFAULT_MIN_PAIRS)?;

    // horizontal between wells
    let hs: Vec<crate::geostat::variogram::Sample> = samples
        .iter()
        .zip(residuals)
        .map(|(s, r)| crate::geostat::variogram::Sample {
            x: s.pos[0],
            y: s.pos[1],
            s: s.pos[2],
            value: *r,
            well: s.well as usize,
        })
        .collect();
    let corners = g.corners();
    let diag =
        ((corners[0].0 - corners[2].0).powi(2) + (corners[0].1 - corners[2].1).powi(2)).sqrt();
    let spacing = g.inline_spacing.max(g.xline_spacing);
    let hwidth = (diag / 12.0).max(spacing);
    let hbins = LagBins::uniform(hwidth, 8)?;
    let horiz = horizontal_variogram(
        &hs,
        &HorizontalOptions {
            bins: hbins,
            vertical_tolerance: 1.5 * h,
            direction: None,
            min_pairs: DEFAULT_MIN_PAIRS,
        },
    )?;

    // horizontal from the background volume on the layer centres
    let mut dense: Vec<ExperimentalVariogram> = Vec::new();
    if let Some(bg) = background {
        let (top, base) = &frame.bounds[zi];
        let (ni, nj, nk) = (g.inline_count, g.xline_count, zf.layers);
        let mut vals = vec![f64::NAN; ni * nj * nk];
        for i in 0..ni {
            for j in 0..nj {
                let (Some(t), Some(b)) = (top.z_at_node(i, j), base.z_at_node(i, j)) else {
                    continue;
                };
                for l in 0..nk {
                    if let Some(z) = zf.z_of(zf.layer_centre(l), t, b) {
                        if let Some(v) =
                            super::volume_sampling::trace_at_depth(g, &bg.data, i, j, z)
                        {
                            vals[(i * nj + j) * nk + l] = v;
                        }
                    }
                }
            }
        }
        let finite: Vec<f64> = vals.iter().copied().filter(|v| v.is_finite()).collect();
        let (vb, vw) = (variance(&finite), variance(residuals));
        if vb > 0.0 && vw > 0.0 {
            let nlags = (ni.max(nj) / 2).clamp(4, 40);
            let grid = GridValues {
                values: &vals,
                shape: [ni, nj, nk],
                inline_spacing: g.inline_spacing,
                xline_spacing: g.xline_spacing,
                layer_spacing: h,
                azimuth: g.azimuth,
                active: None,
            };
            let mut gv = gridded_variogram(
                &grid,
                &[GridDirection::AlongInline, GridDirection::AlongCrossline],
                nlags,
                DEFAULT_MIN_PAIRS,
            )?;
            let scale = vw / vb;
            for e in &mut gv {
                for b in &mut e.bins {
                    b.gamma *= scale;
                }
            }
            dense = gv;
        }
    }

    let mut experimental = vec![vert.clone()];
    let fit = if !dense.is_empty() {
        experimental.extend(dense.iter().cloned());
        fit_model(&[vert.clone(), dense[0].clone(), dense[1].clone()], &spec)
    } else {
        experimental.push(horiz.clone());
        fit_model(&[vert.clone(), horiz.clone()], &spec)
    };
    let fit = match fit {
        Ok(f) => f,
        Err(e) => {
            // horizontal evidence could not be fitted: fit the vertical one, borrow the horizontal range
            let (maj, min, az) = fallback_horizontal.unwrap_or((diag / 3.0, diag / 3.0, 0.0));
            warnings.push(format!(
                "the horizontal variogram could not be fitted ({e}); horizontal range {maj:.0} / {min:.0} m at {az:.0} deg used instead"
            ));
            let mut spec2 = spec.clone();
            let mut fixed = spec2.fixed.structures.clone();
            if fixed.is_empty() {
                fixed.push(Default::default());
            }
            for f in &mut fixed {
                f.range_major = Some(maj);
                f.range_minor = Some(min);
                f.azimuth = Some(az);
            }
            spec2.fixed.structures = fixed;
            fit_model(&[vert.clone(), horiz.clone()], &spec2)
                .or_else(|_| fit_model(std::slice::from_ref(&vert), &spec2))?
        }
    };
    for w in &fit.warnings {
        warnings.push(w.clone());
    }
    for e in &experimental {
        for w in &e.warnings {
            warnings.push(w.message.clone());
        }
    }
    let model = fit.model.clone();
    let toml = model.to_toml_entry(&format!("variograms.{}.{prop}", toml_key(zone)));
    Ok((
        model.clone(),
        VariogramRecord {
            zone: zone.clone(),
            property: prop.into(),
            source: source.into(),
            model,
            toml,
            experimental,
            fit: Some(fit),
            warnings,
        },
    ))
}

/// A zone name as a TOML key (bare when it can be, quoted otherwise).
pub fn toml_key(name: &str) -> String {
    if !name.is_empty()
        && name
            .chars()
            .all(|c| c.is_ascii_alphanumeric() || c == '_' || c == '-')
    {
        name.to_string()
    } else {
        format!("\"{}\"", name.replace('\\', "\\\\").replace('"', "\\\""))
    }
}
