//! `stratiprior check` and `inspect` on the demo project and on broken copies of it.
//!
//! The broken projects are the demo with one thing wrong each; every one must
//! fail with exit status 1 (not a panic, which is 101) and a message naming
//! what is wrong.

use std::fs;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn copy_dir(from: &Path, to: &Path) {
    fs::create_dir_all(to).unwrap();
    for e in fs::read_dir(from).unwrap() {
        let e = e.unwrap();
        let p = e.path();
        if p.is_dir() {
            copy_dir(&p, &to.join(e.file_name()));
        } else {
            fs::copy(&p, to.join(e.file_name())).unwrap();
        }
    }
}

/// A temporary copy of the committed demo project.
fn demo_copy() -> tempfile::TempDir {
    let d = tempfile::tempdir().unwrap();
    for sub in ["demo_wells", "demo_horizons", "demo_volumes"] {
        copy_dir(&root().join(sub), &d.path().join(sub));
    }
    fs::copy(root().join("demo.toml"), d.path().join("demo.toml")).unwrap();
    d
}

fn run(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_stratiprior"))
        .args(args)
        .output()
        .unwrap()
}

fn check(dir: &Path) -> Output {
    run(&["check", dir.join("demo.toml").to_str().unwrap()])
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// Assert a clean failure (exit 1, not a panic) whose message contains every fragment.
fn assert_fails_with(o: &Output, fragments: &[&str]) {
    let e = stderr(o);
    assert_eq!(
        o.status.code(),
        Some(1),
        "expected exit 1, got {:?}: {e}",
        o.status
    );
    assert!(!e.contains("panicked"), "panic: {e}");
    for f in fragments {
        assert!(e.contains(f), "message lacks {f:?}: {e}");
    }
}

fn well_names(dir: &Path) -> Vec<String> {
    let t = fs::read_to_string(dir.join("demo_wells/wells.csv")).unwrap();
    t.lines()
        .skip(1)
        .filter(|l| !l.trim().is_empty() && !l.starts_with('#'))
        .map(|l| l.split(',').next().unwrap().trim().to_string())
        .collect()
}

fn edit_toml(dir: &Path, f: impl FnOnce(&mut toml::Table)) {
    let p = dir.join("demo.toml");
    let mut t: toml::Table = fs::read_to_string(&p).unwrap().parse().unwrap();
    f(&mut t);
    fs::write(&p, toml::to_string(&t).unwrap()).unwrap();
}

#[test]
fn check_demo_reports_every_well_and_horizon() {
    let d = demo_copy();
    let o = check(d.path());
    assert!(o.status.success(), "{}", stderr(&o));
    let out = String::from_utf8_lossy(&o.stdout);
    let project = stratiprior::project::Project::load(&d.path().join("demo.toml")).unwrap();
    for w in well_names(d.path()) {
        assert!(out.contains(&w), "summary lacks well {w}");
    }
    for h in &project.horizons {
        assert!(out.contains(&h.name), "summary lacks horizon {}", h.name);
    }
    for section in [
        "Survey grid",
        "Wells",
        "Horizons",
        "Tie misties",
        "Zones",
        "Input volumes",
    ] {
        assert!(out.contains(section), "summary lacks {section}");
    }

    let o = run(&[
        "check",
        "--json",
        d.path().join("demo.toml").to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let j: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(
        j["wells"].as_array().unwrap().len(),
        well_names(d.path()).len()
    );
    assert_eq!(
        j["horizons"].as_array().unwrap().len(),
        project.horizons.len()
    );
    // every well with tops has a mistie row per top, and the tie honours the tops
    let tops = fs::read_to_string(d.path().join("demo_wells/tops.csv")).unwrap();
    let n_tops = tops
        .lines()
        .skip(1)
        .filter(|l| !l.trim().is_empty())
        .count();
    let misties = j["misties"].as_array().unwrap();
    assert_eq!(misties.len(), n_tops);
    for m in misties {
        let r = m["residual"].as_f64().unwrap();
        assert!(r.abs() < 1e-3, "tie residual {r} at {m}");
    }
    // the demo's picks miss the tops by a few metres (issue 2, demo requirement)
    let max_mistie = misties
        .iter()
        .map(|m| m["mistie"].as_f64().unwrap().abs())
        .fold(0.0, f64::max);
    assert!(
        max_mistie > 1.0 && max_mistie < 20.0,
        "max mistie {max_mistie}"
    );
    // deviated wells and the logging gap are reported
    let wells = j["wells"].as_array().unwrap();
    assert!(wells.iter().filter(|w| w["deviated"] == true).count() >= 2);
    assert!(wells
        .iter()
        .any(|w| !w["gaps"].as_array().unwrap().is_empty()));
    // every well penetrates at least one zone
    for w in wells {
        assert!(!w["zones"].as_array().unwrap().is_empty(), "{}", w["name"]);
    }
}

#[test]
fn quiet_prints_nothing() {
    let d = demo_copy();
    let o = run(&[
        "check",
        "--quiet",
        d.path().join("demo.toml").to_str().unwrap(),
    ]);
    assert!(o.status.success());
    assert!(o.stdout.is_empty());
}

#[test]
fn missing_file_is_named() {
    let d = demo_copy();
    let table = fs::read_to_string(d.path().join("demo_wells/wells.csv")).unwrap();
    let las = table
        .lines()
        .nth(1)
        .unwrap()
        .split(',')
        .nth(1)
        .unwrap()
        .trim()
        .to_string();
    fs::remove_file(d.path().join("demo_wells").join(&las)).unwrap();
    assert_fails_with(&check(d.path()), &[&las, "No such file"]);
}

#[test]
fn missing_project_is_named() {
    let o = run(&["check", "/nonexistent/project.toml"]);
    assert_fails_with(&o, &["/nonexistent/project.toml"]);
}

#[test]
fn unknown_key_is_named_with_its_line() {
    let d = demo_copy();
    let p = d.path().join("demo.toml");
    let text = fs::read_to_string(&p).unwrap();
    let line = text.lines().position(|l| l.trim() == "[grid]").unwrap() + 2;
    fs::write(
        &p,
        text.replacen("[grid]\n", "[grid]\ncolour = \"red\"\n", 1),
    )
    .unwrap();
    assert_fails_with(
        &check(d.path()),
        &["unknown field `colour`", &format!("demo.toml:{line}")],
    );
}

#[test]
fn well_outside_the_survey_is_named() {
    let d = demo_copy();
    let p = d.path().join("demo_wells/wells.csv");
    let text = fs::read_to_string(&p).unwrap();
    let mut lines: Vec<String> = text.lines().map(String::from).collect();
    let header: Vec<&str> = lines[0].split(',').collect();
    let xi = header.iter().position(|c| c.trim() == "x").unwrap();
    let mut f: Vec<String> = lines[1].split(',').map(String::from).collect();
    let name = f[0].clone();
    let x: f64 = f[xi].trim().parse().unwrap();
    f[xi] = format!("{}", x + 60_000.0);
    lines[1] = f.join(",");
    fs::write(&p, lines.join("\n") + "\n").unwrap();
    assert_fails_with(
        &check(d.path()),
        &[&format!("well {name}"), "inside the survey grid"],
    );
}

#[test]
fn unit_mismatch_is_reported() {
    let d = demo_copy();
    edit_toml(d.path(), |t| {
        t["curves"]["vp"]["unit"] = toml::Value::String("us/m".into());
    });
    assert_fails_with(&check(d.path()), &["unit mismatch", "curves.vp.unit"]);
}

#[test]
fn bad_unit_name_is_reported() {
    let d = demo_copy();
    edit_toml(d.path(), |t| {
        t["curves"]["density"]["unit"] = toml::Value::String("furlongs".into());
    });
    assert_fails_with(&check(d.path()), &["curves.density.unit", "g/cm3, kg/m3"]);
}

#[test]
fn horizons_out_of_order_are_reported() {
    // Swapping the first two horizons makes the zones' top and base non-consecutive.
    let d = demo_copy();
    edit_toml(d.path(), |t| {
        let h = t["horizons"].as_array_mut().unwrap();
        h.swap(0, 1);
    });
    assert_fails_with(&check(d.path()), &["consecutive horizons"]);

    // Swapping them and rewriting the zones to match: the well tops contradict the order.
    let d = demo_copy();
    edit_toml(d.path(), |t| {
        let names: Vec<String> = t["horizons"]
            .as_array()
            .unwrap()
            .iter()
            .map(|h| h["name"].as_str().unwrap().to_string())
            .collect();
        t["horizons"].as_array_mut().unwrap().swap(0, 1);
        let z = t["zones"].as_array_mut().unwrap();
        z[0]["top"] = toml::Value::String(names[1].clone());
        z[0]["base"] = toml::Value::String(names[0].clone());
        z[1]["top"] = toml::Value::String(names[0].clone());
        z[1]["base"] = toml::Value::String(names[2].clone());
    });
    assert_fails_with(&check(d.path()), &["against the [[horizons]] order"]);
}

#[test]
fn volume_on_another_grid_is_reported() {
    let d = demo_copy();
    edit_toml(d.path(), |t| {
        let z = t["grid"]["z"].as_array_mut().unwrap();
        z[2] = toml::Value::Integer(z[2].as_integer().unwrap() - 1);
    });
    assert_fails_with(&check(d.path()), &["background_vp0.sgy", "sample"]);
}

#[test]
fn inspect_reads_every_kind_of_demo_file() {
    let d = demo_copy();
    let table = fs::read_to_string(d.path().join("demo_wells/wells.csv")).unwrap();
    let las = table
        .lines()
        .nth(1)
        .unwrap()
        .split(',')
        .nth(1)
        .unwrap()
        .trim()
        .to_string();
    let las_path = d.path().join("demo_wells").join(&las);
    let o = run(&["inspect", "--json", las_path.to_str().unwrap()]);
    assert!(o.status.success(), "{}", stderr(&o));
    let j: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(j["kind"], "las");
    let values = j["values"].as_array().unwrap();
    let n = values[0]["values"].as_array().unwrap().len();
    assert!(n > 100);
    for c in values {
        assert_eq!(c["values"].as_array().unwrap().len(), n);
    }
    for (f, kind) in [
        ("demo_volumes/background_vp0.sgy", "segy"),
        ("demo_wells/wells.csv", "well_table"),
        ("demo_wells/tops.csv", "tops"),
    ] {
        let o = run(&["inspect", "--json", d.path().join(f).to_str().unwrap()]);
        assert!(o.status.success(), "{f}: {}", stderr(&o));
        let j: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
        assert_eq!(j["kind"], kind, "{f}");
        let o = run(&["inspect", d.path().join(f).to_str().unwrap()]);
        assert!(o.status.success() && !o.stdout.is_empty(), "{f}");
    }
    let picks = fs::read_dir(d.path().join("demo_horizons"))
        .unwrap()
        .next()
        .unwrap()
        .unwrap()
        .path();
    let o = run(&["inspect", "--json", picks.to_str().unwrap()]);
    assert!(o.status.success(), "{}", stderr(&o));
    let j: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(j["kind"], "picks");
    assert!(j["count"].as_u64().unwrap() > 100);
}

#[test]
fn inspect_bad_file_fails_cleanly() {
    let d = tempfile::tempdir().unwrap();
    let p = d.path().join("broken.las");
    fs::write(
        &p,
        "~Version\nVERS. 2.0 :\nWRAP. NO :\n~Curve\nDEPT.M :\n~A\n1.0 2.0\n",
    )
    .unwrap();
    assert_fails_with(&run(&["inspect", p.to_str().unwrap()]), &["broken.las"]);
    let p = d.path().join("garbage.sgy");
    fs::write(&p, vec![7u8; 5000]).unwrap();
    assert_fails_with(&run(&["inspect", p.to_str().unwrap()]), &["garbage.sgy"]);
}

#[test]
fn readme_example_is_a_valid_project_equal_to_the_demo() {
    // The annotated example in the README is the demo project plus defaults.
    let readme = fs::read_to_string(root().join("README.md")).unwrap();
    let start = readme.find("```toml\n").unwrap() + 8;
    let end = start + readme[start..].find("```").unwrap();
    let example = &readme[start..end];
    let p = stratiprior::project::Project::from_toml(example, &root().join("readme-example.toml"))
        .unwrap();
    let demo = stratiprior::project::Project::load(&root().join("demo.toml")).unwrap();
    assert_eq!(p.grid, demo.grid);
    assert_eq!(p.zones.len(), demo.zones.len());
    assert_eq!(p.horizons.len(), demo.horizons.len());
    assert_eq!(p.facies, demo.facies);
    assert_eq!(p.kriging, demo.kriging);
    assert_eq!(p.conditioning, demo.conditioning);
    assert_eq!(p.bounds, demo.bounds);
}

#[test]
fn bad_prior_settings_are_named() {
    let cases: [(&str, &str, &str); 5] = [
        ("[kriging]\nvp0 = \"magic\"\n", "kriging.vp0", "not a kriging method"),
        ("[conditioning]\nbackus_window = 10.0\nbackus_number = 0.3\ndominant_frequency = 20.0\n", "conditioning", "not both"),
        ("[kriging.zones.Nowhere]\nepsilon = \"simple\"\n", "kriging.zones.Nowhere", "no zone"),
        ("[bounds]\nepsilon = [0.5, -0.1]\n", "bounds.epsilon", "low < high"),
        ("[variograms.Pellarin]\nporosity = { nugget = 0.0, structures = [] }\n", "variograms.Pellarin.porosity", "not a property"),
    ];
    for (extra, key, what) in cases {
        let d = demo_copy();
        let p = d.path().join("demo.toml");
        let text = fs::read_to_string(&p).unwrap();
        fs::write(&p, format!("{text}\n{extra}")).unwrap();
        assert_fails_with(&check(d.path()), &[key, what]);
    }
}

#[test]
fn a_reader_that_stops_early_is_no_panic() {
    // `stratiprior check --json demo.toml | head -1`: the pipe closes early.
    let mut child = Command::new(env!("CARGO_BIN_EXE_stratiprior"))
        .args([
            "check",
            "--json",
            root().join("demo.toml").to_str().unwrap(),
        ])
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    drop(child.stdout.take());
    let o = child.wait_with_output().unwrap();
    let e = String::from_utf8_lossy(&o.stderr);
    assert!(!e.contains("panicked"), "{e}");
    assert_eq!(o.status.code(), Some(0), "{e}");
}
