//! Tying a gridded horizon to well tops.
//!
//! References used:
//! * Wendland's C2 function phi(r) = (1 - r)^4 (4 r + 1) (Wendland 1995, Adv. Comput.
//!   Math. 4, 389-396), written out again here, and the interpolation condition of
//!   radial basis function interpolation (Hardy 1971): the one-well correction is
//!   recomputed independently from that formula.
//! * Bilinear interpolation on a rectangle (Press et al., Numerical Recipes, 3rd ed.,
//!   section 3.6), implemented again here to check the residuals.

use ndarray::Array2;
use stratiprior::frame::gridding::Surface;
use stratiprior::frame::tie::{tie_surface, TiePoint};
use stratiprior::{Error, SurveyGrid};

fn grid() -> SurveyGrid {
    SurveyGrid {
        x0: 431_000.0,
        y0: 5_820_000.0,
        azimuth: 30.0,
        inline_spacing: 25.0,
        xline_spacing: 12.5,
        inline_first: 500,
        inline_count: 81,
        xline_first: 1200,
        xline_count: 101,
        z0: 0.0,
        dz: 4.0,
        z_count: 50,
    }
}

fn base_surface(g: &SurveyGrid) -> Surface {
    let z = Array2::from_shape_fn((g.inline_count, g.xline_count), |(i, j)| {
        2000.0 + 10.0 * (i as f64 / 7.0).sin() + 5.0 * (j as f64 / 9.0).cos()
    });
    Surface::new("Top Reservoir", z)
}

/// Bilinear interpolation written out from the textbook formula.
fn bilinear(g: &SurveyGrid, z: &Array2<f64>, x: f64, y: f64) -> f64 {
    let (fi, fj) = g.xy_to_ij(x, y);
    let i0 = (fi.floor() as usize).min(g.inline_count - 2);
    let j0 = (fj.floor() as usize).min(g.xline_count - 2);
    let (t, s) = (fi - i0 as f64, fj - j0 as f64);
    (1.0 - t) * (1.0 - s) * z[(i0, j0)]
        + (1.0 - t) * s * z[(i0, j0 + 1)]
        + t * (1.0 - s) * z[(i0 + 1, j0)]
        + t * s * z[(i0 + 1, j0 + 1)]
}

fn wendland(r: f64) -> f64 {
    if r < 1.0 {
        (1.0 - r).powi(4) * (4.0 * r + 1.0)
    } else {
        0.0
    }
}

fn top(g: &SurveyGrid, s: &Surface, well: &str, i: f64, j: f64, mistie: f64) -> TiePoint {
    let (x, y) = g.node_xy(i, j);
    TiePoint {
        well: well.to_string(),
        x,
        y,
        z: bilinear(g, &s.z, x, y) + mistie,
    }
}

