//! Checks of a QC report (`report.html`) shared by the report tests: it is
//! well-formed (parsed strictly as XML, so every element is closed), fetches
//! nothing and runs nothing, holds every expected figure with a non-empty SVG
//! and a caption, and carries the caution. And the headless-browser render:
//! Debian's chromium takes a screenshot and dumps the DOM it built.
#![allow(dead_code)]

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::process::Command;

const SVG_NS: &str = "http://www.w3.org/2000/svg";
const XHTML_NS: &str = "http://www.w3.org/1999/xhtml";
/// Drawing elements of plotters' SVG output.
const MARKS: [&str; 7] = [
    "polygon", "rect", "circle", "polyline", "path", "line", "text",
];

/// What a checked report holds.
#[derive(Debug)]
pub struct ReportFacts {
    /// Figure id -> number of drawing elements in its SVG.
    pub figures: BTreeMap<String, usize>,
    /// Ids of the score tables.
    pub score_tables: Vec<String>,
    /// Rows of score tables with class `loses`: (table id, method).
    pub losing_rows: Vec<(String, String)>,
    /// All text of the page.
    pub text: String,
}

/// Check the report text; `Err` says what is wrong. `expected` are figure ids
/// that must be present, each with at least `min_marks` drawing elements.
pub fn check_report(
    html: &str,
    expected: &[String],
    min_marks: usize,
) -> Result<ReportFacts, String> {
    let opts = roxmltree::ParsingOptions {
        allow_dtd: true,
        ..Default::default()
    };
    let doc = roxmltree::Document::parse_with_options(html, opts)
        .map_err(|e| format!("not well-formed: {e}"))?;
    let root = doc.root_element();
    if root.tag_name().name() != "html" || root.tag_name().namespace() != Some(XHTML_NS) {
        return Err(format!("root element is {:?}", root.tag_name()));
    }
    let mut figures = BTreeMap::new();
    let mut score_tables = Vec::new();
    let mut losing_rows = Vec::new();
    for n in doc.descendants().filter(|n| n.is_element()) {
        let name = n.tag_name().name();
        if [
            "script",
            "iframe",
            "object",
            "embed",
            "link",
            "img",
            "image",
            "video",
            "audio",
            "use",
            "foreignObject",
        ]
        .contains(&name)
        {
            return Err(format!(
                "element <{name}> is not allowed in a self-contained report"
            ));
        }
        for a in n.attributes() {
            let v = a.value().trim_start().to_ascii_lowercase();
            if v.starts_with("http:")
                || v.starts_with("https:")
                || v.starts_with("//")
                || v.starts_with("javascript:")
                || v.starts_with("data:")
            {
                return Err(format!(
                    "attribute {}={:?} on <{name}> points outside the file",
                    a.name(),
                    a.value()
                ));
            }
            if a.name().starts_with("on") {
                return Err(format!("event handler {} on <{name}>", a.name()));
            }
        }
        if name == "style" {
            let css = n.text().unwrap_or("");
            if css.contains("url(") || css.contains("@import") {
                return Err("the style sheet fetches something".into());
            }
        }
        if name == "figure" {
            let id = n.attribute("id").ok_or("a figure without id")?.to_string();
            let svgs: Vec<_> = n
                .children()
                .filter(|c| c.is_element() && c.tag_name().name() == "svg")
                .collect();
            if svgs.len() != 1 || svgs[0].tag_name().namespace() != Some(SVG_NS) {
                return Err(format!(
                    "figure {id}: {} SVG children in the SVG namespace",
                    svgs.len()
                ));
            }
            let svg = svgs[0];
            for dim in ["width", "height"] {
                let v: f64 = svg
                    .attribute(dim)
                    .and_then(|v| v.trim_end_matches("px").parse().ok())
                    .ok_or(format!("figure {id}: svg {dim} missing"))?;
                if v <= 0.0 {
                    return Err(format!("figure {id}: svg {dim} {v}"));
                }
            }
            let marks = svg
                .descendants()
                .filter(|d| d.is_element() && MARKS.contains(&d.tag_name().name()))
                .count();
            let caption = n
                .children()
                .find(|c| c.tag_name().name() == "figcaption")
                .and_then(|c| c.text())
                .unwrap_or("");
            if caption.trim().is_empty() {
                return Err(format!("figure {id}: no caption"));
            }
            if figures.insert(id.clone(), marks).is_some() {
                return Err(format!("figure id {id} twice"));
            }
        }
        if name == "table" && n.attribute("class") == Some("scores") {
            let id = n.attribute("id").unwrap_or("").to_string();
            for tr in n.children().filter(|c| c.tag_name().name() == "tr") {
                if tr.attribute("class") == Some("loses") {
                    let method = tr
                        .children()
                        .find(|c| c.tag_name().name() == "td")
                        .and_then(|c| c.text())
                        .unwrap_or("")
                        .to_string();
                    losing_rows.push((id.clone(), method));
                }
            }
            score_tables.push(id);
        }
    }
    let missing: Vec<&String> = expected
        .iter()
        .filter(|e| !figures.contains_key(*e))
        .collect();
    if !missing.is_empty() {
        return Err(format!(
            "figures missing: {missing:?} (present: {:?})",
            figures.keys().collect::<Vec<_>>()
        ));
    }
    for e in expected {
        if figures[e] < min_marks {
            return Err(format!(
                "figure {e} has only {} drawing elements",
                figures[e]
            ));
        }
    }
    let text: String = doc
        .descendants()
        .filter(|n| n.is_text())
        .filter_map(|n| n.text())
        .collect::<Vec<_>>()
        .join(" ");
    for phrase in [
        "estimates",
        "qualified geoscientist",
        "local regulations",
        "licensed",
    ] {
        if !text.contains(phrase) {
            return Err(format!("the caution is missing ({phrase:?} not found)"));
        }
    }
    Ok(ReportFacts {
        figures,
        score_tables,
        losing_rows,
        text,
    })
}

