//! The QC report: one self-contained `report.html` written by `build` and by
//! `validate`.
//!
//! The page holds inline SVG figures ([`figures`], drawn with `plotters`' SVG
//! backend), HTML tables and a small inline style sheet: no script, no font, no
//! image or style sheet fetched from anywhere, so it opens in any browser
//! without a network. It is also well-formed XML (every element closed), which
//! the tests check with an XML parser.
//!
//! What it shows depends on the command:
//!
//! * both: the caution, the study summary (grid, wells, horizons, zones, facies,
//!   input volumes), the horizon tie table and the variogram figures;
//! * `build`: map views of the mean and sd of each property on the mid-layer of
//!   each zone with the wells, one inline section of the Vp0 mean with the
//!   horizons, and cross-plots of every bank region against its well samples;
//! * `validate`: the log tracks of every held-out well with its leave-one-out
//!   prediction and the validation table with baselines and skill scores,
//!   highlighted where the prior does worse than a baseline.
//!
//! Every figure is a `<figure class="fig" id="...">` whose id is
//! [`figure_id`] of its parts, so scripts and tests can find it.

pub mod colour;
pub mod data;
pub mod figures;

use crate::error::Result;
use crate::geostat::variogram::{
    plot_model_svg, plot_svg, ExperimentalVariogram, LagDirection, PlotOptions,
};
use crate::io_util::write_atomic;
use crate::prior::manifest::CAUTION;
use crate::prior::variograms::VariogramRecord;
use crate::study::Study;
use crate::validation::records::{ScoreRow, WellPrediction, METHOD_PRIOR};
use data::{CrossPlotRegion, MapFigure, SectionFigure};
use std::fmt::Write as _;
use std::path::Path;

/// The facies trend of one zone: its name and, per facies name, the offsets
/// `t_f` of vp0 (m/s), epsilon and delta.
pub type ZoneFaciesTrend = (String, Vec<(String, [f64; 3])>);

/// Which command wrote the report.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ReportKind {
    /// `stratiprior build`.
    Build,
    /// `stratiprior validate`.
    Validate,
}

/// The leave-one-well-out results drawn by the report.
#[derive(Debug, Clone, Copy)]
pub struct ValidationContent<'a> {
    /// Score rows (per well and pooled `all`).
    pub rows: &'a [ScoreRow],
    /// Predictions along every held-out well.
    pub predictions: &'a [WellPrediction],
    /// Whether the variograms were refitted without each held-out well.
    pub refit_variograms: bool,
}

/// Everything a report shows.
#[derive(Debug, Clone, Copy)]
pub struct ReportInputs<'a> {
    /// The command.
    pub kind: ReportKind,
    /// The study (project, wells, horizons with their ties, volumes).
    pub study: &'a Study,
    /// Variograms used, per zone and property.
    pub variograms: &'a [VariogramRecord],
    /// Mid-layer maps (`build`).
    pub maps: &'a [MapFigure],
    /// Well positions per zone index, for the maps.
    pub map_wells: &'a std::collections::BTreeMap<usize, Vec<(String, f64, f64)>>,
    /// The inline section (`build`).
    pub section: Option<&'a SectionFigure>,
    /// Bank regions (`build`).
    pub crossplots: &'a [CrossPlotRegion],
    /// Leave-one-well-out results (`validate`).
    pub validation: Option<ValidationContent<'a>>,
    /// The facies trend of the mean volumes (`build`): per zone name, the
    /// offsets `t_f` (vp0 m/s, epsilon, delta) per facies name.
    pub facies_trend: &'a [ZoneFaciesTrend],
    /// The facies-label volume's confusion calibrated at the wells (`build`).
    pub label_confusion: Option<&'a [crate::prior::build::LabelConfusionRow]>,
    /// Files written by the run (kind, path relative to the report).
    pub files: &'a [(String, String)],
    /// Warnings of the run.
    pub warnings: &'a [String],
}

