//! Gridding picks onto the survey grid.
//!
//! References used:
//! * Linear precision of Sibson's natural-neighbour interpolant: picks on a plane
//!   give the plane (Sibson 1980, Math. Proc. Camb. Phil. Soc. 87; Sibson 1981).
//! * An independent brute-force implementation of Sibson's definition (area of the
//!   inserted point's Voronoi cell stolen from each site, Sibson 1981) by half-plane
//!   clipping, written here without the triangulation library.
//! * The extrapolation formula documented in `grid_picks` (nearest hull point plus
//!   least-squares trend gradient, Davis 2002 ch. 5), recomputed here in world
//!   coordinates with an independent convex hull (Andrew's monotone chain).

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use std::path::PathBuf;
use stratiprior::frame::gridding::grid_picks;
use stratiprior::ingest::picks::{read_picks, Picks};
use stratiprior::{Error, SurveyGrid};

fn rotated_grid() -> SurveyGrid {
    SurveyGrid {
        x0: 512_345.0,
        y0: 6_712_345.0,
        azimuth: 30.0,
        inline_spacing: 25.0,
        xline_spacing: 12.5,
        inline_first: 1001,
        inline_count: 61,
        xline_first: 2001,
        xline_count: 101,
        z0: 0.0,
        dz: 5.0,
        z_count: 100,
    }
}

/// Write `points` as a picks file (shortest round-trip decimal form) and read it back.
fn picks_file(dir: &tempfile::TempDir, name: &str, points: &[[f64; 3]]) -> Picks {
    let mut text = String::from("x y z\n");
    for p in points {
        text.push_str(&format!("{} {} {}\n", p[0], p[1], p[2]));
    }
    let path: PathBuf = dir.path().join(name);
    std::fs::write(&path, text).unwrap();
    read_picks(&path, false).unwrap()
}

/// Random world points whose fractional grid indices lie in the given ranges.
fn random_points(
    grid: &SurveyGrid,
    rng: &mut ChaCha8Rng,
    n: usize,
    i: (f64, f64),
    j: (f64, f64),
) -> Vec<(f64, f64)> {
    (0..n)
        .map(|_| grid.node_xy(rng.gen_range(i.0..i.1), rng.gen_range(j.0..j.1)))
        .collect()
}

#[test]
fn planar_surface_is_reproduced_everywhere_on_a_rotated_grid() {
    // Sibson's interpolant has linear precision; the documented extrapolation
    // (hull value + trend gradient) is exact for a plane too.
    let grid = rotated_grid();
    let plane = |x: f64, y: f64| 2100.0 + 0.045 * (x - 512_000.0) - 0.031 * (y - 6_712_000.0);
    let mut rng = ChaCha8Rng::seed_from_u64(20240611);
    let pts: Vec<[f64; 3]> = random_points(&grid, &mut rng, 300, (12.0, 45.0), (20.0, 80.0))
        .into_iter()
        .map(|(x, y)| [x, y, plane(x, y)])
        .collect();
    let dir = tempfile::tempdir().unwrap();
    let picks = picks_file(&dir, "plane.xyz", &pts);
    let (surf, rep) = grid_picks("Plane", &picks, &grid).unwrap();
    assert_eq!(surf.z.dim(), (61, 101));
    assert_eq!(rep.pick_count, 300);
    assert_eq!(rep.nodes_total, 61 * 101);
    assert_eq!(
        rep.nodes_inside_hull + rep.nodes_extrapolated,
        rep.nodes_total
    );
    // the picks cover only the middle: most nodes are extrapolated
    assert!(rep.nodes_extrapolated > rep.nodes_total / 2, "{rep:?}");
    assert!(rep.nodes_inside_hull > 1000, "{rep:?}");
    let mut max_err = 0.0f64;
    for i in 0..61 {
        for j in 0..101 {
            let (x, y) = grid.node_xy(i as f64, j as f64);
            max_err = max_err.max((surf.z[(i, j)] - plane(x, y)).abs());
        }
    }
    eprintln!(
        "planar: max error {max_err:e} m over {} nodes ({} extrapolated)",
        rep.nodes_total, rep.nodes_extrapolated
    );
    assert!(max_err < 1e-6, "max error {max_err} m");
    // the trend gradient in world coordinates is the plane's
    assert!(
        (rep.trend_gradient[0] - 0.045).abs() < 1e-9,
        "{:?}",
        rep.trend_gradient
    );
    assert!(
        (rep.trend_gradient[1] + 0.031).abs() < 1e-9,
        "{:?}",
        rep.trend_gradient
    );
    // bilinear evaluation between nodes reproduces a plane as well
    for _ in 0..200 {
        let (x, y) = grid.node_xy(rng.gen_range(0.0..60.0), rng.gen_range(0.0..100.0));
        let z = surf.z_at_xy(&grid, x, y).unwrap();
        assert!((z - plane(x, y)).abs() < 1e-6);
    }
    // outside the grid there is no value
    let (x, y) = grid.node_xy(-1.0, 50.0);
    assert!(surf.z_at_xy(&grid, x, y).is_none());
    let (x, y) = grid.node_xy(30.0, 100.5);
    assert!(surf.z_at_xy(&grid, x, y).is_none());
    assert!(rep.max_extrapolation_distance > 300.0, "{rep:?}");
}

