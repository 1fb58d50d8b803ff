//! Stratigraphic order and zone thickness.
//!
//! Two planes that cross along a known line are gridded from picks, put in order,
//! and the clipped node count, the largest overlap and its node are compared with
//! values computed in closed form from the node formula of the design overview
//! (a linear function of the node indices: lattice points on one side of a line,
//! extreme values at the grid corners, mean at the grid centre).

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use stratiprior::frame::gridding::grid_picks;
use stratiprior::frame::horizons::{enforce_order, thickness_stats};
use stratiprior::ingest::picks::read_picks;
use stratiprior::SurveyGrid;

fn grid() -> SurveyGrid {
    SurveyGrid {
        x0: 300_000.0,
        y0: 4_100_000.0,
        azimuth: 30.0,
        inline_spacing: 25.0,
        xline_spacing: 20.0,
        inline_first: 10,
        inline_count: 41,
        xline_first: 100,
        xline_count: 61,
        z0: 0.0,
        dz: 4.0,
        z_count: 50,
    }
}

// Top: z = 1500 + gx (x - x0) + gy (y - y0); base = top + c0 + cx (x - x0) + cy (y - y0).
const TOP: (f64, f64, f64) = (1500.0, 0.03, -0.02);
const C0: f64 = 10.3;
const CX: f64 = 0.004;
const CY: f64 = -0.03;

fn top_z(g: &SurveyGrid, x: f64, y: f64) -> f64 {
    TOP.0 + TOP.1 * (x - g.x0) + TOP.2 * (y - g.y0)
}
fn base_z(g: &SurveyGrid, x: f64, y: f64) -> f64 {
    top_z(g, x, y) + C0 + CX * (x - g.x0) + CY * (y - g.y0)
}

#[test]
fn crossing_planes_are_clipped_and_reported() {
    let g = grid();
    let dir = tempfile::tempdir().unwrap();
    let mut rng = ChaCha8Rng::seed_from_u64(3);
    let mut files = Vec::new();
    for (name, f) in [
        ("top", top_z as fn(&SurveyGrid, f64, f64) -> f64),
        ("base", base_z),
    ] {
        let mut text = String::new();
        for _ in 0..200 {
            let (x, y) = g.node_xy(rng.gen_range(-2.0..42.0), rng.gen_range(-2.0..62.0));
            text.push_str(&format!("{x},{y},{}\n", f(&g, x, y)));
        }
        let p = dir.path().join(format!("{name}.csv"));
        std::fs::write(&p, text).unwrap();
        files.push((name, p));
    }
    let mut surfaces = Vec::new();
    for (name, p) in &files {
        let picks = read_picks(p, false).unwrap();
        surfaces.push(grid_picks(name, &picks, &g).unwrap().0);
    }

    // closed form: thickness D(i, j) = C0 + alpha j + beta i with
    // x - x0 = j dxl sin az + i dil cos az, y - y0 = j dxl cos az - i dil sin az
    let (s, c) = g.azimuth.to_radians().sin_cos();
    let alpha = g.xline_spacing * (CX * s + CY * c);
    let beta = g.inline_spacing * (CX * c - CY * s);
    assert!(alpha != 0.0);
    let (ni, nj) = (g.inline_count, g.xline_count);
    // nodes with D < 0 on inline i: j < j* (alpha > 0) or j > j* (alpha < 0),
    // j* = -(C0 + beta i) / alpha
    let mut expected_count = 0usize;
    for i in 0..ni {
        let jstar = -(C0 + beta * i as f64) / alpha;
        let below = (jstar.ceil().max(0.0) as usize).min(nj); // j = 0 .. ceil(j*) - 1
        expected_count += if alpha > 0.0 {
            below
        } else {
            nj - (((jstar.floor() + 1.0).max(0.0)) as usize).min(nj)
        };
    }
    // the test is well posed: no node within 1 mm of the crossing line
    for i in 0..ni {
        for j in 0..nj {
            assert!((C0 + alpha * j as f64 + beta * i as f64).abs() > 1e-3);
        }
    }
    // largest overlap -D at one of the corners
    let corners = [(0, 0), (0, nj - 1), (ni - 1, 0), (ni - 1, nj - 1)];
    let (ci, cj) = *corners
        .iter()
        .max_by(|a, b| {
            let da = -(C0 + alpha * a.1 as f64 + beta * a.0 as f64);
            let db = -(C0 + alpha * b.1 as f64 + beta * b.0 as f64);
            da.partial_cmp(&db).unwrap()
        })
        .unwrap();
    let expected_overlap = -(C0 + alpha * cj as f64 + beta * ci as f64);
    // thickness before clipping: min/max at corners, mean at the centre (linear function)
    let ds: Vec<f64> = corners
        .iter()
        .map(|&(i, j)| C0 + alpha * j as f64 + beta * i as f64)
        .collect();
    let (tmin, tmean, tmax) = thickness_stats(&surfaces[0], &surfaces[1]);
    let dmin = ds.iter().cloned().fold(f64::INFINITY, f64::min);
    let dmax = ds.iter().cloned().fold(f64::NEG_INFINITY, f64::max);
    let dmean = C0 + alpha * (nj - 1) as f64 / 2.0 + beta * (ni - 1) as f64 / 2.0;
    assert!(
        (tmin - dmin).abs() < 1e-6 && (tmax - dmax).abs() < 1e-6 && (tmean - dmean).abs() < 1e-6
    );

    let top_before = surfaces[0].z.clone();
    let base_before = surfaces[1].z.clone();
    let reports = enforce_order(&mut surfaces, &g);
    assert_eq!(reports.len(), 1);
    let r = &reports[0];
    eprintln!("crossing: {} nodes clipped (expected {expected_count}), max overlap {} m (expected {expected_overlap})", r.nodes_clipped, r.max_overlap);
    assert_eq!((r.upper.as_str(), r.lower.as_str()), ("top", "base"));
    assert!(
        expected_count > 100 && expected_count < ni * nj / 2,
        "{expected_count}"
    );
    assert_eq!(r.nodes_clipped, expected_count);
    assert!(
        (r.max_overlap - expected_overlap).abs() < 1e-6,
        "{} vs {expected_overlap}",
        r.max_overlap
    );
    let at = r.max_overlap_at.clone().unwrap();
    assert_eq!(
        (at.inline, at.xline),
        (g.inline_number(ci), g.xline_number(cj))
    );
    let (x, y) = g.node_xy(ci as f64, cj as f64);
    assert!((at.x - x).abs() < 1e-6 && (at.y - y).abs() < 1e-6);
    // the rule: the shallower is untouched, the deeper is set to it where it was above
    assert_eq!(surfaces[0].z, top_before);
    for i in 0..ni {
        for j in 0..nj {
            let d = C0 + alpha * j as f64 + beta * i as f64;
            if d < 0.0 {
                assert_eq!(surfaces[1].z[(i, j)], top_before[(i, j)]);
            } else {
                assert_eq!(surfaces[1].z[(i, j)], base_before[(i, j)]);
            }
        }
    }
    let (tmin, _, tmax) = thickness_stats(&surfaces[0], &surfaces[1]);
    assert_eq!(tmin, 0.0);
    assert!((tmax - dmax).abs() < 1e-6);
    // a second pass finds nothing
    let again = enforce_order(&mut surfaces, &g);
    assert_eq!(again[0].nodes_clipped, 0);
    assert!(again[0].max_overlap_at.is_none());
}

