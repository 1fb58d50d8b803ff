//! Per-region sample banks: for every region (zone, facies), or (zone, area,
//! facies) in a zone split into `[[areas]]`, a pool of joint
//! residual vectors (vp0, epsilon, delta) of the well samples, and a bank of
//! draws of the region's prior distribution over its cells.
//!
//! * Local trend at a location: the zone's kriged prior mean of the property
//!   there plus the facies offset `d_f` (declustered mean of facies `f`'s
//!   samples minus the declustered zone mean).
//! * Pool: `r_i = v_i - (m_loo(x_i) + d_f)`, with `m_loo` the kriged mean at the
//!   sample without the sample's own well (leave one well out: kriging is an
//!   exact interpolator, so the prior containing the sample would give residuals
//!   near 0), weighted by cell declustering of the wells (Deutsch 1989).
//! * Bank: `N` draws; each draws a cell of the region with probability
//!   proportional to its facies probability, a pool vector by weight, and adds
//!   the trend at that cell (the mean volumes as written, f32, plus `d_f`).
//!   In a zone with areas, a region's cells are the zone's cells whose map node
//!   lies in the area (nodes in none of the zone's areas form the area `rest`),
//!   and its samples those whose (x, y) lies in the area; `d_f` is then the
//!   region's declustered mean minus the declustered mean of the whole zone.
//!   Rows are in trace order of their cells (inline, crossline, depth).
//!
//! The volumes are streamed twice from the written SEG-Y files (memory: one
//! trace per volume plus the banks), so memory does not grow with the survey.

use super::manifest::ManifestBank;
use crate::error::{Error, Result};
use crate::formats::npy::write_npy_f32;
use crate::formats::segy::SegyReader;
use crate::frame::strat::StratFrame;
use crate::grid::SurveyGrid;
use crate::project::{area_of_node, AreaDef};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use serde::Serialize;
use std::path::{Path, PathBuf};

/// Regions with fewer wells than this borrow the area pool, then the zone pool.
pub const MIN_REGION_WELLS: usize = 2;
/// Regions with fewer samples than this borrow the area pool, then the zone pool.
pub const MIN_REGION_SAMPLES: usize = 30;

/// Bank columns.
pub const BANK_COLUMNS: [&str; 7] = ["vp0", "epsilon", "delta", "x", "y", "z", "s"];
/// Pool columns.
pub const POOL_COLUMNS: [&str; 5] = ["vp0", "epsilon", "delta", "weight", "well"];

/// A blocked well sample with all three properties, in one zone.
#[derive(Debug, Clone)]
pub struct JointSample {
    /// Study well index.
    pub well: usize,
    /// Facies index in the project's facies list (`None` without facies).
    pub facies: Option<usize>,
    /// World x, y, m.
    pub xy: [f64; 2],
    /// vp0 (m/s), epsilon, delta.
    pub values: [f64; 3],
    /// Leave-one-well-out kriged means at the sample (same units).
    pub loo: [f64; 3],
}

/// Whose samples a region's pool holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PoolSource {
    /// The region's own samples.
    Region,
    /// Too few: every facies of the region's (zone, area).
    Area,
    /// Too few again (or a zone without areas): the whole zone.
    Zone,
}

impl PoolSource {
    /// Manifest spelling: `region`, `area` or `zone`.
    pub fn name(self) -> &'static str {
        match self {
            PoolSource::Region => "region",
            PoolSource::Area => "area",
            PoolSource::Zone => "zone",
        }
    }
}

/// One region's residual pool and offset, ready to draw.
#[derive(Debug, Clone)]
pub struct RegionPool {
    /// Zone index.
    pub zone: usize,
    /// Area slot: `None` for a zone without areas; `Some(None)` for the zone's
    /// implicit area `rest`; `Some(Some(a))` for project area `a`.
    pub area: Option<Option<usize>>,
    /// Facies index (`None`: the whole zone, a project without facies).
    pub facies: Option<usize>,
    /// Facies offset `d_f`: vp0 (m/s), epsilon, delta.
    pub offset: [f64; 3],
    /// Residual vectors and their weights (sum 1) and well index.
    pub rows: Vec<([f64; 3], f64, usize)>,
    /// Samples of the region itself.
    pub own_samples: usize,
    /// Wells of the region itself.
    pub own_wells: usize,
    /// Wells contributing to `rows`.
    pub wells: usize,
    /// Whose samples `rows` holds.
    pub source: PoolSource,
    /// Generator stream of the region's bank (see [`assign_streams`]).
    pub stream: u64,
}

