//! Simple, ordinary and external-drift kriging with kriging variance, in
//! stratigraphic coordinates `(x, y, s)` (m).
//!
//! * [`system`]: the kriging equations for one target (with their sources) and
//!   the public one-target functions [`simple_kriging_weights`],
//!   [`ordinary_kriging_weights`], [`external_drift_kriging_weights`].
//! * [`Kriger`]: kriging of many targets from blocked well samples
//!   ([`SampleSet`]) with a per-well-limited neighbourhood
//!   ([`crate::geostat::neighbourhood`]), one grid column at a time
//!   ([`Kriger::krige_column`]) and columns in parallel ([`Kriger::krige_columns`]).
//!
//! # Factor once, reuse along a column
//!
//! Kriging weights depend only on the covariance model and on the relative
//! displacements among the neighbours and between them and the target (and, in
//! KED, on the drift offsets `f(x_i) - f(x_0)`; for SK, not on the mean or
//! trend). Well samples are blocked on the zone's layering, so for the targets
//! of one grid column (successive layers), the neighbourhood of a target is
//! often the neighbourhood of the previous one shifted down by the same number
//! of layers in every well, with the same relative geometry. [`Kriger::krige_column`]
//! detects that case and reuses the weights and variance of the last solved
//! system ("anchor"), recomputing only the weighted sum of the new values.
//!
//! The reuse test, for target `k` against target `k - 1`, is: same number of
//! neighbours; in canonical (well, layer) order, neighbour `i` is in the same
//! well as before and its layer index changed by the same `delta` for every `i`;
//! every displacement `x_i - x_0` equals the anchor's to `1e-9` m in each
//! coordinate; in KED, every offset `f(x_i) - f(x_0)` equals the anchor's to
//! `1e-11` relative to the largest offset. Comparing with the anchor (the last
//! configuration actually solved) rather than the previous target keeps the
//! tolerance from accumulating along a column. Where the test fails (zone
//! boundaries, log gaps, deviated wells, varying layer thickness, a drift that
//! is not a shift) the system is solved afresh. Results are the same as
//! independent solves up to rounding and the `1e-9` m tolerance.
//!
//! Parallelism: columns are independent and each is computed by one thread
//! from its own data; there is no floating-point reduction across threads,
//! so results do not depend on the number of threads.

pub mod data;
pub mod system;

pub use data::{Sample, SampleSet, Target};
pub use system::{
    external_drift_kriging_weights, ordinary_kriging_weights, simple_kriging_weights,
    KrigingWeights, DRIFT_ILL_POSED,
};

use crate::error::{Error, Result};
use crate::geostat::neighbourhood::{NeighbourhoodParams, SearchScratch, WellIndex};
use crate::geostat::CovarianceModel;
use rayon::prelude::*;
use system::{Constraints, Singular};

/// Tolerance (m, per coordinate) on displacements for reusing weights.
pub const REUSE_DISPLACEMENT_TOL: f64 = 1e-9;
/// Relative tolerance on KED drift offsets for reusing weights.
pub const REUSE_DRIFT_TOL: f64 = 1e-11;

/// Which kriging.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum KrigingKind {
    /// Simple kriging with a known constant mean (in the property's unit).
    SimpleMean(f64),
    /// Simple kriging of the residuals from a known trend: every sample and
    /// target carries its trend value ([`Sample::trend`], [`Target::trend`]).
    SimpleTrend,
    /// Ordinary kriging (unknown constant mean).
    Ordinary,
    /// Kriging with an external drift: every sample and target carries its
    /// drift value ([`Sample::drift`], [`Target::drift`]).
    ExternalDrift,
}

/// What happened at one target.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Note {
    /// Kriged as asked.
    #[default]
    Kriged,
    /// No sample in the neighbourhood. Simple kriging returns the mean (or
    /// trend) with variance `C(0)`; ordinary and external-drift kriging return
    /// NaN for both (nothing to estimate from).
    NoNeighbours,
    /// External-drift kriging fell back to ordinary kriging because the drift
    /// is (nearly) constant over the neighbourhood.
    DriftFallback,
}

