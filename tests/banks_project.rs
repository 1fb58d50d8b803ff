//! `[banks]` in the project file: default, accepted values, and clear errors.

use std::fs;
use std::path::PathBuf;
use stratiprior::project::{Project, DEFAULT_BANK_COUNT};

fn load_with(extra: &str) -> Result<Project, String> {
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let d = tempfile::tempdir().unwrap();
    let text = fs::read_to_string(root.join("demo.toml")).unwrap();
    let p = d.path().join("demo.toml");
    fs::write(&p, format!("{text}\n{extra}\n")).unwrap();
    Project::load(&p).map_err(|e| e.to_string())
}

#[test]
fn bank_count_defaults_and_reads() {
    assert_eq!(load_with("").unwrap().bank_count, DEFAULT_BANK_COUNT);
    assert_eq!(DEFAULT_BANK_COUNT, 20000);
    assert_eq!(load_with("[banks]\ncount = 500").unwrap().bank_count, 500);
    assert_eq!(load_with("[banks]").unwrap().bank_count, DEFAULT_BANK_COUNT);
}

#[test]
fn bad_bank_settings_are_refused_with_the_key_named() {
    for bad in [
        "[banks]\ncount = 0",
        "[banks]\ncount = -3",
        "[banks]\ncount = 100000000",
    ] {
        let e = load_with(bad).unwrap_err();
        assert!(e.contains("banks.count") && e.contains("demo.toml"), "{e}");
    }
    let e = load_with("[banks]\nsize = 10").unwrap_err();
    assert!(e.contains("unknown field `size`"), "{e}");
    // a fraction: the parser names the file and line of `count` and the expected type
    let e = load_with("[banks]\ncount = 2.5").unwrap_err();
    assert!(
        e.contains("demo.toml:") && e.contains("expected i64"),
        "{e}"
    );
}

const WEST: &str = "[[areas]]\nname = \"west\"\nzones = [\"Pellarin\"]\nbox = { inlines = [1201, 1226], xlines = [3101, 3171] }";

#[test]
fn areas_parse_with_default_zones_and_both_shapes() {
    use stratiprior::project::AreaShape;
    let p = load_with(WEST).unwrap();
    assert_eq!(p.areas.len(), 1);
    assert_eq!(p.areas[0].zones, vec![0]);
    assert_eq!(
        p.areas[0].shape,
        AreaShape::Box {
            inlines: (1201, 1226),
            xlines: (3101, 3171)
        }
    );
    let p = load_with(
        "[[areas]]\nname = \"lobe\"\npolygon = [[419000.0, 6412000.0], [420500.0, 6412000.0], [420500.0, 6413500.0]]",
    )
    .unwrap();
    assert!(matches!(&p.areas[0].shape, AreaShape::Polygon(v) if v.len() == 3));
    // no `zones`: every zone
    assert_eq!(p.areas[0].zones, vec![0, 1, 2]);
    assert!(load_with("").unwrap().areas.is_empty());
}

#[test]
fn a_polygon_along_a_box_outline_holds_the_same_nodes() {
    use stratiprior::project::{area_of_node, point_in_polygon};
    // the box inlines 1205..=1230, xlines 3110..=3150 and the polygon through the
    // world positions of its corners widened by half a line hold the same nodes:
    // node (i, j) is inside iff first <= line <= last (common practice)
    let g = load_with("").unwrap().grid;
    let (i0, i1, j0, j1) = (4.0 - 0.5, 29.0 + 0.5, 9.0 - 0.5, 49.0 + 0.5);
    let c: Vec<String> = [(i0, j0), (i1, j0), (i1, j1), (i0, j1)]
        .iter()
        .map(|&(i, j)| {
            let (x, y) = g.node_xy(i, j);
            format!("[{x}, {y}]")
        })
        .collect();
    let p = load_with(&format!(
        "[[areas]]\nname = \"b\"\nzones = [\"Pellarin\"]\nbox = {{ inlines = [1205, 1230], xlines = [3110, 3150] }}\n[[areas]]\nname = \"p\"\nzones = [\"Vostrand\"]\npolygon = [{}]",
        c.join(", ")
    ))
    .unwrap();
    let mut inside = 0;
    for i in 0..g.inline_count {
        for j in 0..g.xline_count {
            let b = area_of_node(&p.areas, &g, 0, i, j) == Some(0);
            let q = area_of_node(&p.areas, &g, 1, i, j) == Some(1);
            assert_eq!(b, q, "node {i} {j}");
            let want = (4..=29).contains(&i) && (9..=49).contains(&j);
            assert_eq!(b, want, "node {i} {j}");
            inside += usize::from(b);
        }
    }
    assert_eq!(inside, 26 * 41);
    // even-odd rule on a concave (U-shaped) polygon: the notch is outside
    let u = [
        [0.0, 0.0],
        [3.0, 0.0],
        [3.0, 3.0],
        [2.0, 3.0],
        [2.0, 1.0],
        [1.0, 1.0],
        [1.0, 3.0],
        [0.0, 3.0],
    ];
    assert!(point_in_polygon(&u, 0.5, 2.0));
    assert!(point_in_polygon(&u, 2.5, 2.0));
    assert!(!point_in_polygon(&u, 1.5, 2.0));
    assert!(point_in_polygon(&u, 1.5, 0.5));
    assert!(!point_in_polygon(&u, 4.0, 0.5));
}

