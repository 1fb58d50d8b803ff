//! `stratiprior build` on a copy of the demo whose zone Pellarin is split into
//! the area `west` (a box over the first 26 inlines) and the implicit `rest`:
//! regions (zone, area, facies), bank cells and pool wells inside their area,
//! and the zones without areas numbered as in the plain demo.

mod report_support;

use std::fs;
use std::path::{Path, PathBuf};
use std::process::Command;
use stratiprior::formats::segy::read_volume_on_grid;
use stratiprior::project::Project;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// A float32 little-endian C-order .npy file (NumPy format spec v1.0/2.0): its values.
fn read_npy_f32(path: &Path) -> Vec<f32> {
    let b = fs::read(path).unwrap();
    assert_eq!(&b[..6], b"\x93NUMPY");
    let (hlen, start) = if b[6] == 1 {
        (u16::from_le_bytes([b[8], b[9]]) as usize, 10)
    } else {
        (u32::from_le_bytes([b[8], b[9], b[10], b[11]]) as usize, 12)
    };
    let header = std::str::from_utf8(&b[start..start + hlen]).unwrap();
    assert!(header.contains("'<f4'"), "{header}");
    b[start + hlen..]
        .chunks_exact(4)
        .map(|c| f32::from_le_bytes([c[0], c[1], c[2], c[3]]))
        .collect()
}

/// Last inline index (0-based) of the `west` box: inlines 1201..=1226.
const WEST_LAST_I: f64 = 25.0;

