//! The demo generator: determinism, the committed demo equals a fresh
//! generation, size, the project and well inputs load with the crate's
//! readers, and the geological invariants the demo promises.

mod demo_support;

use demo_support::{
    committed_files, files_under, fresh, read_npy_f32, read_picks, read_simple_las, repo,
};
use std::collections::BTreeMap;
use std::path::Path;
use stratiprior::demo::{generate, DemoOptions, DEFAULT_SEED};
use stratiprior::ingest::trajectory::Trajectory;
use stratiprior::ingest::wells::{read_survey, read_tops, read_well_table, WellPath};
use stratiprior::project::Project;

#[test]
fn two_runs_are_byte_identical() {
    let (a, _) = fresh();
    let b = tempfile::tempdir().unwrap();
    generate(&DemoOptions::field(b.path().to_path_buf(), DEFAULT_SEED)).unwrap();
    let fa: Vec<String> = ["demo_wells", "demo_horizons", "demo_volumes", "demo_truth"]
        .iter()
        .flat_map(|s| files_under(a.path(), s))
        .collect();
    let fb: Vec<String> = ["demo_wells", "demo_horizons", "demo_volumes", "demo_truth"]
        .iter()
        .flat_map(|s| files_under(b.path(), s))
        .collect();
    assert_eq!(fa, fb);
    assert!(fa.len() > 20, "{fa:?}");
    for f in fa.iter().chain(std::iter::once(&"demo.toml".to_string())) {
        let x = std::fs::read(a.path().join(f)).unwrap();
        let y = std::fs::read(b.path().join(f)).unwrap();
        assert!(x == y, "{f} differs between two runs with the same seed");
    }
    // a different seed gives a different basin
    let c = tempfile::tempdir().unwrap();
    generate(&DemoOptions::field(
        c.path().to_path_buf(),
        DEFAULT_SEED + 1,
    ))
    .unwrap();
    let p = "demo_wells/MRW-1.las";
    assert_ne!(
        std::fs::read(a.path().join(p)).unwrap(),
        std::fs::read(c.path().join(p)).unwrap()
    );
}

#[test]
fn committed_demo_equals_a_fresh_generation() {
    let (dir, _) = fresh();
    if std::env::var("STRATIPRIOR_REGENERATE_DEMO").as_deref() == Ok("1") {
        // "bless" mode: replace the committed demo by the fresh generation
        for f in committed_files(&repo()) {
            std::fs::remove_file(repo().join(f)).unwrap();
        }
        for f in committed_files(dir.path()) {
            let to = repo().join(&f);
            std::fs::create_dir_all(to.parent().unwrap()).unwrap();
            std::fs::copy(dir.path().join(&f), to).unwrap();
        }
    }
    let committed = committed_files(&repo());
    let generated = committed_files(dir.path());
    assert_eq!(
        committed, generated,
        "the committed demo files differ from a fresh generation's file list; \
         regenerate it: STRATIPRIOR_REGENERATE_DEMO=1 cargo test --test demo_generate committed"
    );
    for f in &committed {
        let a = std::fs::read(repo().join(f)).unwrap();
        let b = std::fs::read(dir.path().join(f)).unwrap();
        assert!(
            a == b,
            "committed {f} differs from a fresh generation (seed {DEFAULT_SEED}); regenerate it: STRATIPRIOR_REGENERATE_DEMO=1 cargo test --test demo_generate committed"
        );
    }
}

#[test]
fn committed_demo_is_under_10_mb_and_volumes_have_the_segy_size() {
    let (dir, report) = fresh();
    let total: u64 = committed_files(dir.path())
        .iter()
        .map(|f| std::fs::metadata(dir.path().join(f)).unwrap().len())
        .sum();
    assert_eq!(total, report.committed_bytes);
    assert!(total < 10_000_000, "committed demo is {total} bytes");
    // SEG-Y rev 1 layout (SEG Technical Standards Committee 2002): 3200-byte
    // textual and 400-byte binary file headers, then per trace a 240-byte header
    // and 4 bytes per IEEE float32 sample.
    let p = Project::load(&dir.path().join("demo.toml")).unwrap();
    let g = &p.grid;
    let expect = 3600 + g.trace_count() as u64 * (240 + 4 * g.z_count as u64);
    for v in ["background_vp0.sgy", "facies.sgy"] {
        let n = std::fs::metadata(dir.path().join("demo_volumes").join(v))
            .unwrap()
            .len();
        assert_eq!(n, expect, "{v}");
    }
}