/// Convex polygon clipped by the half-plane of points closer to `a` than to `b`
/// (Sutherland-Hodgman with one edge).
fn clip(poly: &[(f64, f64)], a: (f64, f64), b: (f64, f64)) -> Vec<(f64, f64)> {
    // f(p) = (p - m) . (b - a) <= 0, m the midpoint
    let m = ((a.0 + b.0) / 2.0, (a.1 + b.1) / 2.0);
    let n = (b.0 - a.0, b.1 - a.1);
    let f = |p: (f64, f64)| (p.0 - m.0) * n.0 + (p.1 - m.1) * n.1;
    let mut out = Vec::new();
    for k in 0..poly.len() {
        let p = poly[k];
        let q = poly[(k + 1) % poly.len()];
        let (fp, fq) = (f(p), f(q));
        if fp <= 0.0 {
            out.push(p);
        }
        if (fp < 0.0 && fq > 0.0) || (fp > 0.0 && fq < 0.0) {
            let t = fp / (fp - fq);
            out.push((p.0 + t * (q.0 - p.0), p.1 + t * (q.1 - p.1)));
        }
    }
    out
}

fn area(poly: &[(f64, f64)]) -> f64 {
    let mut s = 0.0;
    for k in 0..poly.len() {
        let p = poly[k];
        let q = poly[(k + 1) % poly.len()];
        s += p.0 * q.1 - q.0 * p.1;
    }
    0.5 * s.abs()
}

/// Sibson interpolation by definition: returns None when the inserted cell reaches
/// the bounding box (the query is outside the hull).
fn sibson_brute_force(sites: &[(f64, f64, f64)], q: (f64, f64), bbox: f64) -> Option<f64> {
    let boxp = vec![(-bbox, -bbox), (bbox, -bbox), (bbox, bbox), (-bbox, bbox)];
    let mut cell = boxp.clone();
    for s in sites {
        cell = clip(&cell, q, (s.0, s.1));
    }
    if cell
        .iter()
        .any(|p| p.0.abs() >= 0.999 * bbox || p.1.abs() >= 0.999 * bbox)
    {
        return None;
    }
    let total = area(&cell);
    let mut z = 0.0;
    for (k, s) in sites.iter().enumerate() {
        let mut part = cell.clone();
        for (l, o) in sites.iter().enumerate() {
            if l != k && !part.is_empty() {
                part = clip(&part, (s.0, s.1), (o.0, o.1));
            }
        }
        if part.len() >= 3 {
            z += area(&part) / total * s.2;
        }
    }
    Some(z)
}

