//! Cell declustering weights (Journel 1983; Deutsch 1989).
//!
//! Wells are drilled where the reservoir is expected, so their samples are
//! preferentially clustered and their plain mean is biased. Cell declustering
//! lays a regular grid of cells over the data and gives each datum a weight
//! inversely proportional to the number of data sharing its cell:
//!
//! ```text
//! w_i = 1 / (n_c(i) * L)
//! ```
//!
//! with `n_c(i)` the number of data in datum `i`'s cell and `L` the number of
//! occupied cells, so every occupied cell carries the same total weight `1 / L`
//! and the weights sum to 1. Because the result depends on where the grid
//! starts, the weights are averaged over several grid origins. The cell size is
//! usually chosen by a sweep: the declustered mean is computed for a range of
//! cell sizes and the size giving the smallest mean (data clustered in high
//! values) or the largest (data clustered in low values) is kept.
//!
//! References: Journel, A.G. (1983), Nonparametric estimation of spatial
//! distributions, Mathematical Geology 15(3), 445-468; Deutsch, C.V. (1989),
//! DECLUS: a Fortran 77 program for determining optimum spatial declustering
//! weights, Computers and Geosciences 15(3), 325-332; Deutsch and Journel
//! (1998), GSLIB, 2nd ed., section VI.2.
//!
//! Conventions of this module (ours, documented here):
//!
//! * **Normalisation.** Weights sum to 1, so the declustered mean is
//!   `sum_i w_i v_i`. Multiply by the number of data `n` for the other common
//!   convention (weights with mean 1, as GSLIB's `declus` writes them).
//! * **Grid origins.** The grid is anchored at the data minimum of every axis
//!   (so the weights do not depend on where the coordinate system starts) and
//!   shifted back by `a / k` of a cell along each axis, for every `a` in
//!   `0..k` with `k = offsets_per_axis`: a regular `k x k` sub-grid of origins
//!   in plan, `k x k x k` in 3-D. Datum `i` is in cell
//!   `floor((x_i - origin) / cell)` along each axis. The weights are the mean over
//!   all origins (each origin's weights sum to 1). GSLIB instead moves the origin
//!   along the cell diagonal only; a sub-grid covers the shifts of the cell evenly.
//! * **Sweep.** The best size is the first of the given sizes reaching the
//!   smallest (or largest) declustered mean; ties keep the earlier size.
//! * **Per-well weights** ([`Layout::Wells`]): each well is first given the
//!   same total weight, shared equally by its samples, and the wells are then
//!   declustered as points at the mean position of their samples: sample `i` of
//!   well `w` with `n_w` samples gets `W_w / n_w`, `W_w` the well's
//!   declustering weight. A well logged over 200 m then counts as much as one
//!   logged over 20 m, and a cluster of wells counts as one cell.
//!
//! Distances and cell sizes are in metres. Everything is deterministic.

use crate::error::{Error, Result};
use rayon::prelude::*;
use serde::Serialize;
use std::collections::BTreeMap;

/// Most grid origins one call may average over (`offsets_per_axis` to the
/// power of the dimension).
pub const MAX_ORIGINS: usize = 4096;

/// Cell index magnitudes beyond this are refused (cell far too small for the
/// extent of the data); keeps `floor` results exact in `i64`.
const MAX_CELL_INDEX: f64 = 1.0e15;

/// Which extreme of the declustered mean the cell-size sweep looks for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum SweepCriterion {
    /// Smallest declustered mean: for data clustered in high values (wells
    /// drilled on the sweet spots).
    MinimiseMean,
    /// Largest declustered mean: for data clustered in low values.
    MaximiseMean,
}

/// One point of the sweep curve.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SweepPoint {
    /// Cell size (m; the horizontal size in 3-D).
    pub cell: f64,
    /// Declustered mean with this cell size, in the unit of the values.
    pub mean: f64,
}

/// The result of a cell-size sweep.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SweepResult {
    /// The chosen cell size (m; horizontal size in 3-D).
    pub best_size: f64,
    /// The declustered mean at `best_size`.
    pub best_mean: f64,
    /// The plain (equal-weight) mean of the values, for comparison.
    pub naive_mean: f64,
    /// The weights at `best_size`, one per datum, summing to 1.
    pub weights: Vec<f64>,
    /// Declustered mean for every size tried, in the order given.
    pub curve: Vec<SweepPoint>,
    /// The criterion used.
    pub criterion: SweepCriterion,
}

