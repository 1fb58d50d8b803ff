//! Log curves mapped to properties and converted to SI units.
//!
//! The project file says which mnemonics carry which property and in what
//! unit ([`crate::project::CurveSpec`]). Here each well's curves are found,
//! their unit checked against the LAS header's own unit where it has one, and
//! the values converted to SI: velocities in m/s (sonic slowness in us/ft by
//! `v = 304800 / DT`), density in kg/m3, epsilon and delta dimensionless,
//! facies as integer codes.

use crate::error::{Error, Result};
use crate::project::{CurveProperty, CurveSpec, CurveUnit, FaciesDef};
use serde::Serialize;
use std::collections::BTreeMap;
use std::path::Path;

/// A curve as read from a file, before mapping: mnemonic, the file's unit text and values.
#[derive(Debug, Clone, Copy)]
pub struct FileCurve<'a> {
    /// Mnemonic as in the file.
    pub mnemonic: &'a str,
    /// Unit text as in the file (may be empty).
    pub unit: &'a str,
    /// Values in the file's unit; `None` where null.
    pub values: &'a [Option<f64>],
}

/// One property's log of a well, in SI units.
#[derive(Debug, Clone, Serialize)]
pub struct PropertyLog {
    /// The property.
    pub property: CurveProperty,
    /// The file mnemonic it came from.
    pub mnemonic: String,
    /// The file's unit text.
    pub file_unit: String,
    /// The unit used for the conversion (from the project file).
    pub unit: CurveUnit,
    /// Values in SI; `None` for null or physically meaningless samples.
    pub values: Vec<Option<f64>>,
}

impl PropertyLog {
    /// Number of non-null samples.
    pub fn count(&self) -> usize {
        self.values.iter().filter(|v| v.is_some()).count()
    }

    /// Minimum and maximum of the non-null values.
    pub fn range(&self) -> Option<(f64, f64)> {
        let mut it = self.values.iter().flatten();
        let first = *it.next()?;
        Some(it.fold((first, first), |(a, b), &v| (a.min(v), b.max(v))))
    }
}

/// Plausible ranges in SI used to catch a wrong unit (common practice: rock
/// velocities lie within roughly 1000-8000 m/s for Vp and 300-5000 m/s for Vs,
/// bulk densities 1000-3500 kg/m3; Thomsen parameters of rocks are within
/// -0.5..1 (Thomsen 1986, Table 1 spans about -0.3..0.4)). The median of a curve
/// outside its range means the unit or the mapping is wrong.
fn plausible(p: CurveProperty) -> Option<(f64, f64)> {
    match p {
        CurveProperty::Vp => Some((1000.0, 8000.0)),
        CurveProperty::Vs => Some((300.0, 5000.0)),
        CurveProperty::Density => Some((1000.0, 3500.0)),
        CurveProperty::Epsilon | CurveProperty::Delta => Some((-0.5, 1.0)),
        CurveProperty::Facies => None,
    }
}

fn median(v: &[f64]) -> Option<f64> {
    if v.is_empty() {
        return None;
    }
    let mut s = v.to_vec();
    s.sort_by(f64::total_cmp);
    Some(s[s.len() / 2])
}