/// The estimate at one target.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Estimate {
    /// Kriging estimate (property unit).
    pub value: f64,
    /// Kriging variance (squared property unit).
    pub variance: f64,
    /// Number of neighbours used.
    pub neighbours: u32,
    /// What happened.
    pub note: Note,
    /// True when the weights were reused from the previous target's configuration.
    pub reused: bool,
}

/// Counts over a run.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct KrigingStats {
    /// Targets estimated.
    pub targets: u64,
    /// Kriging systems solved.
    pub solves: u64,
    /// Targets whose weights were reused.
    pub reuses: u64,
    /// Targets without any neighbour.
    pub no_neighbours: u64,
    /// Targets where KED fell back to OK (solved or reused).
    pub drift_fallbacks: u64,
    /// Solves where Cholesky failed and LU was used.
    pub lu_fallbacks: u64,
}

impl std::ops::AddAssign for KrigingStats {
    fn add_assign(&mut self, o: Self) {
        self.targets += o.targets;
        self.solves += o.solves;
        self.reuses += o.reuses;
        self.no_neighbours += o.no_neighbours;
        self.drift_fallbacks += o.drift_fallbacks;
        self.lu_fallbacks += o.lu_fallbacks;
    }
}

/// Estimates of one column.
#[derive(Debug, Clone, PartialEq)]
pub struct ColumnEstimates {
    /// One estimate per target, in the order given.
    pub estimates: Vec<Estimate>,
    /// Counts.
    pub stats: KrigingStats,
}

/// Estimates of many columns.
#[derive(Debug, Clone, PartialEq)]
pub struct GridEstimates {
    /// Per column, one estimate per target, in the order given.
    pub columns: Vec<Vec<Estimate>>,
    /// Counts summed over all columns.
    pub stats: KrigingStats,
}

/// The last solved configuration of a column.
#[derive(Debug, Default, Clone)]
struct Anchor {
    valid: bool,
    disp: Vec<[f64; 3]>,
    g: Vec<f64>,
    w: Vec<f64>,
    variance: f64,
    note: Note,
}

/// Per-thread buffers.
#[derive(Debug, Default, Clone)]
struct Workspace {
    scratch: SearchScratch,
    nb: Vec<u32>,
    prev: Vec<u32>,
    pts: Vec<[f64; 3]>,
    g: Vec<f64>,
    w: Vec<f64>,
    anchor: Anchor,
}

/// What kriging needs of one sample, packed together.
#[derive(Debug, Clone, Copy)]
struct Meta {
    pos: [f64; 3],
    /// `z - m` (SK with a mean), `z - m(x)` (SK with a trend), `z` otherwise.
    resid: f64,
    /// Drift value (0 when not used).
    drift: f64,
    /// Dense well index.
    well: u32,
    layer: i32,
}

/// Kriging of targets from a set of blocked well samples.
///
/// Holds the samples (structure of arrays), the per-well search index in the
/// model's scaled space, the covariance model and the kriging kind.
pub struct Kriger<'m, M: CovarianceModel + ?Sized> {
    model: &'m M,
    kind: KrigingKind,
    index: WellIndex,
    /// Per sample, in [`SampleSet`] order.
    meta: Vec<Meta>,
    well_id: Vec<u32>,
    sill: f64,
}