/// The positions to decluster, and how cells are shaped.
#[derive(Debug, Clone, Copy)]
pub enum Layout<'a> {
    /// Map positions `(x, y)` in metres; square cells.
    Plan(&'a [[f64; 2]]),
    /// Positions `(x, y, z)` in metres; cells of horizontal size `cell` and
    /// vertical size `z_ratio * cell` (`z_ratio > 0`; e.g. 0.01 for 100 m by 1 m
    /// cells on blocked well samples).
    Volume {
        /// The positions.
        points: &'a [[f64; 3]],
        /// Vertical cell size over horizontal cell size.
        z_ratio: f64,
    },
    /// Samples at map positions `(x, y)` (m) grouped by well label: wells count
    /// equally before declustering (see the module notes).
    Wells {
        /// The sample positions.
        points: &'a [[f64; 2]],
        /// The well of each sample (any labels; equal label, same well).
        wells: &'a [usize],
    },
}

impl Layout<'_> {
    /// Number of data (samples).
    pub fn len(&self) -> usize {
        match self {
            Layout::Plan(p) => p.len(),
            Layout::Volume { points, .. } => points.len(),
            Layout::Wells { points, .. } => points.len(),
        }
    }

    /// Whether there are no data.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Declustering weights (summing to 1) with cell size `cell` (m; the
    /// horizontal size for [`Layout::Volume`]), averaged over
    /// `offsets_per_axis` origins per axis (see the module notes).
    pub fn weights(&self, cell: f64, offsets_per_axis: usize) -> Result<Vec<f64>> {
        match *self {
            Layout::Plan(points) => cell_weights(points, cell, offsets_per_axis),
            Layout::Volume { points, z_ratio } => {
                check_positive("decluster: z_ratio", z_ratio)?;
                cell_weights_3d(points, cell, z_ratio * cell, offsets_per_axis)
            }
            Layout::Wells { points, wells } => well_weights(points, wells, cell, offsets_per_axis),
        }
    }
}

/// Cell declustering weights of map positions `(x, y)` (m) with square cells of
/// side `cell` (m), averaged over `offsets_per_axis^2` grid origins.
///
/// `w_i = mean over origins of 1 / (n_c(i) * L)`, with `n_c(i)` the number of
/// points in point `i`'s cell and `L` the number of occupied cells (Deutsch 1989,
/// Computers and Geosciences 15(3), 325-332). The weights sum to 1; the grid
/// origins are described in the [module notes](self).
///
/// Errors: no points, a non-finite coordinate, `cell` not positive and finite,
/// `offsets_per_axis` 0 or too large, or a cell too small for the extent.
pub fn cell_weights(points: &[[f64; 2]], cell: f64, offsets_per_axis: usize) -> Result<Vec<f64>> {
    check_positive("decluster: cell size", cell)?;
    weights_nd(points, [cell, cell], offsets_per_axis)
}

/// Cell declustering weights of positions `(x, y, z)` (m) with cells of
/// horizontal side `cell_xy` and height `cell_z` (m), averaged over
/// `offsets_per_axis^3` grid origins.
///
/// Same formula as [`cell_weights`] with anisotropic cells (GSLIB `declus`'s
/// cell anisotropy, Deutsch 1989): per-zone blocked well samples are 3-D, and
/// `cell_z` controls how many samples along one well share a cell.
pub fn cell_weights_3d(
    points: &[[f64; 3]],
    cell_xy: f64,
    cell_z: f64,
    offsets_per_axis: usize,
) -> Result<Vec<f64>> {
    check_positive("decluster: horizontal cell size", cell_xy)?;
    check_positive("decluster: vertical cell size", cell_z)?;
    weights_nd(points, [cell_xy, cell_xy, cell_z], offsets_per_axis)
}