#[test]
fn clipping_cascades_down_a_stack() {
    // three flat horizons: the middle one dips into the top, the bottom crosses both
    let g = grid();
    let (ni, nj) = (g.inline_count, g.xline_count);
    let mk = |name: &str, f: &dyn Fn(usize, usize) -> f64| {
        stratiprior::frame::gridding::Surface::new(
            name,
            ndarray::Array2::from_shape_fn((ni, nj), |(i, j)| f(i, j)),
        )
    };
    let mut s = vec![
        mk("A", &|_, _| 1000.0),
        mk("B", &|_, j| if j < 10 { 990.0 } else { 1010.0 }),
        mk("C", &|i, _| if i < 5 { 980.0 } else { 1020.0 }),
    ];
    let r = enforce_order(&mut s, &g);
    assert_eq!(r[0].nodes_clipped, ni * 10);
    assert!((r[0].max_overlap - 10.0).abs() < 1e-12);
    // C against the clipped B (1000 for j < 10, 1010 beyond): overlap 20 or 30 m
    assert_eq!(r[1].nodes_clipped, 5 * nj);
    assert!((r[1].max_overlap - 30.0).abs() < 1e-12);
    let at = r[1].max_overlap_at.clone().unwrap();
    assert!(at.xline >= g.xline_number(10) && at.inline < g.inline_number(5));
    for k in 1..3 {
        assert!(s[k]
            .z
            .iter()
            .zip(s[k - 1].z.iter())
            .all(|(lo, up)| lo >= up));
    }
    let (mn, mean, mx) = thickness_stats(&s[0], &s[2]);
    assert_eq!((mn, mx), (0.0, 20.0));
    // A to C: 0 (i < 5, j < 10), 10 (i < 5, j >= 10), 20 (i >= 5)
    let expect_mean =
        (5.0 * (nj - 10) as f64 * 10.0 + (ni - 5) as f64 * nj as f64 * 20.0) / (ni * nj) as f64;
    assert!((mean - expect_mean).abs() < 1e-9);
}