impl<'m, M: CovarianceModel + ?Sized> Kriger<'m, M> {
    /// Prepare kriging of `data` with `model`, `neighbourhood` and `kind`.
    ///
    /// Errors: no samples; a non-finite or non-positive sill; a sample without
    /// the drift (KED) or trend (SK with a trend) value the kind needs; a
    /// non-finite mean; invalid neighbourhood limits.
    pub fn new(
        data: &SampleSet,
        model: &'m M,
        neighbourhood: NeighbourhoodParams,
        kind: KrigingKind,
    ) -> Result<Self> {
        if data.is_empty() {
            return Err(Error::inconsistent(
                "kriging: no data samples (expected at least one)",
            ));
        }
        let sill = model.sill();
        if !(sill.is_finite() && sill > 0.0) {
            return Err(Error::inconsistent(format!(
                "kriging: covariance model sill C(0) = {sill} (expected a positive number)"
            )));
        }
        let n = data.len();
        let mut resid = Vec::with_capacity(n);
        let mut drift = Vec::with_capacity(n);
        let mut well = Vec::with_capacity(n);
        let mut well_id = Vec::with_capacity(data.well_count());
        for (w, (id, range)) in data.wells().iter().enumerate() {
            well_id.push(*id);
            well.extend(std::iter::repeat(w as u32).take(range.len()));
        }
        for sm in data.samples() {
            let r = match kind {
                KrigingKind::SimpleMean(m) => {
                    if !m.is_finite() {
                        return Err(Error::inconsistent(format!(
                            "simple kriging: mean {m} is not a finite number"
                        )));
                    }
                    sm.value - m
                }
                KrigingKind::SimpleTrend => match sm.trend {
                    Some(t) => sm.value - t,
                    None => {
                        return Err(Error::inconsistent(format!(
                            "simple kriging with a trend: well {} layer {} has no trend value",
                            sm.well, sm.layer
                        )))
                    }
                },
                _ => sm.value,
            };
            resid.push(r);
            match (kind, sm.drift) {
                (KrigingKind::ExternalDrift, None) => {
                    return Err(Error::inconsistent(format!(
                        "kriging with external drift: well {} layer {} has no drift value",
                        sm.well, sm.layer
                    )))
                }
                (_, f) => drift.push(f.unwrap_or(0.0)),
            }
        }
        let index = WellIndex::new(data, model, neighbourhood)?;
        let meta = data
            .samples()
            .iter()
            .enumerate()
            .map(|(i, s)| Meta {
                pos: s.pos,
                resid: resid[i],
                drift: drift[i],
                well: well[i],
                layer: s.layer,
            })
            .collect();
        Ok(Kriger {
            model,
            kind,
            index,
            meta,
            well_id,
            sill,
        })
    }

    /// The search index.
    pub fn index(&self) -> &WellIndex {
        &self.index
    }

    /// The kriging kind.
    pub fn kind(&self) -> KrigingKind {
        self.kind
    }

    /// Estimate one target on its own (no reuse).
    pub fn estimate(&self, target: &Target) -> Result<Estimate> {
        let mut ws = Workspace::default();
        let mut stats = KrigingStats::default();
        self.one(target, 0, &mut ws, &mut stats, false)
    }

    /// Estimate a column of targets (successive layers of one grid column, or
    /// any sequence), reusing weights where the configuration repeats (see the
    /// module documentation).
    pub fn krige_column(&self, targets: &[Target]) -> Result<ColumnEstimates> {
        let mut ws = Workspace::default();
        self.column(targets, &mut ws, true)
    }

    /// Estimate a column solving every target on its own (the reference for
    /// [`Kriger::krige_column`]).
    pub fn krige_column_independent(&self, targets: &[Target]) -> Result<ColumnEstimates> {
        let mut ws = Workspace::default();
        self.column(targets, &mut ws, false)
    }

    /// Estimate many columns in parallel (rayon, one column per task), with
    /// reuse along each column. Results do not depend on the number of threads.
    /// On errors, the error of the first failing column (in order) is returned.
    pub fn krige_columns<C: AsRef<[Target]> + Sync>(&self, columns: &[C]) -> Result<GridEstimates> {
        self.columns_impl(columns, true)
    }

    /// As [`Kriger::krige_columns`] but solving every target on its own.
    pub fn krige_columns_independent<C: AsRef<[Target]> + Sync>(
        &self,
        columns: &[C],
    ) -> Result<GridEstimates> {
        self.columns_impl(columns, false)
    }

    fn columns_impl<C: AsRef<[Target]> + Sync>(
        &self,
        columns: &[C],
        reuse: bool,
    ) -> Result<GridEstimates> {
        let results: Vec<Result<ColumnEstimates>> = columns
            .par_iter()
            .map_init(Workspace::default, |ws, c| {
                self.column(c.as_ref(), ws, reuse)
            })
            .collect();
        let mut stats = KrigingStats::default();
        let mut out = Vec::with_capacity(results.len());
        for r in results {
            let c = r?;
            stats += c.stats;
            out.push(c.estimates);
        }
        Ok(GridEstimates {
            columns: out,
            stats,
        })
    }