#[test]
fn natural_neighbour_values_match_a_brute_force_sibson_reference() {
    let mut grid = rotated_grid();
    grid.inline_count = 17;
    grid.xline_count = 21;
    grid.inline_spacing = 60.0;
    grid.xline_spacing = 50.0;
    let mut rng = ChaCha8Rng::seed_from_u64(77);
    let surface = |x: f64, y: f64| {
        let (u, v) = (x - 512_345.0, y - 6_712_345.0);
        1800.0 + 40.0 * (u / 230.0).sin() * (v / 310.0).cos() + 1e-5 * u * v
    };
    let pts: Vec<[f64; 3]> = random_points(&grid, &mut rng, 35, (1.0, 15.0), (1.0, 19.0))
        .into_iter()
        .map(|(x, y)| [x, y, surface(x, y)])
        .collect();
    let dir = tempfile::tempdir().unwrap();
    let picks = picks_file(&dir, "wavy.xyz", &pts);
    let (surf, rep) = grid_picks("Wavy", &picks, &grid).unwrap();
    // reference in world coordinates relative to the origin (a different frame from
    // the library's grid-aligned one; Sibson coordinates do not depend on it)
    let sites: Vec<(f64, f64, f64)> = pts
        .iter()
        .map(|p| (p[0] - grid.x0, p[1] - grid.y0, p[2]))
        .collect();
    let mut compared = 0;
    let mut max_diff = 0.0f64;
    for i in 0..grid.inline_count {
        for j in 0..grid.xline_count {
            let (x, y) = grid.node_xy(i as f64, j as f64);
            if let Some(zref) = sibson_brute_force(&sites, (x - grid.x0, y - grid.y0), 1e5) {
                compared += 1;
                max_diff = max_diff.max((surf.z[(i, j)] - zref).abs());
            }
        }
    }
    assert_eq!(compared, rep.nodes_inside_hull, "{rep:?}");
    assert!(compared > 150, "{compared}");
    eprintln!("Sibson vs brute force: {compared} nodes, max difference {max_diff:e} m");
    assert!(
        max_diff < 1e-6,
        "max difference from the reference {max_diff} m"
    );
}

/// Andrew's monotone chain convex hull, counter-clockwise.
fn hull(mut p: Vec<(f64, f64, f64)>) -> Vec<(f64, f64, f64)> {
    p.sort_by(|a, b| a.partial_cmp(b).unwrap());
    let cross = |o: (f64, f64, f64), a: (f64, f64, f64), b: (f64, f64, f64)| {
        (a.0 - o.0) * (b.1 - o.1) - (a.1 - o.1) * (b.0 - o.0)
    };
    let mut lower: Vec<(f64, f64, f64)> = Vec::new();
    for &q in &p {
        while lower.len() >= 2 && cross(lower[lower.len() - 2], lower[lower.len() - 1], q) <= 0.0 {
            lower.pop();
        }
        lower.push(q);
    }
    let mut upper: Vec<(f64, f64, f64)> = Vec::new();
    for &q in p.iter().rev() {
        while upper.len() >= 2 && cross(upper[upper.len() - 2], upper[upper.len() - 1], q) <= 0.0 {
            upper.pop();
        }
        upper.push(q);
    }
    lower.pop();
    upper.pop();
    lower.extend(upper);
    lower
}

fn inside_hull(h: &[(f64, f64, f64)], x: f64, y: f64) -> bool {
    (0..h.len()).all(|k| {
        let a = h[k];
        let b = h[(k + 1) % h.len()];
        (b.0 - a.0) * (y - a.1) - (b.1 - a.1) * (x - a.0) >= 0.0
    })
}