impl RegionPool {
    /// Whether a larger pool (area or zone) is borrowed.
    pub fn borrowed(&self) -> bool {
        self.source != PoolSource::Region
    }
}

/// What was drawn for one region.
#[derive(Debug, Clone, Serialize)]
pub struct BankReport {
    /// Zone name.
    pub zone: String,
    /// Area name (`None`: a zone without areas).
    pub area: Option<String>,
    /// Facies name.
    pub facies: Option<String>,
    /// Bank rows.
    pub count: usize,
    /// Pool rows.
    pub pool_count: usize,
    /// Wells contributing to the pool.
    pub wells: usize,
    /// Samples of the region itself.
    pub region_samples: usize,
    /// Wells of the region itself.
    pub region_wells: usize,
    /// `region`, `area` or `zone` (borrowed).
    pub pool: String,
}

fn count_wells(w: impl Iterator<Item = usize>) -> usize {
    let mut v: Vec<usize> = w.collect();
    v.sort_unstable();
    v.dedup();
    v.len()
}

fn weighted_mean3(rows: &[(&JointSample, f64)]) -> [f64; 3] {
    let tot: f64 = rows.iter().map(|r| r.1).sum();
    let mut m = [0.0; 3];
    if tot <= 0.0 {
        return m;
    }
    for (s, w) in rows {
        for (q, mq) in m.iter_mut().enumerate() {
            *mq += w * s.values[q];
        }
    }
    m.map(|v| v / tot)
}

/// The pools of every region of one zone without areas. `samples` are the
/// zone's joint samples, `weights` their declustering weights (sum 1), `nk` the
/// facies count (0 without facies). See [`zone_area_pools`].
pub fn zone_pools(
    zone: usize,
    samples: &[JointSample],
    weights: &[f64],
    nk: usize,
) -> Vec<RegionPool> {
    let slots = vec![0usize; samples.len()];
    zone_area_pools(zone, samples, weights, nk, &[None], &slots)
}

