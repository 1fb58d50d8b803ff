//! SVG figures and JSON output.
//!
//! The SVG is parsed by an independent XML parser (roxmltree, which rejects
//! documents that are not well-formed XML 1.0); the points and the model curve are
//! checked against the data and against the model evaluated here, through the
//! linear data-to-pixel map that the points themselves define. JSON is read back
//! with serde_json.

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use stratiprior::geostat::variogram::{
    fit_model, plot_svg, to_json, vertical_variogram, write_json, ExperimentalVariogram, FitSpec,
    LagBin, LagBins, LagDirection, PlotOptions, Structure, StructureKind, VariogramModel,
    VariogramSummary, WellSeries,
};

fn model() -> VariogramModel {
    VariogramModel {
        nugget: 0.1,
        structures: vec![Structure {
            kind: StructureKind::Spherical,
            sill: 0.9,
            range_major: 1500.0,
            range_minor: 800.0,
            azimuth: 30.0,
            range_vertical: 12.0,
        }],
    }
}

fn series(m: &VariogramModel, az: f64, seed: u64) -> ExperimentalVariogram {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let (s, c) = az.to_radians().sin_cos();
    let bins = (0..20)
        .map(|k| {
            let h = (k as f64 + 0.5) * 100.0;
            LagBin {
                h_lower: k as f64 * 100.0,
                h_upper: (k + 1) as f64 * 100.0,
                h_mean: h,
                gamma: m.gamma([h * s, h * c, 0.0]) * (1.0 + rng.gen_range(-0.05..0.05)),
                pairs: if k == 2 {
                    0
                } else if k == 4 {
                    12
                } else {
                    40 + 13 * k as u64
                },
            }
        })
        .collect();
    ExperimentalVariogram {
        direction: LagDirection::Horizontal {
            azimuth: az,
            tolerance: 22.5,
        },
        bins,
        min_pairs: 30,
        warnings: vec![],
    }
}

fn attr(n: &roxmltree::Node, a: &str) -> f64 {
    n.attribute(a).unwrap().parse().unwrap()
}

/// Least-squares line `pixel = a + b value`.
fn fit_line(pairs: &[(f64, f64)]) -> (f64, f64) {
    let n = pairs.len() as f64;
    let (sx, sy) = pairs.iter().fold((0.0, 0.0), |a, p| (a.0 + p.0, a.1 + p.1));
    let (mx, my) = (sx / n, sy / n);
    let sxy: f64 = pairs.iter().map(|p| (p.0 - mx) * (p.1 - my)).sum();
    let sxx: f64 = pairs.iter().map(|p| (p.0 - mx).powi(2)).sum();
    let b = sxy / sxx;
    (my - b * mx, b)
}

#[test]
fn svg_is_well_formed_and_shows_points_and_model() {
    let m = model();
    let evs = vec![series(&m, 30.0, 1), series(&m, 120.0, 2)];
    let opts = PlotOptions {
        title: "Vp0 <Reservoir> & Seal".into(),
        value_unit: "(m/s)^2".into(),
        ..Default::default()
    };
    let svg = plot_svg(&evs, Some(&m), &opts).unwrap();
    let doc = roxmltree::Document::parse(&svg).expect("well-formed SVG");
    let root = doc.root_element();
    assert_eq!(root.tag_name().name(), "svg");

    let texts: Vec<String> = doc
        .descendants()
        .filter(|n| n.has_tag_name("text"))
        .map(|n| n.text().unwrap_or("").trim().to_string())
        .collect();
    for want in [
        "lag (m)",
        "semivariance ((m/s)^2)",
        "Vp0 <Reservoir> & Seal",
    ] {
        assert!(texts.iter().any(|t| t == want), "missing text {want:?}");
    }
    // One pair-count label per non-empty class.
    for ev in &evs {
        for b in ev.non_empty() {
            assert!(
                texts.iter().any(|t| *t == b.pairs.to_string()),
                "label {}",
                b.pairs
            );
        }
    }

    // Circles: one per non-empty class plus one legend marker per series; classes
    // below min_pairs are hollow.
    let circles: Vec<roxmltree::Node> = doc
        .descendants()
        .filter(|n| n.has_tag_name("circle"))
        .collect();
    let non_empty: usize = evs.iter().map(|e| e.non_empty().count()).sum();
    assert_eq!(circles.len(), non_empty + evs.len());
    let hollow = circles
        .iter()
        .filter(|c| c.attribute("fill") == Some("none"))
        .count();
    assert_eq!(hollow, 2);

    // Pixel map from the data circles of both series (drawn in order of the bins).
    let mut xs = Vec::new();
    let mut ys = Vec::new();
    // The legend is drawn last, so the first circles are the data, series by series.
    let data_circles = &circles[..non_empty];
    let mut it = data_circles.iter();
    for ev in &evs {
        for b in ev.non_empty() {
            let c = it.next().unwrap();
            xs.push((b.h_mean, attr(c, "cx")));
            ys.push((b.gamma, attr(c, "cy")));
        }
    }
    let (ax, bx) = fit_line(&xs);
    let (ay, by) = fit_line(&ys);
    assert!(bx > 0.0 && by < 0.0);
    for &(h, px) in &xs {
        assert!(
            (ax + bx * h - px).abs() <= 1.0,
            "points not on a linear lag axis"
        );
    }
    for &(g, py) in &ys {
        assert!(
            (ay + by * g - py).abs() <= 1.0,
            "points not on a linear semivariance axis"
        );
    }

    // Model curves: the long polylines, one per series, follow the model along
    // each series' azimuth within a pixel.
    let curves: Vec<Vec<(f64, f64)>> = doc
        .descendants()
        .filter(|n| n.has_tag_name("polyline"))
        .map(|n| {
            n.attribute("points")
                .unwrap()
                .split_whitespace()
                .map(|p| {
                    let (x, y) = p.split_once(',').unwrap();
                    (x.parse().unwrap(), y.parse().unwrap())
                })
                .collect::<Vec<(f64, f64)>>()
        })
        .filter(|pts: &Vec<(f64, f64)>| pts.len() > 100)
        .collect();
    assert_eq!(curves.len(), 2);
    for (curve, az) in curves.iter().zip([30.0f64, 120.0]) {
        let (s, c) = az.to_radians().sin_cos();
        let mut checked = 0;
        for &(px, py) in curve {
            let h = (px - ax) / bx;
            if h < 1.0 {
                continue; // the nugget jump at the origin
            }
            // Pixel columns are rounded: compare with the model over +/- 0.5 px in lag.
            let g = |h: f64| ay + by * m.gamma([h * s, h * c, 0.0]);
            let dh = 0.6 / bx;
            let (lo, hi) = (g(h - dh).min(g(h + dh)), g(h - dh).max(g(h + dh)));
            assert!(
                py >= lo - 1.0 && py <= hi + 1.0,
                "azimuth {az}: curve at h={h} off the model"
            );
            checked += 1;
        }
        assert!(checked > 100);
    }
    // Total sill line.
    assert!(texts.iter().any(|t| t.starts_with("total sill 1.0000")));

    // Nothing to draw is an error, not a panic.
    let empty = ExperimentalVariogram {
        direction: LagDirection::Vertical,
        bins: vec![],
        min_pairs: 30,
        warnings: vec![],
    };
    assert!(plot_svg(&[empty], None, &opts).is_err());
}

