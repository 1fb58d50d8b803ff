//! The report's SVG figures: maps, the inline section, log tracks and
//! cross-plots, drawn with `plotters`' SVG backend (no font library; the viewer
//! picks the font).
//!
//! Raster figures (maps, section) are drawn as one polygon per run of equal
//! colour step along a row, after averaging blocks of cells so that no figure
//! holds more than about [`MAX_RASTER_CELLS`] cells along its longest side:
//! this keeps a report of a large survey to a few megabytes while the stepped
//! colour bar still reads to one step.

use super::colour::{Cubehelix, Stepped, REPORT_SCALE};
use super::data::{CrossPlotRegion, MapFigure, SectionFigure};
use crate::error::{Error, Result};
use crate::grid::SurveyGrid;
use crate::validation::records::WellPrediction;
use plotters::coord::Shift;
use plotters::prelude::*;

/// Largest number of (block-averaged) cells along either side of a raster figure.
pub const MAX_RASTER_CELLS: usize = 90;
/// Colour steps of the raster figures.
pub const COLOUR_STEPS: usize = 16;

/// Lines and markers of the report: near-black, a dark teal, a warm mid tone
/// and a light grey, far apart in luminance so they read in greyscale.
pub const INK: RGBColor = RGBColor(28, 30, 36);
/// Second line colour (leave-one-out prediction).
pub const TEAL: RGBColor = RGBColor(0, 104, 112);
/// Band fill (prediction +/- 1 sd).
pub const BAND: RGBColor = RGBColor(184, 222, 222);
/// Bank samples in the cross-plots.
pub const SAND: RGBColor = RGBColor(214, 170, 96);
/// Grid lines and boundaries.
pub const RULE: RGBColor = RGBColor(150, 150, 150);

fn fig_err<E: std::fmt::Display>(e: E) -> Error {
    Error::inconsistent(format!("report figure: {e}"))
}

/// Block size so that `n` cells become at most [`MAX_RASTER_CELLS`] blocks.
fn block(n: usize) -> usize {
    n.div_ceil(MAX_RASTER_CELLS).max(1)
}

/// Mean of the finite values of `values[a][b]` (row-major `nb` wide) over the
/// block `[a0, a1) x [b0, b1)`; NaN when none.
fn block_mean(values: &[f64], nb: usize, a: (usize, usize), b: (usize, usize)) -> f64 {
    let (mut s, mut n) = (0.0, 0usize);
    for ia in a.0..a.1 {
        for ib in b.0..b.1 {
            let v = values[ia * nb + ib];
            if v.is_finite() {
                s += v;
                n += 1;
            }
        }
    }
    if n == 0 {
        f64::NAN
    } else {
        s / n as f64
    }
}

/// Runs of equal steps along a row of blocks: `(first, last, step)` with
/// `first..=last` the blocks of one colour; blocks without a value end a run.
fn runs(row: &[Option<usize>]) -> Vec<(usize, usize, usize)> {
    let mut out: Vec<(usize, usize, usize)> = Vec::new();
    for (b, k) in row.iter().enumerate() {
        match (out.last_mut(), k) {
            (Some(r), Some(k)) if r.1 + 1 == b && r.2 == *k => r.1 = b,
            (_, Some(k)) => out.push((b, b, *k)),
            (_, None) => {}
        }
    }
    out
}