/// The pools of every region (area, facies) of one zone. `samples` are the
/// zone's joint samples, `weights` their declustering weights over the zone
/// (sum 1), `nk` the facies count (0 without facies), `areas` the zone's area
/// slots (`[None]` for a zone without areas; else `Some(a)` per project area and
/// `None` for `rest`), `slot[i]` the index in `areas` of sample `i`'s area.
///
/// Offset of region (a, f):
/// `d = sum_{i in (a,f)} w_i v_i / sum_{i in (a,f)} w_i - sum_i w_i v_i` (declustered means, Deutsch 1989 cell declustering, relative
/// to the whole zone); residual `r_i = v_i - (m_loo,i + d_{region(i)})`. A
/// region with fewer than [`MIN_REGION_WELLS`] wells or [`MIN_REGION_SAMPLES`]
/// samples gets the pool of its area (all facies; the zone weights renormalised)
/// when that one has enough, else the zone pool (every sample, the zone
/// weights). A region without samples gets the offset of its facies over the
/// whole zone (0 when the facies has no sample in the zone either).
pub fn zone_area_pools(
    zone: usize,
    samples: &[JointSample],
    weights: &[f64],
    nk: usize,
    areas: &[Option<usize>],
    slot: &[usize],
) -> Vec<RegionPool> {
    let all: Vec<(&JointSample, f64, usize)> = samples
        .iter()
        .zip(weights.iter().copied())
        .zip(slot.iter().copied())
        .map(|((s, w), a)| (s, w, a))
        .collect();
    let pairs = |rows: &[&(&JointSample, f64, usize)]| -> [f64; 3] {
        let v: Vec<(&JointSample, f64)> = rows.iter().map(|r| (r.0, r.1)).collect();
        weighted_mean3(&v)
    };
    let everything: Vec<&(&JointSample, f64, usize)> = all.iter().collect();
    let zone_mean = pairs(&everything);
    let facies_list: Vec<Option<usize>> = if nk == 0 {
        vec![None]
    } else {
        (0..nk).map(Some).collect()
    };
    let offset_where = |keep: &dyn Fn(&JointSample, usize) -> bool, f: Option<usize>| {
        let rows: Vec<&(&JointSample, f64, usize)> =
            all.iter().filter(|r| keep(r.0, r.2)).collect();
        if rows.is_empty() || f.is_none() {
            None
        } else {
            let m = pairs(&rows);
            Some([0, 1, 2].map(|q| m[q] - zone_mean[q]))
        }
    };
    // offsets per (area slot, facies)
    let mut offsets: Vec<Vec<[f64; 3]>> = Vec::with_capacity(areas.len());
    for a in 0..areas.len() {
        let row = facies_list
            .iter()
            .map(|&f| {
                offset_where(&|s, sa| sa == a && s.facies == f, f)
                    .or_else(|| offset_where(&|s, _| s.facies == f, f))
                    .unwrap_or([0.0; 3])
            })
            .collect();
        offsets.push(row);
    }
    let offset_of = |a: usize, f: Option<usize>| -> [f64; 3] {
        let k = facies_list.iter().position(|x| *x == f);
        k.and_then(|k| offsets.get(a).and_then(|o| o.get(k)).copied())
            .unwrap_or([0.0; 3])
    };
    let residual = |s: &JointSample, a: usize| -> [f64; 3] {
        let d = offset_of(a, s.facies);
        [0, 1, 2].map(|q| s.values[q] - (s.loo[q] + d[q]))
    };
    let pool_of = |rows: &[&(&JointSample, f64, usize)]| -> Option<Vec<([f64; 3], f64, usize)>> {
        let wells = count_wells(rows.iter().map(|r| r.0.well));
        let tot: f64 = rows.iter().map(|r| r.1).sum();
        if rows.len() < MIN_REGION_SAMPLES
            || wells < MIN_REGION_WELLS
            || tot.partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater)
        {
            return None;
        }
        Some(
            rows.iter()
                .map(|(s, w, a)| (residual(s, *a), w / tot, s.well))
                .collect(),
        )
    };
    let zone_rows: Vec<([f64; 3], f64, usize)> = all
        .iter()
        .map(|(s, w, a)| (residual(s, *a), *w, s.well))
        .collect();
    let zone_wells = count_wells(samples.iter().map(|s| s.well));
    let has_areas = areas.len() > 1 || areas.first().is_some_and(|a| a.is_some());
    let mut out = Vec::with_capacity(areas.len() * facies_list.len());
    for (ai, area) in areas.iter().enumerate() {
        let in_area: Vec<&(&JointSample, f64, usize)> = all.iter().filter(|r| r.2 == ai).collect();
        let area_pool = if has_areas { pool_of(&in_area) } else { None };
        for &f in &facies_list {
            let own: Vec<&(&JointSample, f64, usize)> = in_area
                .iter()
                .copied()
                .filter(|r| r.0.facies == f)
                .collect();
            let own_wells = count_wells(own.iter().map(|r| r.0.well));
            let (rows, source, wells) = match pool_of(&own) {
                Some(rows) => (rows, PoolSource::Region, own_wells),
                None => match &area_pool {
                    Some(rows) => (
                        rows.clone(),
                        PoolSource::Area,
                        count_wells(in_area.iter().map(|r| r.0.well)),
                    ),
                    None => (zone_rows.clone(), PoolSource::Zone, zone_wells),
                },
            };
            out.push(RegionPool {
                zone,
                area: has_areas.then_some(*area),
                facies: f,
                offset: offset_of(ai, f),
                rows,
                own_samples: own.len(),
                own_wells,
                wells,
                source,
                stream: 0,
            });
        }
    }
    out
}

/// Number the generator streams of `pools` (zone-major): a region of a zone
/// without areas gets `zone * F + f` (F = facies count, at least 1), its index
/// in a project without any areas, so splitting one zone into areas leaves the
/// banks of the other zones unchanged; area regions are numbered after all of
/// those, `nzones * F + k`, in order.
pub fn assign_streams(pools: &mut [RegionPool], nzones: usize, nk: usize) {
    let f_count = nk.max(1);
    let mut next = (nzones * f_count) as u64;
    for p in pools.iter_mut() {
        p.stream = if p.area.is_none() {
            (p.zone * f_count + p.facies.unwrap_or(0)) as u64
        } else {
            next += 1;
            next - 1
        };
    }
}

