//! Variogram model formulas, anisotropy convention, covariance, validation, TOML.
//!
//! Sources:
//! * Practical-range shapes (Deutsch & Journel 1998, GSLIB 2nd ed., section II.3;
//!   from memory): spherical `1.5 h - 0.5 h^3` reaching the sill at the range;
//!   exponential `1 - exp(-3h)` and Gaussian `1 - exp(-3h^2)` reaching
//!   `1 - e^-3 = 0.950212931632136` of it (the value of `1 - e^-3` is elementary).
//! * Spherical model values (Journel & Huijbregts 1978, Mining Geostatistics, eq. III.9).
//! * Nugget effect: `gamma(0) = 0`, a jump of the nugget at any non-zero lag
//!   (Journel & Huijbregts 1978, section III.A).
//! * Azimuth convention: bearing clockwise from north (+y towards +x), as in the
//!   survey-grid convention of the design overview; rotations written out by hand.
//! * TOML 1.0 (toml.io): inline tables, arrays may span lines.

use stratiprior::geostat::variogram::{Structure, StructureKind, VariogramModel};
use stratiprior::geostat::CovarianceModel;
use stratiprior::Error;

const ONE_MINUS_E3: f64 = 0.950_212_931_632_136; // 1 - exp(-3)

fn iso(kind: StructureKind, sill: f64, a: f64) -> VariogramModel {
    VariogramModel {
        nugget: 0.0,
        structures: vec![Structure::horizontally_isotropic(kind, sill, a, a)],
    }
}

#[test]
fn practical_range_values() {
    let c = 2.5;
    let a = 400.0;
    let at = |m: &VariogramModel, h: f64| m.gamma([0.0, h, 0.0]);
    let sph = iso(StructureKind::Spherical, c, a);
    let exp = iso(StructureKind::Exponential, c, a);
    let gau = iso(StructureKind::Gaussian, c, a);
    // Spherical reaches the sill exactly at the range and stays there.
    assert!((at(&sph, a) - c).abs() < 1e-14);
    assert!((at(&sph, 3.0 * a) - c).abs() < 1e-14);
    // Spherical at h = 1/2: 1.5 * 0.5 - 0.5 * 0.125 = 0.6875 (J&H eq. III.9).
    assert!((at(&sph, 0.5 * a) - 0.6875 * c).abs() < 1e-14);
    assert!(at(&sph, 0.999 * a) < c);
    // Exponential and Gaussian reach 95 % (1 - e^-3) at the practical range.
    assert!((at(&exp, a) - ONE_MINUS_E3 * c).abs() < 1e-13);
    assert!((at(&gau, a) - ONE_MINUS_E3 * c).abs() < 1e-13);
    // Exponential at h = 1/3 is 1 - 1/e; Gaussian at h = 1/sqrt(3) too.
    let one_minus_inv_e = 1.0 - (-1.0f64).exp();
    assert!((at(&exp, a / 3.0) - one_minus_inv_e * c).abs() < 1e-13);
    assert!((at(&gau, a / 3.0f64.sqrt()) - one_minus_inv_e * c).abs() < 1e-13);
    // Gaussian is parabolic near the origin: gamma ~ 3 c h^2.
    let h = 1e-4;
    assert!((at(&gau, h * a) / (3.0 * c * h * h) - 1.0).abs() < 1e-6);
    // Exponential is linear near the origin: gamma ~ 3 c h.
    assert!((at(&exp, h * a) / (3.0 * c * h) - 1.0).abs() < 1e-3);
}