#[test]
fn areas_split_the_regions_of_one_zone_and_leave_the_others_alone() {
    let d = tempfile::tempdir().unwrap();
    let text = fs::read_to_string(root().join("demo.toml")).unwrap();
    // the copy lives elsewhere: point its inputs at the demo files
    let text = text.replace("= \"demo_", &format!("= \"{}/demo_", root().display()));
    let text = format!(
        "{text}\n[[areas]]\nname = \"west\"\nzones = [\"Pellarin\"]\nbox = {{ inlines = [1201, 1226], xlines = [3101, 3171] }}\n[volumes]\nblend_facies_with_wells = false\n"
    );
    let pf = d.path().join("areas.toml");
    fs::write(&pf, text).unwrap();
    let out = d.path().join("out");
    let o = Command::new(env!("CARGO_BIN_EXE_stratiprior"))
        .args([
            "build",
            pf.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
            "--threads",
            "2",
            "--json",
        ])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let summary: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let project = Project::load(&pf).unwrap();
    let g = &project.grid;
    let nf = project.facies.len();
    let m: serde_json::Value =
        serde_json::from_slice(&fs::read(out.join("manifest.json")).unwrap()).unwrap();
    let vol = |prop: &str| -> Vec<f32> {
        let v = m["volumes"]
            .as_array()
            .unwrap()
            .iter()
            .find(|v| v["property"] == prop && v["statistic"] == "value")
            .unwrap_or_else(|| panic!("no volume {prop}"));
        read_volume_on_grid(&out.join(v["path"].as_str().unwrap()), g).unwrap()
    };
    let zone = vol("zone");
    // blend_facies_with_wells = false: inside zones the facies come from the
    // facies-label volume alone, read through its confusion calibrated at the
    // wells: the probabilities of a cell are the row of its label, and the most
    // likely facies that row's largest entry
    let labels = read_volume_on_grid(&root().join("demo_volumes/facies.sgy"), g).unwrap();
    let most_likely = vol("facies");
    let confusion: Vec<Vec<f64>> = summary["facies_label_confusion"]
        .as_array()
        .expect("a calibrated label confusion")
        .iter()
        .map(|row| {
            row[1]
                .as_array()
                .unwrap()
                .iter()
                .map(|e| e[1].as_f64().unwrap())
                .collect()
        })
        .collect();
    assert_eq!(confusion.len(), nf);
    for row in &confusion {
        assert!((row.iter().sum::<f64>() - 1.0).abs() < 1e-12);
        assert!(row.iter().all(|p| *p > 0.0 && *p < 1.0));
    }
    let probs: Vec<Vec<f32>> = project
        .facies
        .iter()
        .map(|f| vol(&format!("facies_probability:{}", f.name)))
        .collect();
    for k in 0..zone.len() {
        if zone[k] >= 0.0 {
            let l = project
                .facies
                .iter()
                .position(|f| f.code as f32 == labels[k])
                .unwrap();
            for (f, pv) in probs.iter().enumerate() {
                assert!(
                    (f64::from(pv[k]) - confusion[l][f]).abs() < 1e-6,
                    "cell {k} facies {f}"
                );
            }
            let best = (0..nf)
                .max_by(|&a, &b| confusion[l][a].total_cmp(&confusion[l][b]))
                .unwrap();
            assert_eq!(most_likely[k], project.facies[best].code as f32, "cell {k}");
        }
    }
    // vertical wells (no survey in the well table) stand at their table (x, y)
    let table = fs::read_to_string(root().join("demo_wells/wells.csv")).unwrap();
    let vertical: Vec<Option<(f64, f64)>> = table
        .lines()
        .skip(1)
        .map(|l| {
            let c: Vec<&str> = l.split(',').collect();
            c[5].trim()
                .is_empty()
                .then(|| (c[2].parse().unwrap(), c[3].parse().unwrap()))
        })
        .collect();

    let banks = m["banks"].as_array().unwrap();
    // Pellarin: (west, rest) x facies; Vostrand and Kessimer: facies
    assert_eq!(banks.len(), 2 * nf + 2 * nf);
    let mut seen = Vec::new();
    let mut pool_wells_checked = 0;
    for (r, b) in banks.iter().enumerate() {
        let zname = b["zone"].as_str().unwrap();
        let zi = b["zone_index"].as_u64().unwrap() as usize;
        let fname = b["facies"].as_str().unwrap();
        let fi = project.facies.iter().position(|f| f.name == fname).unwrap();
        let path = b["path"].as_str().unwrap();
        let area = b["area"].as_str();
        seen.push((
            zname.to_string(),
            area.map(str::to_string),
            fname.to_string(),
        ));
        assert_eq!(
            b["count"].as_u64().unwrap() as usize,
            project.bank_count,
            "{path}"
        );
        if zname == "Pellarin" {
            let a = area.expect("Pellarin regions name their area");
            assert!(a == "west" || a == "rest", "{a}");
            assert!(path.contains(&format!("_{a}_")), "{path}");
            // area regions are numbered after the 3 x nf regions of a project without areas
            assert_eq!(b["stream"].as_u64().unwrap() as usize, 3 * nf + r);
        } else {
            // the other zones: no area, and the stream (hence the draws) of the plain demo
            assert!(b["area"].is_null(), "{b}");
            assert!(!path.contains("west") && !path.contains("rest"), "{path}");
            assert_eq!(b["stream"].as_u64().unwrap() as usize, zi * nf + fi);
        }
        let pool_kind = b["pool"].as_str().unwrap();
        assert!(
            ["region", "area", "zone"].contains(&pool_kind),
            "{pool_kind}"
        );
        if area.is_none() {
            assert_ne!(pool_kind, "area");
        }
        // every bank cell: in its zone, facies possible there, node in its area
        let prob = vol(&format!("facies_probability:{fname}"));
        let bank = read_npy_f32(&out.join(path));
        for row in bank.chunks_exact(7) {
            let (fi_, fj) = g.xy_to_ij(f64::from(row[3]), f64::from(row[4]));
            let (i, j) = (fi_.round() as usize, fj.round() as usize);
            let k = ((f64::from(row[5]) - g.z0) / g.dz).round() as usize;
            let c = g.trace_index(i, j) * g.z_count + k;
            assert_eq!(zone[c], zi as f32, "{path}: cell outside its zone");
            assert!(prob[c] > 0.0);
            match area {
                Some("west") => assert!(i as f64 <= WEST_LAST_I, "{path}: inline index {i}"),
                Some(_) => assert!(i as f64 > WEST_LAST_I, "{path}: inline index {i}"),
                None => {}
            }
        }
        // a pool of the region's own samples holds wells of the area only
        // (checked on the vertical wells, whose samples all lie at their table x, y)
        if pool_kind == "region" && area.is_some() {
            let pool = read_npy_f32(&out.join(b["pool_path"].as_str().unwrap()));
            for p in pool.chunks_exact(5) {
                let w = p[4] as usize;
                if let Some((x, y)) = vertical[w] {
                    let (fi_, _) = g.xy_to_ij(x, y);
                    let in_west = fi_ <= WEST_LAST_I + 0.5;
                    assert_eq!(in_west, area == Some("west"), "{path}: pool well {w}");
                    pool_wells_checked += 1;
                }
            }
        }
        eprintln!(
            "bank {path}: area {area:?}, pool {pool_kind} ({} rows, {} wells)",
            b["pool_count"], b["wells"]
        );
    }
    assert!(pool_wells_checked > 0, "no region pool of an area to check");
    // manifest order: zone-major, then area (west, rest), then facies
    let facies: Vec<String> = project.facies.iter().map(|f| f.name.clone()).collect();
    let mut want = Vec::new();
    for a in ["west", "rest"] {
        for f in &facies {
            want.push(("Pellarin".to_string(), Some(a.to_string()), f.clone()));
        }
    }
    for z in ["Vostrand", "Kessimer"] {
        for f in &facies {
            want.push((z.to_string(), None, f.clone()));
        }
    }
    assert_eq!(seen, want);
    // the report draws one cross-plot per region, areas included
    let html = fs::read_to_string(out.join("report.html")).unwrap();
    let expected: Vec<String> = banks
        .iter()
        .map(|b| {
            let region = match b["area"].as_str() {
                Some(a) => format!(
                    "zone {} area {a} facies {}",
                    b["zone"].as_str().unwrap(),
                    b["facies"].as_str().unwrap()
                ),
                None => format!(
                    "zone {} facies {}",
                    b["zone"].as_str().unwrap(),
                    b["facies"].as_str().unwrap()
                ),
            };
            report_support::id(&["crossplot", &region])
        })
        .collect();
    assert!(expected.iter().any(|e| e.contains("area_west")));
    report_support::check_report(&html, &expected, 20).unwrap_or_else(|e| panic!("{e}"));
    // the summary names the area of each borrowing region's warning
    for w in summary["warnings"].as_array().unwrap() {
        let w = w.as_str().unwrap();
        if w.starts_with("bank zone Pellarin") {
            assert!(w.contains("area west") || w.contains("area rest"), "{w}");
        }
    }
}
