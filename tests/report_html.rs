//! The QC report is real: `build` and `validate` on the demo write a
//! `report.html` that is well-formed, self-contained (no script, nothing
//! fetched), holds every expected figure with a non-empty SVG, marks exactly
//! the baselines the prior loses to, carries the caution, and renders in a
//! headless browser (Debian's chromium, installed by `.ci/run`; the render check
//! is skipped where no browser is installed unless `STRATIPRIOR_REQUIRE_BROWSER=1`).

mod report_support;

use report_support::{browser, check_report, id, render_check};
use std::fs;
use std::path::{Path, PathBuf};
use std::process::Command;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn run(args: &[&str]) {
    let o = Command::new(env!("CARGO_BIN_EXE_stratiprior"))
        .args(args)
        .output()
        .unwrap();
    assert!(
        o.status.success(),
        "{args:?}: {}",
        String::from_utf8_lossy(&o.stderr)
    );
}

fn json(path: &Path) -> serde_json::Value {
    serde_json::from_slice(&fs::read(path).unwrap()).unwrap()
}

const PROPS: [&str; 3] = ["vp0", "epsilon", "delta"];

#[test]
fn build_report_has_every_figure_and_renders() {
    let d = tempfile::tempdir().unwrap();
    let out = d.path().join("out");
    run(&[
        "build",
        root().join("demo.toml").to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--quiet",
    ]);
    let m = json(&out.join("manifest.json"));
    // the manifest lists the report
    assert!(m["files"]
        .as_array()
        .unwrap()
        .iter()
        .any(|f| f["kind"] == "report" && f["path"] == "report.html"));
    let zones: Vec<String> = m["zones"]
        .as_array()
        .unwrap()
        .iter()
        .map(|z| z["name"].as_str().unwrap().to_string())
        .collect();
    assert_eq!(zones.len(), 3);
    let mut expected = Vec::new();
    for z in &zones {
        for p in PROPS {
            for dir in ["vertical", "horizontal"] {
                expected.push(id(&["variogram", z, p, dir]));
            }
            for stat in ["mean", "sd"] {
                expected.push(id(&["map", z, p, stat]));
            }
        }
    }
    // the section is the middle inline: first + count / 2
    let inl = m["grid"]["inlines"].as_array().unwrap();
    let middle = inl[0].as_i64().unwrap() + inl[1].as_i64().unwrap() / 2;
    expected.push(id(&["section", "inline", &middle.to_string()]));
    let banks = m["banks"].as_array().unwrap();
    assert!(!banks.is_empty());
    for b in banks {
        let region = format!(
            "zone {} facies {}",
            b["zone"].as_str().unwrap(),
            b["facies"].as_str().unwrap()
        );
        expected.push(id(&["crossplot", &region]));
    }
    let html = fs::read_to_string(out.join("report.html")).unwrap();
    let facts = check_report(&html, &expected, 20).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(
        facts.figures.len(),
        expected.len(),
        "unexpected figures: {:?}",
        facts
            .figures
            .keys()
            .filter(|k| !expected.contains(k))
            .collect::<Vec<_>>()
    );
    // the study summary names every well and horizon, and the tie table is there
    let wells = fs::read_to_string(root().join("demo_wells/wells.csv")).unwrap();
    for line in wells.lines().skip(1).filter(|l| !l.trim().is_empty()) {
        let name = line.split(',').next().unwrap().trim();
        assert!(facts.text.contains(name), "well {name} not in the report");
    }
    assert!(facts.text.contains("Horizon ties") && facts.text.contains("mistie (m)"));
    // maps hold a raster (many polygons), not an empty frame
    for z in &zones {
        let n = facts.figures[&id(&["map", z, "vp0", "mean"])];
        assert!(n > 100, "map of {z} has {n} elements");
    }
    // a size kept in check for a survey of any size (raster blocking, point thinning)
    assert!(html.len() < 12_000_000, "report is {} bytes", html.len());

    if let Some(b) = browser() {
        render_check(&b, &out.join("report.html"), facts.figures.len())
            .unwrap_or_else(|e| panic!("{e}"));
    }
}

