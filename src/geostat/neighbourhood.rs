//! Kriging neighbourhoods that draw from several wells.
//!
//! Well data are dense along the wells and sparse between them: a plain
//! "nearest n samples" search around a target usually takes all of its samples
//! from the one or two nearest wells, and the kriging then cannot see the
//! lateral variation. [`WellIndex`] applies a per-well limit instead, the
//! "maximum samples per drillhole" restriction of resource estimation (common
//! practice; related to the octant search of GSLIB `kt3d`, Deutsch and Journel
//! 1998, *GSLIB*, 2nd ed., which limits samples per octant):
//!
//! * the search is done in anisotropy-scaled space
//!   ([`CovarianceModel::to_isotropic`]), where distance measures how far apart
//!   two points are for the covariance model; the search radius is in scaled
//!   units (1 = one range);
//! * wells are ranked by the scaled distance from the target to their nearest
//!   sample inside the radius (nearest wells first) and at most
//!   [`NeighbourhoodParams::max_wells`] wells are used;
//! * from each of those wells at most [`NeighbourhoodParams::max_per_well`] of
//!   its nearest samples inside the radius are taken;
//! * if that gives more than [`NeighbourhoodParams::max_total`] samples, the
//!   nearest ones are kept.
//!
//! Ties (equal distances up to `1e-9` scaled units) are broken the same way
//! everywhere (the shallower sample first in a well, the smaller well index
//! first between wells), so that a configuration shifted by whole layers
//! selects the shifted samples.
//!
//! **How a well is searched.** A well whose samples lie on a straight line in
//! scaled space (every vertical well, and straight deviated ones, under a
//! linear anisotropy map) is searched in one dimension: with `u` the line's unit
//! direction and `t_i` the samples' abscissae along it, the squared distance to a
//! target `q` is `perp^2 + (t_i - t*)^2`, `t* = (q - p_0).u`, so the `k`
//! nearest samples are the `k` nearest abscissae to `t*`: a binary search and a
//! two-sided walk, `O(log N + k)`. Other wells (curved trajectories) get
//! their own kiddo [`kiddo::ImmutableKdTree`]. (kiddo's mutable tree is not used:
//! it loses points when more than its bucket size share one coordinate value, as
//! samples of a vertical well share x and y.) Candidate wells are visited in order
//! of a lower bound of their distance (to the segment or the bounding box) and the
//! visit stops when the bound exceeds the distance of the `max_wells`-th best well.
//!
//! [`NearestIndex`] is the plain search (the `n` nearest samples of all wells),
//! one global kiddo [`kiddo::ImmutableKdTree`], for comparison and as a check.

use crate::error::{Error, Result};
use crate::geostat::kriging::SampleSet;
use crate::geostat::CovarianceModel;
use kiddo::SquaredEuclidean;
use std::num::NonZero;

/// Tolerance (scaled units) under which two distances count as tied.
const TIE_EPS: f64 = 1e-9;

/// Limits of a kriging neighbourhood.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NeighbourhoodParams {
    /// At most this many samples from any one well.
    pub max_per_well: usize,
    /// Samples from at most this many wells (the nearest ones).
    pub max_wells: usize,
    /// At most this many samples in all.
    pub max_total: usize,
    /// Search radius in anisotropy-scaled units (1 = one range of the model);
    /// `f64::INFINITY` for no limit.
    pub radius: f64,
}

impl NeighbourhoodParams {
    /// A per-well-limited neighbourhood.
    pub fn per_well(max_per_well: usize, max_wells: usize, max_total: usize, radius: f64) -> Self {
        NeighbourhoodParams {
            max_per_well,
            max_wells,
            max_total,
            radius,
        }
    }

    /// The plain search: the `n` nearest samples within `radius`, any wells.
    pub fn nearest(n: usize, radius: f64) -> Self {
        NeighbourhoodParams {
            max_per_well: n,
            max_wells: usize::MAX,
            max_total: n,
            radius,
        }
    }

