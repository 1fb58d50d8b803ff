//! What the `inspect` command shows about a SEG-Y file.

use super::geometry::{depth_axis, infer_from_positions, TracePos};
use super::reader::{ByteOrder, SegyReader, TextEncoding};
use crate::error::Result;
use crate::grid::SurveyGrid;
use serde::Serialize;
use std::fmt;
use std::io::{Read, Seek};
use std::path::Path;

/// One corner trace of the inline/crossline rectangle.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct CornerTrace {
    /// Inline number.
    pub inline: i32,
    /// Crossline number.
    pub crossline: i32,
    /// CDP X, scalar applied.
    pub x: f64,
    /// CDP Y, scalar applied.
    pub y: f64,
}

/// Summary of one SEG-Y file (headers, geometry, value statistics).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SegySummary {
    /// The file.
    pub path: String,
    /// Size, bytes.
    pub file_bytes: u64,
    /// Character set of the textual header.
    pub text_encoding: TextEncoding,
    /// The textual header's 40 lines, trailing blanks removed.
    pub text_header: Vec<String>,
    /// Number of extended textual headers.
    pub extended_text_headers: usize,
    /// Byte order of the binary numbers.
    pub byte_order: ByteOrder,
    /// Format revision `major.minor` (binary header bytes 3501-3502).
    pub revision: String,
    /// Data sample format code (3225-3226).
    pub format_code: i16,
    /// Data sample format, in words.
    pub format: String,
    /// Samples per trace.
    pub sample_count: usize,
    /// Sample interval field (us for time data; mm in our depth volumes).
    pub sample_interval: u16,
    /// Delay recording time of the first trace (ms for time data; z0 in m in our depth volumes).
    pub delay: i16,
    /// First sample depth under our convention (delay read as metres), m.
    pub z0_m: f64,
    /// Depth interval under our convention (interval read as millimetres), m.
    pub dz_m: f64,
    /// Measurement system (3255-3256): 1 metres, 2 feet, 0 unset.
    pub measurement_system: i16,
    /// Number of traces.
    pub trace_count: usize,
    /// Smallest and largest inline number.
    pub inline_range: [i32; 2],
    /// Number of distinct inline numbers.
    pub inline_count: usize,
    /// Smallest and largest crossline number.
    pub xline_range: [i32; 2],
    /// Number of distinct crossline numbers.
    pub xline_count: usize,
    /// Traces at (first il, first xl), (first il, last xl), (last il, last xl),
    /// (last il, first xl), as far as present.
    pub corners: Vec<CornerTrace>,
    /// The survey grid, if the file is regular in our convention.
    pub grid: Option<SurveyGrid>,
    /// Why no grid was inferred.
    pub grid_note: Option<String>,
    /// Smallest finite sample value.
    pub value_min: Option<f64>,
    /// Largest finite sample value.
    pub value_max: Option<f64>,
    /// Mean of the finite sample values.
    pub value_mean: Option<f64>,
    /// Number of finite samples.
    pub finite_count: u64,
    /// Number of NaN samples.
    pub nan_count: u64,
    /// Number of infinite samples.
    pub inf_count: u64,
}

/// Summarize a SEG-Y file, reading it trace by trace (memory: the trace
/// positions, 24 bytes per trace, and one trace of samples).
pub fn summarize(path: &Path) -> Result<SegySummary> {
    SegyReader::open(path)?.summarize()
}

impl<R: Read + Seek> SegyReader<R> {
    /// [`summarize`] on an open reader (from its first trace).
    pub fn summarize(self) -> Result<SegySummary> {
        summarize_from(self)
    }
}