/// The written volumes a bank draw reads.
#[derive(Debug, Clone)]
pub struct BankVolumes {
    /// Zone-index volume.
    pub zone: PathBuf,
    /// Mean volumes of vp0, epsilon, delta.
    pub means: [PathBuf; 3],
    /// Facies-probability volumes, in facies order (empty without facies).
    pub probabilities: Vec<PathBuf>,
    /// The facies offsets the mean volumes hold (the facies trend), per zone,
    /// per facies: vp0, epsilon, delta; empty (or zeros) without it. A bank
    /// trend is the mean minus their probability-weighted sum at the cell plus
    /// the region's own offset.
    pub facies_offsets: Vec<Vec<[f64; 3]>>,
}

/// Seed and stream of region `r`'s generator: ChaCha8 seeded from the project
/// seed, stream = region index (independent streams, independent of threads).
fn region_rng(seed: u64, stream: u64) -> ChaCha8Rng {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    rng.set_stream(stream);
    rng
}

struct Streams {
    readers: Vec<SegyReader<std::io::BufReader<std::fs::File>>>,
    bufs: Vec<Vec<f32>>,
}

impl Streams {
    fn open(v: &BankVolumes, nz: usize) -> Result<Streams> {
        let mut paths: Vec<&Path> = vec![&v.zone];
        paths.extend(v.means.iter().map(|p| p.as_path()));
        paths.extend(v.probabilities.iter().map(|p| p.as_path()));
        let readers = paths
            .iter()
            .map(|p| SegyReader::open(p))
            .collect::<Result<Vec<_>>>()?;
        for r in &readers {
            if r.headers().sample_count != nz {
                return Err(Error::inconsistent(format!(
                    "{}: {} samples per trace, the grid has {nz}",
                    r.path().display(),
                    r.headers().sample_count
                )));
            }
        }
        Ok(Streams {
            bufs: vec![vec![0f32; nz]; readers.len()],
            readers,
        })
    }

    /// Read the next trace of every volume; `false` at the end.
    fn next(&mut self) -> Result<bool> {
        let mut any = None;
        for (r, b) in self.readers.iter_mut().zip(self.bufs.iter_mut()) {
            let got = r.next_trace(Some(b))?.is_some();
            if *any.get_or_insert(got) != got {
                return Err(Error::inconsistent(format!(
                    "{}: trace count differs from the other volumes",
                    r.path().display()
                )));
            }
        }
        Ok(any.unwrap_or(false))
    }

    /// Probability of region facies `f` (None: 1) at sample `k`.
    fn prob(&self, f: Option<usize>, k: usize) -> f64 {
        match f {
            None => 1.0,
            Some(f) => self
                .bufs
                .get(4 + f)
                .and_then(|b| b.get(k))
                .map_or(0.0, |v| f64::from(*v).max(0.0)),
        }
    }
}

/// Region index of a cell's zone and facies in `pools` (zone-major, facies order).
fn regions_of_zone(pools: &[RegionPool], zone: usize) -> std::ops::Range<usize> {
    let a = pools.iter().position(|p| p.zone == zone).unwrap_or(0);
    let n = pools.iter().filter(|p| p.zone == zone).count();
    a..a + n
}

