//! Streaming SEG-Y rev 1 writer for volumes on the survey grid.

use super::bytes as b;
use super::ebcdic::{encode_text_char, safe_text_char};
use super::{
    VolumeMeta, BINARY_HEADER_LEN, COORD_SCALAR_WRITTEN, TEXT_HEADER_LEN, TRACE_HEADER_LEN,
};
use crate::error::{Error, Result};
use crate::grid::SurveyGrid;
use crate::io_util::AtomicFile;
use std::path::Path;

/// Characters available on one textual-header card after the `Cnn ` prefix.
const CARD_TEXT: usize = 76;
/// Tolerance when checking that `z0` (m) and `dz` (mm) are whole numbers: only
/// the floating-point representation error of a decimal value is forgiven.
const WHOLE_TOL: f64 = 1e-6;

fn put_i16(buf: &mut [u8], pos: usize, v: i16) {
    buf[pos - 1..pos + 1].copy_from_slice(&v.to_be_bytes());
}
fn put_u16(buf: &mut [u8], pos: usize, v: u16) {
    buf[pos - 1..pos + 1].copy_from_slice(&v.to_be_bytes());
}
fn put_i32(buf: &mut [u8], pos: usize, v: i32) {
    buf[pos - 1..pos + 3].copy_from_slice(&v.to_be_bytes());
}

/// The integer header values a grid maps to, checked to be representable.
#[derive(Debug, Clone, Copy)]
struct Encoded {
    /// dz in millimetres (sample-interval fields).
    dz_mm: u16,
    /// z0 in whole metres (delay recording time).
    z0_m: i16,
    /// samples per trace
    ns: u16,
}

/// Check the grid can be written with our SEG-Y conventions; the message says
/// what does not fit.
fn encode_grid(grid: &SurveyGrid) -> std::result::Result<Encoded, String> {
    grid.validate().map_err(|m| format!("survey grid: {m}"))?;
    // z0 -> delay recording time, whole metres, i16
    let z0r = grid.z0.round();
    if (grid.z0 - z0r).abs() > WHOLE_TOL {
        return Err(format!(
            "z0 = {} m is not a whole number of metres; the delay recording time \
             (trace bytes 109-110) holds z0 in whole metres",
            grid.z0
        ));
    }
    if z0r < i16::MIN as f64 || z0r > i16::MAX as f64 {
        return Err(format!(
            "z0 = {} m does not fit the delay recording time (trace bytes 109-110, \
             -32768..32767 m)",
            grid.z0
        ));
    }
    // dz -> sample interval, whole millimetres, 1..=32767 so that readers that
    // take the field as a signed 16-bit integer (rev 1 says all binary values
    // are two's complement) agree with those that take it as unsigned (rev 2)
    let mm = grid.dz * 1000.0;
    let mmr = mm.round();
    if (mm - mmr).abs() > WHOLE_TOL {
        return Err(format!(
            "dz = {} m is not a whole number of millimetres; the sample interval \
             (binary bytes 3217-3218, trace bytes 117-118) holds dz in whole millimetres",
            grid.dz
        ));
    }
    if !(1.0..=32767.0).contains(&mmr) {
        return Err(format!(
            "dz = {} m is outside 0.001..32.767 m, the range of the sample interval \
             field in millimetres (binary bytes 3217-3218)",
            grid.dz
        ));
    }
    let ns = u16::try_from(grid.z_count)
        .ok()
        .filter(|&n| n <= 32767)
        .ok_or_else(|| {
            format!(
                "{} depth samples do not fit a SEG-Y rev 1 trace (at most 32767)",
                grid.z_count
            )
        })?;
    // inline / crossline numbers and sequence numbers fit i32
    let il_last = grid.inline_first as i64 + grid.inline_count as i64 - 1;
    let xl_last = grid.xline_first as i64 + grid.xline_count as i64 - 1;
    if il_last > i32::MAX as i64 || xl_last > i32::MAX as i64 {
        return Err(format!(
            "inline or crossline numbers exceed {} (trace bytes 189-196 are 32-bit)",
            i32::MAX
        ));
    }
    if grid.trace_count() > i32::MAX as usize {
        return Err(format!(
            "{} traces exceed the 32-bit trace sequence numbers",
            grid.trace_count()
        ));
    }
    // coordinates in centimetres fit i32; the grid is affine, so the extremes are at the corners
    for (x, y) in grid.corners() {
        for (name, v) in [("x", x), ("y", y)] {
            if scaled_cm(v).is_none() {
                return Err(format!(
                    "corner {name} = {v} m does not fit a 32-bit coordinate in centimetres \
                     (coordinate scalar -100, |{name}| must be below 21474836.47 m)"
                ));
            }
        }
    }
    Ok(Encoded {
        dz_mm: mmr as u16,
        z0_m: z0r as i16,
        ns,
    })
}