#[test]
fn project_file_and_well_inputs_load_with_the_readers() {
    let (dir, report) = fresh();
    let p = Project::load(&dir.path().join("demo.toml")).unwrap();
    assert_eq!(p.horizons.len(), 4);
    assert_eq!(p.zones.len(), 3);
    let mut layering: Vec<&str> = p.zones.iter().map(|z| z.layering.name()).collect();
    layering.sort();
    assert_eq!(
        layering,
        ["parallel_to_base", "parallel_to_top", "proportional"]
    );
    assert!(p.facies.len() >= 2);
    for v in [&p.volumes.background_vp0, &p.volumes.facies] {
        assert!(v.as_ref().unwrap().path.is_file());
    }
    for h in &p.horizons {
        assert!(h.picks.is_file(), "{}", h.picks.display());
    }
    let table = read_well_table(&p.well_table).unwrap();
    assert_eq!(table.len(), report.wells.len());
    assert!((6..=10).contains(&table.len()));
    let tops = read_tops(p.tops.as_ref().unwrap()).unwrap();
    for w in &table {
        assert!(w.las.is_file());
        assert!(
            p.grid.contains_xy(w.x, w.y),
            "{} outside the survey",
            w.name
        );
        let mine: Vec<_> = tops.iter().filter(|t| t.well == w.name).collect();
        // one top per horizon, named as the project's tops_name, deepening downwards
        assert_eq!(mine.len(), p.horizons.len(), "{}", w.name);
        for (t, h) in mine.iter().zip(&p.horizons) {
            assert_eq!(t.surface, h.tops_name);
        }
        assert!(mine.windows(2).all(|a| a[0].md < a[1].md));
    }
}

fn well_paths(root: &Path) -> (Project, BTreeMap<String, (WellPath, std::path::PathBuf)>) {
    let p = Project::load(&root.join("demo.toml")).unwrap();
    let mut out = BTreeMap::new();
    for w in read_well_table(&p.well_table).unwrap() {
        let trajectory = match &w.survey {
            Some(s) => read_survey(s).unwrap(),
            None => Trajectory::vertical(),
        };
        out.insert(
            w.name.clone(),
            (
                WellPath {
                    x: w.x,
                    y: w.y,
                    datum_elevation: w.datum_elevation,
                    trajectory,
                },
                w.las.clone(),
            ),
        );
    }
    (p, out)
}

/// Measured depths in metres of a LAS file's rows (index unit M or FT; 1 ft = 0.3048 m).
fn md_metres(las: &demo_support::SimpleLas) -> Vec<f64> {
    let f = match las.units[0].to_ascii_uppercase().as_str() {
        "M" => 1.0,
        "FT" | "F" => 0.3048,
        u => panic!("depth unit {u}"),
    };
    las.rows.iter().map(|r| r[0].unwrap() * f).collect()
}

#[test]
fn deviated_wells_logging_gap_and_las_variety() {
    let (dir, _) = fresh();
    let (_, wells) = well_paths(dir.path());
    let mut deviated = 0;
    let (mut j_shape, mut s_shape) = (false, false);
    for (path, _) in wells.values() {
        let t = &path.trajectory;
        if t.max_inclination() > 20.0 {
            deviated += 1;
            let last = t.stations().last().unwrap().inclination;
            j_shape |= last > t.max_inclination() - 1.0;
            s_shape |= last < t.max_inclination() - 10.0;
        }
    }
    assert!(deviated >= 2 && j_shape && s_shape);

    let mut versions = Vec::new();
    let mut feet = 0;
    let mut gap_found = false;
    for (name, (_, las)) in &wells {
        let l = read_simple_las(las);
        versions.push((l.version.clone(), l.wrapped));
        if l.units[0].eq_ignore_ascii_case("FT") {
            feet += 1;
        }
        // longest run of rows where every curve is null
        let md = md_metres(&l);
        let (mut run_start, mut best) = (None, 0.0f64);
        for (k, r) in l.rows.iter().enumerate() {
            if r[1..].iter().all(Option::is_none) {
                let s = *run_start.get_or_insert(md[k]);
                best = best.max(md[k] - s);
            } else {
                run_start = None;
            }
        }
        if best >= 59.0 {
            gap_found = true;
            assert!(best < 61.0, "{name}: gap of {best} m");
        }
        // the logs cover the zones: from above the first top to below the last
        let md0 = md[0];
        let md1 = *md.last().unwrap();
        let tops = read_tops(&dir.path().join("demo_wells/tops.csv")).unwrap();
        for t in tops.iter().filter(|t| &t.well == name) {
            assert!(
                t.md > md0 + 20.0 && t.md < md1 - 20.0,
                "{name} {}",
                t.surface
            );
        }
    }
    assert!(gap_found, "no 60 m logging gap");
    assert!(feet >= 1);
    assert!(versions.contains(&("1.2".into(), false)));
    assert!(versions.contains(&("2.0".into(), true)));
    assert!(
        versions
            .iter()
            .filter(|v| **v == ("2.0".into(), false))
            .count()
            >= 3
    );
}