#[test]
fn json_output_of_points_and_models() {
    let mut rng = ChaCha8Rng::seed_from_u64(8);
    let wells: Vec<WellSeries> = (0..3)
        .map(|w| {
            let s: Vec<f64> = (0..200).map(|i| i as f64 * 0.5).collect();
            let mut z = 0.0;
            let values = s
                .iter()
                .map(|_| {
                    z = 0.9 * z + rng.gen_range(-1.0..1.0);
                    2800.0 + 50.0 * z
                })
                .collect();
            WellSeries {
                well: format!("Osprey-{w}"),
                s,
                values,
            }
        })
        .collect();
    let ev = vertical_variogram(&wells, &LagBins::uniform(1.0, 15).unwrap(), 30).unwrap();
    let mut spec = FitSpec::new(vec![StructureKind::Exponential]);
    spec.fixed.structures = vec![stratiprior::geostat::variogram::FixedStructure {
        range_major: Some(1000.0),
        range_minor: Some(500.0),
        azimuth: Some(45.0),
        ..Default::default()
    }];
    let fit = fit_model(std::slice::from_ref(&ev), &spec).unwrap();
    let summary = VariogramSummary {
        property: "vp0".into(),
        value_unit: "(m/s)^2".into(),
        experimental: vec![ev.clone()],
        model: Some(fit.model.clone()),
        fit: Some(fit.clone()),
    };
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("variogram.json");
    write_json(&path, &summary).unwrap();
    let v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&path).unwrap()).unwrap();
    let b = &v["experimental"][0]["bins"];
    assert_eq!(v["experimental"][0]["direction"]["kind"], "vertical");
    assert_eq!(b.as_array().unwrap().len(), 15);
    for (k, bin) in ev.bins.iter().enumerate() {
        assert_eq!(b[k]["pairs"].as_u64().unwrap(), bin.pairs);
        // serde_json's default float parser may be off by an ulp.
        assert!((b[k]["gamma"].as_f64().unwrap() - bin.gamma).abs() <= 1e-15 * bin.gamma);
        assert!((b[k]["h_mean"].as_f64().unwrap() - bin.h_mean).abs() <= 1e-15 * bin.h_mean);
    }
    assert_eq!(v["model"]["structures"][0]["kind"], "exponential");
    assert_eq!(v["model"]["structures"][0]["range_major"], 1000.0);
    assert_eq!(v["fit"]["fixed"][0], "structures[0].range_major");
    assert!(v["fit"]["weighted_residual"].as_f64().unwrap() >= 0.0);
    // The model reads back from JSON.
    let back: VariogramModel = serde_json::from_value(v["model"].clone()).unwrap();
    assert_eq!(back.structures[0].range_minor, 500.0);
    assert!((back.total_sill() - fit.model.total_sill()).abs() <= 1e-14 * back.total_sill());
    assert!(to_json(&fit).unwrap().contains("\"stages\""));
}