    fn column(
        &self,
        targets: &[Target],
        ws: &mut Workspace,
        reuse: bool,
    ) -> Result<ColumnEstimates> {
        ws.anchor.valid = false;
        ws.prev.clear();
        let mut stats = KrigingStats::default();
        let mut estimates = Vec::with_capacity(targets.len());
        for (k, t) in targets.iter().enumerate() {
            estimates.push(self.one(t, k, ws, &mut stats, reuse)?);
        }
        Ok(ColumnEstimates { estimates, stats })
    }

    /// Can the anchor's weights be used for neighbours `ws.nb` of target `x0`
    /// (drift `f0`)? See the module documentation.
    fn matches(&self, ws: &Workspace, x0: [f64; 3], f0: f64) -> bool {
        let (nb, prev, a) = (&ws.nb, &ws.prev, &ws.anchor);
        if !a.valid || nb.len() != prev.len() || nb.len() != a.disp.len() {
            return false;
        }
        let (Some(&n0), Some(&p0)) = (nb.first(), prev.first()) else {
            return false;
        };
        let meta = &self.meta;
        let delta = meta[n0 as usize].layer as i64 - meta[p0 as usize].layer as i64;
        for ((&i, &j), d) in nb.iter().zip(prev).zip(&a.disp) {
            let (mi, mj) = (&meta[i as usize], &meta[j as usize]);
            if mi.well != mj.well || mi.layer as i64 - mj.layer as i64 != delta {
                return false;
            }
            let p = mi.pos;
            if (p[0] - x0[0] - d[0]).abs() > REUSE_DISPLACEMENT_TOL
                || (p[1] - x0[1] - d[1]).abs() > REUSE_DISPLACEMENT_TOL
                || (p[2] - x0[2] - d[2]).abs() > REUSE_DISPLACEMENT_TOL
            {
                return false;
            }
        }
        if self.kind == KrigingKind::ExternalDrift {
            let mut gmax = 0.0f64;
            for (&i, ga) in nb.iter().zip(&a.g) {
                gmax = gmax
                    .max((self.meta[i as usize].drift - f0).abs())
                    .max(ga.abs());
            }
            let tol = REUSE_DRIFT_TOL * gmax;
            for (&i, ga) in nb.iter().zip(&a.g) {
                if ((self.meta[i as usize].drift - f0) - ga).abs() > tol {
                    return false;
                }
            }
        }
        true
    }

    fn target_error(&self, k: usize, t: &Target, msg: &str) -> Error {
        Error::inconsistent(format!("kriging: target {k} at {:?}: {msg}", t.pos))
    }