#[test]
fn every_top_is_honoured_and_the_correction_fades() {
    let g = grid();
    let mut s = base_surface(&g);
    let before = s.z.clone();
    // smooth mistie field, so that the two close wells agree with each other
    let m = |i: f64, j: f64| 4.0 + 3.0 * (i / 30.0).sin() - 2.0 * (j / 40.0).cos();
    let spots = [
        ("Alder-1", 20.3, 30.7),
        ("Alder-2", 22.7, 30.7), // 60 m from Alder-1
        ("Birch-1", 60.0, 80.0), // on a node
        ("Cedar-1", 45.5, 10.0), // on a crossline
        ("Cedar-2", 46.1, 12.3), // 18 m from Cedar-1
        ("Dogwood-1", 5.2, 90.9),
        ("Elm-1", 70.1, 20.4),
    ];
    let tops: Vec<TiePoint> = spots
        .iter()
        .map(|&(w, i, j)| top(&g, &s, w, i, j, m(i, j)))
        .collect();
    let radius = 500.0;
    let rep = tie_surface(&mut s, &g, &tops, radius).unwrap();
    assert_eq!(rep.wells.len(), tops.len());
    for (t, w) in tops.iter().zip(&rep.wells) {
        let after = bilinear(&g, &s.z, t.x, t.y);
        assert!(
            (after - t.z).abs() < 1e-6,
            "{}: residual {}",
            t.well,
            t.z - after
        );
        assert!(w.residual.abs() < 1e-6);
        let expect = t.z - bilinear(&g, &before, t.x, t.y);
        assert!((w.mistie - expect).abs() < 1e-9);
        assert_eq!(w.well, t.well);
    }
    eprintln!(
        "tie: max |residual| {:e} m, levels {:?}",
        rep.max_abs_residual, rep.levels
    );
    assert!(rep.max_abs_residual < 1e-6);
    // close wells need more than one level
    assert!(rep.levels.len() >= 2, "{:?}", rep.levels);
    assert_eq!(rep.levels.last().unwrap().tops, tops.len());
    // fade: nodes farther than R + one cell diagonal from every top are unchanged
    let support = radius + 25.0f64.hypot(12.5);
    assert!((rep.support - support).abs() < 1e-9);
    let (mut far, mut near_changed, mut near) = (0, 0, 0);
    for i in 0..g.inline_count {
        for j in 0..g.xline_count {
            let (x, y) = g.node_xy(i as f64, j as f64);
            let d = tops
                .iter()
                .map(|t| (t.x - x).hypot(t.y - y))
                .fold(f64::INFINITY, f64::min);
            if d > support {
                far += 1;
                assert_eq!(
                    s.z[(i, j)],
                    before[(i, j)],
                    "node ({i}, {j}) {d} m from the tops changed"
                );
            } else if d < radius / 2.0 {
                near += 1;
                if s.z[(i, j)] != before[(i, j)] {
                    near_changed += 1;
                }
            }
        }
    }
    assert!(far > 300, "{far}");
    assert_eq!(near_changed, near);
    // consistent misties: no overshoot beyond the largest mistie
    assert!(
        rep.max_abs_correction <= 1.05 * rep.max_abs_mistie,
        "{rep:?}"
    );
    assert!(serde_json::to_string(&rep).unwrap().contains("Alder-2"));
}

#[test]
fn one_well_gives_the_wendland_bump() {
    let g = grid();
    let mut s = base_surface(&g);
    let before = s.z.clone();
    let (fi, fj, d, radius) = (40.37, 55.81, -7.5, 400.0);
    let t = top(&g, &s, "Fir-1", fi, fj, d);
    let rep = tie_surface(&mut s, &g, std::slice::from_ref(&t), radius).unwrap();
    assert_eq!(rep.levels.len(), 1);
    // independent: c(n) = lambda sum_a b_a phi(|x_n - x_a| / R) with
    // lambda = d / sum_a sum_b b_a b_b phi(|x_a - x_b| / R), a, b the stencil nodes
    let (i0, j0) = (fi.floor() as usize, fj.floor() as usize);
    let (tt, ss) = (fi - i0 as f64, fj - j0 as f64);
    let stencil = [
        (i0, j0, (1.0 - tt) * (1.0 - ss)),
        (i0, j0 + 1, (1.0 - tt) * ss),
        (i0 + 1, j0, tt * (1.0 - ss)),
        (i0 + 1, j0 + 1, tt * ss),
    ];
    let pos = |i: usize, j: usize| g.node_xy(i as f64, j as f64);
    let mut denom = 0.0;
    for &(ia, ja, ba) in &stencil {
        for &(ib, jb, bb) in &stencil {
            let (pa, pb) = (pos(ia, ja), pos(ib, jb));
            denom += ba * bb * wendland((pa.0 - pb.0).hypot(pa.1 - pb.1) / radius);
        }
    }
    let lambda = d / denom;
    let mut max_diff = 0.0f64;
    for i in 0..g.inline_count {
        for j in 0..g.xline_count {
            let p = pos(i, j);
            let expect: f64 = stencil
                .iter()
                .map(|&(ia, ja, b)| {
                    let q = pos(ia, ja);
                    lambda * b * wendland((p.0 - q.0).hypot(p.1 - q.1) / radius)
                })
                .sum();
            max_diff = max_diff.max((s.z[(i, j)] - before[(i, j)] - expect).abs());
        }
    }
    assert!(max_diff < 1e-9, "{max_diff}");
    assert!((bilinear(&g, &s.z, t.x, t.y) - t.z).abs() < 1e-9);
    // a bump: the correction has the sign of the mistie and is largest next to the well
    assert!(s.z.iter().zip(before.iter()).all(|(a, b)| a - b <= 1e-12));
}

