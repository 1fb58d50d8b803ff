//! Kriging throughput benchmark (plain `main`, no harness).
//!
//! Procedure:
//! 1. On an otherwise idle machine run `cargo bench --bench kriging` from the
//!    crate root (this builds the `bench` profile, i.e. release, once).
//! 2. The case is fixed: 20 vertical wells (seeded positions in a 5 km x 5 km
//!    area) with 1000 blocked samples each (layers 0.5 m thick, s from 0 to
//!    500 m), a grid of 100 x 100 columns (50 m apart) x 100 layers (5 m, one
//!    target layer every 10 well layers), ordinary kriging of one property with
//!    an anisotropic exponential covariance (ranges 1500 m / 1000 m laterally,
//!    10 m vertically, azimuth 30 deg) and a neighbourhood of at most 4 samples
//!    per well from the 8 nearest wells, 32 in all.
//! 3. It prints, for 1 and 2 rayon threads, the wall time and cells/s of
//!    `Kriger::krige_columns` (estimate and variance of every cell), the number
//!    of solves and reuses, whether the two runs are bit-identical, a baseline
//!    without reuse (every cell solved, on a subset of columns), and the peak
//!    resident memory (VmHWM from /proc/self/status, Linux only). The CPU time of
//!    the process (from /proc/self/stat) is printed beside the wall time: on a
//!    shared machine, wall time of the 2-thread run is only meaningful when the
//!    CPU time is about twice the wall time (both cores were ours).
//! 4. Each timing is the best of `KRIGING_BENCH_REPEAT` runs (default 3).
//!    `KRIGING_BENCH_THREADS=1,2` (default) sets the thread counts;
//!    `KRIGING_BENCH_NO_BASELINE=1` skips the no-reuse baseline (for profiling:
//!    `KRIGING_BENCH_THREADS=1 perf record target/release/deps/kriging-<hash>`).

use std::time::Instant;
use stratiprior::geostat::kriging::{Kriger, KrigingKind, Sample, SampleSet, Target};
use stratiprior::geostat::neighbourhood::{NeighbourhoodParams, SearchScratch};
use stratiprior::geostat::CovarianceModel;

/// Anisotropic exponential covariance `C(d) = c exp(-|A d|)`, with `A` the
/// rotation to the major axis at `azimuth` (clockwise from north) and division
/// by the three ranges.
struct AnisoExp {
    c: f64,
    inv: [f64; 3],
    sin: f64,
    cos: f64,
}

impl AnisoExp {
    fn new(c: f64, lengths: [f64; 3], azimuth_deg: f64) -> Self {
        let (sin, cos) = azimuth_deg.to_radians().sin_cos();
        AnisoExp {
            c,
            inv: [1.0 / lengths[0], 1.0 / lengths[1], 1.0 / lengths[2]],
            sin,
            cos,
        }
    }
}

impl CovarianceModel for AnisoExp {
    fn covariance(&self, d: [f64; 3]) -> f64 {
        let m = self.to_isotropic(d);
        self.c * (-(m[0] * m[0] + m[1] * m[1] + m[2] * m[2]).sqrt()).exp()
    }
    fn sill(&self) -> f64 {
        self.c
    }
    fn to_isotropic(&self, p: [f64; 3]) -> [f64; 3] {
        [
            (p[0] * self.sin + p[1] * self.cos) * self.inv[0],
            (p[0] * self.cos - p[1] * self.sin) * self.inv[1],
            p[2] * self.inv[2],
        ]
    }
}