#[test]
fn extrapolation_follows_the_documented_formula() {
    let grid = rotated_grid();
    let mut rng = ChaCha8Rng::seed_from_u64(5);
    let surface = |x: f64, y: f64| {
        let (u, v) = (x - 512_345.0, y - 6_712_345.0);
        1900.0 + 25.0 * (u / 400.0).sin() + 0.02 * v
    };
    let pts: Vec<[f64; 3]> = random_points(&grid, &mut rng, 60, (20.0, 40.0), (30.0, 70.0))
        .into_iter()
        .map(|(x, y)| [x, y, surface(x, y)])
        .collect();
    let dir = tempfile::tempdir().unwrap();
    let picks = picks_file(&dir, "ext.xyz", &pts);
    let (surf, rep) = grid_picks("Ext", &picks, &grid).unwrap();
    // least-squares plane z = a + gx x + gy y (normal equations, centred), world frame
    let n = pts.len() as f64;
    let (mx, my, mz) = pts.iter().fold((0.0, 0.0, 0.0), |s, p| {
        (s.0 + p[0] / n, s.1 + p[1] / n, s.2 + p[2] / n)
    });
    let (mut sxx, mut sxy, mut syy, mut sxz, mut syz) = (0.0, 0.0, 0.0, 0.0, 0.0);
    for p in &pts {
        let (dx, dy, dz) = (p[0] - mx, p[1] - my, p[2] - mz);
        sxx += dx * dx;
        sxy += dx * dy;
        syy += dy * dy;
        sxz += dx * dz;
        syz += dy * dz;
    }
    let det = sxx * syy - sxy * sxy;
    let gx = (sxz * syy - syz * sxy) / det;
    let gy = (syz * sxx - sxz * sxy) / det;
    assert!((rep.trend_gradient[0] - gx).abs() < 1e-9 && (rep.trend_gradient[1] - gy).abs() < 1e-9);
    let h = hull(pts.iter().map(|p| (p[0], p[1], p[2])).collect());
    let mut checked = 0;
    let mut max_diff = 0.0f64;
    for i in 0..grid.inline_count {
        for j in 0..grid.xline_count {
            let (x, y) = grid.node_xy(i as f64, j as f64);
            if inside_hull(&h, x, y) {
                continue;
            }
            // nearest point on the hull boundary, with the depth linear along the edge
            let mut best = (f64::INFINITY, 0.0, 0.0, 0.0);
            for k in 0..h.len() {
                let a = h[k];
                let b = h[(k + 1) % h.len()];
                let (dx, dy) = (b.0 - a.0, b.1 - a.1);
                let s = (((x - a.0) * dx + (y - a.1) * dy) / (dx * dx + dy * dy)).clamp(0.0, 1.0);
                let (qx, qy) = (a.0 + s * dx, a.1 + s * dy);
                let d = (x - qx).hypot(y - qy);
                if d < best.0 {
                    best = (d, qx, qy, a.2 + s * (b.2 - a.2));
                }
            }
            let expected = best.3 + gx * (x - best.1) + gy * (y - best.2);
            max_diff = max_diff.max((surf.z[(i, j)] - expected).abs());
            checked += 1;
        }
    }
    assert_eq!(checked, rep.nodes_extrapolated);
    assert!(max_diff < 1e-6, "max difference {max_diff} m");
}