/// Per-well declustering weights: every well first gets the same total weight,
/// shared equally by its samples; the wells are then declustered in plan as
/// points at the mean `(x, y)` (m) of their samples, with square cells of side
/// `cell` (m) and `offsets_per_axis^2` origins.
///
/// Sample `i` of well `w` (with `n_w` samples) gets `W_w / n_w`, where `W_w` is
/// well `w`'s weight from [`cell_weights`] on the well positions. The weights sum
/// to 1. `wells[i]` is the well label of sample `i`.
pub fn well_weights(
    points: &[[f64; 2]],
    wells: &[usize],
    cell: f64,
    offsets_per_axis: usize,
) -> Result<Vec<f64>> {
    if points.len() != wells.len() {
        return Err(Error::inconsistent(format!(
            "decluster: {} sample positions but {} well labels; expected one label per sample",
            points.len(),
            wells.len()
        )));
    }
    check_points(points)?;
    // Well label -> (index among wells, sum x, sum y, count), in label order.
    let mut groups: BTreeMap<usize, (usize, f64, f64, usize)> = BTreeMap::new();
    for (p, &w) in points.iter().zip(wells) {
        let g = groups.entry(w).or_insert((0, 0.0, 0.0, 0));
        g.1 += p[0];
        g.2 += p[1];
        g.3 += 1;
    }
    let mut centres = Vec::with_capacity(groups.len());
    for (k, g) in groups.values_mut().enumerate() {
        g.0 = k;
        centres.push([g.1 / g.3 as f64, g.2 / g.3 as f64]);
    }
    let well_w = cell_weights(&centres, cell, offsets_per_axis)?;
    let mut out = Vec::with_capacity(points.len());
    for w in wells {
        let (k, count) = match groups.get(w) {
            Some(g) => (g.0, g.3),
            None => return Err(Error::inconsistent("decluster: well label lost")),
        };
        let wk = well_w.get(k).copied().unwrap_or(0.0);
        out.push(wk / count as f64);
    }
    normalise(&mut out);
    Ok(out)
}

/// Cell-size sweep on map positions `(x, y)` (m): [`sweep_layout`] with
/// [`Layout::Plan`].
pub fn sweep(
    points: &[[f64; 2]],
    values: &[f64],
    sizes: &[f64],
    offsets_per_axis: usize,
    criterion: SweepCriterion,
) -> Result<SweepResult> {
    sweep_layout(
        &Layout::Plan(points),
        values,
        sizes,
        offsets_per_axis,
        criterion,
    )
}

/// Cell-size sweep (Deutsch 1989): for every cell size in `sizes` (m), the
/// declustering weights and the declustered mean `sum_i w_i v_i`; the size with
/// the smallest ([`SweepCriterion::MinimiseMean`]) or largest
/// ([`SweepCriterion::MaximiseMean`]) mean is kept, the first one on ties.
///
/// Returns the best size and its weights, and the whole curve (size, mean) for
/// reporting. [`size_range`] builds the usual evenly spaced sizes.
pub fn sweep_layout(
    layout: &Layout<'_>,
    values: &[f64],
    sizes: &[f64],
    offsets_per_axis: usize,
    criterion: SweepCriterion,
) -> Result<SweepResult> {
    if values.len() != layout.len() {
        return Err(Error::inconsistent(format!(
            "decluster: {} values for {} positions; expected one value per position",
            values.len(),
            layout.len()
        )));
    }
    if let Some(i) = values.iter().position(|v| !v.is_finite()) {
        return Err(Error::inconsistent(format!(
            "decluster: value {i} is {}; expected a finite number",
            values[i]
        )));
    }
    if sizes.is_empty() {
        return Err(Error::inconsistent(
            "decluster: no cell sizes to sweep; expected at least one",
        ));
    }
    for &s in sizes {
        check_positive("decluster: cell size", s)?;
    }
    let runs: Vec<Result<(Vec<f64>, f64)>> = sizes
        .par_iter()
        .map(|&s| {
            let w = layout.weights(s, offsets_per_axis)?;
            let m = w.iter().zip(values).map(|(w, v)| w * v).sum::<f64>();
            Ok((w, m))
        })
        .collect();
    let mut curve = Vec::with_capacity(sizes.len());
    let mut best: Option<(usize, f64)> = None;
    let mut all = Vec::with_capacity(sizes.len());
    for (k, r) in runs.into_iter().enumerate() {
        let (w, m) = r?;
        curve.push(SweepPoint {
            cell: sizes[k],
            mean: m,
        });
        let better = match best {
            None => true,
            Some((_, bm)) => match criterion {
                SweepCriterion::MinimiseMean => m < bm,
                SweepCriterion::MaximiseMean => m > bm,
            },
        };
        if better {
            best = Some((k, m));
        }
        all.push(w);
    }
    let (k, best_mean) = best.ok_or_else(|| Error::inconsistent("decluster: empty sweep"))?;
    let weights = all.swap_remove(k);
    let naive_mean = values.iter().sum::<f64>() / values.len() as f64;
    Ok(SweepResult {
        best_size: sizes[k],
        best_mean,
        naive_mean,
        weights,
        curve,
        criterion,
    })
}