#[test]
fn bad_areas_are_refused_with_the_key_named() {
    let area = |body: &str| format!("[[areas]]\nname = \"a\"\n{body}");
    let cases: Vec<(String, Vec<&str>)> = vec![
        (
            area("polygon = [[419000.0, 6412000.0], [420000.0, 6412000.0]]"),
            vec!["areas[0].polygon", "at least 3 vertices"],
        ),
        (
            // a bow tie: edges 0-1 and 2-3 cross
            area("polygon = [[0.0, 0.0], [10.0, 10.0], [10.0, 0.0], [0.0, 10.0]]"),
            vec!["areas[0].polygon", "edge 0-1", "edge 2-3", "simple"],
        ),
        (
            area("polygon = [[0.0, 0.0], [10.0, 0.0, 5.0], [10.0, 10.0]]"),
            vec!["areas[0].polygon[1]", "[x, y]"],
        ),
        (
            area("box = { inlines = [1190, 1220], xlines = [3101, 3171] }"),
            vec!["areas[0].box.inlines", "1201..=1251", "[1190, 1220]"],
        ),
        (
            area("box = { inlines = [1201, 1220], xlines = [3150, 3172] }"),
            vec!["areas[0].box.xlines", "3101..=3171"],
        ),
        (
            area("box = { inlines = [1220, 1210], xlines = [3101, 3171] }"),
            vec!["areas[0].box.inlines", "first <= last"],
        ),
        (
            area("zones = [\"Pellarin\", \"Morvane\"]\nbox = { inlines = [1201, 1220], xlines = [3101, 3171] }"),
            vec!["areas[0].zones", "unknown zone `Morvane`", "Pellarin, Vostrand, Kessimer"],
        ),
        (
            area("box = { inlines = [1201, 1220], xlines = [3101, 3171] }\npolygon = [[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]]"),
            vec!["areas[0]", "both `polygon` and `box`"],
        ),
        (area("zones = [\"Pellarin\"]"), vec!["areas[0]", "neither `polygon` nor `box`"]),
        (
            format!("{WEST}\n{WEST}"),
            vec!["areas[1].name", "`west` is defined twice"],
        ),
        (
            "[[areas]]\nname = \"rest\"\nbox = { inlines = [1201, 1220], xlines = [3101, 3171] }".into(),
            vec!["areas[0].name", "reserved"],
        ),
        (
            // west holds inlines 1201..=1226; east from 1220, crosslines from 3120:
            // the first shared node in inline-major order is (1220, 3120)
            format!("{WEST}\n[[areas]]\nname = \"east\"\nbox = {{ inlines = [1220, 1251], xlines = [3120, 3171] }}"),
            vec!["areas[1]", "`west` and `east` overlap", "zone `Pellarin`", "inline 1220, crossline 3120"],
        ),
    ];
    for (text, wants) in cases {
        let e = load_with(&text).unwrap_err();
        assert!(e.contains("demo.toml"), "{e}");
        for w in wants {
            assert!(e.contains(w), "{text}\n=> {e}\n(missing {w:?})");
        }
    }
    // the same two boxes in different zones do not overlap
    let ok = load_with(&format!(
        "{WEST}\n[[areas]]\nname = \"east\"\nzones = [\"Vostrand\"]\nbox = {{ inlines = [1220, 1251], xlines = [3120, 3171] }}"
    ));
    assert!(ok.is_ok(), "{ok:?}");
    let e = load_with(&area("box = { inlines = [1201, 1220] }")).unwrap_err();
    assert!(e.contains("xlines"), "{e}");
    let e = load_with(&area(
        "shape = 3\nbox = { inlines = [1201, 1220], xlines = [3101, 3171] }",
    ))
    .unwrap_err();
    assert!(e.contains("unknown field `shape`"), "{e}");
}
