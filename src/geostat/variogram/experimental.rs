//! Experimental (sample) variograms.
//!
//! All three estimators use the method-of-moments estimator of Matheron (1963,
//! *Principles of geostatistics*, Economic Geology 58):
//!
//! `gamma(h) = 1 / (2 N(h)) * sum_{(i,j) in bin h} (z_i - z_j)^2`
//!
//! over the `N(h)` unordered pairs whose lag falls in the bin. A bin holds lags
//! `lower <= |h| < upper` (the same rule as `gstools.vario_estimate`).
//!
//! * [`vertical_variogram`]: pairs along each well only (dense, lag = `|ds|`);
//! * [`horizontal_variogram`]: pairs between different wells within a vertical
//!   tolerance, binned by horizontal distance (sparse);
//! * [`gridded_variogram`]: pairs of nodes of a dense gridded volume along grid
//!   directions, by lag in nodes.
//!
//! Missing values are NaN (or inactive nodes) and take part in no pair. The
//! sums are accumulated in a fixed order, so results are deterministic whatever
//! the number of threads.

use crate::error::{Error, Result};
use rayon::prelude::*;
use serde::{Deserialize, Serialize};

/// Common practice (Journel & Huijbregts 1978, *Mining Geostatistics*, p. 194, from
/// memory: "at least 30 to 50 pairs"): lags with fewer pairs are flagged.
pub const DEFAULT_MIN_PAIRS: u64 = 30;

/// Lag classes given by increasing edges: bin `k` holds lags `edges[k] <= h < edges[k+1]` (m).
///
/// Serialized as `{ edges = [...] }`; the edges are checked when read.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(try_from = "RawLagBins")]
pub struct LagBins {
    edges: Vec<f64>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawLagBins {
    edges: Vec<f64>,
}

impl TryFrom<RawLagBins> for LagBins {
    type Error = String;
    fn try_from(raw: RawLagBins) -> std::result::Result<Self, String> {
        LagBins::from_edges(raw.edges).map_err(|e| e.to_string())
    }
}

impl LagBins {
    /// `count` bins of width `width` (m) starting at 0: edges `0, w, 2w, ..., count w`.
    pub fn uniform(width: f64, count: usize) -> Result<Self> {
        if !(width.is_finite() && width > 0.0) {
            return Err(Error::inconsistent(format!(
                "variogram lag width must be a finite distance > 0 in metres, got {width}"
            )));
        }
        if count == 0 {
            return Err(Error::inconsistent(
                "variogram lag count must be at least 1, got 0",
            ));
        }
        LagBins::from_edges((0..=count).map(|k| k as f64 * width).collect())
    }

    /// Bins from explicit edges (m): finite, `>= 0`, strictly increasing, at least two.
    pub fn from_edges(edges: Vec<f64>) -> Result<Self> {
        if edges.len() < 2 {
            return Err(Error::inconsistent(format!(
                "variogram lag bins need at least two edges, got {}",
                edges.len()
            )));
        }
        for (k, e) in edges.iter().enumerate() {
            if !e.is_finite() || *e < 0.0 {
                return Err(Error::inconsistent(format!(
                    "variogram lag edge {k} must be a finite distance >= 0 in metres, got {e}"
                )));
            }
        }
        for k in 1..edges.len() {
            if edges[k] <= edges[k - 1] {
                return Err(Error::inconsistent(format!(
                    "variogram lag edges must increase strictly: edge {k} ({}) <= edge {} ({})",
                    edges[k],
                    k - 1,
                    edges[k - 1]
                )));
            }
        }
        Ok(LagBins { edges })
    }

    /// The edges (m).
    pub fn edges(&self) -> &[f64] {
        &self.edges
    }

    /// Number of bins.
    pub fn count(&self) -> usize {
        self.edges.len() - 1
    }

    /// Upper edge of the last bin (m): lags at or beyond it are not used.
    pub fn max_lag(&self) -> f64 {
        self.edges[self.edges.len() - 1]
    }