/// The figure id as `stratiprior::report::figure_id` makes it (restated here so
/// that a change of the scheme breaks the test).
pub fn id(parts: &[&str]) -> String {
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

/// The browser to render with: `STRATIPRIOR_CHROMIUM`, else /usr/bin/chromium.
/// `None` when it is missing; a failure when `STRATIPRIOR_REQUIRE_BROWSER=1`.
pub fn browser() -> Option<PathBuf> {
    let require = std::env::var("STRATIPRIOR_REQUIRE_BROWSER").is_ok_and(|v| v == "1");
    let path = std::env::var("STRATIPRIOR_CHROMIUM")
        .map(PathBuf::from)
        .unwrap_or_else(|_| PathBuf::from("/usr/bin/chromium"));
    if path.is_file() {
        Some(path)
    } else {
        assert!(
            !require,
            "STRATIPRIOR_REQUIRE_BROWSER=1 but no browser at {}",
            path.display()
        );
        eprintln!(
            "no browser at {}: the render check is skipped",
            path.display()
        );
        None
    }
}

fn chromium(browser: &Path, args: &[&str], page: &Path) -> std::process::Output {
    let profile = tempfile::tempdir().unwrap();
    let mut cmd = Command::new(browser);
    cmd.args([
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--no-first-run",
        "--disable-extensions",
        "--hide-scrollbars",
        "--enable-logging=stderr",
        "--v=0",
    ])
    .arg(format!("--user-data-dir={}", profile.path().display()))
    .args(args)
    .arg(format!("file://{}", page.display()));
    let o = cmd.output().unwrap();
    drop(profile);
    o
}

/// Render `page` headless: the DOM the browser built must hold `figures`
/// figures with an SVG each, its console must show no error about the page,
/// and the screenshot must be a real picture (not blank).
pub fn render_check(browser: &Path, page: &Path, figures: usize) -> Result<(), String> {
    let dom = chromium(browser, &["--dump-dom"], page);
    if !dom.status.success() {
        return Err(format!(
            "--dump-dom failed: {}",
            String::from_utf8_lossy(&dom.stderr)
        ));
    }
    let html = String::from_utf8_lossy(&dom.stdout);
    let built = html.matches("<figure class=\"fig\"").count();
    let svgs = html.matches("<svg").count();
    if built != figures || svgs < figures {
        return Err(format!(
            "the browser built {built} figures and {svgs} svg elements, {figures} expected"
        ));
    }
    let stderr = String::from_utf8_lossy(&dom.stderr);
    for line in stderr.lines() {
        let l = line.to_ascii_lowercase();
        if (l.contains("console") && l.contains("error"))
            || l.contains("uncaught")
            || l.contains("failed to load resource")
            || l.contains("net::err_")
        {
            return Err(format!("browser error: {line}"));
        }
    }
    let shot_dir = tempfile::tempdir().unwrap();
    let shot = shot_dir.path().join("shot.png");
    let o = chromium(
        browser,
        &[
            &format!("--screenshot={}", shot.display()),
            "--window-size=1200,2400",
        ],
        page,
    );
    if !o.status.success() || !shot.is_file() {
        return Err(format!(
            "--screenshot failed: {}",
            String::from_utf8_lossy(&o.stderr)
        ));
    }
    let decoder = png::Decoder::new(std::fs::File::open(&shot).unwrap());
    let mut reader = decoder
        .read_info()
        .map_err(|e| format!("screenshot: {e}"))?;
    let mut buf = vec![0u8; reader.output_buffer_size()];
    let info = reader
        .next_frame(&mut buf)
        .map_err(|e| format!("screenshot: {e}"))?;
    if info.width != 1200 || info.height != 2400 {
        return Err(format!("screenshot is {} x {}", info.width, info.height));
    }
    let bpp = info.line_size / info.width as usize;
    let px = &buf[..info.buffer_size()];
    let mut dark = 0usize;
    let mut colours = std::collections::BTreeSet::new();
    for p in px.chunks_exact(bpp) {
        if p[0] < 200 || p[1] < 200 || p[2] < 200 {
            dark += 1;
        }
        colours.insert((p[0] >> 3, p[1] >> 3, p[2] >> 3));
    }
    let n = px.len() / bpp;
    if dark * 50 < n || colours.len() < 30 {
        return Err(format!(
            "screenshot looks blank: {dark} of {n} pixels drawn, {} colours",
            colours.len()
        ));
    }
    Ok(())
}