/// Map one well's file curves to properties and convert to SI.
///
/// `well` and `file` name the well and its LAS file in messages. Errors: a
/// curve whose header unit is a recognised unit different from the project's
/// (unit mismatch), a median outside the plausible range (wrong unit), a facies
/// value that is not an integer or not a defined code. A missing curve is not an
/// error here (the property is simply absent for this well), except `vp`.
pub fn map_curves(
    well: &str,
    file: &Path,
    curves: &[FileCurve<'_>],
    specs: &[CurveSpec],
    facies: &[FaciesDef],
    md: &[f64],
) -> Result<(BTreeMap<CurveProperty, PropertyLog>, Vec<String>)> {
    let mut out = BTreeMap::new();
    let mut warnings = Vec::new();
    let ctx = |msg: String| Error::inconsistent(format!("well {well} ({}): {msg}", file.display()));
    for spec in specs {
        let key = spec.property.key();
        let found = spec
            .mnemonics
            .iter()
            .find_map(|m| curves.iter().find(|c| c.mnemonic.eq_ignore_ascii_case(m)));
        let Some(c) = found else {
            if spec.property == CurveProperty::Vp {
                let have: Vec<&str> = curves.iter().map(|c| c.mnemonic).collect();
                return Err(ctx(format!(
                    "no curve for vp: looked for {} (curves.vp.mnemonics), the file has {}",
                    spec.mnemonics.join(", "),
                    have.join(", ")
                )));
            }
            continue;
        };
        if spec.property != CurveProperty::Facies && !c.unit.trim().is_empty() {
            match CurveUnit::parse(c.unit) {
                Some(u) if u == spec.unit => {}
                Some(u) => {
                    return Err(ctx(format!(
                        "unit mismatch: curve {} is in {} by its LAS header, but curves.{key}.unit says {}",
                        c.mnemonic,
                        u.name(),
                        spec.unit.name()
                    )))
                }
                None => warnings.push(format!(
                    "well {well}: curve {} has unit \"{}\" that is not recognised; using curves.{key}.unit = {}",
                    c.mnemonic,
                    c.unit,
                    spec.unit.name()
                )),
            }
        }
        if c.values.len() != md.len() {
            return Err(ctx(format!(
                "curve {} has {} samples but the depth index has {}",
                c.mnemonic,
                c.values.len(),
                md.len()
            )));
        }
        let mut bad = 0usize;
        let mut values = Vec::with_capacity(c.values.len());
        for (k, v) in c.values.iter().enumerate() {
            let si = match v {
                None => None,
                Some(x) if spec.property == CurveProperty::Facies => {
                    if x.fract() != 0.0 || !facies.iter().any(|f| f64::from(f.code) == *x) {
                        let codes: Vec<String> =
                            facies.iter().map(|f| f.code.to_string()).collect();
                        return Err(ctx(format!(
                            "facies curve {} has value {x} at MD {:.2} m, which is not one of the [[facies]] codes {}",
                            c.mnemonic,
                            md[k],
                            codes.join(", ")
                        )));
                    }
                    Some(*x)
                }
                Some(x) => match spec.unit.to_si(*x) {
                    Some(s) => Some(s),
                    None => {
                        bad += 1;
                        None
                    }
                },
            };
            values.push(si);
        }
        if bad > 0 {
            warnings.push(format!(
                "well {well}: {bad} samples of {} are zero or negative and were treated as missing",
                c.mnemonic
            ));
        }
        if let Some((lo, hi)) = plausible(spec.property) {
            let vals: Vec<f64> = values.iter().flatten().copied().collect();
            if let Some(m) = median(&vals) {
                if !(lo..=hi).contains(&m) {
                    return Err(ctx(format!(
                        "curve {} gives a median {key} of {m:.4} in SI after conversion from {}, outside the plausible {lo}..{hi}; check curves.{key}.unit and the mnemonic mapping",
                        c.mnemonic,
                        spec.unit.name()
                    )));
                }
            }
        }
        out.insert(
            spec.property,
            PropertyLog {
                property: spec.property,
                mnemonic: c.mnemonic.to_string(),
                file_unit: c.unit.to_string(),
                unit: spec.unit,
                values,
            },
        );
    }
    Ok((out, warnings))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn spec(p: CurveProperty, m: &str, u: CurveUnit) -> CurveSpec {
        CurveSpec {
            property: p,
            mnemonics: vec![m.into()],
            unit: u,
        }
    }

    #[test]
    fn sonic_us_per_ft_converts_by_304800() {
        // Design overview: v = 304800 / DT for DT in us/ft (1 ft = 0.3048 m exactly).
        let md = [1.0, 2.0, 3.0];
        let vals = [Some(100.0), None, Some(50.0)];
        let c = [FileCurve {
            mnemonic: "dt",
            unit: "US/F",
            values: &vals,
        }];
        let (m, w) = map_curves(
            "W",
            Path::new("w.las"),
            &c,
            &[spec(
                CurveProperty::Vp,
                "DT",
                CurveUnit::MicrosecondsPerFoot,
            )],
            &[],
            &md,
        )
        .unwrap();
        assert!(w.is_empty());
        let v = &m[&CurveProperty::Vp].values;
        assert_eq!(v[0], Some(3048.0));
        assert_eq!(v[1], None);
        assert_eq!(v[2], Some(6096.0));
    }

    #[test]
    fn unit_mismatch_and_implausible_values_are_errors() {
        let md = [1.0];
        let vals = [Some(300.0)];
        let c = [FileCurve {
            mnemonic: "DT",
            unit: "US/M",
            values: &vals,
        }];
        let specs = [spec(
            CurveProperty::Vp,
            "DT",
            CurveUnit::MicrosecondsPerFoot,
        )];
        let e = map_curves("W", Path::new("w.las"), &c, &specs, &[], &md)
            .unwrap_err()
            .to_string();
        assert!(e.contains("unit mismatch") && e.contains("us/m"), "{e}");
        let c = [FileCurve {
            mnemonic: "DT",
            unit: "",
            values: &vals,
        }];
        // 300 us/ft read as us/ft is 1016 m/s (plausible); as m/s it is not plausible for vp
        let specs = [spec(CurveProperty::Vp, "DT", CurveUnit::MetresPerSecond)];
        let e = map_curves("W", Path::new("w.las"), &c, &specs, &[], &md)
            .unwrap_err()
            .to_string();
        assert!(e.contains("plausible"), "{e}");
    }
}
