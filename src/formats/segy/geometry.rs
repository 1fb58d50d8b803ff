//! Matching a SEG-Y file to the survey grid, and inferring a grid from a file.

use super::reader::{SegyHeaders, SegyReader, TraceHeader};
use crate::error::{Error, Result};
use crate::grid::SurveyGrid;
use std::io::{Read, Seek};
use std::path::Path;

/// Coordinate tolerance, as a fraction of the smaller grid spacing: a trace's
/// CDP X/Y may lie this far from its survey node (and at least
/// [`COORD_TOLERANCE_MIN`]), which covers coordinates stored to the
/// centimetre and grids defined from rounded numbers.
pub const COORD_TOLERANCE_FRACTION: f64 = 0.01;
/// Smallest coordinate tolerance, m: centimetre rounding of X and Y moves a
/// point by up to 0.71 cm.
pub const COORD_TOLERANCE_MIN: f64 = 0.01;
/// How many missing traces an error lists by name.
const LIST_MAX: usize = 5;

/// The coordinate tolerance used for `grid`, m.
pub fn coord_tolerance(grid: &SurveyGrid) -> f64 {
    (COORD_TOLERANCE_FRACTION * grid.inline_spacing.min(grid.xline_spacing))
        .max(COORD_TOLERANCE_MIN)
}

/// The depth axis of a file under our convention: (z0 m, dz m).
pub(crate) fn depth_axis(h: &SegyHeaders, first: Option<&TraceHeader>) -> (f64, f64) {
    (
        first.map(|t| t.delay as f64).unwrap_or(0.0),
        h.sample_interval as f64 / 1000.0,
    )
}

fn fmt_m(v: f64) -> String {
    // shortest representation that round-trips, like the textual header
    format!("{v}")
}

/// Read the volume in `path` onto `grid`: trace-major in grid order (inline
/// by inline, crossline fastest), depth fastest, like [`super::write_volume`].
///
/// The file's traces may come in any order; they are placed by their inline
/// and crossline numbers (bytes 189-192, 193-196). The file must match the
/// grid exactly, otherwise the error lists every difference found: sample
/// count, dz (sample interval read as millimetres), z0 (delay recording time
/// read as metres, the same on every trace), inline and crossline ranges,
/// duplicated and missing traces, and traces whose CDP X/Y lie farther than
/// [`coord_tolerance`] from their survey node.
pub fn read_volume_on_grid(path: &Path, grid: &SurveyGrid) -> Result<Vec<f32>> {
    SegyReader::open(path)?.read_on_grid(grid)
}

impl<R: Read + Seek> SegyReader<R> {
    /// [`read_volume_on_grid`] on an open reader (from its first trace).
    pub fn read_on_grid(self, grid: &SurveyGrid) -> Result<Vec<f32>> {
        read_on_grid(self, grid)
    }

    /// [`infer_grid`] on an open reader (from its first trace).
    pub fn infer_grid(self) -> Result<SurveyGrid> {
        infer_grid_from(self)
    }
}