    /// The bin of lag `h`, or `None` outside `[edges[0], max_lag)`.
    pub fn find(&self, h: f64) -> Option<usize> {
        let n = self.edges.partition_point(|&e| e <= h);
        if n == 0 || n >= self.edges.len() {
            None
        } else {
            Some(n - 1)
        }
    }
}

/// One lag class of an experimental variogram.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct LagBin {
    /// Lower edge of the class (m).
    pub h_lower: f64,
    /// Upper edge of the class (m, exclusive).
    pub h_upper: f64,
    /// Mean lag of the pairs in the class (m); the class centre when it is empty.
    pub h_mean: f64,
    /// Semivariance (property unit squared); 0 when the class is empty.
    pub gamma: f64,
    /// Number of pairs `N(h)`.
    pub pairs: u64,
}

/// The direction an experimental variogram was computed along.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum LagDirection {
    /// Along the stratigraphic coordinate s.
    Vertical,
    /// Horizontal, all bearings pooled.
    Omnidirectional,
    /// Horizontal along a bearing (degrees clockwise from north) with a half-angle
    /// tolerance (degrees; 0 for exact grid directions).
    Horizontal {
        /// Bearing, degrees clockwise from north.
        azimuth: f64,
        /// Half-angle tolerance, degrees.
        tolerance: f64,
    },
}

impl LagDirection {
    /// Unit lag vector `(dx, dy, ds)` for a model evaluated along this direction;
    /// `None` for [`LagDirection::Omnidirectional`].
    pub fn unit_vector(&self) -> Option<[f64; 3]> {
        match *self {
            LagDirection::Vertical => Some([0.0, 0.0, 1.0]),
            LagDirection::Omnidirectional => None,
            LagDirection::Horizontal { azimuth, .. } => {
                let (s, c) = azimuth.to_radians().sin_cos();
                Some([s, c, 0.0])
            }
        }
    }

    /// Short text for plot legends and messages.
    pub fn describe(&self) -> String {
        match *self {
            LagDirection::Vertical => "vertical".into(),
            LagDirection::Omnidirectional => "horizontal, omnidirectional".into(),
            LagDirection::Horizontal { azimuth, tolerance } => {
                if tolerance > 0.0 {
                    format!("horizontal, azimuth {azimuth} +/- {tolerance} deg")
                } else {
                    format!("horizontal, azimuth {azimuth} deg")
                }
            }
        }
    }
}

/// A lag class with fewer pairs than asked for.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct LagWarning {
    /// Index of the class.
    pub lag: usize,
    /// Its mean lag (m).
    pub h_mean: f64,
    /// Its number of pairs.
    pub pairs: u64,
    /// Readable message.
    pub message: String,
}

/// An experimental variogram along one direction.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ExperimentalVariogram {
    /// Direction of the lags.
    pub direction: LagDirection,
    /// Lag classes, in order of distance.
    pub bins: Vec<LagBin>,
    /// The pair count below which a class is flagged.
    pub min_pairs: u64,
    /// Classes with fewer than `min_pairs` pairs (empty classes included).
    pub warnings: Vec<LagWarning>,
}

impl ExperimentalVariogram {
    fn from_accumulator(
        direction: LagDirection,
        lower: &[f64],
        upper: &[f64],
        acc: &Acc,
        min_pairs: u64,
    ) -> Self {
        let mut bins = Vec::with_capacity(acc.n.len());
        let mut warnings = Vec::new();
        for k in 0..acc.n.len() {
            let n = acc.n[k];
            let (h_mean, gamma) = if n > 0 {
                (acc.h[k] / n as f64, acc.sq[k] / (2.0 * n as f64))
            } else {
                (0.5 * (lower[k] + upper[k]), 0.0)
            };
            if n < min_pairs {
                warnings.push(LagWarning {
                    lag: k,
                    h_mean,
                    pairs: n,
                    message: if upper[k] > lower[k] {
                        format!(
                            "{}: lag class {k} ({} to {} m) has {n} pairs, fewer than {min_pairs}",
                            direction.describe(),
                            lower[k],
                            upper[k]
                        )
                    } else {
                        format!(
                            "{}: lag {k} ({} m) has {n} pairs, fewer than {min_pairs}",
                            direction.describe(),
                            lower[k]
                        )
                    },
                });
            }
            bins.push(LagBin {
                h_lower: lower[k],
                h_upper: upper[k],
                h_mean,
                gamma,
                pairs: n,
            });
        }
        ExperimentalVariogram {
            direction,
            bins,
            min_pairs,
            warnings,
        }
    }