    /// Check the limits: counts at least 1, radius positive (or infinite).
    pub fn validate(&self) -> Result<()> {
        if self.max_per_well == 0 || self.max_wells == 0 || self.max_total == 0 {
            return Err(Error::inconsistent(format!(
                "kriging neighbourhood: max_per_well ({}), max_wells ({}) and max_total ({}) \
                 must all be at least 1",
                self.max_per_well, self.max_wells, self.max_total
            )));
        }
        if self.radius.is_nan() || self.radius <= 0.0 {
            return Err(Error::inconsistent(format!(
                "kriging neighbourhood: search radius {} must be positive (scaled units, 1 = one \
                 range)",
                self.radius
            )));
        }
        Ok(())
    }
}

/// How one well is searched.
#[derive(Debug, Clone)]
enum Shape {
    /// Samples on a straight line in scaled space: `p_0 + t u`, sorted by `t`.
    Line {
        p0: [f64; 3],
        u: [f64; 3],
        /// Abscissae, ascending.
        t: Vec<f64>,
        /// Global sample index for each abscissa.
        item: Vec<u32>,
        /// Order of `item`: 1 ascending, -1 descending, 0 neither.
        order: i8,
        /// `(n - 1) / (t_last - t_first)`: inverse mean spacing, for a first guess.
        inv_dt: f64,
        /// `t` padded with `-inf` before and `+inf` after.
        tpad: Vec<f64>,
    },
    /// General trajectory: a kd-tree of the scaled positions.
    Cloud {
        tree: kiddo::ImmutableKdTree<f64, 3>,
        /// Global sample index for each tree item.
        item: Vec<u32>,
        lo: [f64; 3],
        hi: [f64; 3],
    },
}

/// What the lower bound of a well's distance needs (kept contiguous).
#[derive(Debug, Clone, Copy)]
enum Bound {
    /// Segment `p0 + t u`, `t0 <= t <= t1`.
    Line {
        p0: [f64; 3],
        u: [f64; 3],
        t0: f64,
        t1: f64,
    },
    /// Bounding box.
    Box { lo: [f64; 3], hi: [f64; 3] },
}

impl Bound {
    #[inline]
    fn lower2(&self, q: [f64; 3]) -> f64 {
        match *self {
            Bound::Line { p0, u, t0, t1 } => {
                let e = sub(q, p0);
                let ts = dot3(e, u);
                let perp2 = pos_part(dot3(e, e) - ts * ts);
                let out_of = pos_part(if ts < t0 { t0 - ts } else { ts - t1 });
                perp2 + out_of * out_of
            }
            Bound::Box { lo, hi } => {
                let mut s = 0.0;
                for k in 0..3 {
                    let d = pos_part(if q[k] < lo[k] {
                        lo[k] - q[k]
                    } else {
                        q[k] - hi[k]
                    });
                    s += d * d;
                }
                s
            }
        }
    }
}

/// One candidate well of a search.
#[derive(Debug, Clone, Copy)]
struct Hit {
    /// Squared scaled distance to the well's nearest sample in the radius.
    near2: f64,
    well: u32,
    /// Line well: the window `a..b` of abscissa indices. Cloud well: the range
    /// `a..b` of its candidates in the scratch candidate list.
    a: u32,
    b: u32,
    /// Squared perpendicular distance and abscissa of the query (line wells).
    perp2: f64,
    ts: f64,
}

/// Reusable buffers of [`WellIndex::search`] (one per thread).
#[derive(Debug, Default, Clone)]
pub struct SearchScratch {
    order: Vec<(f64, u32)>,
    hits: Vec<Hit>,
    cand: Vec<(f64, u32)>,
    pick: Vec<(f64, u32)>,
}

/// Per-well search structure over a [`SampleSet`] (see the module documentation).
#[derive(Debug, Clone)]
pub struct WellIndex {
    params: NeighbourhoodParams,
    scaled: Vec<[f64; 3]>,
    wells: Vec<Shape>,
    /// Compact copy of what the lower bounds need, one per well.
    bounds: Vec<Bound>,
    line_wells: usize,
}