fn read_on_grid<R: Read + Seek>(mut r: SegyReader<R>, grid: &SurveyGrid) -> Result<Vec<f32>> {
    let path = r.path().to_path_buf();
    grid.validate()
        .map_err(|m| Error::inconsistent(format!("survey grid: {m}")))?;
    let h = r.headers().clone();
    let nz = grid.z_count;
    let mut diffs: Vec<String> = Vec::new();
    let samples_match = h.sample_count == nz;
    if !samples_match {
        diffs.push(format!(
            "sample count {} in file, {} in survey",
            h.sample_count, nz
        ));
    }
    let file_dz = h.sample_interval as f64 / 1000.0;
    if (file_dz - grid.dz).abs() > 1e-9 {
        diffs.push(format!(
            "dz {} m in file (sample interval {} read as millimetres), {} m in survey",
            fmt_m(file_dz),
            h.sample_interval,
            fmt_m(grid.dz)
        ));
    }

    let il0 = grid.inline_first as i64;
    let xl0 = grid.xline_first as i64;
    let (ni, nj) = (grid.inline_count as i64, grid.xline_count as i64);
    let total = grid.trace_count();
    let tol = coord_tolerance(grid);
    let mut out = if samples_match {
        vec![0f32; total * nz]
    } else {
        Vec::new()
    };
    let mut owner: Vec<u32> = vec![u32::MAX; total];
    let mut scratch = vec![0f32; h.sample_count];
    let (mut il_min, mut il_max, mut xl_min, mut xl_max) = (i64::MAX, i64::MIN, i64::MAX, i64::MIN);
    let mut first_delay: Option<i16> = None;
    let mut delay_diff: Option<String> = None;
    let mut dup_first: Option<String> = None;
    let mut dup_count = 0usize;
    let mut far_first: Option<String> = None;
    let mut far_count = 0usize;
    let mut far_max = 0f64;
    let mut outside = 0usize;
    while let Some(t) = r.next_trace(Some(&mut scratch))? {
        let n = r.position(); // 1-based number of this trace
        let (il, xl) = (t.inline as i64, t.crossline as i64);
        il_min = il_min.min(il);
        il_max = il_max.max(il);
        xl_min = xl_min.min(xl);
        xl_max = xl_max.max(xl);
        match first_delay {
            None => first_delay = Some(t.delay),
            Some(d) if d != t.delay && delay_diff.is_none() => {
                delay_diff = Some(format!(
                    "trace {n} (il {il}, xl {xl}) has delay recording time {} (z0 {} m), \
                     trace 1 has {d}",
                    t.delay, t.delay
                ));
            }
            _ => {}
        }
        let (i, j) = (il - il0, xl - xl0);
        if i < 0 || j < 0 || i >= ni || j >= nj {
            outside += 1;
            continue;
        }
        let (i, j) = (i as usize, j as usize);
        let idx = grid.trace_index(i, j);
        let prev = owner[idx];
        if prev != u32::MAX {
            dup_count += 1;
            if dup_first.is_none() {
                dup_first = Some(format!(
                    "trace {n} (il {il}, xl {xl}) repeats trace {} (same inline and crossline)",
                    prev as u64 + 1
                ));
            }
            continue;
        }
        owner[idx] = (n - 1) as u32;
        let (x, y) = grid.node_xy(i as f64, j as f64);
        let d = (t.cdp_x - x).hypot(t.cdp_y - y);
        if d > tol || d.is_nan() {
            far_count += 1;
            if far_first.is_none() {
                far_first = Some(format!(
                    "trace {n} (il {il}, xl {xl}) CDP X/Y ({:.2}, {:.2}) is {:.2} m from \
                     the survey node ({:.2}, {:.2})",
                    t.cdp_x, t.cdp_y, d, x, y
                ));
            }
            if d > far_max || d.is_nan() {
                far_max = d;
            }
        }
        if samples_match {
            out[idx * nz..(idx + 1) * nz].copy_from_slice(&scratch);
        }
    }

    if let Some(d) = first_delay {
        if (d as f64 - grid.z0).abs() > 1e-9 {
            diffs.push(format!(
                "z0 {} m in file (delay recording time read as metres), {} m in survey",
                d,
                fmt_m(grid.z0)
            ));
        }
    }
    if let Some(s) = delay_diff {
        diffs.push(s);
    }
    let il_last = il0 + ni - 1;
    let xl_last = xl0 + nj - 1;
    if h.trace_count > 0 && (il_min != il0 || il_max != il_last) {
        diffs.push(format!(
            "inline range {il_min}..{il_max} in file, {il0}..{il_last} in survey"
        ));
    }
    if h.trace_count > 0 && (xl_min != xl0 || xl_max != xl_last) {
        diffs.push(format!(
            "crossline range {xl_min}..{xl_max} in file, {xl0}..{xl_last} in survey"
        ));
    }
    if outside > 0 && diffs.is_empty() {
        // cannot happen when the ranges agree, kept for completeness
        diffs.push(format!("{outside} traces lie outside the survey"));
    }
    if let Some(s) = dup_first {
        diffs.push(if dup_count > 1 {
            format!("{s}; {dup_count} duplicated traces in all")
        } else {
            s
        });
    }
    let missing: Vec<usize> = owner
        .iter()
        .enumerate()
        .filter(|(_, &o)| o == u32::MAX)
        .map(|(k, _)| k)
        .collect();
    if !missing.is_empty() {
        let names: Vec<String> = missing
            .iter()
            .take(LIST_MAX)
            .map(|&k| {
                let (i, j) = (k / grid.xline_count, k % grid.xline_count);
                format!("(il {}, xl {})", il0 + i as i64, xl0 + j as i64)
            })
            .collect();
        diffs.push(format!(
            "{} of {} survey traces missing from the file: {}{}",
            missing.len(),
            total,
            names.join(", "),
            if missing.len() > LIST_MAX {
                ", ..."
            } else {
                ""
            }
        ));
    }
    if let Some(s) = far_first {
        let feet = if h.binary.measurement_system == 2 {
            " (the binary header declares feet, bytes 3255-3256 = 2)"
        } else {
            ""
        };
        diffs.push(format!(
            "{s}; {far_count} traces farther than the tolerance {tol:.3} m (1% of the \
             smaller grid spacing, at least 0.01 m), largest {far_max:.2} m{feet}"
        ));
    }
    if !diffs.is_empty() {
        return Err(Error::inconsistent(format!(
            "{}: volume does not match the survey grid: {}",
            path.display(),
            diffs.join("; ")
        )));
    }
    Ok(out)
}