    /// Classes that hold at least one pair.
    pub fn non_empty(&self) -> impl Iterator<Item = &LagBin> {
        self.bins.iter().filter(|b| b.pairs > 0)
    }

    /// Total number of pairs over all classes.
    pub fn total_pairs(&self) -> u64 {
        self.bins.iter().map(|b| b.pairs).sum()
    }
}

/// Per-bin sums: squared differences, lags, pair counts.
#[derive(Clone)]
struct Acc {
    sq: Vec<f64>,
    h: Vec<f64>,
    n: Vec<u64>,
}

impl Acc {
    fn new(k: usize) -> Self {
        Acc {
            sq: vec![0.0; k],
            h: vec![0.0; k],
            n: vec![0; k],
        }
    }
    #[inline]
    fn add(&mut self, k: usize, h: f64, dz: f64) {
        self.sq[k] += dz * dz;
        self.h[k] += h;
        self.n[k] += 1;
    }
    fn merge(&mut self, o: &Acc) {
        for k in 0..self.n.len() {
            self.sq[k] += o.sq[k];
            self.h[k] += o.h[k];
            self.n[k] += o.n[k];
        }
    }
}

/// One well's samples along the stratigraphic coordinate.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct WellSeries {
    /// Well name (for messages).
    pub well: String,
    /// Stratigraphic coordinate of each sample (m), any order, gaps allowed.
    pub s: Vec<f64>,
    /// Property value of each sample; NaN marks a missing sample.
    pub values: Vec<f64>,
}

/// Vertical experimental variogram from pairs **within each well only**.
///
/// For every well, every unordered pair of non-missing samples `(i, j)` with lag
/// `|s_i - s_j|` inside `bins` contributes `(z_i - z_j)^2` to its class;
/// `gamma = sum / (2 N)` (Matheron 1963). Deviation of the well is ignored: the lag
/// is the stratigraphic separation only. Cost `O(n * pairs within max_lag)`.
///
/// Errors: `s` and `values` of different lengths, or a non-finite `s` at a
/// non-missing sample (naming the well and sample index).
pub fn vertical_variogram(
    wells: &[WellSeries],
    bins: &LagBins,
    min_pairs: u64,
) -> Result<ExperimentalVariogram> {
    let nb = bins.count();
    let max_lag = bins.max_lag();
    let mut prepared: Vec<Vec<(f64, f64)>> = Vec::with_capacity(wells.len());
    for w in wells {
        if w.s.len() != w.values.len() {
            return Err(Error::inconsistent(format!(
                "well {}: {} stratigraphic coordinates but {} values",
                w.well,
                w.s.len(),
                w.values.len()
            )));
        }
        let mut pts = Vec::with_capacity(w.s.len());
        for (i, (&s, &v)) in w.s.iter().zip(&w.values).enumerate() {
            if v.is_nan() {
                continue;
            }
            if !v.is_finite() {
                return Err(Error::inconsistent(format!(
                    "well {}: sample {i} has an infinite value",
                    w.well
                )));
            }
            if !s.is_finite() {
                return Err(Error::inconsistent(format!(
                    "well {}: sample {i} has a value but no finite stratigraphic coordinate (s = {s})",
                    w.well
                )));
            }
            pts.push((s, v));
        }
        pts.sort_by(|a, b| a.0.total_cmp(&b.0));
        prepared.push(pts);
    }
    let parts: Vec<Acc> = prepared
        .par_iter()
        .map(|pts| {
            let mut acc = Acc::new(nb);
            for i in 0..pts.len() {
                let (si, zi) = pts[i];
                for &(sj, zj) in &pts[i + 1..] {
                    let h = sj - si;
                    if h >= max_lag {
                        break;
                    }
                    if let Some(k) = bins.find(h) {
                        acc.add(k, h, zi - zj);
                    }
                }
            }
            acc
        })
        .collect();
    let mut acc = Acc::new(nb);
    for p in &parts {
        acc.merge(p);
    }
    let e = bins.edges();
    Ok(ExperimentalVariogram::from_accumulator(
        LagDirection::Vertical,
        &e[..nb],
        &e[1..],
        &acc,
        min_pairs,
    ))
}