fn inconsistent(e: Error) -> String {
    match e {
        Error::Inconsistent(m) => m,
        other => panic!("expected an inconsistency error, got {other:?}"),
    }
}

#[test]
fn refused_ties_name_the_wells() {
    let g = grid();
    let s0 = base_surface(&g);

    // outside the grid
    let mut s = s0.clone();
    let tops = vec![top(&g, &s, "Gum-1", 10.0, 10.0, 1.0), {
        let (x, y) = g.node_xy(-3.0, 50.0);
        TiePoint {
            well: "Outer-1".into(),
            x,
            y,
            z: 2000.0,
        }
    }];
    let m = inconsistent(tie_surface(&mut s, &g, &tops, 300.0).unwrap_err());
    assert!(
        m.contains("Outer-1") && m.contains("outside the survey grid"),
        "{m}"
    );
    assert_eq!(s.z, s0.z, "a refused tie leaves the surface alone");

    // same position, different depths
    let a = top(&g, &s, "Hazel-1", 30.4, 40.4, 2.0);
    let mut b = a.clone();
    b.well = "Hazel-1 ST1".into();
    b.z += 1.5;
    let m = inconsistent(tie_surface(&mut s, &g, &[a.clone(), b.clone()], 300.0).unwrap_err());
    assert!(
        m.contains("Hazel-1") && m.contains("Hazel-1 ST1") && m.contains("same position"),
        "{m}"
    );

    // same position, same depth: one constraint, both honoured
    b.z = a.z;
    let rep = tie_surface(&mut s, &g, &[a.clone(), b], 300.0).unwrap();
    assert_eq!(rep.notes.len(), 1);
    assert!(rep.wells.iter().all(|w| w.residual.abs() < 1e-9));

    // two wells 3 m apart that disagree by 1 m: exact honouring would overshoot
    let mut s = s0.clone();
    let tops = vec![
        top(&g, &s, "Ivy-1", 50.3, 50.5, 1.0),
        top(&g, &s, "Ivy-2", 50.3 + 3.0 / 25.0, 50.5, 0.0),
    ];
    let m = inconsistent(tie_surface(&mut s, &g, &tops, 1000.0).unwrap_err());
    eprintln!("{m}");
    assert!(
        m.contains("Ivy-1") && m.contains("Ivy-2") && m.contains("times the largest mistie"),
        "{m}"
    );

    // three tops on a line inside one cell with a kink: a bilinear cell is linear
    // along that line, so no node values can honour them
    let tops = vec![
        top(&g, &s, "Juniper-1", 10.5, 20.2, 0.0),
        top(&g, &s, "Juniper-2", 10.5, 20.5, 1.0),
        top(&g, &s, "Juniper-3", 10.5, 20.8, 0.0),
    ];
    let m = inconsistent(tie_surface(&mut s, &g, &tops, 1000.0).unwrap_err());
    eprintln!("{m}");
    assert!(
        m.contains("Juniper-1") && m.contains("Juniper-2") && m.contains("Juniper-3"),
        "{m}"
    );

    // radius must be positive
    let m = inconsistent(tie_surface(&mut s, &g, &[a], 0.0).unwrap_err());
    assert!(m.contains("radius"), "{m}");

    // no tops: nothing changes
    let rep = tie_surface(&mut s, &g, &[], 500.0).unwrap();
    assert_eq!(rep.nodes_changed, 0);
    assert_eq!(s.z, s0.z);
}