/// `v` metres in whole centimetres, if it fits an i32.
fn scaled_cm(v: f64) -> Option<i32> {
    let r = (v * 100.0).round();
    if r.is_finite() && r >= i32::MIN as f64 && r <= i32::MAX as f64 {
        Some(r as i32)
    } else {
        None
    }
}

/// Word-wrap `text` into pieces of at most `width` characters (long words are cut).
fn wrap(text: &str, width: usize) -> Vec<String> {
    let mut out = Vec::new();
    let mut line = String::new();
    for word in text.split_whitespace() {
        let mut word: Vec<char> = word.chars().collect();
        loop {
            let used = line.chars().count();
            let need = if used == 0 {
                word.len()
            } else {
                used + 1 + word.len()
            };
            if need <= width {
                if used > 0 {
                    line.push(' ');
                }
                line.extend(word.iter());
                break;
            }
            if used > 0 {
                out.push(std::mem::take(&mut line));
                continue;
            }
            // a single word longer than the card
            let rest = word.split_off(width);
            out.push(word.iter().collect());
            word = rest;
        }
    }
    if !line.is_empty() {
        out.push(line);
    }
    out
}

/// The 40 cards of the textual header we write for `grid` and `meta`, each
/// exactly 80 characters (`C 1 `..`C40 ` + 76), in the character set we encode
/// (see the `ebcdic` module: `[ ]` become `( )`, `! ^ |` and non-ASCII become `?`).
///
/// Fails when the grid cannot be written (see [`SegyWriter::create`]).
pub fn textual_header_lines(
    grid: &SurveyGrid,
    meta: &VolumeMeta,
) -> std::result::Result<Vec<String>, String> {
    let enc = encode_grid(grid)?;
    Ok(header_cards(grid, meta, enc))
}