/// Draw a vertical stepped colour bar with value labels into `area`.
fn colour_bar<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    steps: &Stepped,
    scale: &Cubehelix,
    label: &str,
) -> Result<()> {
    let (w, h) = area.dim_in_pixel();
    let top = 40i32;
    let bottom = h as i32 - 50;
    let x0 = 12i32;
    let x1 = x0 + 18;
    let span = (bottom - top).max(1) as f64;
    for k in 0..steps.levels {
        let c = steps.colour(scale, k);
        let ya = bottom - (span * k as f64 / steps.levels as f64).round() as i32;
        let yb = bottom - (span * (k + 1) as f64 / steps.levels as f64).round() as i32;
        area.draw(&Rectangle::new(
            [(x0, yb), (x1, ya)],
            RGBColor(c[0], c[1], c[2]).filled(),
        ))
        .map_err(fig_err)?;
    }
    area.draw(&Rectangle::new(
        [(x0, top), (x1, bottom)],
        INK.stroke_width(1),
    ))
    .map_err(fig_err)?;
    let every = (steps.levels / 4).max(1);
    for k in (0..=steps.levels).step_by(every) {
        let y = bottom - (span * k as f64 / steps.levels as f64).round() as i32;
        area.draw(&PathElement::new(vec![(x1, y), (x1 + 4, y)], INK))
            .map_err(fig_err)?;
        area.draw(&Text::new(
            format_value(steps.edge(k)),
            (x1 + 6, y - 6),
            ("sans-serif", 11).into_font().color(&INK),
        ))
        .map_err(fig_err)?;
    }
    let _ = w;
    area.draw(&Text::new(
        label.to_string(),
        (4, top - 24),
        ("sans-serif", 12).into_font().color(&INK),
    ))
    .map_err(fig_err)?;
    Ok(())
}

/// A compact label of a value: 4 significant figures.
pub fn format_value(v: f64) -> String {
    if !v.is_finite() {
        return "-".into();
    }
    let a = v.abs();
    if a == 0.0 {
        "0".into()
    } else if a >= 1000.0 {
        format!("{v:.0}")
    } else if a >= 1.0 {
        format!("{v:.2}")
    } else {
        format!("{v:.4}")
    }
}

/// Map view of one property on a zone's mid-layer: stepped colours per node in
/// world coordinates (easting, northing in m; rotated grids are drawn rotated),
/// white where the zone is absent, wells as triangles with their names.
pub fn map_svg(
    grid: &SurveyGrid,
    map: &MapFigure,
    wells: &[(String, f64, f64)],
    title: &str,
) -> Result<String> {
    let (ni, nj) = (map.ni, map.nj);
    if map.values.len() != ni * nj || ni == 0 || nj == 0 {
        return Err(Error::inconsistent(format!(
            "report map {title}: {} values for a {ni} x {nj} grid",
            map.values.len()
        )));
    }
    let Some(steps) = Stepped::over(map.values.iter().copied(), COLOUR_STEPS) else {
        return Err(Error::inconsistent(format!(
            "report map {title}: no value to draw"
        )));
    };
    let corners = grid.corners();
    let (mut xmin, mut xmax, mut ymin, mut ymax) = (f64::MAX, f64::MIN, f64::MAX, f64::MIN);
    let half = [
        grid.node_xy(-0.5, -0.5),
        grid.node_xy(-0.5, nj as f64 - 0.5),
        grid.node_xy(ni as f64 - 0.5, -0.5),
        grid.node_xy(ni as f64 - 0.5, nj as f64 - 0.5),
    ];
    for (x, y) in corners.iter().chain(half.iter()) {
        xmin = xmin.min(*x);
        xmax = xmax.max(*x);
        ymin = ymin.min(*y);
        ymax = ymax.max(*y);
    }
    let pad = 0.04 * (xmax - xmin).max(ymax - ymin);
    let (xmin, xmax, ymin, ymax) = (xmin - pad, xmax + pad, ymin - pad, ymax + pad);
    // equal scale in x and y
    let plot_w = 460.0;
    let plot_h = (plot_w * (ymax - ymin) / (xmax - xmin)).clamp(180.0, 700.0);
    let (w, h) = (plot_w as u32 + 90 + 110, plot_h as u32 + 40 + 50);

    let (bi, bj) = (block(ni), block(nj));
    let (mi, mj) = (ni.div_ceil(bi), nj.div_ceil(bj));
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        root.fill(&WHITE).map_err(fig_err)?;
        let (left, right) = root.split_horizontally(w - 110);
        let mut chart = ChartBuilder::on(&left)
            .caption(title, ("sans-serif", 15))
            .margin(8)
            .x_label_area_size(38)
            .y_label_area_size(72)
            .build_cartesian_2d(xmin..xmax, ymin..ymax)
            .map_err(fig_err)?;
        chart
            .configure_mesh()
            .disable_mesh()
            .x_desc("easting (m)")
            .y_desc("northing (m)")
            .x_labels(5)
            .y_labels(5)
            .draw()
            .map_err(fig_err)?;
        let mut polys = Vec::new();
        for a in 0..mi {
            let i0 = a * bi;
            let i1 = ((a + 1) * bi).min(ni);
            let row: Vec<Option<usize>> = (0..mj)
                .map(|b| {
                    let v = block_mean(&map.values, nj, (i0, i1), (b * bj, ((b + 1) * bj).min(nj)));
                    v.is_finite().then(|| steps.step(v))
                })
                .collect();
            for (b0, b1, k) in runs(&row) {
                let j0 = b0 * bj;
                let j1 = ((b1 + 1) * bj).min(nj);
                let pts = vec![
                    grid.node_xy(i0 as f64 - 0.5, j0 as f64 - 0.5),
                    grid.node_xy(i0 as f64 - 0.5, j1 as f64 - 0.5),
                    grid.node_xy(i1 as f64 - 0.5, j1 as f64 - 0.5),
                    grid.node_xy(i1 as f64 - 0.5, j0 as f64 - 0.5),
                ];
                let c = steps.colour(&REPORT_SCALE, k);
                polys.push((pts, RGBColor(c[0], c[1], c[2])));
            }
        }
        chart
            .draw_series(
                polys
                    .into_iter()
                    .map(|(pts, c)| Polygon::new(pts, c.filled())),
            )
            .map_err(fig_err)?;
        let outline: Vec<(f64, f64)> = vec![half[0], half[1], half[3], half[2], half[0]];
        chart
            .draw_series(LineSeries::new(outline, RULE.stroke_width(1)))
            .map_err(fig_err)?;
        chart
            .draw_series(wells.iter().map(|(name, x, y)| {
                let halo = |dx: i32, dy: i32| {
                    Text::new(
                        name.clone(),
                        (7 + dx, -4 + dy),
                        ("sans-serif", 11).into_font().color(&WHITE),
                    )
                };
                EmptyElement::at((*x, *y))
                    + TriangleMarker::new((0, 0), 6, WHITE.filled())
                    + TriangleMarker::new((0, 0), 4, INK.filled())
                    + halo(-1, 0)
                    + halo(1, 0)
                    + halo(0, -1)
                    + halo(0, 1)
                    + Text::new(
                        name.clone(),
                        (7, -4),
                        ("sans-serif", 11).into_font().color(&INK),
                    )
            }))
            .map_err(fig_err)?;
        colour_bar(&right, &steps, &REPORT_SCALE, &map.unit_label())?;
        root.present().map_err(fig_err)?;
    }
    Ok(svg)
}