/// Draw `count` bank rows for every region of `pools` from the written volumes
/// and return them (row-major, 7 columns) with the region masses.
///
/// Pass 1 sums each region's probability mass `M = sum_c p_f(c)` over the cells
/// `c` of its zone; `count` uniform positions in `[0, M)` are sorted (inverse
/// transform sampling of the discrete cell distribution, common practice);
/// pass 2 walks the cumulative mass in the same cell order and takes, for each
/// position, the cell whose mass interval holds it. Residuals are drawn from the
/// pool by weight with the same generator (after the positions).
///
/// A region of a zone with areas (`pool.area` set) takes only the cells whose
/// map node is in its area ([`crate::project::area_of_node`] over `areas`).
#[allow(clippy::too_many_arguments)]
pub fn draw_banks(
    grid: &SurveyGrid,
    frame: &StratFrame,
    volumes: &BankVolumes,
    pools: &[RegionPool],
    areas: &[AreaDef],
    seed: u64,
    count: usize,
) -> Result<(Vec<Vec<f32>>, Vec<f64>)> {
    let nz = grid.z_count;
    let nzones = frame.zones.len();
    let zone_ranges: Vec<std::ops::Range<usize>> =
        (0..nzones).map(|z| regions_of_zone(pools, z)).collect();
    let nj = grid.xline_count.max(1);
    // whether region r takes the cells of node (i, j)
    let node_regions = |i: usize, j: usize| -> Vec<bool> {
        pools
            .iter()
            .map(|p| match p.area {
                None => true,
                Some(a) => area_of_node(areas, grid, p.zone, i, j) == a,
            })
            .collect()
    };
    // pass 1: mass per region
    let mut mass = vec![0f64; pools.len()];
    let mut st = Streams::open(volumes, nz)?;
    let mut trace = 0usize;
    while st.next()? {
        let here = node_regions(trace / nj, trace % nj);
        trace += 1;
        for k in 0..nz {
            let z = st.bufs[0][k];
            if z.is_nan() || z < 0.0 || z as usize >= nzones {
                continue;
            }
            for r in zone_ranges[z as usize].clone() {
                if !here[r] {
                    continue;
                }
                mass[r] += st.prob(pools[r].facies, k);
            }
        }
    }
    // positions and residual picks
    let mut targets: Vec<Vec<f64>> = Vec::with_capacity(pools.len());
    let mut picks: Vec<Vec<usize>> = Vec::with_capacity(pools.len());
    for (r, pool) in pools.iter().enumerate() {
        let n = if mass[r] > 0.0 && !pool.rows.is_empty() {
            count
        } else {
            0
        };
        let mut rng = region_rng(seed, pool.stream);
        let mut pos: Vec<f64> = (0..n).map(|_| rng.gen::<f64>() * mass[r]).collect();
        pos.sort_by(f64::total_cmp);
        let mut cum = Vec::with_capacity(pool.rows.len());
        let mut c = 0.0;
        for row in &pool.rows {
            c += row.1;
            cum.push(c);
        }
        let pk: Vec<usize> = (0..n)
            .map(|_| {
                let u = rng.gen::<f64>() * c;
                cum.partition_point(|&x| x <= u).min(pool.rows.len() - 1)
            })
            .collect();
        targets.push(pos);
        picks.push(pk);
    }
    // pass 2: pick the cells
    let mut banks: Vec<Vec<f32>> = targets
        .iter()
        .map(|t| Vec::with_capacity(t.len() * 7))
        .collect();
    let mut cum = vec![0f64; pools.len()];
    let mut st = Streams::open(volumes, nz)?;
    let mut trace = 0usize;
    let mut last_row: Vec<Option<[f32; 7]>> = vec![None; pools.len()];
    while st.next()? {
        let (i, j) = (trace / nj, trace % nj);
        trace += 1;
        let here = node_regions(i, j);
        let (x, y) = grid.node_xy(i as f64, j as f64);
        for k in 0..nz {
            let z = st.bufs[0][k];
            if z.is_nan() || z < 0.0 || z as usize >= nzones {
                continue;
            }
            for r in zone_ranges[z as usize].clone() {
                let p = st.prob(pools[r].facies, k);
                if p <= 0.0 || !here[r] {
                    continue;
                }
                let next = cum[r] + p;
                let n_done = banks[r].len() / 7;
                let mut n_new = 0;
                while n_done + n_new < targets[r].len() && targets[r][n_done + n_new] < next {
                    n_new += 1;
                }
                cum[r] = next;
                if n_new == 0 && last_row[r].is_some() {
                    continue;
                }
                let s = frame
                    .locate_cell(grid, i, j, k)
                    .map_or(f64::NAN, |pos| pos.s);
                let pool = &pools[r];
                // the mean volumes hold the facies trend sum_f p_f d_f: the
                // region's trend replaces it with its own offset
                let mut mix = [0.0; 3];
                if let Some(offs) = volumes.facies_offsets.get(z as usize) {
                    for (f, d) in offs.iter().enumerate() {
                        let pf = st.prob(Some(f), k);
                        for q in 0..3 {
                            mix[q] += pf * d[q];
                        }
                    }
                }
                let trend: [f64; 3] =
                    [0, 1, 2].map(|q| f64::from(st.bufs[1 + q][k]) - mix[q] + pool.offset[q]);
                for &pick in &picks[r][n_done..n_done + n_new] {
                    let res = pool.rows[pick].0;
                    banks[r].extend_from_slice(&[
                        (trend[0] + res[0]) as f32,
                        (trend[1] + res[1]) as f32,
                        (trend[2] + res[2]) as f32,
                        x as f32,
                        y as f32,
                        grid.z_at(k) as f32,
                        s as f32,
                    ]);
                }
                // the last picked cell, for a position rounded onto M itself (u M == M)
                last_row[r] = Some([
                    trend[0] as f32,
                    trend[1] as f32,
                    trend[2] as f32,
                    x as f32,
                    y as f32,
                    grid.z_at(k) as f32,
                    s as f32,
                ]);
            }
        }
    }
    for r in 0..pools.len() {
        while banks[r].len() / 7 < targets[r].len() {
            let m = banks[r].len() / 7;
            let Some(c) = last_row[r] else { break };
            let res = pools[r].rows[picks[r][m]].0;
            let mut row = c;
            for q in 0..3 {
                row[q] = (f64::from(c[q]) + res[q]) as f32;
            }
            banks[r].extend_from_slice(&row);
        }
    }
    Ok((banks, mass))
}