#[test]
fn nugget_at_zero_and_covariance() {
    let m = VariogramModel {
        nugget: 0.1,
        structures: vec![Structure {
            kind: StructureKind::Spherical,
            sill: 0.9,
            range_major: 1500.0,
            range_minor: 800.0,
            azimuth: 30.0,
            range_vertical: 12.0,
        }],
    };
    m.validate().unwrap();
    assert_eq!(m.total_sill(), 1.0);
    assert_eq!(m.gamma([0.0; 3]), 0.0);
    // Any non-zero lag carries the nugget.
    let tiny = m.gamma([0.0, 0.0, 1e-9]);
    assert!((0.1..0.1 + 1e-9).contains(&tiny));
    assert_eq!(m.covariance([0.0; 3]), 1.0);
    assert_eq!(m.sill(), 1.0);
    assert!((m.covariance([0.0, 0.0, 1e-9]) - 0.9).abs() < 1e-9);
    // Beyond every range the covariance vanishes.
    assert!(m.covariance([5000.0, 5000.0, 100.0]).abs() < 1e-15);
    // C(d) = sill - gamma(d) at an arbitrary lag.
    let d = [120.0, -340.0, 3.0];
    assert_eq!(m.covariance(d), 1.0 - m.gamma(d));
}

fn aniso(kind: StructureKind) -> VariogramModel {
    VariogramModel {
        nugget: 0.0,
        structures: vec![Structure {
            kind,
            sill: 1.0,
            range_major: 1500.0,
            range_minor: 800.0,
            azimuth: 30.0,
            range_vertical: 12.0,
        }],
    }
}

#[test]
fn anisotropy_rotation_with_explicit_vectors() {
    let m = aniso(StructureKind::Spherical);
    // Unit vectors written out: bearing 30 deg = (sin 30, cos 30) = (0.5, 0.8660254037844386);
    // bearing 120 deg = (sin 120, cos 120) = (0.8660254037844386, -0.5).
    let major = [0.5, 0.866_025_403_784_438_6];
    let minor = [0.866_025_403_784_438_6, -0.5];
    let along = |u: [f64; 2], r: f64| [u[0] * r, u[1] * r, 0.0];
    // Along the azimuth the sill is reached at range_major, not before.
    assert!((m.gamma(along(major, 1500.0)) - 1.0).abs() < 1e-12);
    assert!(m.gamma(along(major, 1400.0)) < 0.999);
    // 800 m along the major axis is only h = 0.5333: 1.5 h - 0.5 h^3.
    let h: f64 = 800.0 / 1500.0;
    assert!((m.gamma(along(major, 800.0)) - (1.5 * h - 0.5 * h.powi(3))).abs() < 1e-12);
    // Across (bearing 120) it is reached at range_minor; both senses agree.
    assert!((m.gamma(along(minor, 800.0)) - 1.0).abs() < 1e-12);
    assert!((m.gamma(along(minor, -800.0)) - 1.0).abs() < 1e-12);
    assert!(m.gamma(along(minor, 700.0)) < 0.999);
    // Vertically at range_vertical.
    assert!((m.gamma([0.0, 0.0, 12.0]) - 1.0).abs() < 1e-12);
    assert!(m.gamma([0.0, 0.0, 11.0]) < 0.999);
    // North (bearing 0) is 30 degrees off the major axis: effective range
    // 1 / sqrt(cos^2 30 / 1500^2 + sin^2 30 / 800^2) = 1263.1... m.
    let a0 = 1.0 / ((0.75 / 1500.0f64.powi(2)) + (0.25 / 800.0f64.powi(2))).sqrt();
    assert!((m.structures[0].range_along(0.0) - a0).abs() < 1e-9);
    assert!((m.gamma([0.0, a0, 0.0]) - 1.0).abs() < 1e-12);
    assert!(m.gamma([0.0, 0.99 * a0, 0.0]) < 1.0);
    // A general lag by hand: d = (300, 400, 5):
    // d_major = 300 * 0.5 + 400 * 0.8660254 = 496.4101615; d_minor = 300 * 0.8660254 - 400 * 0.5 = 59.8076211.
    let hh = ((496.410_161_513_775_4 / 1500.0f64).powi(2)
        + (59.807_621_135_331_6 / 800.0f64).powi(2)
        + (5.0 / 12.0f64).powi(2))
    .sqrt();
    assert!((m.structures[0].scaled_lag([300.0, 400.0, 5.0]) - hh).abs() < 1e-12);
    let e = aniso(StructureKind::Exponential);
    assert!((e.gamma([300.0, 400.0, 5.0]) - (1.0 - (-3.0 * hh).exp())).abs() < 1e-12);
    // Exponential and Gaussian reach 95 % at each of the three ranges.
    for kind in [StructureKind::Exponential, StructureKind::Gaussian] {
        let m = aniso(kind);
        for d in [along(major, 1500.0), along(minor, 800.0), [0.0, 0.0, 12.0]] {
            assert!((m.gamma(d) - ONE_MINUS_E3).abs() < 1e-12, "{kind:?} {d:?}");
        }
    }
}