fn sub(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}

fn dot3(a: [f64; 3], b: [f64; 3]) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}

/// Scaled positions of all samples; error on a non-finite result.
fn scaled_positions<M: CovarianceModel + ?Sized>(
    data: &SampleSet,
    model: &M,
) -> Result<Vec<[f64; 3]>> {
    let mut out = Vec::with_capacity(data.len());
    for sm in data.samples() {
        let p = model.to_isotropic(sm.pos);
        if !p.iter().all(|c| c.is_finite()) {
            return Err(Error::inconsistent(format!(
                "kriging neighbourhood: the covariance model maps well {} layer {} at {:?} to a \
                 non-finite scaled position {:?}",
                sm.well, sm.layer, sm.pos, p
            )));
        }
        out.push(p);
    }
    Ok(out)
}

/// `max(x, 0)` for finite `x` (plain comparison, no NaN handling needed).
#[inline(always)]
fn pos_part(x: f64) -> f64 {
    if x > 0.0 {
        x
    } else {
        0.0
    }
}

/// Sort by (value, index) by insertion: linear on nearly sorted input.
fn insertion_sort(v: &mut [(f64, u32)]) {
    let less = |a: &(f64, u32), b: &(f64, u32)| a.0 < b.0 || (a.0 == b.0 && a.1 < b.1);
    for i in 1..v.len() {
        let x = v[i];
        if !less(&x, &v[i - 1]) {
            continue;
        }
        let mut j = i;
        while j > 0 && less(&x, &v[j - 1]) {
            v[j] = v[j - 1];
            j -= 1;
        }
        v[j] = x;
    }
}

/// The first index `i` with `t[i] >= ts` (`t` ascending), starting from the
/// guess of a uniform spacing (one step either way) and falling back to a
/// binary search.
#[inline]
fn partition_at(t: &[f64], ts: f64, t0: f64, inv_dt: f64) -> usize {
    let len = t.len();
    let g = (ts - t0) * inv_dt;
    if g >= 0.0 && g < len as f64 {
        let mut i = g as usize; // floor
        if t[i] < ts {
            i += 1;
            if i == len || t[i] >= ts {
                return i;
            }
        } else if i == 0 || t[i - 1] < ts {
            return i;
        } else if i == 1 || t[i - 2] < ts {
            return i - 1;
        }
    }
    t.partition_point(|&ti| ti < ts)
}

/// Try to describe scaled points as a straight line.
fn as_line(pts: &[[f64; 3]], items: &[u32]) -> Option<Shape> {
    let first = *pts.first()?;
    let last = *pts.last()?;
    let d = sub(last, first);
    let len = dot3(d, d).sqrt();
    let u = if pts.len() == 1 {
        [0.0, 0.0, 1.0]
    } else if len > 0.0 {
        [d[0] / len, d[1] / len, d[2] / len]
    } else {
        return None;
    };
    let scale = first.iter().map(|c| c.abs()).fold(1.0, f64::max);
    let tol = 1e-9 + 1e-12 * scale;
    let mut pairs: Vec<(f64, u32)> = Vec::with_capacity(pts.len());
    for (p, &it) in pts.iter().zip(items) {
        let e = sub(*p, first);
        let t = dot3(e, u);
        let r = [e[0] - t * u[0], e[1] - t * u[1], e[2] - t * u[2]];
        if dot3(r, r).sqrt() > tol {
            return None;
        }
        pairs.push((t, it));
    }
    pairs.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
    let item: Vec<u32> = pairs.iter().map(|p| p.1).collect();
    let order = if item.windows(2).all(|w| w[0] < w[1]) {
        1
    } else if item.windows(2).all(|w| w[0] > w[1]) {
        -1
    } else {
        0
    };
    let t: Vec<f64> = pairs.iter().map(|p| p.0).collect();
    let span = t.last().copied().unwrap_or(0.0) - t.first().copied().unwrap_or(0.0);
    let inv_dt = if span > 0.0 {
        (t.len() - 1) as f64 / span
    } else {
        0.0
    };
    let mut tpad = Vec::with_capacity(t.len() + 2);
    tpad.push(f64::NEG_INFINITY);
    tpad.extend_from_slice(&t);
    tpad.push(f64::INFINITY);
    Some(Shape::Line {
        p0: first,
        u,
        t,
        item,
        order,
        inv_dt,
        tpad,
    })
}