/// Inline, crossline and CDP X/Y of one trace, for grid inference.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct TracePos {
    pub inline: i32,
    pub crossline: i32,
    pub x: f64,
    pub y: f64,
}

/// Infer the survey grid of a regular file: every (inline, crossline) of a
/// rectangle with consecutive numbers present once, CDP X/Y on a rectangular
/// grid whose inline number grows at bearing `azimuth + 90` (our convention).
/// The depth axis follows our convention: z0 = delay (m), dz = interval / 1000 (m).
///
/// The origin, azimuth and spacings are the least-squares fit of
/// `x = x0 + i * a + j * b`, `y = y0 + i * c + j * d` to all traces (a full
/// rectangle makes the normal equations separate: `a = cov(x, i) / var(i)`
/// etc.); every trace must then lie within [`coord_tolerance`] of its node.
/// Returns why the file is not regular otherwise.
pub(crate) fn infer_from_positions(
    pos: &[TracePos],
    z0: f64,
    dz: f64,
    z_count: usize,
) -> std::result::Result<SurveyGrid, String> {
    if pos.is_empty() {
        return Err("no traces".into());
    }
    let il_min = pos.iter().map(|p| p.inline as i64).min().unwrap_or(0);
    let il_max = pos.iter().map(|p| p.inline as i64).max().unwrap_or(0);
    let xl_min = pos.iter().map(|p| p.crossline as i64).min().unwrap_or(0);
    let xl_max = pos.iter().map(|p| p.crossline as i64).max().unwrap_or(0);
    let ni = (il_max - il_min + 1) as u64;
    let nj = (xl_max - xl_min + 1) as u64;
    if ni < 2 || nj < 2 {
        return Err(format!(
            "needs at least 2 inlines and 2 crosslines, the file has {ni} x {nj}"
        ));
    }
    if ni.saturating_mul(nj) != pos.len() as u64 {
        let mut ils: Vec<i64> = pos.iter().map(|p| p.inline as i64).collect();
        ils.sort_unstable();
        ils.dedup();
        let mut xls: Vec<i64> = pos.iter().map(|p| p.crossline as i64).collect();
        xls.sort_unstable();
        xls.dedup();
        let step = |v: &[i64]| v.windows(2).map(|w| w[1] - w[0]).min().unwrap_or(1);
        let (si, sj) = (step(&ils), step(&xls));
        if si > 1 || sj > 1 {
            return Err(format!(
                "inline numbers step by {si} and crossline numbers by {sj}; the survey \
                 grid numbers both consecutively"
            ));
        }
        return Err(format!(
            "{} traces for {ni} inlines x {nj} crosslines: traces missing or repeated",
            pos.len()
        ));
    }
    let mut seen = vec![false; (ni * nj) as usize];
    for p in pos {
        let k = ((p.inline as i64 - il_min) as u64 * nj + (p.crossline as i64 - xl_min) as u64)
            as usize;
        if seen[k] {
            return Err(format!(
                "inline {} crossline {} appears more than once",
                p.inline, p.crossline
            ));
        }
        seen[k] = true;
    }
    // least squares on centred values (reference: the first trace, to keep
    // UTM-size numbers out of the sums)
    let (rx, ry) = (pos[0].x, pos[0].y);
    let n = pos.len() as f64;
    let ib = (ni as f64 - 1.0) / 2.0;
    let jb = (nj as f64 - 1.0) / 2.0;
    let (mut sx, mut sy) = (0.0, 0.0);
    for p in pos {
        sx += p.x - rx;
        sy += p.y - ry;
    }
    let (mx, my) = (sx / n, sy / n);
    let (mut sxi, mut sxj, mut syi, mut syj, mut sii, mut sjj) = (0.0, 0.0, 0.0, 0.0, 0.0, 0.0);
    for p in pos {
        let di = (p.inline as i64 - il_min) as f64 - ib;
        let dj = (p.crossline as i64 - xl_min) as f64 - jb;
        let dx = p.x - rx - mx;
        let dy = p.y - ry - my;
        sxi += dx * di;
        sxj += dx * dj;
        syi += dy * di;
        syj += dy * dj;
        sii += di * di;
        sjj += dj * dj;
    }
    let (a, b, c, d) = (sxi / sii, sxj / sjj, syi / sii, syj / sjj);
    let x0 = rx + mx - a * ib - b * jb;
    let y0 = ry + my - c * ib - d * jb;
    let xline_spacing = b.hypot(d);
    if xline_spacing.is_nan() || xline_spacing <= 0.0 {
        return Err("CDP coordinates do not change along an inline".into());
    }
    let mut azimuth = b.atan2(d).to_degrees();
    if azimuth < 0.0 {
        azimuth += 360.0;
    }
    let (s, co) = azimuth.to_radians().sin_cos();
    // inline step projected on the +90 direction, and off it
    let along = a * co - c * s;
    let across = a * s + c * co;
    let step = along.hypot(across);
    if step.is_nan() || step <= 0.0 {
        return Err("CDP coordinates do not change across inlines".into());
    }
    if along <= 0.0 || across.abs() > 0.01 * along.abs() {
        let bearing = a.atan2(c).to_degrees().rem_euclid(360.0);
        return Err(format!(
            "inline numbers grow at bearing {bearing:.2} deg while crossline numbers grow \
             at {azimuth:.2} deg; the survey grid convention needs inline growing at \
             azimuth + 90 deg ({:.2} deg)",
            (azimuth + 90.0) % 360.0
        ));
    }
    let grid = SurveyGrid {
        x0,
        y0,
        azimuth,
        inline_spacing: along,
        xline_spacing,
        inline_first: il_min as i32,
        inline_count: ni as usize,
        xline_first: xl_min as i32,
        xline_count: nj as usize,
        z0,
        dz,
        z_count,
    };
    let tol = coord_tolerance(&grid);
    for p in pos {
        let (i, j) = (
            (p.inline as i64 - il_min) as f64,
            (p.crossline as i64 - xl_min) as f64,
        );
        let (x, y) = grid.node_xy(i, j);
        let dist = (p.x - x).hypot(p.y - y);
        if dist > tol || dist.is_nan() {
            return Err(format!(
                "il {} xl {}: CDP X/Y ({:.2}, {:.2}) is {:.2} m from the fitted regular \
                 grid (tolerance {:.3} m)",
                p.inline, p.crossline, p.x, p.y, dist, tol
            ));
        }
    }
    grid.validate()?;
    Ok(grid)
}