#[test]
fn azimuth_90_puts_major_axis_east() {
    let mut m = aniso(StructureKind::Spherical);
    m.structures[0].azimuth = 90.0;
    assert!((m.gamma([1500.0, 0.0, 0.0]) - 1.0).abs() < 1e-12);
    assert!(m.gamma([1000.0, 0.0, 0.0]) < 0.99);
    assert!((m.gamma([0.0, 800.0, 0.0]) - 1.0).abs() < 1e-12);
    assert!(m.gamma([0.0, 700.0, 0.0]) < 0.999);
}

#[test]
fn to_isotropic_uses_longest_structure() {
    let m = VariogramModel {
        nugget: 0.2,
        structures: vec![
            Structure {
                kind: StructureKind::Exponential,
                sill: 0.3,
                range_major: 200.0,
                range_minor: 100.0,
                azimuth: 0.0,
                range_vertical: 2.0,
            },
            Structure {
                kind: StructureKind::Spherical,
                sill: 0.5,
                range_major: 2000.0,
                range_minor: 700.0,
                azimuth: 60.0,
                range_vertical: 15.0,
            },
        ],
    };
    m.validate().unwrap();
    assert_eq!(m.search_structure().unwrap().range_major, 2000.0);
    let p = [431_250.0, 5_820_100.0, 7.0];
    let q = [432_000.0, 5_819_650.0, 11.5];
    let tp = m.to_isotropic(p);
    let tq = m.to_isotropic(q);
    let dist = ((tp[0] - tq[0]).powi(2) + (tp[1] - tq[1]).powi(2) + (tp[2] - tq[2]).powi(2)).sqrt();
    let d = [q[0] - p[0], q[1] - p[1], q[2] - p[2]];
    // By hand: bearing 60: major (0.8660254, 0.5), minor (0.5, -0.8660254).
    let dm = d[0] * 0.866_025_403_784_438_6 + d[1] * 0.5;
    let dn = d[0] * 0.5 - d[1] * 0.866_025_403_784_438_6;
    let h = ((dm / 2000.0).powi(2) + (dn / 700.0).powi(2) + (d[2] / 15.0).powi(2)).sqrt();
    assert!((dist - h).abs() < 1e-9 * h);
    // Pure nugget: identity.
    let n = VariogramModel {
        nugget: 1.0,
        structures: vec![],
    };
    assert_eq!(n.to_isotropic(p), p);
    assert_eq!(n.gamma([1.0, 0.0, 0.0]), 1.0);
}

fn msg(e: Error) -> String {
    e.to_string()
}

#[test]
fn validation_messages() {
    let good = aniso(StructureKind::Spherical);
    let mut m = good.clone();
    m.structures[0].sill = -0.5;
    assert!(msg(m.validate().unwrap_err()).contains("structures[0] (spherical): sill"));
    let mut m = good.clone();
    m.structures[0].range_vertical = 0.0;
    assert!(msg(m.validate().unwrap_err())
        .contains("range_vertical must be a finite practical range > 0"));
    let mut m = good.clone();
    m.structures[0].range_major = f64::NAN;
    assert!(msg(m.validate().unwrap_err()).contains("range_major"));
    let mut m = good.clone();
    m.nugget = -0.1;
    assert!(msg(m.validate().unwrap_err()).contains("nugget"));
    let mut m = good.clone();
    m.structures[0].range_minor = 2000.0;
    assert!(msg(m.validate().unwrap_err()).contains("exceeds range_major"));
    let z = VariogramModel {
        nugget: 0.0,
        structures: vec![],
    };
    assert!(msg(z.validate().unwrap_err()).contains("total sill"));
    let mut m = good;
    m.structures[0].azimuth = f64::INFINITY;
    assert!(msg(m.validate().unwrap_err()).contains("azimuth"));
}