fn header_cards(grid: &SurveyGrid, meta: &VolumeMeta, enc: Encoded) -> Vec<String> {
    let il_last = grid.inline_first as i64 + grid.inline_count as i64 - 1;
    let xl_last = grid.xline_first as i64 + grid.xline_count as i64 - 1;
    let paragraphs = [
        format!(
            "{} {}: property volume on a depth grid",
            env!("CARGO_PKG_NAME"),
            env!("CARGO_PKG_VERSION")
        ),
        format!(
            "property: {}, statistic: {}, unit: {}",
            meta.property, meta.statistic, meta.unit
        ),
        format!(
            "depth: TVDSS in metres, positive down; z = z0 + k * dz, k = 0..{}",
            grid.z_count - 1
        ),
        format!(
            "z0 = {} m, dz = {} m, {} samples",
            enc.z0_m, grid.dz, grid.z_count
        ),
        format!(
            "depth is stored as time: sample interval (binary bytes 3217-3218, trace \
             bytes 117-118) = dz in millimetres ({}); delay recording time (trace \
             bytes 109-110) = z0 in metres ({}); readers showing ms show metres",
            enc.dz_mm, enc.z0_m
        ),
        format!(
            "origin (first inline, first crossline): x0 = {} m, y0 = {} m",
            grid.x0, grid.y0
        ),
        format!(
            "azimuth {} deg (bearing of increasing crossline, clockwise from grid north)",
            grid.azimuth
        ),
        "inline number grows at azimuth + 90 deg".to_string(),
        format!(
            "inline spacing {} m, crossline spacing {} m",
            grid.inline_spacing, grid.xline_spacing
        ),
        format!(
            "inlines {}-{} ({}), crosslines {}-{} ({}), {} traces",
            grid.inline_first,
            il_last,
            grid.inline_count,
            grid.xline_first,
            xl_last,
            grid.xline_count,
            grid.trace_count()
        ),
        "traces ordered inline by inline, crossline fastest".to_string(),
        "trace header bytes: inline 189-192, crossline 193-196".to_string(),
        "CDP X 181-184, CDP Y 185-188, coordinate scalar 71-72 = -100 (centimetres)".to_string(),
        "source X/Y 73-80 and group X/Y 81-88 = CDP X/Y; CDP number 21-24".to_string(),
        "trace sequence numbers 1-4 and 5-8".to_string(),
        "samples: IEEE float32 big-endian (format code 5); measurement system: metres".to_string(),
        "SEG-Y rev 1, fixed-length traces, no extended textual headers".to_string(),
        String::new(),
    ];
    let mut body: Vec<String> = Vec::new();
    for p in &paragraphs {
        if p.is_empty() {
            body.push(String::new());
        } else {
            body.extend(wrap(p, CARD_TEXT));
        }
    }
    let mut notes: Vec<String> = Vec::new();
    for n in &meta.notes {
        notes.extend(wrap(n, CARD_TEXT));
    }
    // cards 1..=38 free; 39 and 40 are the rev 1 closing cards
    let room = 38usize.saturating_sub(body.len());
    if !notes.is_empty() && room > 0 {
        if notes.len() > room {
            notes.truncate(room.saturating_sub(1));
            notes.push("(notes truncated)".to_string());
        }
        body.extend(notes);
    }
    body.truncate(38);
    body.resize(38, String::new());
    // SEG-Y rev 1 section 3.1 (from memory): card 39 "SEG Y REV1", card 40 "END TEXTUAL HEADER"
    body.push("SEG Y REV1".to_string());
    body.push("END TEXTUAL HEADER".to_string());
    body.iter()
        .enumerate()
        .map(|(k, text)| {
            let text: String = text.chars().map(safe_text_char).take(CARD_TEXT).collect();
            format!("C{:>2} {:<76}", k + 1, text)
        })
        .collect()
}

fn binary_header(enc: Encoded) -> [u8; BINARY_HEADER_LEN] {
    let mut h = [0u8; BINARY_HEADER_LEN];
    let at = |pos: usize| pos - TEXT_HEADER_LEN;
    put_i32(&mut h, at(b::BIN_JOB), 1);
    put_i32(&mut h, at(b::BIN_LINE), 1);
    put_i32(&mut h, at(b::BIN_REEL), 1);
    put_i16(&mut h, at(b::BIN_TRACES_PER_ENSEMBLE), 1);
    put_u16(&mut h, at(b::BIN_INTERVAL), enc.dz_mm);
    put_u16(&mut h, at(b::BIN_INTERVAL_ORIG), enc.dz_mm);
    put_u16(&mut h, at(b::BIN_SAMPLES), enc.ns);
    put_u16(&mut h, at(b::BIN_SAMPLES_ORIG), enc.ns);
    put_i16(&mut h, at(b::BIN_FORMAT), 5);
    put_i16(&mut h, at(b::BIN_FOLD), 1);
    put_i16(&mut h, at(b::BIN_SORTING), 4);
    put_i16(&mut h, at(b::BIN_VERTICAL_SUM), 1);
    put_i16(&mut h, at(b::BIN_MEASUREMENT), 1);
    put_u16(&mut h, at(b::BIN_REVISION), 0x0100);
    put_i16(&mut h, at(b::BIN_FIXED_LENGTH), 1);
    put_i16(&mut h, at(b::BIN_EXTENDED_HEADERS), 0);
    h
}

/// Streams a volume on the survey grid into a SEG-Y rev 1 file, one trace at a
/// time, with memory independent of the volume size (one trace buffer).
///
/// The file appears under its final name only when [`SegyWriter::finish`]
/// succeeds (it is written through [`AtomicFile`]); dropping the writer early
/// leaves nothing behind.
pub struct SegyWriter {
    out: AtomicFile,
    grid: SurveyGrid,
    written: usize,
    /// trace header template (constant fields filled) followed by the sample bytes
    buf: Vec<u8>,
}