/// Infer the [`SurveyGrid`] of a regular SEG-Y file (see the rules of the
/// private fit: every inline/crossline of a rectangle present once, a
/// rectangular coordinate grid in our handedness). The depth axis is read with
/// our convention: z0 = delay recording time (m), dz = sample interval / 1000 (m).
pub fn infer_grid(path: &Path) -> Result<SurveyGrid> {
    infer_grid_from(SegyReader::open(path)?)
}

fn infer_grid_from<R: Read + Seek>(mut r: SegyReader<R>) -> Result<SurveyGrid> {
    let path = r.path().to_path_buf();
    let h = r.headers().clone();
    let mut pos = Vec::with_capacity(h.trace_count);
    let mut first = None;
    while let Some(t) = r.next_trace(None)? {
        if first.is_none() {
            first = Some(t);
        }
        pos.push(TracePos {
            inline: t.inline,
            crossline: t.crossline,
            x: t.cdp_x,
            y: t.cdp_y,
        });
    }
    let (z0, dz) = depth_axis(&h, first.as_ref());
    infer_from_positions(&pos, z0, dz, h.sample_count)
        .map_err(|m| Error::input(path, None, format!("not a regular survey grid: {m}")))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn grid() -> SurveyGrid {
        SurveyGrid {
            x0: 452311.37,
            y0: 6701987.63,
            azimuth: 30.0,
            inline_spacing: 18.91,
            xline_spacing: 12.37,
            inline_first: 1001,
            inline_count: 6,
            xline_first: 2001,
            xline_count: 9,
            z0: 1500.0,
            dz: 2.5,
            z_count: 7,
        }
    }

    fn positions(g: &SurveyGrid) -> Vec<TracePos> {
        let mut v = Vec::new();
        for i in 0..g.inline_count {
            for j in 0..g.xline_count {
                let (x, y) = g.node_xy(i as f64, j as f64);
                v.push(TracePos {
                    inline: g.inline_number(i),
                    crossline: g.xline_number(j),
                    // stored to the centimetre, as our writer does
                    x: (x * 100.0).round() / 100.0,
                    y: (y * 100.0).round() / 100.0,
                });
            }
        }
        v
    }

    #[test]
    fn fit_recovers_the_grid_from_centimetre_coordinates() {
        for az in [0.0, 30.0, 135.0, 300.0] {
            let mut g = grid();
            g.azimuth = az;
            let f = infer_from_positions(&positions(&g), 1500.0, 2.5, 7).unwrap();
            assert!((f.x0 - g.x0).abs() < 0.01, "{az}: {f:?}");
            assert!((f.y0 - g.y0).abs() < 0.01);
            let daz = (f.azimuth - g.azimuth + 180.0).rem_euclid(360.0) - 180.0;
            assert!(daz.abs() < 1e-3, "{az}: {}", f.azimuth);
            assert!((f.inline_spacing - g.inline_spacing).abs() < 1e-3);
            assert!((f.xline_spacing - g.xline_spacing).abs() < 1e-3);
            assert_eq!((f.inline_first, f.inline_count), (1001, 6));
            assert_eq!((f.xline_first, f.xline_count), (2001, 9));
        }
    }

    #[test]
    fn left_handed_and_irregular_files_are_explained() {
        let g = grid();
        let mut p = positions(&g);
        // mirror: inline grows at azimuth - 90
        for t in p.iter_mut() {
            let i = (t.inline - 1001) as f64;
            let j = (t.crossline - 2001) as f64;
            let (x, y) = g.node_xy(-i, j);
            t.x = x;
            t.y = y;
        }
        let e = infer_from_positions(&p, 0.0, 1.0, 7).unwrap_err();
        assert!(e.contains("azimuth + 90"), "{e}");
        let mut p = positions(&g);
        p[10].x += 1.0;
        let e = infer_from_positions(&p, 0.0, 1.0, 7).unwrap_err();
        assert!(
            e.contains("il 1002 xl 2002") && e.contains("from the fitted"),
            "{e}"
        );
        let mut p = positions(&g);
        p.pop();
        let e = infer_from_positions(&p, 0.0, 1.0, 7).unwrap_err();
        assert!(e.contains("missing or repeated"), "{e}");
        let mut p = positions(&g);
        for t in p.iter_mut() {
            t.inline = 1001 + 2 * (t.inline - 1001);
        }
        let e = infer_from_positions(&p, 0.0, 1.0, 7).unwrap_err();
        assert!(e.contains("step by 2"), "{e}");
    }
}