    fn one(
        &self,
        t: &Target,
        k: usize,
        ws: &mut Workspace,
        stats: &mut KrigingStats,
        reuse: bool,
    ) -> Result<Estimate> {
        let x0 = t.pos;
        if !x0.iter().all(|c| c.is_finite()) {
            return Err(self.target_error(k, t, "position is not finite"));
        }
        let (base, f0) =
            match self.kind {
                KrigingKind::SimpleMean(m) => (m, 0.0),
                KrigingKind::SimpleTrend => match t.trend {
                    Some(v) if v.is_finite() => (v, 0.0),
                    _ => return Err(self.target_error(
                        k,
                        t,
                        "simple kriging with a trend needs a finite trend value at every target",
                    )),
                },
                KrigingKind::Ordinary => (0.0, 0.0),
                KrigingKind::ExternalDrift => match t.drift {
                    Some(v) if v.is_finite() => (0.0, v),
                    _ => return Err(self.target_error(
                        k,
                        t,
                        "kriging with external drift needs a finite drift value at every target",
                    )),
                },
            };
        stats.targets += 1;
        let q = self.model.to_isotropic(x0);
        self.index.search(q, &mut ws.scratch, &mut ws.nb);
        if ws.nb.is_empty() {
            ws.anchor.valid = false;
            ws.prev.clear();
            stats.no_neighbours += 1;
            let (value, variance) = match self.kind {
                KrigingKind::SimpleMean(_) | KrigingKind::SimpleTrend => (base, self.sill),
                _ => (f64::NAN, f64::NAN),
            };
            return Ok(Estimate {
                value,
                variance,
                neighbours: 0,
                note: Note::NoNeighbours,
                reused: false,
            });
        }
        let reused = reuse && self.matches(ws, x0, f0);
        if reused {
            stats.reuses += 1;
        } else {
            ws.pts.clear();
            ws.pts
                .extend(ws.nb.iter().map(|&i| self.meta[i as usize].pos));
            ws.g.clear();
            if self.kind == KrigingKind::ExternalDrift {
                ws.g.extend(ws.nb.iter().map(|&i| self.meta[i as usize].drift - f0));
            }
            let constraints = match self.kind {
                KrigingKind::SimpleMean(_) | KrigingKind::SimpleTrend => Constraints::None,
                KrigingKind::Ordinary => Constraints::Unbiased,
                KrigingKind::ExternalDrift => Constraints::Drift(&ws.g),
            };
            let solved = system::solve(self.model, &ws.pts, x0, constraints, &mut ws.w)
                .map_err(|e| self.singular(e, k, t, &ws.nb))?;
            stats.solves += 1;
            if solved.lu_fallback {
                stats.lu_fallbacks += 1;
            }
            let a = &mut ws.anchor;
            a.valid = reuse;
            a.disp.clear();
            a.disp.extend(
                ws.pts
                    .iter()
                    .map(|p| [p[0] - x0[0], p[1] - x0[1], p[2] - x0[2]]),
            );
            a.g.clear();
            a.g.extend_from_slice(&ws.g);
            std::mem::swap(&mut a.w, &mut ws.w);
            a.variance = solved.variance;
            a.note = if solved.drift_fallback {
                Note::DriftFallback
            } else {
                Note::Kriged
            };
        }
        let a = &ws.anchor;
        if a.note == Note::DriftFallback {
            stats.drift_fallbacks += 1;
        }
        let value = base + self.weighted_sum(&a.w, &ws.nb);
        let est = Estimate {
            value,
            variance: a.variance,
            neighbours: ws.nb.len() as u32,
            note: a.note,
            reused,
        };
        std::mem::swap(&mut ws.prev, &mut ws.nb);
        Ok(est)
    }

    /// `sum_i w_i r_i` over the neighbours, with four partial sums (the same
    /// order whether the weights are fresh or reused).
    #[inline]
    fn weighted_sum(&self, w: &[f64], nb: &[u32]) -> f64 {
        let meta = &self.meta;
        let mut acc = [0.0f64; 4];
        let mut wc = w.chunks_exact(4);
        let mut nc = nb.chunks_exact(4);
        for (w4, n4) in (&mut wc).zip(&mut nc) {
            for k in 0..4 {
                acc[k] += w4[k] * meta[n4[k] as usize].resid;
            }
        }
        let mut tail = 0.0;
        for (wi, &i) in wc.remainder().iter().zip(nc.remainder()) {
            tail += wi * meta[i as usize].resid;
        }
        (acc[0] + acc[1]) + (acc[2] + acc[3]) + tail
    }

    fn singular(&self, e: Singular, k: usize, t: &Target, nb: &[u32]) -> Error {
        let name = |i: usize| -> String {
            match nb.get(i) {
                Some(&s) => format!(
                    "well {} layer {}",
                    self.well_id
                        .get(self.meta[s as usize].well as usize)
                        .copied()
                        .unwrap_or(0),
                    self.meta[s as usize].layer
                ),
                None => format!("neighbour {i}"),
            }
        };
        match e.coincident {
            Some((i, j)) => self.target_error(
                k,
                t,
                &format!(
                    "singular kriging system: samples {} and {} are at the same position \
                     (merge or remove duplicate data)",
                    name(i),
                    name(j)
                ),
            ),
            None => self.target_error(
                k,
                t,
                "singular kriging system (is the covariance model positive definite?)",
            ),
        }
    }
}

/// Estimate one column of targets: builds a [`Kriger`] and calls
/// [`Kriger::krige_column`]. For many columns build the [`Kriger`] once.
pub fn krige_column<M: CovarianceModel + ?Sized>(
    targets: &[Target],
    data: &SampleSet,
    model: &M,
    neighbourhood: NeighbourhoodParams,
    kind: KrigingKind,
) -> Result<ColumnEstimates> {
    Kriger::new(data, model, neighbourhood, kind)?.krige_column(targets)
}