/// A small deterministic generator (SplitMix64) so the case needs no crate.
struct SplitMix(u64);
impl SplitMix {
    fn next(&mut self) -> f64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        ((z ^ (z >> 31)) >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// CPU time (user + system) of this process so far, in seconds, from
/// /proc/self/stat (Linux; clock ticks assumed 100 per second, resolution 10 ms).
fn cpu_seconds() -> Option<f64> {
    let s = std::fs::read_to_string("/proc/self/stat").ok()?;
    let rest = s.rsplit_once(')')?.1;
    let f: Vec<&str> = rest.split_whitespace().collect();
    let ut: f64 = f.get(11)?.parse().ok()?;
    let st: f64 = f.get(12)?.parse().ok()?;
    Some((ut + st) / 100.0)
}

fn peak_rss_mib() -> Option<f64> {
    let s = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = s.lines().find(|l| l.starts_with("VmHWM:"))?;
    let kb: f64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kb / 1024.0)
}

fn main() {
    let repeat: usize = std::env::var("KRIGING_BENCH_REPEAT")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(3)
        .max(1);
    // KRIGING_BENCH_THREADS: comma-separated thread counts (default "1,2").
    let thread_counts: Vec<usize> = std::env::var("KRIGING_BENCH_THREADS")
        .unwrap_or_else(|_| "1,2".to_string())
        .split(',')
        .filter_map(|t| t.trim().parse().ok())
        .filter(|&t| t > 0)
        .collect();
    let skip_baseline = std::env::var("KRIGING_BENCH_NO_BASELINE").is_ok();
    let mut rng = SplitMix(42);
    let (nwells, nsamples, ds) = (20u32, 1000i32, 0.5);
    let mut samples = Vec::new();
    for w in 0..nwells {
        let (x, y) = (rng.next() * 5000.0, rng.next() * 5000.0);
        for l in 0..nsamples {
            let s = (l as f64 + 0.5) * ds;
            let v = 2500.0
                + 100.0 * (x / 900.0).sin()
                + 80.0 * (y / 700.0).cos()
                + 30.0 * (s / 7.0).sin()
                + 10.0 * (rng.next() - 0.5);
            samples.push(Sample::new(w, l, [x, y, s], v));
        }
    }
    let data = SampleSet::new(samples).expect("valid synthetic data");
    let model = AnisoExp::new(400.0, [1500.0, 1000.0, 10.0], 30.0);
    let nb = NeighbourhoodParams::per_well(4, 8, 32, f64::INFINITY);

    let t0 = Instant::now();
    let kr = Kriger::new(&data, &model, nb, KrigingKind::Ordinary).expect("kriger");
    let setup = t0.elapsed().as_secs_f64();

    let (ni, nj, nk) = (100usize, 100usize, 100usize);
    let columns: Vec<Vec<Target>> = (0..ni * nj)
        .map(|c| {
            let (x, y) = ((c % nj) as f64 * 50.0 + 25.0, (c / nj) as f64 * 50.0 + 25.0);
            (0..nk)
                .map(|k| Target::at([x, y, (10.0 * k as f64 + 0.5) * ds]))
                .collect()
        })
        .collect();
    let cells = (ni * nj * nk) as f64;
    println!(
        "kriging benchmark: {} wells x {} samples, grid {ni} x {nj} x {nk} = {} cells, \
         ordinary kriging, <= 4 per well, <= 8 wells, 32 neighbours",
        nwells, nsamples, cells
    );
    println!("setup (sample set index): {:.3} ms", setup * 1e3);

    // The neighbourhood search alone (1 thread), for the cost breakdown.
    {
        let index = kr.index();
        let mut scratch = SearchScratch::default();
        let mut nb = Vec::new();
        let mut count = 0usize;
        let t = Instant::now();
        for col in &columns {
            for tg in col {
                index.search(model.to_isotropic(tg.pos), &mut scratch, &mut nb);
                count += nb.len();
            }
        }
        let dt = t.elapsed().as_secs_f64();
        println!(
            "neighbourhood search alone, 1 thread: {dt:.3} s, {:.0} targets/s ({:.1} neighbours on average)",
            cells / dt,
            count as f64 / cells
        );
    }

    let mut results = Vec::new();
    for &threads in &thread_counts {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .expect("thread pool");
        let mut best = f64::INFINITY;
        let mut best_cpu = f64::INFINITY;
        let mut out = None;
        for _ in 0..repeat {
            let c0 = cpu_seconds();
            let t = Instant::now();
            let g = pool
                .install(|| kr.krige_columns(&columns))
                .expect("kriging");
            best = best.min(t.elapsed().as_secs_f64());
            if let (Some(a), Some(b)) = (c0, cpu_seconds()) {
                best_cpu = best_cpu.min(b - a);
            }
            out = Some(g);
        }
        let g = out.expect("at least one run");
        println!(
            "threads {threads}: {best:.3} s wall, {:.0} cells/s (CPU {best_cpu:.2} s, \
             {:.0} cells per CPU-second); solves {}, reuses {} ({:.1}% reused), no neighbours {}",
            cells / best,
            cells / best_cpu,
            g.stats.solves,
            g.stats.reuses,
            100.0 * g.stats.reuses as f64 / g.stats.targets as f64,
            g.stats.no_neighbours
        );
        results.push(g);
    }
    if results.len() >= 2 {
        let same = results[0]
            .columns
            .iter()
            .flatten()
            .zip(results[1].columns.iter().flatten())
            .all(|(a, b)| {
                a.value.to_bits() == b.value.to_bits()
                    && a.variance.to_bits() == b.variance.to_bits()
            });
        println!(
            "{} vs {} threads bit-identical: {same}",
            thread_counts[0], thread_counts[1]
        );
    }
    if skip_baseline || results.is_empty() {
        if let Some(m) = peak_rss_mib() {
            println!("peak resident memory: {m:.0} MiB");
        }
        return;
    }

    // Baseline without reuse on a subset (every 20th column).
    let subset: Vec<Vec<Target>> = columns.iter().step_by(20).cloned().collect();
    let sub_cells = (subset.len() * nk) as f64;
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(2)
        .build()
        .expect("thread pool");
    let mut best = f64::INFINITY;
    let mut worst_diff = 0.0f64;
    for _ in 0..repeat {
        let t = Instant::now();
        let g = pool
            .install(|| kr.krige_columns_independent(&subset))
            .expect("kriging");
        best = best.min(t.elapsed().as_secs_f64());
        for (c, col) in g.columns.iter().enumerate() {
            for (a, b) in col.iter().zip(&results[results.len() - 1].columns[c * 20]) {
                worst_diff = worst_diff.max((a.value - b.value).abs());
            }
        }
    }
    println!(
        "no reuse (every cell solved), 2 threads, {} cells: {:.3} s, {:.0} cells/s; \
         largest |reuse - independent| estimate difference {:.2e}",
        sub_cells,
        best,
        sub_cells / best,
        worst_diff
    );
    if let Some(m) = peak_rss_mib() {
        println!("peak resident memory: {m:.0} MiB");
    }
}