#[test]
fn picks_have_holes_and_miss_the_tops_by_a_few_metres() {
    let (dir, report) = fresh();
    let (p, wells) = well_paths(dir.path());
    let tops = read_tops(p.tops.as_ref().unwrap()).unwrap();
    let mut holes = 0;
    let mut misties = Vec::new();
    for (hr, h) in report.horizons.iter().zip(&p.horizons) {
        let picks = read_picks(&h.picks);
        assert_eq!(picks.len(), hr.picks);
        assert!(picks.len() > 400);
        let local = |x: f64, y: f64| {
            let (i, j) = p.grid.xy_to_ij(x, y);
            (j * p.grid.xline_spacing, i * p.grid.inline_spacing)
        };
        for hole in &hr.holes {
            holes += 1;
            let nearest = picks
                .iter()
                .map(|&(x, y, _)| {
                    let (u, v) = local(x, y);
                    ((u - hole.centre.0).powi(2) + (v - hole.centre.1).powi(2)).sqrt()
                })
                .fold(f64::INFINITY, f64::min);
            let a = hole.semi_axes.0.min(hole.semi_axes.1);
            assert!(
                nearest > a * 0.95,
                "{}: a pick {nearest} m from the hole centre",
                h.name
            );
        }
        // typical distance to the nearest other pick: a decimated grid (< 100 m)
        let mut nn: Vec<f64> = picks
            .iter()
            .take(200)
            .map(|a| {
                picks
                    .iter()
                    .filter(|b| *b != a)
                    .map(|b| ((a.0 - b.0).powi(2) + (a.1 - b.1).powi(2)).sqrt())
                    .fold(f64::INFINITY, f64::min)
            })
            .collect();
        nn.sort_by(f64::total_cmp);
        assert!(
            nn[nn.len() / 2] < 100.0 && nn[nn.len() / 2] > 20.0,
            "{:?}",
            nn[nn.len() / 2]
        );
        // misties: inverse-distance average of picks within 150 m of the top's position
        for t in tops.iter().filter(|t| t.surface == h.tops_name) {
            let q = wells[&t.well].0.point_at_md(t.md);
            let (mut s, mut ws) = (0.0, 0.0);
            for &(x, y, z) in &picks {
                let d = ((x - q.x).powi(2) + (y - q.y).powi(2)).sqrt();
                if d < 150.0 {
                    let w = 1.0 / (d + 10.0).powi(2);
                    s += w * z;
                    ws += w;
                }
            }
            if ws > 0.0 {
                misties.push(s / ws - q.z);
            }
        }
    }
    assert!(holes >= 1);
    // a few wells lie in holes; the others give misties of a few metres
    assert!(misties.len() >= 24, "{}", misties.len());
    let mut abs: Vec<f64> = misties.iter().map(|m| m.abs()).collect();
    abs.sort_by(f64::total_cmp);
    let median = abs[abs.len() / 2];
    assert!(
        abs[abs.len() - 1] < 12.0,
        "largest mistie {}",
        abs[abs.len() - 1]
    );
    assert!((0.7..6.0).contains(&median), "median mistie {median}");
}