impl SegyWriter {
    /// Start writing `path` for `grid`; writes the textual and binary headers.
    ///
    /// Errors when the grid does not fit our conventions: `z0` not a whole
    /// number of metres or outside -32768..32767 m, `dz` not a whole number of
    /// millimetres or outside 1..32767 mm, more than 32767 samples, inline or
    /// crossline numbers beyond 32 bits, or a corner coordinate whose value in
    /// centimetres does not fit 32 bits. Nothing is ever rounded silently
    /// except coordinates, which are stored to the centimetre.
    pub fn create(path: &Path, grid: &SurveyGrid, meta: &VolumeMeta) -> Result<Self> {
        let enc = encode_grid(grid).map_err(|m| {
            Error::unsupported(
                path,
                None,
                format!("cannot write this volume as SEG-Y: {m}"),
            )
        })?;
        let mut out = AtomicFile::create(path)?;
        let cards = header_cards(grid, meta, enc);
        let text: Vec<u8> = cards
            .iter()
            .flat_map(|c| c.chars())
            .map(encode_text_char)
            .collect();
        debug_assert_eq!(text.len(), TEXT_HEADER_LEN);
        out.write_all(&text)?;
        out.write_all(&binary_header(enc))?;

        let mut buf = vec![0u8; TRACE_HEADER_LEN + 4 * grid.z_count];
        let h = &mut buf[..TRACE_HEADER_LEN];
        put_i32(h, b::TRACE_IN_ENSEMBLE, 1);
        put_i16(h, b::TRACE_ID, 1);
        put_i16(h, b::VERTICAL_SUM, 1);
        put_i16(h, b::HORIZONTAL_STACK, 1);
        put_i16(h, b::DATA_USE, 1);
        put_i16(h, b::COORD_SCALAR, COORD_SCALAR_WRITTEN);
        put_i16(h, b::COORD_UNITS, 1);
        put_i16(h, b::DELAY, enc.z0_m);
        put_u16(h, b::TRACE_SAMPLES, enc.ns);
        put_u16(h, b::TRACE_INTERVAL, enc.dz_mm);
        Ok(SegyWriter {
            out,
            grid: grid.clone(),
            written: 0,
            buf,
        })
    }

    /// Number of traces written so far.
    pub fn traces_written(&self) -> usize {
        self.written
    }

    /// Write the next trace (grid order: inline by inline, crossline fastest);
    /// `samples` are the `z_count` values at `z0 + k * dz`.
    pub fn write_trace(&mut self, samples: &[f32]) -> Result<()> {
        let total = self.grid.trace_count();
        if self.written >= total {
            return Err(Error::inconsistent(format!(
                "{}: all {} traces of the grid are already written",
                self.out.final_path().display(),
                total
            )));
        }
        let n = self.written;
        let (i, j) = (n / self.grid.xline_count, n % self.grid.xline_count);
        let il = self.grid.inline_number(i);
        let xl = self.grid.xline_number(j);
        if samples.len() != self.grid.z_count {
            return Err(Error::inconsistent(format!(
                "{}: trace {} (inline {il}, crossline {xl}) has {} samples, the grid has {}",
                self.out.final_path().display(),
                n + 1,
                samples.len(),
                self.grid.z_count
            )));
        }
        let (x, y) = self.grid.node_xy(i as f64, j as f64);
        // checked at create for the corners; the nodes lie between them
        let xs = scaled_cm(x).unwrap_or(0);
        let ys = scaled_cm(y).unwrap_or(0);
        let seq = (n + 1) as i32;
        let h = &mut self.buf[..TRACE_HEADER_LEN];
        put_i32(h, b::TRACE_SEQ_LINE, seq);
        put_i32(h, b::TRACE_SEQ_FILE, seq);
        put_i32(h, b::CDP, seq);
        for (px, py) in [
            (b::SOURCE_X, b::SOURCE_Y),
            (b::GROUP_X, b::GROUP_Y),
            (b::CDP_X, b::CDP_Y),
        ] {
            put_i32(h, px, xs);
            put_i32(h, py, ys);
        }
        put_i32(h, b::INLINE, il);
        put_i32(h, b::XLINE, xl);
        for (dst, s) in self.buf[TRACE_HEADER_LEN..]
            .chunks_exact_mut(4)
            .zip(samples)
        {
            dst.copy_from_slice(&s.to_bits().to_be_bytes());
        }
        self.out.write_all(&self.buf)?;
        self.written += 1;
        Ok(())
    }

