//! The leave-one-well-out frame (`Study::without_well_tops`): the horizons are
//! re-tied without the held-out well's tops, so they no longer honour that
//! well's tops (they move there) while still honouring every other well's.
//! (The demo's tie radius, 1500 m, covers its whole 2.5 x 3.5 km survey, so
//! "unchanged beyond the support" cannot be checked on it; tests/horizons_tie.rs
//! checks the compact support of the tie itself.)

use std::path::PathBuf;
use stratiprior::study::load;

#[test]
fn retie_without_a_well_differs_near_it_and_equals_beyond_the_support() {
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let study = load(&root.join("demo.toml"), false).unwrap();
    let g = &study.project.grid;
    let w = 0;
    let loo = study.without_well_tops(w).unwrap();
    let well = &study.wells[w];
    assert!(!well.tops.is_empty());
    let mut differs_near = 0;
    for t in &well.tops {
        let h = t.horizon;
        let full = &study.horizons[h].surface;
        let without = &loo.horizons[h].surface;
        // the full tie honours the top; the re-tie does not have to
        let zf = full.z_at_xy(g, t.point.x, t.point.y).unwrap();
        assert!((zf - t.point.z).abs() < 1e-6, "{zf} vs {}", t.point.z);
        let zl = without.z_at_xy(g, t.point.x, t.point.y).unwrap();
        if (zl - zf).abs() > 1e-6 {
            differs_near += 1;
        }
        // the other wells' tops are still honoured
        for (k, other) in study.wells.iter().enumerate().filter(|(k, _)| *k != w) {
            for u in other.tops.iter().filter(|u| u.horizon == h) {
                let z = without.z_at_xy(g, u.point.x, u.point.y).unwrap();
                assert!(
                    (z - u.point.z).abs() < 1e-3,
                    "well {k}: {z} vs {}",
                    u.point.z
                );
            }
        }
    }
    assert!(differs_near > 0, "no horizon moved at the held-out well");
}