/// Write a region's bank and pool `.npy` files under `dir` and return their manifest entry.
#[allow(clippy::too_many_arguments)]
pub fn write_region(
    dir: &Path,
    out: &Path,
    pool: &RegionPool,
    bank: &[f32],
    mass: f64,
    zone_name: &str,
    area: Option<&str>,
    facies: Option<(&str, i32)>,
    seed: u64,
) -> Result<ManifestBank> {
    let stem = format!(
        "{}{}_{}",
        crate::condition::output::file_stem(zone_name),
        area.map_or(String::new(), |a| format!(
            "_{}",
            crate::condition::output::file_stem(a)
        )),
        facies.map_or("all".to_string(), |f| crate::condition::output::file_stem(
            f.0
        ))
    );
    let bank_path = dir.join(format!("bank_{stem}.npy"));
    let pool_path = dir.join(format!("pool_{stem}.npy"));
    let n = bank.len() / 7;
    write_npy_f32(&bank_path, &[n, 7], bank)?;
    let mut pdata = Vec::with_capacity(pool.rows.len() * 5);
    for (r, w, well) in &pool.rows {
        pdata.extend_from_slice(&[
            r[0] as f32,
            r[1] as f32,
            r[2] as f32,
            *w as f32,
            *well as f32,
        ]);
    }
    write_npy_f32(&pool_path, &[pool.rows.len(), 5], &pdata)?;
    let rel = |p: &Path| {
        p.strip_prefix(out)
            .unwrap_or(p)
            .to_string_lossy()
            .replace('\\', "/")
    };
    Ok(ManifestBank {
        zone: zone_name.to_string(),
        zone_index: pool.zone,
        area: area.map(str::to_string),
        facies: facies.map(|f| f.0.to_string()),
        facies_code: facies.map(|f| f.1),
        path: rel(&bank_path),
        pool_path: rel(&pool_path),
        count: n,
        pool_count: pool.rows.len(),
        wells: pool.wells,
        pool: pool.source.name().into(),
        columns: BANK_COLUMNS.iter().map(|s| s.to_string()).collect(),
        pool_columns: POOL_COLUMNS.iter().map(|s| s.to_string()).collect(),
        offset: pool.offset,
        seed,
        stream: pool.stream,
        mass,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sample(well: usize, facies: usize, v: f64, loo: f64) -> JointSample {
        JointSample {
            well,
            facies: Some(facies),
            xy: [well as f64 * 100.0, 0.0],
            values: [v, v / 1000.0, v / 2000.0],
            loo: [loo, loo / 1000.0, loo / 2000.0],
        }
    }

    #[test]
    fn offsets_are_declustered_facies_minus_zone_means_and_small_regions_borrow() {
        // facies 0: 40 samples from 4 wells at 3000 + k; facies 1: 10 samples from 1 well at 2500
        let mut s = Vec::new();
        for w in 0..4 {
            for k in 0..10 {
                s.push(sample(w, 0, 3000.0 + k as f64, 2900.0));
            }
        }
        for _ in 0..10 {
            s.push(sample(4, 1, 2500.0, 2900.0));
        }
        let w = vec![1.0 / s.len() as f64; s.len()];
        let pools = zone_pools(0, &s, &w, 3);
        assert_eq!(pools.len(), 3);
        let zone_mean = (40.0 * 3004.5 + 10.0 * 2500.0) / 50.0;
        assert!((pools[0].offset[0] - (3004.5 - zone_mean)).abs() < 1e-9);
        assert!((pools[1].offset[0] - (2500.0 - zone_mean)).abs() < 1e-9);
        assert_eq!(pools[2].offset, [0.0; 3]);
        // facies 0 has its own pool: residual v - (loo + d_0), weights renormalised
        assert!(!pools[0].borrowed());
        assert_eq!(pools[0].rows.len(), 40);
        let sw: f64 = pools[0].rows.iter().map(|r| r.1).sum();
        assert!((sw - 1.0).abs() < 1e-12);
        let r0 = pools[0].rows[0].0[0];
        assert!((r0 - (3000.0 - (2900.0 + pools[0].offset[0]))).abs() < 1e-9);
        // facies 1 (1 well, 10 samples) and 2 (none) borrow the zone pool
        for p in &pools[1..] {
            assert!(p.borrowed());
            assert_eq!(p.rows.len(), 50);
            assert_eq!(p.wells, 5);
        }
        assert_eq!(pools[1].own_wells, 1);
        assert_eq!(pools[1].own_samples, 10);
    }

    #[test]
    fn area_regions_borrow_the_area_pool_then_the_zone_pool() {
        // area 0: facies 0 40 samples / 4 wells (own pool), facies 1 10 samples /
        // 1 well (borrows area 0's 50 samples); area 1 (`rest`): 5 samples of
        // facies 0 from one well (too few for the area too: the zone pool)
        let mut s = Vec::new();
        for w in 0..4 {
            for k in 0..10 {
                s.push(sample(w, 0, 3000.0 + k as f64, 2900.0));
            }
        }
        for _ in 0..10 {
            s.push(sample(4, 1, 2500.0, 2900.0));
        }
        for _ in 0..5 {
            s.push(sample(5, 0, 3200.0, 2900.0));
        }
        let slot: Vec<usize> = (0..s.len()).map(|i| usize::from(i >= 50)).collect();
        let w = vec![1.0 / s.len() as f64; s.len()];
        let pools = zone_area_pools(0, &s, &w, 2, &[Some(0), None], &slot);
        assert_eq!(pools.len(), 4);
        let src: Vec<PoolSource> = pools.iter().map(|p| p.source).collect();
        assert_eq!(
            src,
            [
                PoolSource::Region,
                PoolSource::Area,
                PoolSource::Zone,
                PoolSource::Zone
            ]
        );
        assert_eq!(pools[0].rows.len(), 40);
        assert_eq!((pools[1].rows.len(), pools[1].wells), (50, 5));
        assert_eq!((pools[2].rows.len(), pools[2].wells), (55, 6));
        assert_eq!(pools[0].area, Some(Some(0)));
        assert_eq!(pools[2].area, Some(None));
        // offsets are relative to the whole zone: d = region mean - zone mean
        let zone_mean = (40.0 * 3004.5 + 10.0 * 2500.0 + 5.0 * 3200.0) / 55.0;
        assert!((pools[0].offset[0] - (3004.5 - zone_mean)).abs() < 1e-9);
        assert!((pools[2].offset[0] - (3200.0 - zone_mean)).abs() < 1e-9);
        // rest has no facies 1 sample: the facies' offset over the zone
        assert!((pools[3].offset[0] - (2500.0 - zone_mean)).abs() < 1e-9);
        // area weights renormalised to 1
        let sw: f64 = pools[1].rows.iter().map(|r| r.1).sum();
        assert!((sw - 1.0).abs() < 1e-12);
        // streams: zones without areas keep zone * F + f, area regions follow
        let mut all = zone_pools(1, &s, &w, 2);
        all.splice(0..0, pools);
        assign_streams(&mut all, 2, 2);
        let st: Vec<u64> = all.iter().map(|p| p.stream).collect();
        assert_eq!(st, [4, 5, 6, 7, 2, 3]);
    }

    #[test]
    fn region_streams_differ_and_repeat() {
        let a: Vec<u64> = (0..4).map(|_| region_rng(5, 0).gen::<u64>()).collect();
        assert!(a.iter().all(|x| *x == a[0]));
        assert_ne!(region_rng(5, 0).gen::<u64>(), region_rng(5, 1).gen::<u64>());
    }
}