impl WellIndex {
    /// Build the per-well search structure of `data` in the scaled space of `model`.
    pub fn new<M: CovarianceModel + ?Sized>(
        data: &SampleSet,
        model: &M,
        params: NeighbourhoodParams,
    ) -> Result<Self> {
        params.validate()?;
        if data.len() > u32::MAX as usize {
            return Err(Error::unsupported(
                "kriging data",
                None,
                format!("{} samples (at most {} supported)", data.len(), u32::MAX),
            ));
        }
        let scaled = scaled_positions(data, model)?;
        let mut wells = Vec::with_capacity(data.well_count());
        let mut line_wells = 0;
        for (_, range) in data.wells() {
            let pts = &scaled[range.clone()];
            let items: Vec<u32> = (range.start as u32..range.end as u32).collect();
            match as_line(pts, &items) {
                Some(shape) => {
                    line_wells += 1;
                    wells.push(shape);
                }
                None => {
                    let mut lo = [f64::INFINITY; 3];
                    let mut hi = [f64::NEG_INFINITY; 3];
                    for p in pts {
                        for k in 0..3 {
                            lo[k] = lo[k].min(p[k]);
                            hi[k] = hi[k].max(p[k]);
                        }
                    }
                    wells.push(Shape::Cloud {
                        tree: kiddo::ImmutableKdTree::new_from_slice(pts),
                        item: items,
                        lo,
                        hi,
                    });
                }
            }
        }
        let bounds = wells
            .iter()
            .map(|w| match w {
                Shape::Line { p0, u, t, .. } => Bound::Line {
                    p0: *p0,
                    u: *u,
                    t0: t.first().copied().unwrap_or(0.0),
                    t1: t.last().copied().unwrap_or(0.0),
                },
                Shape::Cloud { lo, hi, .. } => Bound::Box { lo: *lo, hi: *hi },
            })
            .collect();
        Ok(WellIndex {
            params,
            scaled,
            wells,
            bounds,
            line_wells,
        })
    }

    /// The neighbourhood limits.
    pub fn params(&self) -> &NeighbourhoodParams {
        &self.params
    }

    /// Scaled position of every sample (index as in [`SampleSet::samples`]).
    pub fn scaled_positions(&self) -> &[[f64; 3]] {
        &self.scaled
    }

    /// Number of wells searched in one dimension (straight in scaled space);
    /// the others use a kd-tree.
    pub fn line_well_count(&self) -> usize {
        self.line_wells
    }

    /// Convenience: the neighbours of world point `target` (sample indices,
    /// ascending). Allocates; use [`WellIndex::search`] in loops.
    pub fn neighbours<M: CovarianceModel + ?Sized>(&self, model: &M, target: [f64; 3]) -> Vec<u32> {
        let mut scratch = SearchScratch::default();
        let mut out = Vec::new();
        self.search(model.to_isotropic(target), &mut scratch, &mut out);
        out
    }