/// One sample for the horizontal variogram.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Sample {
    /// World x (m).
    pub x: f64,
    /// World y (m).
    pub y: f64,
    /// Stratigraphic coordinate (m).
    pub s: f64,
    /// Property value; NaN marks a missing sample.
    pub value: f64,
    /// Index of the well the sample belongs to.
    pub well: usize,
}

/// Directional selection of horizontal pairs.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DirectionFilter {
    /// Bearing of the direction, degrees clockwise from north.
    pub azimuth: f64,
    /// Half-angle tolerance (degrees, `0 < t <= 90`): a pair is kept when the angle
    /// between its horizontal separation and the direction (either sense) is
    /// at most `t`.
    pub tolerance: f64,
    /// Optional bandwidth (m): maximum distance of the separation vector from the
    /// direction line (GSLIB `bandwh`).
    pub bandwidth: Option<f64>,
}

/// Settings of [`horizontal_variogram`].
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct HorizontalOptions {
    /// Classes of horizontal distance (m).
    pub bins: LagBins,
    /// Pairs are kept when `|s_i - s_j| <= vertical_tolerance` (m).
    pub vertical_tolerance: f64,
    /// `None`: omnidirectional.
    pub direction: Option<DirectionFilter>,
    /// Classes with fewer pairs are flagged (see [`DEFAULT_MIN_PAIRS`]).
    pub min_pairs: u64,
}

