//! Variogram models: a nugget plus nested structures with geometric anisotropy.
//!
//! Lags are separation vectors `d = (dx, dy, ds)` in metres: world x (east), world
//! y (north) and the stratigraphic coordinate s.

use crate::error::{Error, Result};
use crate::geostat::CovarianceModel;
use serde::{Deserialize, Serialize};
use std::path::Path;

/// The shape of one nested structure.
///
/// All shapes use the **practical range** convention (Deutsch & Journel 1998,
/// *GSLIB: Geostatistical Software Library and User's Guide*, 2nd ed., section II.3;
/// from memory): at scaled lag `h = 1` the spherical model reaches its sill and the
/// exponential and Gaussian models reach 95 % of it (`1 - e^-3 = 0.9502`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum StructureKind {
    /// `g(h) = 1.5 h - 0.5 h^3` for `h < 1`, `1` otherwise (Matheron's spherical
    /// model; Journel & Huijbregts 1978, *Mining Geostatistics*, eq. III.9).
    Spherical,
    /// `g(h) = 1 - exp(-3 h)` (GSLIB practical-range exponential).
    Exponential,
    /// `g(h) = 1 - exp(-3 h^2)` (GSLIB practical-range Gaussian).
    Gaussian,
}

impl StructureKind {
    /// The unit-sill variogram `g(h)` at scaled lag `h >= 0` (dimensionless):
    ///
    /// * spherical: `g(h) = 1.5 h - 0.5 h^3` for `h < 1`, else `1`;
    /// * exponential: `g(h) = 1 - exp(-3 h)`;
    /// * Gaussian: `g(h) = 1 - exp(-3 h^2)`.
    ///
    /// Source: Deutsch & Journel (1998), GSLIB 2nd ed., section II.3 (practical
    /// range convention, from memory).
    pub fn unit_gamma(self, h: f64) -> f64 {
        match self {
            StructureKind::Spherical => {
                if h < 1.0 {
                    h * (1.5 - 0.5 * h * h)
                } else {
                    1.0
                }
            }
            StructureKind::Exponential => -(-3.0 * h).exp_m1(),
            StructureKind::Gaussian => -(-3.0 * h * h).exp_m1(),
        }
    }

    /// The name used in project files (`"spherical"`, `"exponential"`, `"gaussian"`).
    pub fn name(self) -> &'static str {
        match self {
            StructureKind::Spherical => "spherical",
            StructureKind::Exponential => "exponential",
            StructureKind::Gaussian => "gaussian",
        }
    }
}

/// One nested structure: a partial sill and a geometric anisotropy ellipsoid.
///
/// The major axis of the horizontal ellipse points at `azimuth` degrees clockwise
/// from north (from +y towards +x); the minor axis at `azimuth + 90`. The third
/// axis is the stratigraphic (vertical) one.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Structure {
    /// Shape.
    pub kind: StructureKind,
    /// Partial sill (property unit squared), `>= 0`.
    pub sill: f64,
    /// Practical range along the major horizontal axis (m), `> 0`.
    pub range_major: f64,
    /// Practical range along the minor horizontal axis (m), `> 0`, `<= range_major`.
    pub range_minor: f64,
    /// Bearing of the major axis, degrees clockwise from north.
    pub azimuth: f64,
    /// Practical range along the stratigraphic coordinate s (m), `> 0`.
    pub range_vertical: f64,
}

impl Structure {
    /// A structure with horizontally isotropic ranges (`range_major = range_minor
    /// = range_horizontal`, azimuth 0).
    pub fn horizontally_isotropic(
        kind: StructureKind,
        sill: f64,
        range_horizontal: f64,
        range_vertical: f64,
    ) -> Self {
        Structure {
            kind,
            sill,
            range_major: range_horizontal,
            range_minor: range_horizontal,
            azimuth: 0.0,
            range_vertical,
        }
    }

    /// Components of a horizontal vector `(dx, dy)` along the major and minor axes.
    ///
    /// With `a` the azimuth (clockwise from north), the major axis is the unit
    /// vector `(sin a, cos a)` and the minor axis `(cos a, -sin a)` (bearing
    /// `a + 90`), so `d_major = dx sin a + dy cos a`, `d_minor = dx cos a - dy sin a`
    /// (the GSLIB rotation for one azimuth angle; Deutsch & Journel 1998, section
    /// II.3, from memory).
    pub fn major_minor(&self, dx: f64, dy: f64) -> (f64, f64) {
        let (sa, ca) = self.azimuth.to_radians().sin_cos();
        (dx * sa + dy * ca, dx * ca - dy * sa)
    }

    /// Map a point (or lag) into the coordinates where this structure is
    /// isotropic with unit range: `(p_major / range_major, p_minor / range_minor,
    /// s / range_vertical)`. Euclidean lengths there are scaled lags.
    pub fn to_scaled(&self, p: [f64; 3]) -> [f64; 3] {
        let (u, v) = self.major_minor(p[0], p[1]);
        [
            u / self.range_major,
            v / self.range_minor,
            p[2] / self.range_vertical,
        ]
    }