#[test]
fn toml_project_syntax_reads_and_round_trips() {
    let path = std::path::Path::new("project.toml");
    // The syntax of the brief, with integers for ranges (TOML integers read as f64).
    let text = "[zones.reservoir.vp0]\nvariogram = { nugget = 0.1, structures = [{ kind = \"spherical\", sill = 0.9, range_major = 1500, range_minor = 800, azimuth = 30, range_vertical = 12 }] }\n";
    let m = VariogramModel::from_toml_entry(text, "zones.reservoir.vp0.variogram", path).unwrap();
    assert_eq!(m, {
        let mut a = aniso(StructureKind::Spherical);
        a.nugget = 0.1;
        a.structures[0].sill = 0.9;
        a
    });
    // Print and read back: identical, bit for bit.
    let m2 = VariogramModel {
        nugget: 1.0 / 3.0,
        structures: vec![
            Structure {
                kind: StructureKind::Gaussian,
                sill: 1e-20,
                range_major: 1_523.482_193_71,
                range_minor: 0.125,
                azimuth: 347.5,
                range_vertical: 2.0e7,
            },
            Structure::horizontally_isotropic(StructureKind::Exponential, 12.0, 40.0, 3.0),
        ],
    };
    let entry = m2.to_toml_entry("variogram");
    assert!(entry.starts_with("variogram = { nugget = "));
    let back = VariogramModel::from_toml_entry(&entry, "variogram", path).unwrap();
    assert_eq!(back, m2);
    // Independently parsed by the toml crate as a plain table.
    let t: toml::Table = toml::from_str(&entry).unwrap();
    let s0 = &t["variogram"]["structures"][0];
    assert_eq!(s0["kind"].as_str(), Some("gaussian"));
    assert_eq!(s0["range_major"].as_float(), Some(1_523.482_193_71));
    // Unknown key refused.
    let bad = "v = { nugget = 0.1, structures = [{ kind = \"spherical\", sill = 1, range_major = 10, range_minor = 5, azimuth = 0, range_vertical = 1, rang_vertical = 2 }] }";
    let e = msg(VariogramModel::from_toml_entry(bad, "v", path).unwrap_err());
    assert!(
        e.contains("project.toml") && e.contains("unknown field"),
        "{e}"
    );
    let bad = "v = { nuget = 0.1 }";
    assert!(
        msg(VariogramModel::from_toml_entry(bad, "v", path).unwrap_err()).contains("unknown field")
    );
    // Unknown kind.
    let bad = "v = { structures = [{ kind = \"cubic\", sill = 1, range_major = 10, range_minor = 5, azimuth = 0, range_vertical = 1 }] }";
    assert!(msg(VariogramModel::from_toml_entry(bad, "v", path).unwrap_err()).contains("cubic"));
    // Values are validated while reading.
    let bad = "v = { structures = [{ kind = \"spherical\", sill = -1, range_major = 10, range_minor = 5, azimuth = 0, range_vertical = 1 }] }";
    assert!(
        msg(VariogramModel::from_toml_entry(bad, "v", path).unwrap_err()).contains("sill must be")
    );
    // Syntax error: the line is named.
    let bad = "a = 1\n\nv = { nugget = }\n";
    let e = msg(VariogramModel::from_toml_entry(bad, "v", path).unwrap_err());
    assert!(e.starts_with("project.toml:3:"), "{e}");
    // Missing key.
    assert!(
        msg(VariogramModel::from_toml_entry("a = 1", "v", path).unwrap_err())
            .contains("missing key `v`")
    );
}

#[test]
fn json_round_trip() {
    let m = aniso(StructureKind::Exponential);
    let j = serde_json::to_string(&m).unwrap();
    let v: serde_json::Value = serde_json::from_str(&j).unwrap();
    assert_eq!(v["structures"][0]["kind"], "exponential");
    assert_eq!(v["structures"][0]["range_minor"], 800.0);
    let back: VariogramModel = serde_json::from_str(&j).unwrap();
    assert_eq!(back, m);
}