#[test]
fn facies_have_different_properties_and_follow_published_relations() {
    let (dir, _) = fresh();
    let (_, wells) = well_paths(dir.path());
    // per facies: count, sum of Vp, eps, delta
    let mut acc: BTreeMap<i64, (usize, f64, f64, f64)> = BTreeMap::new();
    let (mut gardner, mut mudrock, mut n_g, mut n_m) = (0.0, 0.0, 0usize, 0usize);
    for (_, las) in wells.values() {
        let l = read_simple_las(las);
        let col = |names: &[&str]| names.iter().find_map(|n| l.column(n)).unwrap();
        let (dt, dts, rhob) = (col(&["DTC", "DT"]), col(&["DTS"]), col(&["RHOB"]));
        let (eps, del, fac) = (col(&["EPS"]), col(&["DELTA"]), col(&["FACIES"]));
        for r in &l.rows {
            let (Some(dt), Some(dts), Some(rho), Some(e), Some(d), Some(f)) =
                (r[dt], r[dts], r[rhob], r[eps], r[del], r[fac])
            else {
                continue;
            };
            let vp = 304_800.0 / dt; // design overview: v = 304800 / DT (us/ft)
            let vs = 304_800.0 / dts;
            let a = acc.entry(f as i64).or_default();
            *a = (a.0 + 1, a.1 + vp, a.2 + e, a.3 + d);
            // Gardner et al. (1974): rho = 0.31 V^0.25 g/cm3, V in m/s
            gardner += rho - 0.31 * vp.powf(0.25);
            n_g += 1;
            if f == 2.0 {
                // Castagna et al. (1985) mudrock line: Vp = 1.16 Vs + 1360 m/s
                mudrock += vp - (1.16 * vs + 1360.0);
                n_m += 1;
            }
        }
    }
    let mean = |f: i64| {
        let a = acc[&f];
        (a.1 / a.0 as f64, a.2 / a.0 as f64, a.3 / a.0 as f64, a.0)
    };
    assert_eq!(acc.keys().copied().collect::<Vec<_>>(), [1, 2, 3]);
    let (sand, shale, het) = (mean(1), mean(2), mean(3));
    assert!(
        sand.3 > 300 && shale.3 > 300 && het.3 > 300,
        "{sand:?} {shale:?} {het:?}"
    );
    // sand faster and near-isotropic, shale slower with larger epsilon and delta
    assert!(sand.0 - shale.0 > 300.0, "{sand:?} {shale:?}");
    assert!((0.0..0.05).contains(&sand.1) && (-0.02..0.03).contains(&sand.2));
    assert!((0.10..0.25).contains(&shale.1) && (0.03..0.12).contains(&shale.2));
    assert!(het.1 > sand.1 && het.1 < shale.1);
    // log noise is small and unbiased, so the published relations hold on average
    assert!(
        (gardner / n_g as f64).abs() < 0.005,
        "Gardner residual {}",
        gardner / n_g as f64
    );
    assert!(
        (mudrock / n_m as f64).abs() < 15.0,
        "mudrock residual {}",
        mudrock / n_m as f64
    );
}

#[test]
fn logs_and_tops_sample_the_truth_volumes() {
    let (dir, _) = fresh();
    let (p, wells) = well_paths(dir.path());
    let g = &p.grid;
    let truth = dir.path().join("demo_truth");
    let (shape, facies) = read_npy_f32(&truth.join("facies.npy"));
    assert_eq!(shape, [g.inline_count, g.xline_count, g.z_count]);
    let (_, zone) = read_npy_f32(&truth.join("zone.npy"));
    // logs at the nearest grid node (within 25 m laterally, 0.25 m vertically)
    for (name, (path, las)) in &wells {
        let l = read_simple_las(las);
        let fac = l.column("FACIES").unwrap();
        let md = md_metres(&l);
        let (mut same, mut n) = (0usize, 0usize);
        for (k, r) in l.rows.iter().enumerate() {
            let Some(f) = r[fac] else { continue };
            let q = path.point_at_md(md[k]);
            let (i, j) = g.xy_to_ij(q.x, q.y);
            let (i, j) = (i.round() as usize, j.round() as usize);
            let kz = (q.z - g.z0) / g.dz;
            if (kz - kz.round()).abs() * g.dz > 0.25 {
                continue;
            }
            let idx = (i * g.xline_count + j) * g.z_count + kz.round() as usize;
            n += 1;
            if facies[idx] == f as f32 {
                same += 1;
            }
        }
        let frac = same as f64 / n.max(1) as f64;
        assert!(
            n > 20 && frac > 0.7,
            "{name}: facies agree at {same} of {n} samples"
        );
    }
    // tops on the true horizons: bilinear interpolation of the truth surfaces
    let tops = read_tops(p.tops.as_ref().unwrap()).unwrap();
    for (k, h) in p.horizons.iter().enumerate() {
        let file = [
            "top_pellarin",
            "top_vostrand",
            "top_kessimer",
            "base_kessimer",
        ][k];
        let (_, surf) = read_npy_f32(&truth.join(format!("horizon_{file}.npy")));
        for t in tops.iter().filter(|t| t.surface == h.tops_name) {
            let q = wells[&t.well].0.point_at_md(t.md);
            let (fi, fj) = g.xy_to_ij(q.x, q.y);
            let (i0, j0) = (fi.floor() as usize, fj.floor() as usize);
            let (a, b) = (fi - i0 as f64, fj - j0 as f64);
            let at = |i: usize, j: usize| f64::from(surf[i * g.xline_count + j]);
            let z = (1.0 - a) * ((1.0 - b) * at(i0, j0) + b * at(i0, j0 + 1))
                + a * ((1.0 - b) * at(i0 + 1, j0) + b * at(i0 + 1, j0 + 1));
            assert!(
                (z - q.z).abs() < 0.2,
                "{} {}: top {} vs surface {z}",
                t.well,
                t.surface,
                q.z
            );
        }
    }
    // the zone volume marks cells outside the zones with negative codes
    assert!(zone.contains(&-1.0) && zone.contains(&-2.0));
    assert!((0..3).all(|z| zone.contains(&(z as f32))));
}