    /// Scaled lag `h = sqrt((d_major/a_major)^2 + (d_minor/a_minor)^2 + (d_s/a_vert)^2)`
    /// (dimensionless; geometric anisotropy, Journel & Huijbregts 1978, section III.B).
    pub fn scaled_lag(&self, d: [f64; 3]) -> f64 {
        let q = self.to_scaled(d);
        (q[0] * q[0] + q[1] * q[1] + q[2] * q[2]).sqrt()
    }

    /// This structure's contribution `c g(h)` to the variogram at lag `d` (m).
    pub fn gamma(&self, d: [f64; 3]) -> f64 {
        self.sill * self.kind.unit_gamma(self.scaled_lag(d))
    }

    /// Practical range (m) along a horizontal bearing (degrees clockwise from
    /// north): the distance at which the scaled lag reaches 1,
    /// `1 / sqrt(cos^2(t)/a_major^2 + sin^2(t)/a_minor^2)` with `t` the angle from
    /// the major axis.
    pub fn range_along(&self, bearing: f64) -> f64 {
        let t = (bearing - self.azimuth).to_radians();
        let (st, ct) = t.sin_cos();
        1.0 / ((ct / self.range_major).powi(2) + (st / self.range_minor).powi(2)).sqrt()
    }

    fn validate(&self, index: usize) -> std::result::Result<(), String> {
        let at = format!("structures[{index}] ({})", self.kind.name());
        if !self.sill.is_finite() || self.sill < 0.0 {
            return Err(format!(
                "{at}: sill must be a finite number >= 0 (partial sill, property unit squared), got {}",
                self.sill
            ));
        }
        for (name, v) in [
            ("range_major", self.range_major),
            ("range_minor", self.range_minor),
            ("range_vertical", self.range_vertical),
        ] {
            if !v.is_finite() || v <= 0.0 {
                return Err(format!(
                    "{at}: {name} must be a finite practical range > 0 in metres, got {v}"
                ));
            }
        }
        if !self.azimuth.is_finite() {
            return Err(format!(
                "{at}: azimuth must be a finite bearing in degrees clockwise from north, got {}",
                self.azimuth
            ));
        }
        if self.range_minor > self.range_major {
            return Err(format!(
                "{at}: range_minor ({}) exceeds range_major ({}); the major axis is the longer one: \
                 swap the two ranges and turn the azimuth by 90 degrees",
                self.range_minor, self.range_major
            ));
        }
        Ok(())
    }
}

/// A variogram model: a nugget effect plus nested structures.
///
/// `gamma(d) = nugget * [d != 0] + sum_k c_k g_k(h_k(d))` with `h_k` the scaled
/// lag of structure k (see [`Structure::scaled_lag`]) and `g_k` its unit shape
/// ([`StructureKind::unit_gamma`]); the nested (linear) model of regionalisation
/// (Journel & Huijbregts 1978, section III.A).
///
/// In a project file (TOML) it reads
/// `{ nugget = 0.1, structures = [{ kind = "spherical", sill = 0.9, range_major = 1500,
/// range_minor = 800, azimuth = 30, range_vertical = 12 }] }`; unknown keys are refused
/// and the model is validated while it is read. [`VariogramModel::to_toml_inline`]
/// prints a model in that form.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(try_from = "RawModel")]
pub struct VariogramModel {
    /// Nugget effect (property unit squared), `>= 0`.
    pub nugget: f64,
    /// Nested structures.
    pub structures: Vec<Structure>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawModel {
    #[serde(default)]
    nugget: f64,
    #[serde(default)]
    structures: Vec<Structure>,
}

impl TryFrom<RawModel> for VariogramModel {
    type Error = String;
    fn try_from(raw: RawModel) -> std::result::Result<Self, String> {
        let m = VariogramModel {
            nugget: raw.nugget,
            structures: raw.structures,
        };
        m.check().map(|_| m)
    }
}

impl VariogramModel {
    /// Semivariance at lag `d = (dx, dy, ds)` (m), in property unit squared:
    /// `gamma(0) = 0`, `gamma(d != 0) = nugget + sum_k c_k g_k(h_k)`.
    pub fn gamma(&self, d: [f64; 3]) -> f64 {
        if d == [0.0; 3] {
            return 0.0;
        }
        self.nugget + self.structures.iter().map(|s| s.gamma(d)).sum::<f64>()
    }

    /// Total sill `nugget + sum_k c_k` (property unit squared): the variance of the
    /// stationary random function.
    pub fn total_sill(&self) -> f64 {
        self.nugget + self.structures.iter().map(|s| s.sill).sum::<f64>()
    }

    /// The structure whose anisotropy [`CovarianceModel::to_isotropic`] uses: the
    /// one with the longest `range_major` (the first of equals), or `None` for a
    /// pure nugget model.
    pub fn search_structure(&self) -> Option<&Structure> {
        let mut best: Option<&Structure> = None;
        for s in &self.structures {
            match best {
                Some(b) if s.range_major <= b.range_major => {}
                _ => best = Some(s),
            }
        }
        best
    }