/// Horizontal experimental variogram from pairs **between different wells**.
///
/// A pair `(i, j)` with `well_i != well_j`, both values present and
/// `|s_i - s_j| <= vertical_tolerance` is binned by its horizontal distance
/// `sqrt(dx^2 + dy^2)`; with a [`DirectionFilter`] only pairs whose horizontal
/// separation lies within the angular tolerance of the bearing (pairs at zero
/// horizontal distance always do) and within the bandwidth are kept.
/// `gamma = sum (z_i - z_j)^2 / (2 N)` (Matheron 1963). Classes with fewer than
/// `min_pairs` pairs are listed in `warnings`.
///
/// Cost: samples are sorted by s and each is paired only with those within the
/// vertical tolerance.
pub fn horizontal_variogram(
    samples: &[Sample],
    opts: &HorizontalOptions,
) -> Result<ExperimentalVariogram> {
    let tol = opts.vertical_tolerance;
    if !(tol.is_finite() && tol >= 0.0) {
        return Err(Error::inconsistent(format!(
            "horizontal variogram: vertical tolerance must be a finite distance >= 0 in metres, got {tol}"
        )));
    }
    let dir = match opts.direction {
        None => None,
        Some(d) => {
            if !d.azimuth.is_finite() {
                return Err(Error::inconsistent(format!(
                    "horizontal variogram: direction azimuth must be finite degrees, got {}",
                    d.azimuth
                )));
            }
            if !(d.tolerance > 0.0 && d.tolerance <= 90.0) {
                return Err(Error::inconsistent(format!(
                    "horizontal variogram: angular tolerance must be in (0, 90] degrees, got {}",
                    d.tolerance
                )));
            }
            if let Some(bw) = d.bandwidth {
                if !(bw.is_finite() && bw > 0.0) {
                    return Err(Error::inconsistent(format!(
                        "horizontal variogram: bandwidth must be a finite distance > 0 in metres, got {bw}"
                    )));
                }
            }
            let (sa, ca) = d.azimuth.to_radians().sin_cos();
            Some((sa, ca, d.tolerance.to_radians().cos(), d.bandwidth))
        }
    };
    let mut pts: Vec<Sample> = Vec::with_capacity(samples.len());
    for (i, p) in samples.iter().enumerate() {
        if p.value.is_nan() {
            continue;
        }
        if !(p.x.is_finite() && p.y.is_finite() && p.s.is_finite() && p.value.is_finite()) {
            return Err(Error::inconsistent(format!(
                "horizontal variogram: sample {i} (well index {}) has a non-finite coordinate or value \
                 (x = {}, y = {}, s = {}, value = {})",
                p.well, p.x, p.y, p.s, p.value
            )));
        }
        pts.push(*p);
    }
    pts.sort_by(|a, b| a.s.total_cmp(&b.s));
    let nb = opts.bins.count();
    let max_lag = opts.bins.max_lag();
    const CHUNK: usize = 256;
    let parts: Vec<Acc> = (0..pts.len().div_ceil(CHUNK))
        .into_par_iter()
        .map(|c| {
            let mut acc = Acc::new(nb);
            let end = ((c + 1) * CHUNK).min(pts.len());
            for i in c * CHUNK..end {
                let a = pts[i];
                for b in &pts[i + 1..] {
                    if b.s - a.s > tol {
                        break;
                    }
                    if a.well == b.well {
                        continue;
                    }
                    let dx = b.x - a.x;
                    let dy = b.y - a.y;
                    let h = dx.hypot(dy);
                    if h >= max_lag {
                        continue;
                    }
                    if let Some((sa, ca, cos_tol, bw)) = dir {
                        let along = dx * sa + dy * ca;
                        if h > 0.0 && along.abs() < cos_tol * h {
                            continue;
                        }
                        if let Some(bw) = bw {
                            let across = dx * ca - dy * sa;
                            if across.abs() > bw {
                                continue;
                            }
                        }
                    }
                    if let Some(k) = opts.bins.find(h) {
                        acc.add(k, h, a.value - b.value);
                    }
                }
            }
            acc
        })
        .collect();
    let mut acc = Acc::new(nb);
    for p in &parts {
        acc.merge(p);
    }
    let direction = match opts.direction {
        None => LagDirection::Omnidirectional,
        Some(d) => LagDirection::Horizontal {
            azimuth: d.azimuth,
            tolerance: d.tolerance,
        },
    };
    let e = opts.bins.edges();
    Ok(ExperimentalVariogram::from_accumulator(
        direction,
        &e[..nb],
        &e[1..],
        &acc,
        opts.min_pairs,
    ))
}

/// A property on a regular grid: `values[(i * nj + j) * nk + k]` for inline index
/// `i`, crossline index `j` and layer (or depth sample) `k`, the layout of a
/// trace-ordered volume. A single map is `nk = 1`.
///
/// Geometry follows the survey grid convention: moving along an inline (crossline
/// index `j` growing) goes at bearing `azimuth` in steps of `xline_spacing`;
/// moving along a crossline (inline index `i` growing) goes at bearing
/// `azimuth + 90` in steps of `inline_spacing`; layers are `layer_spacing` apart in s.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct GridValues<'a> {
    /// Values, NaN where missing.
    pub values: &'a [f64],
    /// `[ni, nj, nk]`: inlines, crosslines, layers.
    pub shape: [usize; 3],
    /// Distance between neighbouring inlines (m).
    pub inline_spacing: f64,
    /// Distance between neighbouring crosslines along an inline (m).
    pub xline_spacing: f64,
    /// Distance between layers along s (m); only used for [`GridDirection::Vertical`].
    pub layer_spacing: f64,
    /// Bearing (degrees clockwise from north) in which the crossline index grows.
    pub azimuth: f64,
    /// The mask: `true` marks a node that is used (e.g. inside the zone); `None`
    /// uses every node with a finite value.
    pub active: Option<&'a [bool]>,
}