/// The inline section: Vp0 mean along one inline (distance along the inline in
/// m, depth TVDSS in m increasing downwards), cells outside every zone white,
/// the horizons drawn as lines with their names.
pub fn section_svg(grid: &SurveyGrid, sec: &SectionFigure, title: &str) -> Result<String> {
    let (nj, nz) = (sec.nj, sec.nz);
    if sec.values.len() != nj * nz || nj == 0 || nz == 0 {
        return Err(Error::inconsistent(format!(
            "report section: {} values for {nj} traces x {nz} samples",
            sec.values.len()
        )));
    }
    let Some(steps) = Stepped::over(sec.values.iter().copied(), COLOUR_STEPS) else {
        return Err(Error::inconsistent("report section: no value to draw"));
    };
    let dx = grid.xline_spacing;
    let len = (nj as f64 - 1.0).max(1.0) * dx;
    // depth window: the zones, with a margin
    let (mut kmin, mut kmax) = (nz, 0usize);
    for j in 0..nj {
        for k in 0..nz {
            if sec.values[j * nz + k].is_finite() {
                kmin = kmin.min(k);
                kmax = kmax.max(k);
            }
        }
    }
    let margin = (nz / 20).max(2);
    let k0 = kmin.saturating_sub(margin);
    let k1 = (kmax + margin).min(nz - 1);
    let ztop = grid.z_at(k0) - 0.5 * grid.dz;
    let zbot = grid.z_at(k1) + 0.5 * grid.dz;
    let (w, h) = (820u32, 460u32);
    let (bj, bk) = (block(nj), block(k1 - k0 + 1));
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        root.fill(&WHITE).map_err(fig_err)?;
        let (left, right) = root.split_horizontally(w - 110);
        let mut chart = ChartBuilder::on(&left)
            .caption(title, ("sans-serif", 15))
            .margin(8)
            .x_label_area_size(38)
            .y_label_area_size(64)
            .build_cartesian_2d(-0.5 * dx..len + 0.5 * dx, -zbot..-ztop)
            .map_err(fig_err)?;
        let depth_label = |v: &f64| format!("{:.0}", -v);
        chart
            .configure_mesh()
            .disable_mesh()
            .x_desc(format!("distance along inline {} (m)", sec.inline))
            .y_desc("depth TVDSS (m)")
            .y_label_formatter(&depth_label)
            .draw()
            .map_err(fig_err)?;
        let mut rects = Vec::new();
        let mut k = k0;
        while k <= k1 {
            let (ka, kb) = (k, (k + bk).min(k1 + 1));
            // values are stored trace-major: index j * nz + k
            let row: Vec<Option<usize>> = (0..nj.div_ceil(bj))
                .map(|b| {
                    let v = block_mean(&sec.values, nz, (b * bj, ((b + 1) * bj).min(nj)), (ka, kb));
                    v.is_finite().then(|| steps.step(v))
                })
                .collect();
            for (b0, b1, st) in runs(&row) {
                let j0 = b0 * bj;
                let j1 = ((b1 + 1) * bj).min(nj);
                let c = steps.colour(&REPORT_SCALE, st);
                rects.push((
                    [
                        ((j0 as f64 - 0.5) * dx, -(grid.z_at(ka) - 0.5 * grid.dz)),
                        ((j1 as f64 - 0.5) * dx, -(grid.z_at(kb - 1) + 0.5 * grid.dz)),
                    ],
                    RGBColor(c[0], c[1], c[2]),
                ));
            }
            k = kb;
        }
        chart
            .draw_series(
                rects
                    .into_iter()
                    .map(|(r, c)| Rectangle::new(r, c.filled())),
            )
            .map_err(fig_err)?;
        for (name, zs) in &sec.horizons {
            let mut seg: Vec<(f64, f64)> = Vec::new();
            let mut segs = Vec::new();
            for (j, z) in zs.iter().enumerate() {
                if z.is_finite() {
                    seg.push((j as f64 * dx, -z));
                } else if !seg.is_empty() {
                    segs.push(std::mem::take(&mut seg));
                }
            }
            if !seg.is_empty() {
                segs.push(seg);
            }
            for s in &segs {
                chart
                    .draw_series(LineSeries::new(s.clone(), WHITE.stroke_width(3)))
                    .map_err(fig_err)?;
                chart
                    .draw_series(LineSeries::new(s.clone(), INK.stroke_width(1)))
                    .map_err(fig_err)?;
            }
            if let Some(&(x, y)) = segs.first().and_then(|s| s.first()) {
                chart
                    .draw_series(std::iter::once(
                        EmptyElement::at((x, y))
                            + Text::new(
                                name.clone(),
                                (4, -14),
                                ("sans-serif", 11).into_font().color(&INK),
                            ),
                    ))
                    .map_err(fig_err)?;
            }
        }
        colour_bar(&right, &steps, &REPORT_SCALE, "Vp0 mean (m/s)")?;
        root.present().map_err(fig_err)?;
    }
    Ok(svg)
}