/// `count` cell sizes evenly spaced from `min` to `max` (m), both included
/// (GSLIB `declus` tries `ncell + 1` sizes from `cmin` to `cmax` this way).
pub fn size_range(min: f64, max: f64, count: usize) -> Result<Vec<f64>> {
    check_positive("decluster: smallest cell size", min)?;
    check_positive("decluster: largest cell size", max)?;
    if max < min {
        return Err(Error::inconsistent(format!(
            "decluster: largest cell size {max} is below the smallest {min}"
        )));
    }
    match count {
        0 => Err(Error::inconsistent(
            "decluster: number of cell sizes is 0; expected at least 1",
        )),
        1 => Ok(vec![min]),
        _ => {
            let step = (max - min) / (count - 1) as f64;
            Ok((0..count)
                .map(|k| {
                    if k + 1 == count {
                        max
                    } else {
                        min + k as f64 * step
                    }
                })
                .collect())
        }
    }
}

fn check_positive(what: &str, v: f64) -> Result<()> {
    if v.is_finite() && v > 0.0 {
        Ok(())
    } else {
        Err(Error::inconsistent(format!(
            "{what} is {v}; expected a positive finite number (m)"
        )))
    }
}

fn check_points<const D: usize>(points: &[[f64; D]]) -> Result<()> {
    if points.is_empty() {
        return Err(Error::inconsistent(
            "decluster: no positions; expected at least one",
        ));
    }
    for (i, p) in points.iter().enumerate() {
        if let Some(a) = p.iter().position(|c| !c.is_finite()) {
            return Err(Error::inconsistent(format!(
                "decluster: position {i} has coordinate {a} = {}; expected finite coordinates (m)",
                p[a]
            )));
        }
    }
    Ok(())
}

fn normalise(w: &mut [f64]) {
    let s: f64 = w.iter().sum();
    if s > 0.0 {
        for x in w.iter_mut() {
            *x /= s;
        }
    }
}

/// The weights for cells of size `cell[a]` along axis `a`.
fn weights_nd<const D: usize>(
    points: &[[f64; D]],
    cell: [f64; D],
    offsets_per_axis: usize,
) -> Result<Vec<f64>> {
    check_points(points)?;
    let k = offsets_per_axis;
    let origins = u32::try_from(D)
        .ok()
        .and_then(|d| k.checked_pow(d))
        .filter(|&o| (1..=MAX_ORIGINS).contains(&o));
    let Some(n_origins) = origins else {
        return Err(Error::inconsistent(format!(
            "decluster: {k} grid offsets per axis in {D}-D; expected 1 to {} in plan, {} in 3-D \
             (at most {MAX_ORIGINS} origins)",
            (MAX_ORIGINS as f64).sqrt() as usize,
            (MAX_ORIGINS as f64).cbrt().round() as usize
        )));
    };
    let mut lo = [f64::INFINITY; D];
    let mut hi = [f64::NEG_INFINITY; D];
    for p in points {
        for a in 0..D {
            lo[a] = lo[a].min(p[a]);
            hi[a] = hi[a].max(p[a]);
        }
    }
    for a in 0..D {
        if (hi[a] - lo[a]) / cell[a] + 2.0 > MAX_CELL_INDEX {
            return Err(Error::inconsistent(format!(
                "decluster: cell size {} is too small for the extent {} of axis {a} \
                 (more than {MAX_CELL_INDEX:e} cells)",
                cell[a],
                hi[a] - lo[a]
            )));
        }
    }
    let n = points.len();
    let mut acc = vec![0.0; n];
    let mut keys: Vec<([i64; D], usize)> = Vec::with_capacity(n);
    for o in 0..n_origins {
        // Origin index o -> per-axis shift index (a_0, a_1, ...) in 0..k.
        let mut origin = [0.0; D];
        let mut rest = o;
        for a in 0..D {
            let s = rest % k;
            rest /= k;
            origin[a] = lo[a] - s as f64 / k as f64 * cell[a];
        }
        keys.clear();
        for (i, p) in points.iter().enumerate() {
            let mut key = [0i64; D];
            for a in 0..D {
                key[a] = ((p[a] - origin[a]) / cell[a]).floor() as i64;
            }
            keys.push((key, i));
        }
        keys.sort_unstable();
        // Occupied cells and their counts: runs of equal keys.
        let mut runs: Vec<(usize, usize)> = Vec::new(); // (start, len)
        let mut start = 0;
        for j in 1..=n {
            if j == n || keys[j].0 != keys[start].0 {
                runs.push((start, j - start));
                start = j;
            }
        }
        let occupied = runs.len() as f64;
        for &(s, len) in &runs {
            let w = 1.0 / (len as f64 * occupied);
            for entry in &keys[s..s + len] {
                acc[entry.1] += w;
            }
        }
    }
    for w in acc.iter_mut() {
        *w /= n_origins as f64;
    }
    normalise(&mut acc);
    Ok(acc)
}