/// The id of a figure: its parts joined by `-`, each lower-cased with every
/// character other than an ASCII letter or digit replaced by `_`.
pub fn figure_id(parts: &[&str]) -> String {
    parts
        .iter()
        .map(|p| {
            p.chars()
                .map(|c| {
                    if c.is_ascii_alphanumeric() {
                        c.to_ascii_lowercase()
                    } else {
                        '_'
                    }
                })
                .collect::<String>()
        })
        .collect::<Vec<_>>()
        .join("-")
}

/// Escape text for HTML element content and attribute values.
pub fn escape(s: &str) -> String {
    let mut o = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => o.push_str("&amp;"),
            '<' => o.push_str("&lt;"),
            '>' => o.push_str("&gt;"),
            '"' => o.push_str("&quot;"),
            '\'' => o.push_str("&#39;"),
            c if (c as u32) < 0x20 && c != '\n' && c != '\t' => o.push(' '),
            c => o.push(c),
        }
    }
    o
}

const STYLE: &str = "
body { font-family: sans-serif; color: #1c1e24; margin: 0 auto; max-width: 1180px; padding: 0 18px 40px; line-height: 1.4; }
h1 { font-size: 1.6em; border-bottom: 3px solid #006870; padding-bottom: 6px; }
h2 { font-size: 1.25em; margin-top: 2.2em; border-bottom: 1px solid #9a9a9a; }
h3 { font-size: 1.05em; margin-top: 1.4em; }
.caution { border: 2px solid #1c1e24; background: #f3efe4; padding: 8px 14px; margin: 14px 0; }
table { border-collapse: collapse; margin: 8px 0 14px; font-size: 0.86em; }
th, td { border: 1px solid #b4b4b4; padding: 3px 7px; text-align: right; }
th { background: #e6ecec; }
td.t, th.t { text-align: left; }
tr.prior td { font-weight: bold; background: #f4f7f7; }
tr.loses td { background: #f1d9c4; }
td.verdict { text-align: left; font-weight: bold; }
figure.fig { margin: 12px 0 22px; }
figure.fig svg { max-width: 100%; height: auto; border: 1px solid #dddddd; }
figure.fig svg polygon, figure.fig svg rect { shape-rendering: crispEdges; }
pre { font-size: 0.8em; background: #f4f4f4; padding: 6px 10px; overflow-x: auto; }
figcaption { font-size: 0.85em; color: #3c3e44; margin-top: 4px; }
nav ul { columns: 2; font-size: 0.9em; }
details { margin: 6px 0 12px; }
.grid2 { display: flex; flex-wrap: wrap; gap: 10px; }
.grid2 figure.fig { flex: 1 1 540px; }
";

/// Render the report as one HTML page.
pub fn render(inp: &ReportInputs<'_>) -> Result<String> {
    let p = &inp.study.project;
    let mut h = String::with_capacity(1 << 20);
    let title = match inp.kind {
        ReportKind::Build => format!("Prior build report: {}", p.name),
        ReportKind::Validate => format!("Leave-one-well-out validation report: {}", p.name),
    };
    h.push_str("<!DOCTYPE html>\n<html xmlns=\"http://www.w3.org/1999/xhtml\" lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n");
    let _ = writeln!(h, "<title>{}</title>", escape(&title));
    let _ = writeln!(h, "<style>{STYLE}</style>\n</head>\n<body>");
    let _ = writeln!(h, "<h1>{}</h1>", escape(&title));
    let _ = writeln!(
        h,
        "<p>Written by stratiprior {} from the project file <code>{}</code>. Units: SI (m, m/s; epsilon and delta dimensionless); depths are TVDSS in metres, positive down.</p>",
        env!("CARGO_PKG_VERSION"),
        escape(&p.path.display().to_string())
    );
    caution(&mut h);

    let mut toc: Vec<(&str, &str)> = vec![
        ("summary", "Study summary"),
        ("ties", "Horizon ties"),
        ("variograms", "Variograms"),
    ];
    match inp.kind {
        ReportKind::Build => {
            toc.push(("maps", "Maps on the zone mid-layers"));
            toc.push(("section", "Inline section"));
            toc.push(("crossplots", "Bank cross-plots"));
        }
        ReportKind::Validate => {
            toc.push(("validation", "Validation scores"));
            toc.push(("tracks", "Log tracks of the held-out wells"));
        }
    }
    toc.push(("files", "Files and warnings"));
    h.push_str("<nav><ul>\n");
    for (id, name) in &toc {
        let _ = writeln!(h, "<li><a href=\"#{id}\">{}</a></li>", escape(name));
    }
    h.push_str("</ul></nav>\n");

    summary(&mut h, inp.study);
    facies_tables(&mut h, inp);
    ties(&mut h, inp.study);
    variograms(&mut h, inp.variograms);
    match inp.kind {
        ReportKind::Build => {
            maps(&mut h, inp);
            section(&mut h, inp);
            crossplots(&mut h, inp.crossplots);
        }
        ReportKind::Validate => {
            if let Some(v) = inp.validation {
                validation_table(&mut h, v);
                tracks(&mut h, v);
            }
        }
    }
    files(&mut h, inp);
    caution(&mut h);
    h.push_str("</body>\n</html>\n");
    Ok(h)
}

/// Render and write the report to `path` (atomically: a temporary name renamed
/// when complete).
pub fn write(path: &Path, inp: &ReportInputs<'_>) -> Result<()> {
    let html = render(inp)?;
    write_atomic(path, html.as_bytes())
}

fn caution(h: &mut String) {
    let _ = writeln!(
        h,
        "<div class=\"caution\"><strong>Caution.</strong> {}</div>",
        escape(CAUTION)
    );
}

/// A figure with an id and a caption; `svg` is plotters' output. A figure that
/// cannot be drawn (no value on a map's layer, say) becomes a paragraph saying
/// why, so the report of a run is never lost to one figure.
fn figure(h: &mut String, id: &str, svg: Result<String>, caption: &str) {
    let svg = match svg {
        Ok(svg) => svg,
        Err(e) => {
            let _ = writeln!(
                h,
                "<p class=\"nofig\">Not drawn: {} ({})</p>",
                escape(caption),
                escape(&e.to_string())
            );
            return;
        }
    };
    let svg = svg.as_str();
    let _ = writeln!(h, "<figure class=\"fig\" id=\"{}\">", escape(id));
    // plotters writes a complete <svg> element; drop an XML declaration if any
    let body = match svg.find("<svg") {
        Some(i) => &svg[i..],
        None => svg,
    };
    h.push_str(body.trim());
    let _ = writeln!(
        h,
        "\n<figcaption>{}</figcaption>\n</figure>",
        escape(caption)
    );
}

fn f(v: f64, digits: usize) -> String {
    if v.is_finite() {
        format!("{v:.digits$}")
    } else {
        "-".into()
    }
}

fn summary(h: &mut String, study: &Study) {
    let p = &study.project;
    let g = &p.grid;
    h.push_str("<h2 id=\"summary\">Study summary</h2>\n<h3>Survey grid</h3>\n<table>\n");
    let rows = [
        ("origin x, y (m)", format!("{:.1}, {:.1}", g.x0, g.y0)),
        (
            "crossline bearing (degrees from grid north)",
            f(g.azimuth, 2),
        ),
        (
            "inlines (first, count, spacing m)",
            format!(
                "{}, {}, {}",
                g.inline_first, g.inline_count, g.inline_spacing
            ),
        ),
        (
            "crosslines (first, count, spacing m)",
            format!("{}, {}, {}", g.xline_first, g.xline_count, g.xline_spacing),
        ),
        (
            "depth (first m TVDSS, interval m, count)",
            format!("{}, {}, {}", g.z0, g.dz, g.z_count),
        ),
        ("seed", p.seed.to_string()),
    ];
    for (k, v) in rows {
        let _ = writeln!(
            h,
            "<tr><th class=\"t\">{}</th><td>{}</td></tr>",
            escape(k),
            escape(&v)
        );
    }
    h.push_str("</table>\n");

    let _ = writeln!(h, "<h3>Wells ({})</h3>", study.wells.len());
    h.push_str("<table>\n<tr><th class=\"t\">well</th><th>surface x (m)</th><th>surface y (m)</th><th>datum (m above sea level)</th><th>deviated</th><th>log samples</th><th>tops</th><th class=\"t\">curves</th></tr>\n");
    for w in &study.wells {
        let curves: Vec<&str> = w.logs.keys().map(|c| c.key()).collect();
        let _ = writeln!(
            h,
            "<tr><td class=\"t\">{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td class=\"t\">{}</td></tr>",
            escape(w.name()),
            f(w.entry.x, 1),
            f(w.entry.y, 1),
            f(w.entry.datum_elevation, 1),
            if w.entry.survey.is_some() { "yes" } else { "no" },
            w.md.len(),
            w.tops.len(),
            escape(&curves.join(", "))
        );
    }
    h.push_str("</table>\n");

    h.push_str("<h3>Horizons and zones</h3>\n<table>\n<tr><th class=\"t\">horizon</th><th class=\"t\">tops name</th><th>picks</th><th>nodes extrapolated</th></tr>\n");
    for hz in &study.horizons {
        let _ = writeln!(
            h,
            "<tr><td class=\"t\">{}</td><td class=\"t\">{}</td><td>{}</td><td>{}</td></tr>",
            escape(&hz.def.name),
            escape(&hz.def.tops_name),
            hz.gridding.pick_count,
            hz.gridding.nodes_extrapolated
        );
    }
    h.push_str("</table>\n<table>\n<tr><th class=\"t\">zone</th><th class=\"t\">top</th><th class=\"t\">base</th><th class=\"t\">layering</th><th>cell thickness (m)</th></tr>\n");
    for z in &p.zones {
        let name = |i: usize| p.horizons.get(i).map_or("?", |h| h.name.as_str());
        let _ = writeln!(
            h,
            "<tr><td class=\"t\">{}</td><td class=\"t\">{}</td><td class=\"t\">{}</td><td class=\"t\">{}</td><td>{}</td></tr>",
            escape(&z.name),
            escape(name(z.top)),
            escape(name(z.base)),
            z.layering.name(),
            f(z.cell_thickness, 2)
        );
    }
    h.push_str("</table>\n");
    if p.facies.is_empty() {
        h.push_str("<p>No facies in the project.</p>\n");
    } else {
        h.push_str("<table>\n<tr><th>facies code</th><th class=\"t\">facies</th></tr>\n");
        for fc in &p.facies {
            let _ = writeln!(
                h,
                "<tr><td>{}</td><td class=\"t\">{}</td></tr>",
                fc.code,
                escape(&fc.name)
            );
        }
        h.push_str("</table>\n");
    }
    if study.volumes.is_empty() {
        h.push_str("<p>No input volumes.</p>\n");
    } else {
        h.push_str("<table>\n<tr><th class=\"t\">input volume</th><th class=\"t\">file</th><th class=\"t\">unit</th></tr>\n");
        for v in &study.volumes {
            let _ = writeln!(
                h,
                "<tr><td class=\"t\">{}</td><td class=\"t\">{}</td><td class=\"t\">{}</td></tr>",
                escape(&v.role),
                escape(&v.path.display().to_string()),
                escape(&v.unit)
            );
        }
        h.push_str("</table>\n");
    }
}

fn facies_tables(h: &mut String, inp: &ReportInputs<'_>) {
    if inp.facies_trend.iter().any(|(_, v)| !v.is_empty()) {
        h.push_str("<h3>Facies trend</h3>\n<p>Offsets t_f of each facies (declustered facies mean minus zone mean of the wells' blocked samples): the mean volumes hold sum_f p_f t_f, and their standard deviations the spread of t_f over the facies probabilities.</p>\n<table>\n<tr><th class=\"t\">zone</th><th class=\"t\">facies</th><th>Vp0 (m/s)</th><th>epsilon (1)</th><th>delta (1)</th></tr>\n");
        for (zone, rows) in inp.facies_trend {
            for (facies, t) in rows {
                let _ = writeln!(
                    h,
                    "<tr><td class=\"t\">{}</td><td class=\"t\">{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
                    escape(zone),
                    escape(facies),
                    f(t[0], 1),
                    f(t[1], 4),
                    f(t[2], 4)
                );
            }
        }
        h.push_str("</table>\n");
    }
    if let Some(c) = inp.label_confusion {
        h.push_str("<h3>Facies labels, calibrated at the wells</h3>\n<p>Probability of each facies (columns) in cells of each label of the facies-label volume (rows), from the wells' blocked facies against the label of the nearest cell, with add-one smoothing.</p>\n<table>\n<tr><th class=\"t\">label</th>");
        if let Some((_, first)) = c.first() {
            for (name, _) in first {
                let _ = write!(h, "<th>{}</th>", escape(name));
            }
        }
        h.push_str("</tr>\n");
        for (label, row) in c {
            let _ = write!(h, "<tr><td class=\"t\">{}</td>", escape(label));
            for (_, q) in row {
                let _ = write!(h, "<td>{}</td>", f(*q, 3));
            }
            h.push_str("</tr>\n");
        }
        h.push_str("</table>\n");
    }
}

fn ties(h: &mut String, study: &Study) {
    h.push_str("<h2 id=\"ties\">Horizon ties</h2>\n<p>Each gridded horizon is corrected to pass through the well tops. Mistie: top depth minus surface depth before the tie (positive: the top is deeper); residual: after the tie (m).</p>\n");
    let mut any = false;
    for hz in &study.horizons {
        let Some(t) = &hz.tie else {
            let _ = writeln!(h, "<p>{}: no well top, not tied.</p>", escape(&hz.def.name));
            continue;
        };
        any = true;
        let _ = writeln!(
            h,
            "<h3>{}</h3>\n<p>Support radius {} m; largest |mistie| {} m, largest |residual| {} m, largest |correction| {} m at {} nodes changed.</p>",
            escape(&hz.def.name),
            f(t.radius, 0),
            f(t.max_abs_mistie, 2),
            f(t.max_abs_residual, 3),
            f(t.max_abs_correction, 2),
            t.nodes_changed
        );
        h.push_str("<table>\n<tr><th class=\"t\">well</th><th>x (m)</th><th>y (m)</th><th>top (m TVDSS)</th><th>surface before (m)</th><th>mistie (m)</th><th>residual (m)</th></tr>\n");
        for w in &t.wells {
            let _ = writeln!(
                h,
                "<tr><td class=\"t\">{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
                escape(&w.well),
                f(w.x, 1),
                f(w.y, 1),
                f(w.z_top, 2),
                f(w.z_before, 2),
                f(w.mistie, 2),
                f(w.residual, 3)
            );
        }
        h.push_str("</table>\n");
        for n in &t.notes {
            let _ = writeln!(h, "<p>{}</p>", escape(n));
        }
    }
    if !any {
        h.push_str("<p>No horizon was tied.</p>\n");
    }
}

fn unit_squared(prop: &str) -> &'static str {
    if prop == "vp0" {
        "(m/s)^2"
    } else {
        "1"
    }
}

fn variograms(h: &mut String, records: &[VariogramRecord]) {
    h.push_str("<h2 id=\"variograms\">Variograms</h2>\n<p>Experimental variograms of the kriging residuals in stratigraphic coordinates (circle area grows with the pair count, hollow below the minimum pair count, count written above) and the model used. Vertical: lag along the stratigraphic coordinate s; horizontal: lag in map distance.</p>\n");
    for r in records {
        let _ = writeln!(
            h,
            "<h3>{} {} ({})</h3>\n<pre>{}</pre>",
            escape(&r.zone),
            escape(&r.property),
            escape(&r.source),
            escape(r.toml.trim())
        );
        h.push_str("<div class=\"grid2\">\n");
        for (dir, vertical) in [("vertical", true), ("horizontal", false)] {
            let ex: Vec<ExperimentalVariogram> = r
                .experimental
                .iter()
                .filter(|e| (e.direction == LagDirection::Vertical) == vertical)
                .filter(|e| e.non_empty().next().is_some())
                .cloned()
                .collect();
            let opts = PlotOptions {
                title: format!("{} {}: {dir}", r.zone, r.property),
                value_unit: unit_squared(&r.property).into(),
                width: 560,
                height: 360,
                label_pairs: true,
            };
            let (svg, what) = if ex.is_empty() {
                let d = if vertical {
                    LagDirection::Vertical
                } else {
                    LagDirection::Omnidirectional
                };
                (
                    plot_model_svg(&r.model, d, &opts),
                    "model only: no experimental pairs in this direction",
                )
            } else {
                (
                    plot_svg(&ex, Some(&r.model), &opts),
                    "experimental and model",
                )
            };
            figure(
                h,
                &figure_id(&["variogram", &r.zone, &r.property, dir]),
                svg,
                &format!(
                    "{} {}, {dir} variogram ({what}); lag in m, semivariance in {}.",
                    r.zone,
                    r.property,
                    unit_squared(&r.property)
                ),
            );
        }
        h.push_str("</div>\n");
        for w in &r.warnings {
            let _ = writeln!(h, "<p>{}</p>", escape(w));
        }
    }
}

fn maps(h: &mut String, inp: &ReportInputs<'_>) {
    let g = &inp.study.project.grid;
    h.push_str("<h2 id=\"maps\">Maps on the zone mid-layers</h2>\n<p>Prior mean and standard deviation on the middle stratigraphic layer of each zone, in stepped colours of one perceptually ordered scale (dark: low, light: high; readable in greyscale). White: the zone is absent. Triangles: where each well crosses the zone.</p>\n");
    if inp.maps.is_empty() {
        h.push_str("<p>No map: no zone has a layer inside the grid.</p>\n");
    }
    let none = Vec::new();
    for pair in inp.maps.chunks(2) {
        h.push_str("<div class=\"grid2\">\n");
        for m in pair {
            let title = format!(
                "{} {} {}, layer {}",
                m.zone, m.property, m.statistic, m.layer
            );
            let wells = inp.map_wells.get(&m.zone_index).unwrap_or(&none);
            let svg = figures::map_svg(g, m, wells, &title);
            figure(
                h,
                &figure_id(&["map", &m.zone, &m.property, &m.statistic]),
                svg,
                &format!(
                    "{} on layer {} of zone {} (easting and northing in m).",
                    m.unit_label(),
                    m.layer,
                    m.zone
                ),
            );
        }
        h.push_str("</div>\n");
    }
}

fn section(h: &mut String, inp: &ReportInputs<'_>) {
    h.push_str("<h2 id=\"section\">Inline section</h2>\n");
    match inp.section {
        Some(s) => {
            let svg = figures::section_svg(
                &inp.study.project.grid,
                s,
                &format!("Vp0 mean, inline {}", s.inline),
            );
            figure(
                h,
                &figure_id(&["section", "inline", &s.inline.to_string()]),
                svg,
                &format!(
                    "Vp0 prior mean (m/s) along inline {} with the horizons (lines); white: outside every zone.",
                    s.inline
                ),
            );
        }
        None => h.push_str("<p>No section.</p>\n"),
    }
}

fn crossplots(h: &mut String, regions: &[CrossPlotRegion]) {
    h.push_str("<h2 id=\"crossplots\">Bank cross-plots</h2>\n<p>Each region's sample bank (prior mean at the drawn cell plus a residual from the region's pool) against the region's own blocked well samples: the bank should cover the wells' joint spread of Vp0, epsilon and delta.</p>\n");
    if regions.is_empty() {
        h.push_str("<p>No bank region.</p>\n");
    }
    for r in regions {
        if r.bank.is_empty() && r.wells.is_empty() {
            let _ = writeln!(
                h,
                "<p>{}: the bank is empty and the region has no well sample.</p>",
                escape(&r.region)
            );
            continue;
        }
        let svg = figures::crossplot_svg(r);
        figure(
            h,
            &figure_id(&["crossplot", &r.region]),
            svg,
            &format!(
                "{}: Vp0 (m/s), epsilon and delta (dimensionless).",
                r.region
            ),
        );
    }
}

fn validation_table(h: &mut String, v: ValidationContent<'_>) {
    let _ = writeln!(
        h,
        "<h2 id=\"validation\">Validation scores</h2>\n<p>Each well in turn is held out: the horizons are re-tied without its tops, the prior is rebuilt from the other wells (variograms {}), and predicted at its blocked samples. Baselines use the same remaining wells. RMSE, bias, MAE, CRPS and W1 are in m/s for Vp0 and dimensionless for epsilon and delta; z is the error over the predictive sd; coverage is the fraction of held-out values inside the central interval. Skill = 1 - RMSE(prior) / RMSE(baseline): <strong>rows marked &#8220;prior worse&#8221; (shaded) are baselines the prior loses to.</strong></p>",
        if v.refit_variograms {
            "refitted without the well"
        } else {
            "as configured for the full data"
        }
    );
    let header = "<tr><th class=\"t\">method</th><th>samples</th><th>bias</th><th>RMSE</th><th>MAE</th><th>z mean</th><th>z variance</th><th>80% coverage</th><th>95% coverage</th><th>CRPS</th><th>W1</th><th>skill</th><th class=\"t\">verdict</th></tr>\n";
    let row_html = |h: &mut String, r: &ScoreRow, first_col: &str| {
        let digits = if r.property == "vp0" { 1 } else { 4 };
        let loses = r.skill.is_some_and(|s| s < 0.0);
        let class = if r.method == METHOD_PRIOR {
            " class=\"prior\""
        } else if loses {
            " class=\"loses\""
        } else {
            ""
        };
        let verdict = match r.skill {
            None => "",
            Some(s) if s < 0.0 => "prior worse",
            Some(_) => "prior better",
        };
        let _ = writeln!(
            h,
            "<tr{class}><td class=\"t\">{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td class=\"verdict\">{verdict}</td></tr>",
            escape(first_col),
            r.samples,
            f(r.bias, digits),
            f(r.rmse, digits),
            f(r.mae, digits),
            f(r.z_mean, 2),
            f(r.z_var, 2),
            f(r.coverage80, 2),
            f(r.coverage95, 2),
            f(r.crps, digits),
            f(r.w1, digits),
            r.skill.map_or_else(String::new, |s| f(s, 3)),
        );
    };
    // pooled rows, one table per zone and property
    let mut keys: Vec<(String, String)> = Vec::new();
    for r in v.rows.iter().filter(|r| r.well == "all") {
        let k = (r.zone.clone(), r.property.clone());
        if !keys.contains(&k) {
            keys.push(k);
        }
    }
    let losses = v
        .rows
        .iter()
        .filter(|r| r.well == "all" && r.skill.is_some_and(|s| s < 0.0))
        .count();
    let _ = writeln!(
        h,
        "<p>Pooled over all held-out wells: the prior does worse than a baseline in {losses} of {} comparisons.</p>",
        v.rows
            .iter()
            .filter(|r| r.well == "all" && r.skill.is_some())
            .count()
    );
    for (zone, prop) in &keys {
        let _ = writeln!(
            h,
            "<h3>{} {} (all wells)</h3>\n<table class=\"scores\" id=\"{}\">\n{header}",
            escape(zone),
            escape(prop),
            escape(&figure_id(&["scores", zone, prop]))
        );
        for r in v
            .rows
            .iter()
            .filter(|r| r.well == "all" && &r.zone == zone && &r.property == prop)
        {
            row_html(h, r, &r.method);
        }
        h.push_str("</table>\n");
    }
    h.push_str("<details>\n<summary>Scores per held-out well</summary>\n<table>\n");
    h.push_str(&header.replace(
        "<th class=\"t\">method</th>",
        "<th class=\"t\">well, zone, property, method</th>",
    ));
    for r in v.rows.iter().filter(|r| r.well != "all") {
        let label = format!("{} {} {} {}", r.well, r.zone, r.property, r.method);
        row_html(h, r, &label);
    }
    h.push_str("</table>\n</details>\n");
}

fn tracks(h: &mut String, v: ValidationContent<'_>) {
    h.push_str("<h2 id=\"tracks\">Log tracks of the held-out wells</h2>\n<p>Blocked well values (dark line), the leave-one-out prior mean (teal line) and its +/- 1 sd band (light teal), against depth TVDSS (m). Grey lines: the zone boundaries along the well in the frame tied without its tops.</p>\n");
    for p in v.predictions {
        if p.samples.is_empty() {
            let _ = writeln!(h, "<p>{}: no blocked sample to draw.</p>", escape(&p.well));
            continue;
        }
        let svg = figures::log_tracks_svg(p);
        figure(
            h,
            &figure_id(&["tracks", &p.well]),
            svg,
            &format!(
                "{}: Vp0 (m/s), epsilon and delta (dimensionless) against depth TVDSS (m).",
                p.well
            ),
        );
    }
}

fn files(h: &mut String, inp: &ReportInputs<'_>) {
    h.push_str("<h2 id=\"files\">Files and warnings</h2>\n");
    if !inp.files.is_empty() {
        h.push_str("<table>\n<tr><th class=\"t\">kind</th><th class=\"t\">file</th></tr>\n");
        for (k, p) in inp.files {
            let _ = writeln!(
                h,
                "<tr><td class=\"t\">{}</td><td class=\"t\">{}</td></tr>",
                escape(k),
                escape(p)
            );
        }
        h.push_str("</table>\n");
    }
    if inp.warnings.is_empty() {
        h.push_str("<p>No warnings.</p>\n");
    } else {
        let _ = writeln!(h, "<p>{} warnings:</p>\n<ul>", inp.warnings.len());
        for w in inp.warnings {
            let _ = writeln!(h, "<li>{}</li>", escape(w));
        }
        h.push_str("</ul>\n");
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_figure_that_cannot_be_drawn_becomes_a_note() {
        let mut h = String::new();
        figure(
            &mut h,
            "map-a-vp0-mean",
            Err(crate::Error::inconsistent("no value to draw")),
            "Vp0 <mean>",
        );
        assert!(!h.contains("<figure"));
        assert!(h.contains("Not drawn: Vp0 &lt;mean&gt;") && h.contains("no value to draw"));
        let mut h = String::new();
        figure(
            &mut h,
            "f",
            Ok("<?xml version=\"1.0\"?><svg></svg>".into()),
            "c",
        );
        assert!(h.starts_with("<figure class=\"fig\" id=\"f\">\n<svg></svg>"));
    }

    #[test]
    fn figure_ids_and_escaping() {
        assert_eq!(figure_id(&["map", "Zone A", "vp0"]), "map-zone_a-vp0");
        assert_eq!(
            escape("a<b & \"c\" 'd'"),
            "a&lt;b &amp; &quot;c&quot; &#39;d&#39;"
        );
    }
}