fn summarize_from<R: Read + Seek>(mut r: SegyReader<R>) -> Result<SegySummary> {
    let path = r.path().to_path_buf();
    let h = r.headers().clone();
    let mut buf = vec![0f32; h.sample_count];
    let mut pos: Vec<TracePos> = Vec::with_capacity(h.trace_count);
    let mut first = None;
    let (mut vmin, mut vmax, mut sum) = (f64::INFINITY, f64::NEG_INFINITY, 0.0f64);
    let (mut finite, mut nan, mut inf) = (0u64, 0u64, 0u64);
    while let Some(t) = r.next_trace(Some(&mut buf))? {
        if first.is_none() {
            first = Some(t);
        }
        pos.push(TracePos {
            inline: t.inline,
            crossline: t.crossline,
            x: t.cdp_x,
            y: t.cdp_y,
        });
        for &v in &buf {
            if v.is_nan() {
                nan += 1;
            } else if v.is_infinite() {
                inf += 1;
            } else {
                let v = v as f64;
                finite += 1;
                vmin = vmin.min(v);
                vmax = vmax.max(v);
                sum += v;
            }
        }
    }
    let il_min = pos.iter().map(|p| p.inline).min().unwrap_or(0);
    let il_max = pos.iter().map(|p| p.inline).max().unwrap_or(0);
    let xl_min = pos.iter().map(|p| p.crossline).min().unwrap_or(0);
    let xl_max = pos.iter().map(|p| p.crossline).max().unwrap_or(0);
    let distinct = |mut v: Vec<i32>| {
        v.sort_unstable();
        v.dedup();
        v.len()
    };
    let inline_count = distinct(pos.iter().map(|p| p.inline).collect());
    let xline_count = distinct(pos.iter().map(|p| p.crossline).collect());
    let corners = [
        (il_min, xl_min),
        (il_min, xl_max),
        (il_max, xl_max),
        (il_max, xl_min),
    ]
    .iter()
    .filter_map(|&(il, xl)| {
        pos.iter()
            .find(|p| p.inline == il && p.crossline == xl)
            .map(|p| CornerTrace {
                inline: il,
                crossline: xl,
                x: p.x,
                y: p.y,
            })
    })
    .collect();
    let (z0, dz) = depth_axis(&h, first.as_ref());
    let (grid, grid_note) = match infer_from_positions(&pos, z0, dz, h.sample_count) {
        Ok(g) => (Some(g), None),
        Err(m) => (None, Some(m)),
    };
    Ok(SegySummary {
        path: path.display().to_string(),
        file_bytes: h.file_bytes,
        text_encoding: h.text_encoding,
        text_header: h.text.clone(),
        extended_text_headers: h.extended_text.len(),
        byte_order: h.byte_order,
        revision: h.binary.revision_string(),
        format_code: h.format.code(),
        format: h.format.name().to_string(),
        sample_count: h.sample_count,
        sample_interval: h.sample_interval,
        delay: first.map(|t| t.delay).unwrap_or(0),
        z0_m: z0,
        dz_m: dz,
        measurement_system: h.binary.measurement_system,
        trace_count: h.trace_count,
        inline_range: [il_min, il_max],
        inline_count,
        xline_range: [xl_min, xl_max],
        xline_count,
        corners,
        grid,
        grid_note,
        value_min: (finite > 0).then_some(vmin),
        value_max: (finite > 0).then_some(vmax),
        value_mean: (finite > 0).then(|| sum / finite as f64),
        finite_count: finite,
        nan_count: nan,
        inf_count: inf,
    })
}

/// A number for people: plain when moderate, scientific when huge or tiny.
fn num(v: f64) -> String {
    let a = v.abs();
    if a != 0.0 && !(1e-4..1e9).contains(&a) {
        format!("{v:e}")
    } else {
        format!("{v}")
    }
}

impl fmt::Display for SegySummary {
    /// A plain-text report, one item a line.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        writeln!(f, "file: {} ({} bytes)", self.path, self.file_bytes)?;
        writeln!(
            f,
            "SEG-Y revision {}, {:?}-endian, textual header {:?}, {} extended textual headers",
            self.revision, self.byte_order, self.text_encoding, self.extended_text_headers
        )?;
        writeln!(
            f,
            "samples: format {} ({}), {} per trace, interval {}, delay {}",
            self.format_code, self.format, self.sample_count, self.sample_interval, self.delay
        )?;
        writeln!(
            f,
            "as depth (interval in mm, delay in m): z0 {} m, dz {} m",
            self.z0_m, self.dz_m
        )?;
        writeln!(
            f,
            "traces: {}; inlines {}..{} ({} distinct), crosslines {}..{} ({} distinct)",
            self.trace_count,
            self.inline_range[0],
            self.inline_range[1],
            self.inline_count,
            self.xline_range[0],
            self.xline_range[1],
            self.xline_count
        )?;
        for c in &self.corners {
            writeln!(
                f,
                "corner il {} xl {}: x {:.2}, y {:.2}",
                c.inline, c.crossline, c.x, c.y
            )?;
        }
        match (&self.grid, &self.grid_note) {
            (Some(g), _) => writeln!(
                f,
                "regular grid: x0 {:.2}, y0 {:.2}, azimuth {:.4} deg, inline spacing {:.4} m, \
                 crossline spacing {:.4} m",
                g.x0, g.y0, g.azimuth, g.inline_spacing, g.xline_spacing
            )?,
            (None, Some(n)) => writeln!(f, "no regular grid: {n}")?,
            (None, None) => {}
        }
        match (self.value_min, self.value_max, self.value_mean) {
            (Some(a), Some(b), Some(m)) => writeln!(
                f,
                "values: min {}, max {}, mean {} ({} finite)",
                num(a),
                num(b),
                num(m),
                self.finite_count
            )?,
            _ => writeln!(f, "values: no finite samples")?,
        }
        writeln!(f, "NaN: {}, infinite: {}", self.nan_count, self.inf_count)?;
        writeln!(f, "textual header:")?;
        for l in &self.text_header {
            writeln!(f, "  {l}")?;
        }
        Ok(())
    }
}