#[test]
fn validate_report_has_tracks_and_marks_every_loss() {
    let d = tempfile::tempdir().unwrap();
    let out = d.path().join("out");
    run(&[
        "validate",
        root().join("demo.toml").to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--quiet",
    ]);
    let v = json(&out.join("validation.json"));
    let wells: Vec<&str> = v["wells"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w.as_str().unwrap())
        .collect();
    let mut expected: Vec<String> = wells.iter().map(|w| id(&["tracks", w])).collect();
    let rows = v["rows"].as_array().unwrap();
    let mut zones: Vec<&str> = rows.iter().map(|r| r["zone"].as_str().unwrap()).collect();
    zones.dedup();
    zones.sort_unstable();
    zones.dedup();
    for z in &zones {
        for p in PROPS {
            expected.push(id(&["variogram", z, p, "vertical"]));
            expected.push(id(&["variogram", z, p, "horizontal"]));
        }
    }
    let html = fs::read_to_string(out.join("report.html")).unwrap();
    let facts = check_report(&html, &expected, 20).unwrap_or_else(|e| panic!("{e}"));
    // one score table per zone and property; the shaded rows are exactly the
    // pooled baselines with negative skill in validation.json
    assert_eq!(facts.score_tables.len(), zones.len() * 3);
    let mut want: Vec<(String, String)> = rows
        .iter()
        .filter(|r| r["well"] == "all" && r["skill"].as_f64().is_some_and(|s| s < 0.0))
        .map(|r| {
            (
                id(&[
                    "scores",
                    r["zone"].as_str().unwrap(),
                    r["property"].as_str().unwrap(),
                ]),
                r["method"].as_str().unwrap().to_string(),
            )
        })
        .collect();
    let mut got = facts.losing_rows.clone();
    want.sort();
    got.sort();
    assert_eq!(got, want);
    assert!(facts.text.contains("prior worse") || want.is_empty());

    if let Some(b) = browser() {
        render_check(&b, &out.join("report.html"), facts.figures.len())
            .unwrap_or_else(|e| panic!("{e}"));
    }
}

/// The checks can fail: a report with a figure removed, an emptied figure, a
/// script or an external image is refused.
#[test]
fn the_report_check_refuses_broken_reports() {
    let svg = |marks: usize| {
        let mut s =
            String::from("<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"100\" height=\"80\">");
        for i in 0..marks {
            s.push_str(&format!(
                "<rect x=\"{i}\" y=\"0\" width=\"1\" height=\"1\"/>"
            ));
        }
        s + "</svg>"
    };
    let page = |figs: &str, extra: &str| {
        format!(
            "<!DOCTYPE html>\n<html xmlns=\"http://www.w3.org/1999/xhtml\"><head><title>t</title></head><body>\
             <div>These priors are estimates; a qualified geoscientist; local regulations; licensed practice.</div>{figs}{extra}</body></html>"
        )
    };
    let fig = |id: &str, marks: usize| {
        format!(
            "<figure class=\"fig\" id=\"{id}\">{}<figcaption>c</figcaption></figure>",
            svg(marks)
        )
    };
    let want = vec!["map-a-vp0-mean".to_string(), "map-b-vp0-mean".to_string()];
    let good = page(
        &(fig("map-a-vp0-mean", 30) + &fig("map-b-vp0-mean", 30)),
        "",
    );
    assert!(check_report(&good, &want, 20).is_ok());
    let missing = page(&fig("map-a-vp0-mean", 30), "");
    assert!(check_report(&missing, &want, 20)
        .unwrap_err()
        .contains("figures missing"));
    let empty = page(&(fig("map-a-vp0-mean", 30) + &fig("map-b-vp0-mean", 0)), "");
    assert!(check_report(&empty, &want, 20)
        .unwrap_err()
        .contains("drawing elements"));
    let script = page(
        &(fig("map-a-vp0-mean", 30) + &fig("map-b-vp0-mean", 30)),
        "<script>alert(1)</script>",
    );
    assert!(check_report(&script, &want, 20)
        .unwrap_err()
        .contains("script"));
    let external = page(
        &(fig("map-a-vp0-mean", 30) + &fig("map-b-vp0-mean", 30)),
        "<p><a href=\"https://example.org/x.png\">x</a></p>",
    );
    assert!(check_report(&external, &want, 20)
        .unwrap_err()
        .contains("outside the file"));
    let unclosed = good.replace("</figcaption></figure>", "</figcaption>");
    assert!(check_report(&unclosed, &want, 20)
        .unwrap_err()
        .contains("not well-formed"));
    let no_caution = good.replace("qualified geoscientist", "someone");
    assert!(check_report(&no_caution, &want, 20)
        .unwrap_err()
        .contains("caution"));
}
