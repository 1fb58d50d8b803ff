//! SVG figures of experimental variograms and fitted models.
//!
//! Drawn with `plotters`' SVG backend only (no font library: the backend writes
//! `<text>` elements and the viewer picks the font).

use super::experimental::{ExperimentalVariogram, LagDirection};
use super::fit::model_curve;
use super::model::VariogramModel;
use crate::error::{Error, Result};
use plotters::prelude::*;
use serde::{Deserialize, Serialize};

/// Settings of [`plot_svg`].
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PlotOptions {
    /// Title above the plot.
    pub title: String,
    /// Unit of the property squared, for the axis label, e.g. `"(m/s)^2"` or `"1"`.
    pub value_unit: String,
    /// Width in pixels.
    pub width: u32,
    /// Height in pixels.
    pub height: u32,
    /// Write the pair count next to each experimental point.
    pub label_pairs: bool,
}

impl Default for PlotOptions {
    fn default() -> Self {
        PlotOptions {
            title: "Variogram".into(),
            value_unit: "1".into(),
            width: 720,
            height: 480,
            label_pairs: true,
        }
    }
}

/// Series colours: our own, dark enough on white and apart in luminance.
const PALETTE: [RGBColor; 6] = [
    RGBColor(0, 104, 112),
    RGBColor(176, 88, 24),
    RGBColor(92, 52, 128),
    RGBColor(110, 120, 30),
    RGBColor(40, 60, 110),
    RGBColor(150, 40, 70),
];

fn plot_err<E: std::fmt::Display>(e: E) -> Error {
    Error::inconsistent(format!("variogram plot: {e}"))
}

/// Draw experimental variograms (one colour each) and, optionally, the model
/// along each one's direction, as an SVG document.
///
/// Each point is a circle whose area grows with its pair count; points with fewer
/// pairs than the variogram's `min_pairs` are drawn hollow, and with
/// `label_pairs` the count is written above the point. The model curve of each
/// series is drawn in the series' colour (for an omnidirectional series along the
/// major and, when different, the minor axis of the first structure), and the total
/// sill as a grey line. Axes: "lag (m)" and "semivariance (<value_unit>)".
///
/// All series share one lag axis, so plot vertical and horizontal variograms in
/// separate figures. Errors: nothing to draw (no non-empty lag and no model).
pub fn plot_svg(
    experimental: &[ExperimentalVariogram],
    model: Option<&VariogramModel>,
    opts: &PlotOptions,
) -> Result<String> {
    plot_impl(experimental, model, None, opts)
}

/// Draw a model alone along `direction` (no experimental points: a model given
/// in the project file, or a direction without pairs), from lag 0 to 1.5 times
/// the largest range of its structures along that direction.
pub fn plot_model_svg(
    model: &VariogramModel,
    direction: LagDirection,
    opts: &PlotOptions,
) -> Result<String> {
    plot_impl(&[], Some(model), Some(direction), opts)
}