    fn check(&self) -> std::result::Result<(), String> {
        if !self.nugget.is_finite() || self.nugget < 0.0 {
            return Err(format!(
                "variogram: nugget must be a finite number >= 0 (property unit squared), got {}",
                self.nugget
            ));
        }
        for (i, s) in self.structures.iter().enumerate() {
            s.validate(i).map_err(|m| format!("variogram: {m}"))?;
        }
        let total = self.total_sill();
        if !(total > 0.0 && total.is_finite()) {
            return Err(format!(
                "variogram: total sill (nugget + partial sills) must be > 0, got {total}"
            ));
        }
        Ok(())
    }

    /// Check every parameter: nugget and partial sills finite and `>= 0`, total sill
    /// `> 0`, ranges finite and `> 0`, `range_minor <= range_major`, azimuth finite.
    /// The error names the offending key (`structures[1].range_vertical`, ...).
    pub fn validate(&self) -> Result<()> {
        self.check().map_err(Error::inconsistent)
    }

    /// The model as a TOML inline table, ready to paste into a project file:
    ///
    /// ```text
    /// { nugget = 0.1, structures = [
    ///     { kind = "spherical", sill = 0.9, range_major = 1500.0, range_minor = 800.0, azimuth = 30.0, range_vertical = 12.0 },
    /// ] }
    /// ```
    ///
    /// Numbers are printed with the shortest representation that reads back to the
    /// same f64. (The line breaks sit inside the array, where TOML 1.0 allows them.)
    pub fn to_toml_inline(&self) -> String {
        let mut out = format!("{{ nugget = {}, structures = [", toml_float(self.nugget));
        if self.structures.is_empty() {
            out.push_str("] }");
            return out;
        }
        for s in &self.structures {
            out.push_str(&format!(
                "\n    {{ kind = \"{}\", sill = {}, range_major = {}, range_minor = {}, azimuth = {}, range_vertical = {} }},",
                s.kind.name(),
                toml_float(s.sill),
                toml_float(s.range_major),
                toml_float(s.range_minor),
                toml_float(s.azimuth),
                toml_float(s.range_vertical)
            ));
        }
        out.push_str("\n] }");
        out
    }

    /// `key = { ... }` followed by a newline: one project-file line (see
    /// [`VariogramModel::to_toml_inline`]).
    pub fn to_toml_entry(&self, key: &str) -> String {
        format!("{key} = {}\n", self.to_toml_inline())
    }

    /// Read the model stored under `key` (a dotted path such as
    /// `zones.reservoir.vp0.variogram`) in the TOML text of the file `path`. Errors
    /// name the file and, for syntax and value errors, the line.
    pub fn from_toml_entry(text: &str, key: &str, path: &Path) -> Result<Self> {
        let doc: toml::Table = toml::from_str(text).map_err(|e| toml_error(text, path, &e))?;
        let mut value: Option<&toml::Value> = None;
        let mut table = &doc;
        let parts: Vec<&str> = key.split('.').collect();
        for (i, part) in parts.iter().enumerate() {
            let v = table
                .get(*part)
                .ok_or_else(|| Error::project(path, format!("missing key `{key}`")))?;
            if i + 1 == parts.len() {
                value = Some(v);
            } else {
                table = v.as_table().ok_or_else(|| {
                    Error::project(path, format!("`{}` must be a table", parts[..=i].join(".")))
                })?;
            }
        }
        let value = value.ok_or_else(|| Error::project(path, "empty key"))?;
        VariogramModel::deserialize(value.clone())
            .map_err(|e| Error::project(path, format!("`{key}`: {e}")))
    }
}

/// Shortest round-trip f64 text that is a valid TOML float (`1500.0`, `0.1`, `1e-20`).
fn toml_float(v: f64) -> String {
    if v.is_nan() {
        return "nan".into();
    }
    if v.is_infinite() {
        return if v > 0.0 { "inf".into() } else { "-inf".into() };
    }
    format!("{v:?}")
}

fn toml_error(text: &str, path: &Path, e: &toml::de::Error) -> Error {
    let line = e.span().map(|sp| {
        let end = sp.start.min(text.len());
        text.as_bytes()[..end]
            .iter()
            .filter(|&&b| b == b'\n')
            .count()
            + 1
    });
    Error::input(path, line, e.message().to_string())
}

impl CovarianceModel for VariogramModel {
    /// `C(d) = total_sill - gamma(d)`, so `C(0)` is the total sill, nugget included.
    fn covariance(&self, d: [f64; 3]) -> f64 {
        self.total_sill() - self.gamma(d)
    }

    fn sill(&self) -> f64 {
        self.total_sill()
    }

    /// Scales by the anisotropy of the structure with the longest `range_major`
    /// ([`VariogramModel::search_structure`]): the Euclidean distance between two
    /// mapped points is that structure's scaled lag `h`. A pure nugget model maps
    /// points to themselves.
    fn to_isotropic(&self, p: [f64; 3]) -> [f64; 3] {
        match self.search_structure() {
            Some(s) => s.to_scaled(p),
            None => p,
        }
    }
}