#[test]
fn the_wedge_pinches_and_the_labels_have_errors() {
    let (dir, report) = fresh();
    let truth = dir.path().join("demo_truth");
    let (_, top) = read_npy_f32(&truth.join("horizon_top_vostrand.npy"));
    let (_, base) = read_npy_f32(&truth.join("horizon_top_kessimer.npy"));
    let th: Vec<f32> = top.iter().zip(&base).map(|(a, b)| b - a).collect();
    let min = th.iter().copied().fold(f32::INFINITY, f32::min);
    let max = th.iter().copied().fold(0.0, f32::max);
    assert!(min > 2.0 && min < 8.0 && max > 90.0, "wedge {min}..{max} m");
    assert!((0.10..0.20).contains(&report.facies_label_error_fraction));
    assert!((0.01..0.10).contains(&report.background_rms_relative_error));
}

#[test]
fn crate_readers_take_every_demo_las_file_and_map_its_curves() {
    use stratiprior::formats::las::read_las;
    use stratiprior::ingest::logs::{map_curves, FileCurve};
    use stratiprior::project::CurveProperty;
    let (dir, report) = fresh();
    let p = Project::load(&dir.path().join("demo.toml")).unwrap();
    for w in &report.wells {
        let las = read_las(&dir.path().join(&w.las_file)).unwrap();
        assert!(las.warnings.is_empty(), "{}: {:?}", w.name, las.warnings);
        assert_eq!(las.samples(), w.samples);
        let md = las.index_in_metres().unwrap();
        assert!(
            (md[0] - w.logged_md.0).abs() < 1e-6 && (md[md.len() - 1] - w.logged_md.1).abs() < 1e-6
        );
        assert_eq!(las.well_item("WELL").unwrap().value, w.name);
        let curves: Vec<FileCurve<'_>> = las.curves[1..]
            .iter()
            .map(|c| FileCurve {
                mnemonic: &c.mnemonic,
                unit: &c.unit,
                values: &c.data,
            })
            .collect();
        // the project's curve mapping finds every property with matching units
        let (logs, warnings) =
            map_curves(&w.name, &las.path, &curves, &p.curves, &p.facies, &md).unwrap();
        assert!(warnings.is_empty(), "{}: {warnings:?}", w.name);
        for prop in [
            CurveProperty::Vp,
            CurveProperty::Vs,
            CurveProperty::Density,
            CurveProperty::Epsilon,
            CurveProperty::Delta,
            CurveProperty::Facies,
        ] {
            let l = &logs[&prop];
            let expect = w.samples - w.gap_md.map_or(0, |_| 120);
            assert_eq!(l.count(), expect, "{} {prop:?}", w.name);
        }
        // SI velocities in the range of the truth model (m/s)
        let (lo, hi) = logs[&CurveProperty::Vp].range().unwrap();
        assert!(lo > 2300.0 && hi < 4600.0, "{}: Vp {lo}..{hi}", w.name);
    }
}