/// Axis range of `values` with a 5% margin (or +/- 1 around a single value).
fn value_range(values: impl Iterator<Item = f64>) -> Option<(f64, f64)> {
    let (mut lo, mut hi) = (f64::MAX, f64::MIN);
    for v in values.filter(|v| v.is_finite()) {
        lo = lo.min(v);
        hi = hi.max(v);
    }
    if lo > hi {
        return None;
    }
    let pad = if hi > lo {
        0.05 * (hi - lo)
    } else {
        0.05 * lo.abs().max(1e-3)
    };
    Some((lo - pad, hi + pad))
}

/// Property labels with units, in the order vp0, epsilon, delta.
pub const PROPERTY_LABELS: [&str; 3] = ["Vp0 (m/s)", "epsilon (1)", "delta (1)"];

/// Log tracks of one held-out well: for each of Vp0, epsilon and delta, the
/// blocked values (near-black), the leave-one-out prior mean (teal) with its
/// +/- 1 sd band, against depth TVDSS (m, increasing downwards); zone
/// boundaries of the leave-one-out frame as grey lines with the zone names.
pub fn log_tracks_svg(pred: &WellPrediction) -> Result<String> {
    if pred.samples.is_empty() {
        return Err(Error::inconsistent(format!(
            "report log tracks: well {} has no blocked sample",
            pred.well
        )));
    }
    let zs = pred
        .samples
        .iter()
        .map(|s| s.z)
        .chain(pred.zones.iter().flat_map(|z| [z.z_top, z.z_base]));
    let Some((zlo, zhi)) = value_range(zs) else {
        return Err(Error::inconsistent(format!(
            "report log tracks: well {} has no depth",
            pred.well
        )));
    };
    let (w, h) = (900u32, 560u32);
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        root.fill(&WHITE).map_err(fig_err)?;
        let root = root
            .titled(
                &format!(
                    "{}: blocked logs (dark), leave-one-out prior mean (teal) and +/- 1 sd (band)",
                    pred.well
                ),
                ("sans-serif", 14),
            )
            .map_err(fig_err)?;
        let panels = root.split_evenly((1, 3));
        for (p, panel) in panels.iter().enumerate() {
            let vals = pred.samples.iter().flat_map(|s| {
                let m = s.mean[p];
                let sd = s.sd[p].unwrap_or(0.0);
                [s.observed[p], m.map(|m| m - sd), m.map(|m| m + sd)]
                    .into_iter()
                    .flatten()
            });
            let (vlo, vhi) = value_range(vals).unwrap_or((0.0, 1.0));
            let mut chart = ChartBuilder::on(panel)
                .margin(6)
                .x_label_area_size(36)
                .y_label_area_size(if p == 0 { 60 } else { 14 })
                .build_cartesian_2d(vlo..vhi, -zhi..-zlo)
                .map_err(fig_err)?;
            let depth_label = |v: &f64| format!("{:.0}", -v);
            let value_label = |v: &f64| format_value(*v);
            let mut mesh = chart.configure_mesh();
            mesh.light_line_style(RGBColor(238, 238, 238))
                .x_desc(PROPERTY_LABELS[p])
                .x_labels(4)
                .x_label_formatter(&value_label)
                .y_label_formatter(&depth_label);
            if p == 0 {
                mesh.y_desc("depth TVDSS (m)");
            }
            mesh.draw().map_err(fig_err)?;
            // contiguous runs of samples with a value, broken at zone changes
            let mut runs: Vec<Vec<usize>> = Vec::new();
            for (n, s) in pred.samples.iter().enumerate() {
                let cont = n > 0 && pred.samples[n - 1].zone == s.zone;
                match runs.last_mut() {
                    Some(r) if cont => r.push(n),
                    _ => runs.push(vec![n]),
                }
            }
            for r in &runs {
                let band: Vec<(f64, f64, f64)> = r
                    .iter()
                    .filter_map(|&n| {
                        let s = &pred.samples[n];
                        Some((s.mean[p]?, s.sd[p].unwrap_or(0.0), -s.z))
                    })
                    .collect();
                if band.len() >= 2 {
                    let mut poly: Vec<(f64, f64)> = band.iter().map(|b| (b.0 - b.1, b.2)).collect();
                    poly.extend(band.iter().rev().map(|b| (b.0 + b.1, b.2)));
                    chart
                        .draw_series(std::iter::once(Polygon::new(poly, BAND.filled())))
                        .map_err(fig_err)?;
                }
                let obs: Vec<(f64, f64)> = r
                    .iter()
                    .filter_map(|&n| pred.samples[n].observed[p].map(|v| (v, -pred.samples[n].z)))
                    .collect();
                chart
                    .draw_series(LineSeries::new(obs, INK.stroke_width(1)))
                    .map_err(fig_err)?;
                let mean: Vec<(f64, f64)> = band.iter().map(|b| (b.0, b.2)).collect();
                chart
                    .draw_series(LineSeries::new(mean, TEAL.stroke_width(2)))
                    .map_err(fig_err)?;
            }
            for z in &pred.zones {
                for (zz, label) in [(z.z_top, true), (z.z_base, false)] {
                    chart
                        .draw_series(LineSeries::new(
                            vec![(vlo, -zz), (vhi, -zz)],
                            RULE.stroke_width(1),
                        ))
                        .map_err(fig_err)?;
                    if label && p == 0 {
                        chart
                            .draw_series(std::iter::once(
                                EmptyElement::at((vlo, -zz))
                                    + Text::new(
                                        z.zone.clone(),
                                        (4, 3),
                                        ("sans-serif", 11).into_font().color(&RULE),
                                    ),
                            ))
                            .map_err(fig_err)?;
                    }
                }
            }
        }
        root.present().map_err(fig_err)?;
    }
    Ok(svg)
}