fn plot_impl(
    experimental: &[ExperimentalVariogram],
    model: Option<&VariogramModel>,
    model_only: Option<LagDirection>,
    opts: &PlotOptions,
) -> Result<String> {
    let mut xmax: f64 = 0.0;
    let mut ymax: f64 = 0.0;
    let mut max_pairs = 1u64;
    for ev in experimental {
        for b in ev.non_empty() {
            if b.h_mean.is_finite() && b.gamma.is_finite() {
                xmax = xmax.max(b.h_upper.max(b.h_mean));
                ymax = ymax.max(b.gamma);
                max_pairs = max_pairs.max(b.pairs);
            }
        }
    }
    if let (Some(m), Some(d)) = (model, model_only) {
        let r = m
            .structures
            .iter()
            .map(|s| match d {
                LagDirection::Vertical => s.range_vertical,
                _ => s.range_major.max(s.range_minor),
            })
            .fold(0.0, f64::max);
        xmax = xmax.max(1.5 * r);
    }
    if xmax <= 0.0 {
        return Err(Error::inconsistent(
            "variogram plot: no experimental lag with pairs to draw",
        ));
    }
    if let Some(m) = model {
        m.validate()?;
        ymax = ymax.max(m.total_sill());
    }
    if ymax <= 0.0 {
        ymax = 1.0;
    }
    let xmax = xmax * 1.05;
    let ymax = ymax * 1.15;
    let (w, h) = (opts.width.max(200), opts.height.max(150));

    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        root.fill(&WHITE).map_err(plot_err)?;
        let mut chart = ChartBuilder::on(&root)
            .caption(&opts.title, ("sans-serif", 18))
            .margin(12)
            .x_label_area_size(42)
            .y_label_area_size(64)
            .build_cartesian_2d(0f64..xmax, 0f64..ymax)
            .map_err(plot_err)?;
        chart
            .configure_mesh()
            .x_desc("lag (m)")
            .y_desc(format!("semivariance ({})", opts.value_unit))
            .light_line_style(RGBColor(235, 235, 235))
            .draw()
            .map_err(plot_err)?;

        if let Some(m) = model {
            let sill = m.total_sill();
            chart
                .draw_series(LineSeries::new(
                    vec![(0.0, sill), (xmax, sill)],
                    RGBColor(150, 150, 150).stroke_width(1),
                ))
                .map_err(plot_err)?
                .label(format!("total sill {sill:.4}"))
                .legend(|(x, y)| {
                    PathElement::new(vec![(x, y), (x + 18, y)], RGBColor(150, 150, 150))
                });
        }

        for (i, ev) in experimental.iter().enumerate() {
            let colour = PALETTE[i % PALETTE.len()];
            let pts: Vec<(f64, f64, u64)> = ev
                .non_empty()
                .filter(|b| b.h_mean.is_finite() && b.gamma.is_finite())
                .map(|b| (b.h_mean, b.gamma, b.pairs))
                .collect();
            if let Some(m) = model {
                let mut dirs: Vec<(LagDirection, &str)> = vec![(ev.direction, "model")];
                if ev.direction == LagDirection::Omnidirectional {
                    if let Some(s) = m.structures.first() {
                        if s.range_minor != s.range_major {
                            dirs = vec![
                                (
                                    LagDirection::Horizontal {
                                        azimuth: s.azimuth,
                                        tolerance: 0.0,
                                    },
                                    "model, major axis",
                                ),
                                (
                                    LagDirection::Horizontal {
                                        azimuth: s.azimuth + 90.0,
                                        tolerance: 0.0,
                                    },
                                    "model, minor axis",
                                ),
                            ];
                        }
                    }
                }
                for (j, (d, what)) in dirs.iter().enumerate() {
                    let curve = model_curve(m, d, xmax, 240);
                    let style = if j == 0 {
                        colour.stroke_width(2)
                    } else {
                        colour.mix(0.55).stroke_width(2)
                    };
                    chart
                        .draw_series(LineSeries::new(curve, style))
                        .map_err(plot_err)?
                        .label(format!("{what} ({})", ev.direction.describe()))
                        .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 18, y)], style));
                }
            }
            let min_pairs = ev.min_pairs;
            chart
                .draw_series(pts.iter().map(|&(x, y, n)| {
                    let r = 2.5 + 4.5 * (n as f64 / max_pairs as f64).sqrt();
                    let style = if n >= min_pairs {
                        colour.filled()
                    } else {
                        colour.stroke_width(1)
                    };
                    Circle::new((x, y), r.round() as i32, style)
                }))
                .map_err(plot_err)?
                .label(format!("experimental ({})", ev.direction.describe()))
                .legend(move |(x, y)| Circle::new((x + 9, y), 4, colour.filled()));
            if opts.label_pairs {
                chart
                    .draw_series(pts.iter().map(|&(x, y, n)| {
                        EmptyElement::at((x, y))
                            + Text::new(
                                n.to_string(),
                                (-6, -18),
                                ("sans-serif", 10).into_font().color(&colour),
                            )
                    }))
                    .map_err(plot_err)?;
            }
        }
        if let (Some(m), Some(d)) = (model, model_only) {
            let colour = PALETTE[0];
            let curve = model_curve(m, &d, xmax, 240);
            chart
                .draw_series(LineSeries::new(curve, colour.stroke_width(2)))
                .map_err(plot_err)?
                .label(format!("model ({}), no experimental points", d.describe()))
                .legend(move |(x, y)| {
                    PathElement::new(vec![(x, y), (x + 18, y)], colour.stroke_width(2))
                });
        }
        chart
            .configure_series_labels()
            .position(SeriesLabelPosition::LowerRight)
            .background_style(WHITE.mix(0.85))
            .border_style(RGBColor(120, 120, 120))
            .label_font(("sans-serif", 11))
            .draw()
            .map_err(plot_err)?;
        root.present().map_err(plot_err)?;
    }
    Ok(svg)
}