#[test]
fn a_hole_in_the_picks_is_filled_and_reported() {
    let grid = rotated_grid();
    let plane = |x: f64, y: f64| 1650.0 - 0.02 * (x - 512_000.0) + 0.035 * (y - 6_712_000.0);
    let mut rng = ChaCha8Rng::seed_from_u64(99);
    let (cx, cy) = grid.node_xy(30.0, 50.0);
    let radius = 300.0;
    // one pick at a random place in every 25 m x 25 m cell (so no gap but the disc
    // reaches 2 spacings), except inside a disc of radius 300 m
    let mut cells = Vec::new();
    for i in 0..60 {
        for j in 0..50 {
            cells.push(grid.node_xy(
                i as f64 + rng.gen_range(0.0..1.0),
                2.0 * j as f64 + rng.gen_range(0.0..2.0),
            ));
        }
    }
    let pts: Vec<[f64; 3]> = cells
        .into_iter()
        .filter(|&(x, y)| (x - cx).hypot(y - cy) > radius)
        .map(|(x, y)| [x, y, plane(x, y)])
        .collect();
    let dir = tempfile::tempdir().unwrap();
    let picks = picks_file(&dir, "holed.xyz", &pts);
    let (surf, rep) = grid_picks("Holed", &picks, &grid).unwrap();

    // independent brute force: nearest-pick distance of every node inside the hull
    let h = hull(pts.iter().map(|p| (p[0], p[1], p[2])).collect());
    let threshold = 2.0 * 25.0;
    let (mut inside, mut holes, mut gap) = (0usize, 0usize, 0.0f64);
    for i in 0..grid.inline_count {
        for j in 0..grid.xline_count {
            let (x, y) = grid.node_xy(i as f64, j as f64);
            if !inside_hull(&h, x, y) {
                continue;
            }
            inside += 1;
            let d = pts
                .iter()
                .map(|p| (p[0] - x).hypot(p[1] - y))
                .fold(f64::INFINITY, f64::min);
            if d > threshold {
                holes += 1;
            }
            gap = gap.max(d);
            // filled with the plane (linear precision)
            assert!((surf.z[(i, j)] - plane(x, y)).abs() < 1e-6);
        }
    }
    assert_eq!(rep.hole_threshold, threshold);
    assert_eq!(rep.nodes_inside_hull, inside);
    assert_eq!(rep.hole_nodes, holes, "{rep:?}");
    assert!(
        (rep.largest_gap - gap).abs() < 1e-9,
        "{} vs {gap}",
        rep.largest_gap
    );
    // one hole, around the centre of the removed disc: a node there is at least
    // (radius - half a cell diagonal) from any pick
    assert_eq!(rep.hole_count, 1, "{rep:?}");
    assert!(rep.hole_nodes > 100 && rep.largest_hole_nodes == rep.hole_nodes);
    assert!(rep.largest_gap > radius - 15.0, "{rep:?}");
    let at = rep.largest_gap_at.clone().unwrap();
    assert!((at.x - cx).hypot(at.y - cy) < 100.0, "{at:?}");
    assert!(
        rep.covered_fraction < 1.0 && rep.covered_fraction > 0.8,
        "{rep:?}"
    );
    assert!(rep.hull_fraction > 0.8 && rep.hull_fraction <= 1.0);
    // the report serialises
    let json = serde_json::to_string(&rep).unwrap();
    assert!(json.contains("\"hole_nodes\""));
}

#[test]
fn too_few_or_collinear_picks_are_refused_naming_the_file() {
    let grid = rotated_grid();
    let dir = tempfile::tempdir().unwrap();
    for (name, pts) in [
        (
            "two.xyz",
            vec![
                [512_400.0, 6_712_400.0, 1000.0],
                [512_500.0, 6_712_450.0, 1010.0],
            ],
        ),
        (
            "line.xyz",
            vec![
                [512_400.0, 6_712_400.0, 1000.0],
                [512_500.0, 6_712_450.0, 1010.0],
                [512_600.0, 6_712_500.0, 1020.0],
                [512_700.0, 6_712_550.0, 1030.0],
            ],
        ),
    ] {
        let picks = picks_file(&dir, name, &pts);
        let e = grid_picks("Bad", &picks, &grid).unwrap_err();
        let shown = e.to_string();
        assert!(matches!(e, Error::Input { .. }), "{e:?}");
        assert!(
            shown.contains(name) && shown.contains("at least 3 picks"),
            "{shown}"
        );
    }
}

#[test]
fn picks_closer_than_a_millimetre_are_merged() {
    let grid = rotated_grid();
    let (x, y) = grid.node_xy(10.0, 10.0);
    let pts = vec![
        [x, y, 1000.0],
        [x + 0.0004, y, 1002.0],
        [x + 500.0, y, 1000.0],
        [x, y + 500.0, 1000.0],
    ];
    let dir = tempfile::tempdir().unwrap();
    let picks = picks_file(&dir, "close.xyz", &pts);
    let (surf, rep) = grid_picks("Close", &picks, &grid).unwrap();
    assert_eq!(rep.pick_count, 3);
    assert_eq!(rep.merged_close_picks, 1);
    // the merged pick carries the mean depth; node (10, 10) sits on it
    assert!(
        (surf.z[(10, 10)] - 1001.0).abs() < 1e-9,
        "{}",
        surf.z[(10, 10)]
    );
}