/// Most points drawn per cloud in a cross-plot (bank samples beyond it are
/// thinned by a fixed stride, so the figure is deterministic).
pub const MAX_CROSSPLOT_POINTS: usize = 700;

/// Cross-plots of one bank region: bank samples (light, small) against the
/// region's blocked well samples (dark crosses), Vp0-epsilon, Vp0-delta,
/// epsilon-delta.
pub fn crossplot_svg(region: &CrossPlotRegion) -> Result<String> {
    if region.bank.is_empty() && region.wells.is_empty() {
        return Err(Error::inconsistent(format!(
            "report cross-plot {}: no sample",
            region.region
        )));
    }
    let stride = region.bank.len().div_ceil(MAX_CROSSPLOT_POINTS).max(1);
    let bank: Vec<[f64; 3]> = region.bank.iter().step_by(stride).copied().collect();
    let pairs = [(0usize, 1usize), (0, 2), (1, 2)];
    let (w, h) = (960u32, 340u32);
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        root.fill(&WHITE).map_err(fig_err)?;
        let root = root
            .titled(
                &format!(
                    "{}: {} bank samples (light dots{}), {} well samples from {} wells (dark crosses)",
                    region.region,
                    region.bank.len(),
                    if stride > 1 {
                        format!(", 1 in {stride} drawn")
                    } else {
                        String::new()
                    },
                    region.wells.len(),
                    region.well_count
                ),
                ("sans-serif", 13),
            )
            .map_err(fig_err)?;
        let panels = root.split_evenly((1, 3));
        for (panel, &(a, b)) in panels.iter().zip(pairs.iter()) {
            let xr = value_range(bank.iter().chain(region.wells.iter()).map(|r| r[a]))
                .unwrap_or((0.0, 1.0));
            let yr = value_range(bank.iter().chain(region.wells.iter()).map(|r| r[b]))
                .unwrap_or((0.0, 1.0));
            let mut chart = ChartBuilder::on(panel)
                .margin(8)
                .x_label_area_size(36)
                .y_label_area_size(58)
                .build_cartesian_2d(xr.0..xr.1, yr.0..yr.1)
                .map_err(fig_err)?;
            let fmt = |v: &f64| format_value(*v);
            chart
                .configure_mesh()
                .light_line_style(RGBColor(238, 238, 238))
                .x_desc(PROPERTY_LABELS[a])
                .y_desc(PROPERTY_LABELS[b])
                .x_labels(4)
                .y_labels(5)
                .x_label_formatter(&fmt)
                .y_label_formatter(&fmt)
                .draw()
                .map_err(fig_err)?;
            chart
                .draw_series(
                    bank.iter()
                        .map(|r| Circle::new((r[a], r[b]), 2, SAND.mix(0.8).filled())),
                )
                .map_err(fig_err)?;
            chart
                .draw_series(
                    region
                        .wells
                        .iter()
                        .map(|r| Cross::new((r[a], r[b]), 3, INK.stroke_width(1))),
                )
                .map_err(fig_err)?;
        }
        root.present().map_err(fig_err)?;
    }
    Ok(svg)
}

#[cfg(test)]
mod tests {
    use super::runs;

    #[test]
    fn runs_merge_equal_neighbours_and_break_at_gaps() {
        let row = [Some(1), Some(1), None, Some(1), Some(2), Some(2), Some(1)];
        assert_eq!(runs(&row), vec![(0, 1, 1), (3, 3, 1), (4, 5, 2), (6, 6, 1)]);
        assert!(runs(&[None, None]).is_empty());
    }
}