/// A grid direction for [`gridded_variogram`].
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum GridDirection {
    /// Along an inline: node step `(0, +1, 0)`, bearing `azimuth`.
    AlongInline,
    /// Along a crossline: node step `(+1, 0, 0)`, bearing `azimuth + 90`.
    AlongCrossline,
    /// Node step `(+1, +1, 0)`.
    Diagonal,
    /// Node step `(+1, -1, 0)`.
    AntiDiagonal,
    /// Node step `(0, 0, +1)`, along s.
    Vertical,
}

impl GridDirection {
    fn step(self) -> [isize; 3] {
        match self {
            GridDirection::AlongInline => [0, 1, 0],
            GridDirection::AlongCrossline => [1, 0, 0],
            GridDirection::Diagonal => [1, 1, 0],
            GridDirection::AntiDiagonal => [1, -1, 0],
            GridDirection::Vertical => [0, 0, 1],
        }
    }
}

/// Gridded-volume experimental variograms along grid directions, by lag in nodes.
///
/// For direction step `(a, b, c)` and lag `L = 1..=nlags`, every pair of active
/// nodes `(i, j, k)` and `(i + L a, j + L b, k + L c)` with finite values
/// contributes; `gamma(L) = sum (z - z')^2 / (2 N(L))` (Matheron 1963), the
/// regular-grid estimator of GSLIB's `gam` (Deutsch & Journel 1998, section III.1,
/// from memory). Horizontal directions pair nodes of the same layer only.
/// The lag distance of class `L` is `L` times the step length
/// (`|a i_vec + b j_vec|` in the horizontal, `layer_spacing` vertically), and
/// `h_lower = h_upper = h_mean`. Cost `O(N * nlags)` per direction.
pub fn gridded_variogram(
    grid: &GridValues<'_>,
    directions: &[GridDirection],
    nlags: usize,
    min_pairs: u64,
) -> Result<Vec<ExperimentalVariogram>> {
    let [ni, nj, nk] = grid.shape;
    let n = ni
        .checked_mul(nj)
        .and_then(|v| v.checked_mul(nk))
        .ok_or_else(|| Error::inconsistent("gridded variogram: grid shape overflows"))?;
    if grid.values.len() != n {
        return Err(Error::inconsistent(format!(
            "gridded variogram: {} values for a grid of {ni} x {nj} x {nk} = {n} nodes",
            grid.values.len()
        )));
    }
    if let Some(m) = grid.active {
        if m.len() != n {
            return Err(Error::inconsistent(format!(
                "gridded variogram: mask has {} entries for a grid of {n} nodes",
                m.len()
            )));
        }
    }
    for (name, v) in [
        ("inline spacing", grid.inline_spacing),
        ("crossline spacing", grid.xline_spacing),
    ] {
        if !(v.is_finite() && v > 0.0) {
            return Err(Error::inconsistent(format!(
                "gridded variogram: {name} must be a finite distance > 0 in metres, got {v}"
            )));
        }
    }
    if directions.contains(&GridDirection::Vertical)
        && !(grid.layer_spacing.is_finite() && grid.layer_spacing > 0.0)
    {
        return Err(Error::inconsistent(format!(
            "gridded variogram: layer spacing must be a finite distance > 0 in metres for the vertical direction, got {}",
            grid.layer_spacing
        )));
    }
    if !grid.azimuth.is_finite() {
        return Err(Error::inconsistent(format!(
            "gridded variogram: grid azimuth must be finite degrees, got {}",
            grid.azimuth
        )));
    }
    if nlags == 0 {
        return Err(Error::inconsistent(
            "gridded variogram: number of lags must be at least 1",
        ));
    }
    let ok: Vec<bool> = (0..n)
        .map(|q| grid.values[q].is_finite() && grid.active.is_none_or_true(q))
        .collect();

    let (sa, ca) = grid.azimuth.to_radians().sin_cos();
    // Unit node steps in world coordinates (overview: grid convention).
    let jvec = [grid.xline_spacing * sa, grid.xline_spacing * ca];
    let ivec = [grid.inline_spacing * ca, -grid.inline_spacing * sa];

    let tasks: Vec<(usize, usize)> = (0..directions.len())
        .flat_map(|d| (1..=nlags).map(move |l| (d, l)))
        .collect();
    let sums: Vec<(f64, u64)> = tasks
        .par_iter()
        .map(|&(d, l)| {
            let st = directions[d].step();
            let off = [st[0] * l as isize, st[1] * l as isize, st[2] * l as isize];
            let range = |len: usize, o: isize| -> (usize, usize) {
                if o >= 0 {
                    (0, len.saturating_sub(o as usize))
                } else {
                    (((-o) as usize).min(len), len)
                }
            };
            let (i0, i1) = range(ni, off[0]);
            let (j0, j1) = range(nj, off[1]);
            let (k0, k1) = range(nk, off[2]);
            let delta = (off[0] * nj as isize + off[1]) * nk as isize + off[2];
            let mut sq = 0.0;
            let mut cnt = 0u64;
            for i in i0..i1 {
                for j in j0..j1 {
                    let base = (i * nj + j) * nk;
                    for k in k0..k1 {
                        let q = base + k;
                        let q2 = (q as isize + delta) as usize;
                        if ok[q] && ok[q2] {
                            let dz = grid.values[q] - grid.values[q2];
                            sq += dz * dz;
                            cnt += 1;
                        }
                    }
                }
            }
            (sq, cnt)
        })
        .collect();

    let mut out = Vec::with_capacity(directions.len());
    for (d, &dirn) in directions.iter().enumerate() {
        let st = dirn.step();
        let (step_len, direction) = if dirn == GridDirection::Vertical {
            (grid.layer_spacing, LagDirection::Vertical)
        } else {
            let vx = st[0] as f64 * ivec[0] + st[1] as f64 * jvec[0];
            let vy = st[0] as f64 * ivec[1] + st[1] as f64 * jvec[1];
            let az = match dirn {
                GridDirection::AlongInline => grid.azimuth.rem_euclid(360.0),
                GridDirection::AlongCrossline => (grid.azimuth + 90.0).rem_euclid(360.0),
                _ => vx.atan2(vy).to_degrees().rem_euclid(360.0),
            };
            (
                vx.hypot(vy),
                LagDirection::Horizontal {
                    azimuth: az,
                    tolerance: 0.0,
                },
            )
        };
        let mut acc = Acc::new(nlags);
        let mut lags = Vec::with_capacity(nlags);
        for l in 1..=nlags {
            let (sq, cnt) = sums[d * nlags + (l - 1)];
            let h = l as f64 * step_len;
            acc.sq[l - 1] = sq;
            acc.n[l - 1] = cnt;
            acc.h[l - 1] = h * cnt as f64;
            lags.push(h);
        }
        let mut ev =
            ExperimentalVariogram::from_accumulator(direction, &lags, &lags, &acc, min_pairs);
        for (b, &h) in ev.bins.iter_mut().zip(&lags) {
            b.h_mean = h;
        }
        out.push(ev);
    }
    Ok(out)
}

trait MaskExt {
    fn is_none_or_true(&self, q: usize) -> bool;
}
impl MaskExt for Option<&[bool]> {
    fn is_none_or_true(&self, q: usize) -> bool {
        match self {
            None => true,
            Some(m) => m[q],
        }
    }
}