    /// Check every trace was written, then move the file onto its final name.
    pub fn finish(self) -> Result<()> {
        let total = self.grid.trace_count();
        if self.written != total {
            return Err(Error::inconsistent(format!(
                "{}: only {} of {} traces were written; the file was not created",
                self.out.final_path().display(),
                self.written,
                total
            )));
        }
        self.out.commit()
    }
}

/// Write a whole volume: `data` is trace-major in grid order (inline by inline,
/// crossline fastest), depth fastest within a trace, `trace_count * z_count` values.
pub fn write_volume(path: &Path, grid: &SurveyGrid, meta: &VolumeMeta, data: &[f32]) -> Result<()> {
    let expect = grid.trace_count().saturating_mul(grid.z_count);
    if data.len() != expect {
        return Err(Error::inconsistent(format!(
            "{}: volume has {} values, the grid needs {} ({} traces x {} samples)",
            path.display(),
            data.len(),
            expect,
            grid.trace_count(),
            grid.z_count
        )));
    }
    let mut w = SegyWriter::create(path, grid, meta)?;
    for trace in data.chunks_exact(grid.z_count) {
        w.write_trace(trace)?;
    }
    w.finish()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn grid() -> SurveyGrid {
        SurveyGrid {
            x0: 1000.0,
            y0: 2000.0,
            azimuth: 0.0,
            inline_spacing: 25.0,
            xline_spacing: 12.5,
            inline_first: 1,
            inline_count: 3,
            xline_first: 10,
            xline_count: 4,
            z0: 100.0,
            dz: 4.0,
            z_count: 5,
        }
    }

    #[test]
    fn cards_are_80_chars_numbered_and_closed() {
        let meta = VolumeMeta {
            property: "vp0".into(),
            statistic: "mean".into(),
            unit: "m/s".into(),
            notes: (0..40).map(|k| format!("note {k} [x] | y")).collect(),
        };
        let cards = textual_header_lines(&grid(), &meta).unwrap();
        assert_eq!(cards.len(), 40);
        for (k, c) in cards.iter().enumerate() {
            assert_eq!(c.chars().count(), 80);
            assert!(c.starts_with(&format!("C{:>2} ", k + 1)), "{c}");
            assert!(!c.contains('[') && !c.contains('|'));
        }
        assert!(cards[37].contains("(notes truncated)"));
        assert_eq!(cards[38].trim_end(), "C39 SEG Y REV1");
        assert_eq!(cards[39].trim_end(), "C40 END TEXTUAL HEADER");
    }

    #[test]
    fn unrepresentable_grids_are_refused_with_the_reason() {
        let mut g = grid();
        g.z0 = 100.5;
        assert!(encode_grid(&g)
            .unwrap_err()
            .contains("whole number of metres"));
        g.z0 = 40000.0;
        assert!(encode_grid(&g).unwrap_err().contains("-32768..32767"));
        let mut g = grid();
        g.dz = 0.0005;
        assert!(encode_grid(&g)
            .unwrap_err()
            .contains("whole number of millimetres"));
        g.dz = 40.0;
        assert!(encode_grid(&g).unwrap_err().contains("0.001..32.767"));
        let mut g = grid();
        g.x0 = 3.0e7;
        assert!(encode_grid(&g).unwrap_err().contains("21474836.47"));
        let mut g = grid();
        g.dz = 0.1 + 0.2; // 300.00000000000006 mm: representation error only
        assert_eq!(encode_grid(&g).unwrap().dz_mm, 300);
    }

    #[test]
    fn wrap_cuts_long_words() {
        let w = wrap(&"a".repeat(100), 76);
        assert_eq!(w.len(), 2);
        assert_eq!(w[0].len(), 76);
        assert_eq!(wrap("one two  three", 7), vec!["one two", "three"]);
    }
}