    /// The neighbours of the scaled point `q` (from
    /// [`CovarianceModel::to_isotropic`]): sample indices in ascending order,
    /// written to `out`.
    pub fn search(&self, q: [f64; 3], scratch: &mut SearchScratch, out: &mut Vec<u32>) {
        out.clear();
        let p = &self.params;
        let r2 = if p.radius.is_finite() {
            p.radius * p.radius
        } else {
            f64::MAX
        };
        if !q.iter().all(|c| c.is_finite()) {
            return;
        }
        // Lower bounds of every well's distance, sorted by (bound, well). The
        // order of the previous call is kept and re-sorted by insertion: along a
        // column it barely changes, so this is nearly linear. (The result is the
        // same whatever the starting order: (bound, well) is a total order.)
        if scratch.order.len() != self.wells.len() {
            scratch.order.clear();
            scratch
                .order
                .extend((0..self.wells.len() as u32).map(|w| (0.0, w)));
        }
        for entry in scratch.order.iter_mut() {
            entry.0 = self.bounds[entry.1 as usize].lower2(q);
        }
        insertion_sort(&mut scratch.order);
        scratch.hits.clear();
        scratch.cand.clear();
        let m = p.max_wells;
        // Visit wells by increasing bound; once m wells have samples, only a
        // well whose bound is below the m-th best distance can still enter.
        let mut thr = r2;
        for &(lb2, w) in &scratch.order {
            if lb2 > thr || lb2 > r2 {
                break;
            }
            self.visit(
                w,
                q,
                r2,
                p.max_per_well,
                &mut scratch.hits,
                &mut scratch.cand,
            );
            if scratch.hits.len() == m && thr == r2 {
                thr = scratch.hits.iter().map(|h| h.near2).fold(0.0, f64::max) + TIE_EPS;
            }
        }
        if scratch.hits.len() > m {
            scratch
                .hits
                .sort_unstable_by(|a, b| a.near2.total_cmp(&b.near2).then(a.well.cmp(&b.well)));
            scratch.hits.truncate(m);
        }
        // Wells occupy ascending, disjoint index ranges and each well's part is
        // emitted in ascending order: in well order the concatenation is sorted.
        scratch.hits.sort_unstable_by_key(|h| h.well);
        let total: usize = scratch.hits.iter().map(|h| (h.b - h.a) as usize).sum();
        let n = p.max_total;
        if total <= n {
            for h in &scratch.hits {
                self.emit(h, &scratch.cand, out);
            }
            return;
        }
        scratch.pick.clear();
        for h in &scratch.hits {
            match self.wells.get(h.well as usize) {
                Some(Shape::Line { t, item, .. }) => {
                    scratch.pick.extend((h.a as usize..h.b as usize).map(|i| {
                        let d = t[i] - h.ts;
                        (h.perp2 + d * d, item[i])
                    }));
                }
                _ => scratch
                    .pick
                    .extend_from_slice(&scratch.cand[h.a as usize..h.b as usize]),
            }
        }
        scratch
            .pick
            .select_nth_unstable_by(n - 1, |a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
        scratch.pick.truncate(n);
        out.extend(scratch.pick.iter().map(|c| c.1));
        out.sort_unstable();
    }

    /// Append the samples of one hit to `out` in ascending index order.
    fn emit(&self, h: &Hit, cand: &[(f64, u32)], out: &mut Vec<u32>) {
        let (a, b) = (h.a as usize, h.b as usize);
        match self.wells.get(h.well as usize) {
            Some(Shape::Line { item, order, .. }) => match order {
                1 => out.extend_from_slice(&item[a..b]),
                -1 => out.extend(item[a..b].iter().rev()),
                _ => {
                    let start = out.len();
                    out.extend_from_slice(&item[a..b]);
                    out[start..].sort_unstable();
                }
            },
            _ => out.extend(cand[a..b].iter().map(|c| c.1)),
        }
    }

    /// Search well `w` and record it as a hit if it has samples in the radius.
    fn visit(
        &self,
        w: u32,
        q: [f64; 3],
        r2: f64,
        k: usize,
        hits: &mut Vec<Hit>,
        cand: &mut Vec<(f64, u32)>,
    ) {
        if let Some(h) = self.search_well(w, q, r2, k, cand) {
            hits.push(h);
        }
    }

    /// The up to `k` nearest samples of well `w` within `r2` (squared): a
    /// window of abscissae (line wells) or candidates appended to `cand` in
    /// ascending sample index (kd-tree wells). `None` when there are none.
    fn search_well(
        &self,
        w: u32,
        q: [f64; 3],
        r2: f64,
        k: usize,
        cand: &mut Vec<(f64, u32)>,
    ) -> Option<Hit> {
        match self.wells.get(w as usize)? {
            Shape::Line {
                p0,
                u,
                t,
                inv_dt,
                tpad,
                ..
            } => {
                let e = sub(q, *p0);
                let ts = dot3(e, *u);
                let perp2 = pos_part(dot3(e, e) - ts * ts);
                let len = t.len();
                // tp = [-inf, t.., +inf]: an exhausted side has distance +inf.
                let tp = tpad;
                let mut hi = partition_at(t, ts, t[0], *inv_dt);
                let mut lo = hi;
                let mut near2 = f64::INFINITY;
                // Two-sided walk: the picked samples are the window lo..hi.
                // Branch-free choice of side (the choice is unpredictable).
                for _ in 0..k.min(len) {
                    let dl = ts - tp[lo];
                    let dh = tp[hi + 1] - ts;
                    let take_lo = dl <= dh + TIE_EPS;
                    let d = if take_lo { dl } else { dh };
                    let d2 = perp2 + d * d;
                    if d2 > r2 {
                        break;
                    }
                    if d2 < near2 {
                        near2 = d2;
                    }
                    lo -= usize::from(take_lo);
                    hi += usize::from(!take_lo);
                }
                (hi > lo).then_some(Hit {
                    near2,
                    well: w,
                    a: lo as u32,
                    b: hi as u32,
                    perp2,
                    ts,
                })
            }
            Shape::Cloud { tree, item, .. } => {
                let kk = NonZero::new(k.min(item.len()))?;
                let found = tree.nearest_n_within::<SquaredEuclidean>(&q, r2, kk, false);
                let start = cand.len();
                let mut near2 = f64::INFINITY;
                for nb in found {
                    if let Some(&it) = item.get(nb.item as usize) {
                        near2 = near2.min(nb.distance);
                        cand.push((nb.distance, it));
                    }
                }
                cand[start..].sort_unstable_by_key(|c| c.1);
                (cand.len() > start).then_some(Hit {
                    near2,
                    well: w,
                    a: start as u32,
                    b: cand.len() as u32,
                    perp2: 0.0,
                    ts: 0.0,
                })
            }
        }
    }
}

/// The plain neighbourhood: one kiddo [`kiddo::ImmutableKdTree`] over all samples
/// in scaled space.
#[derive(Debug, Clone)]
pub struct NearestIndex {
    tree: kiddo::ImmutableKdTree<f64, 3>,
    scaled: Vec<[f64; 3]>,
}

impl NearestIndex {
    /// Build the tree of `data` in the scaled space of `model`.
    pub fn new<M: CovarianceModel + ?Sized>(data: &SampleSet, model: &M) -> Result<Self> {
        let scaled = scaled_positions(data, model)?;
        Ok(NearestIndex {
            tree: kiddo::ImmutableKdTree::new_from_slice(&scaled),
            scaled,
        })
    }

    /// Scaled position of every sample.
    pub fn scaled_positions(&self) -> &[[f64; 3]] {
        &self.scaled
    }

    /// The `n` nearest samples to scaled point `q` within `radius` (scaled
    /// units), nearest first.
    pub fn nearest(&self, q: [f64; 3], n: usize, radius: f64) -> Vec<u32> {
        let Some(n) = NonZero::new(n.min(self.scaled.len())) else {
            return Vec::new();
        };
        let r2 = if radius.is_finite() {
            radius * radius
        } else {
            f64::MAX
        };
        self.tree
            .nearest_n_within::<SquaredEuclidean>(&q, r2, n, true)
            .into_iter()
            .map(|nb| nb.item as u32)
            .collect()
    }

    /// All samples within `radius` (scaled units) of scaled point `q`, in
    /// ascending index order.
    pub fn within(&self, q: [f64; 3], radius: f64) -> Vec<u32> {
        if self.scaled.is_empty() {
            return Vec::new();
        }
        let mut v: Vec<u32> = self
            .tree
            .within_unsorted::<SquaredEuclidean>(&q, radius * radius)
            .into_iter()
            .map(|nb| nb.item as u32)
            .collect();
        v.sort_unstable();
        v
    }
}
