//! SEG-Y reader: rev 0 / 1 (and the rev 1 subset of rev 2), either byte order,
//! the common sample formats, decoded into f32.

use super::bytes as b;
use super::ebcdic::{decode_ascii, decode_ebcdic, looks_like_ebcdic};
use super::{BINARY_HEADER_LEN, TEXT_HEADER_LEN, TRACE_HEADER_LEN};
use crate::error::{Error, Result};
use serde::Serialize;
use std::fs::File;
use std::io::{BufReader, Read, Seek, SeekFrom};
use std::path::{Path, PathBuf};

/// Byte order of the binary numbers in a file.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum ByteOrder {
    /// Big-endian, as the SEG-Y standard prescribes.
    Big,
    /// Little-endian (written by some tools; detected and read).
    Little,
}

/// Character set of a textual header.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum TextEncoding {
    /// EBCDIC, decoded with IBM code page 037.
    Ebcdic,
    /// ASCII (bytes above 0x7F shown as Latin-1).
    Ascii,
}

/// Data sample formats we read (binary header bytes 3225-3226).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum SampleFormat {
    /// 1: 4-byte IBM hexadecimal floating point.
    IbmFloat32,
    /// 2: 4-byte two's complement integer.
    Int32,
    /// 3: 2-byte two's complement integer.
    Int16,
    /// 5: 4-byte IEEE floating point.
    IeeeFloat32,
    /// 6: 8-byte IEEE floating point (rev 2).
    IeeeFloat64,
    /// 7: 3-byte two's complement integer (rev 2).
    Int24,
    /// 8: 1-byte two's complement integer.
    Int8,
    /// 9: 8-byte two's complement integer (rev 2).
    Int64,
    /// 10: 4-byte unsigned integer (rev 2).
    UInt32,
    /// 11: 2-byte unsigned integer (rev 2).
    UInt16,
    /// 12: 8-byte unsigned integer (rev 2).
    UInt64,
    /// 15: 3-byte unsigned integer (rev 2).
    UInt24,
    /// 16: 1-byte unsigned integer (rev 2).
    UInt8,
}

impl SampleFormat {
    /// The format of a binary-header code, if we read it.
    pub fn from_code(code: i16) -> Option<Self> {
        use SampleFormat::*;
        Some(match code {
            1 => IbmFloat32,
            2 => Int32,
            3 => Int16,
            5 => IeeeFloat32,
            6 => IeeeFloat64,
            7 => Int24,
            8 => Int8,
            9 => Int64,
            10 => UInt32,
            11 => UInt16,
            12 => UInt64,
            15 => UInt24,
            16 => UInt8,
            _ => return None,
        })
    }

    /// The binary-header code.
    pub fn code(self) -> i16 {
        use SampleFormat::*;
        match self {
            IbmFloat32 => 1,
            Int32 => 2,
            Int16 => 3,
            IeeeFloat32 => 5,
            IeeeFloat64 => 6,
            Int24 => 7,
            Int8 => 8,
            Int64 => 9,
            UInt32 => 10,
            UInt16 => 11,
            UInt64 => 12,
            UInt24 => 15,
            UInt8 => 16,
        }
    }

    /// Bytes per sample.
    pub fn bytes(self) -> usize {
        use SampleFormat::*;
        match self {
            Int8 | UInt8 => 1,
            Int16 | UInt16 => 2,
            Int24 | UInt24 => 3,
            IbmFloat32 | Int32 | IeeeFloat32 | UInt32 => 4,
            IeeeFloat64 | Int64 | UInt64 => 8,
        }
    }

    /// A short description, e.g. `IBM float32`.
    pub fn name(self) -> &'static str {
        use SampleFormat::*;
        match self {
            IbmFloat32 => "IBM float32",
            Int32 => "int32",
            Int16 => "int16",
            IeeeFloat32 => "IEEE float32",
            IeeeFloat64 => "IEEE float64",
            Int24 => "int24",
            Int8 => "int8",
            Int64 => "int64",
            UInt32 => "uint32",
            UInt16 => "uint16",
            UInt64 => "uint64",
            UInt24 => "uint24",
            UInt8 => "uint8",
        }
    }
}

/// Convert a 4-byte IBM System/360 hexadecimal float to the nearest f32.
///
/// `value = (-1)^s * 0.F * 16^(E - 64)`, with sign bit `s`, 7-bit exponent `E`
/// (excess 64) and 24-bit fraction `F` (IBM System/370 Principles of
/// Operation, "Floating-point number representation"; SEG-Y rev 1 Appendix C
/// format 1). The value is formed exactly in f64 and then rounded to f32,
/// which is exact for every IBM value within the f32 normal range (its
/// fraction has at most 24 significant bits); values beyond it become
/// infinities, values below it round to f32 subnormals or zero.
pub fn ibm_to_f32(bits: u32) -> f32 {
    let sign = if bits >> 31 == 1 { -1.0 } else { 1.0 };
    let exp = ((bits >> 24) & 0x7F) as i64;
    let frac = (bits & 0x00FF_FFFF) as f64;
    // 0.F * 16^(E-64) = F * 2^(4(E-64) - 24); the exponent is in -280..=228
    let e2 = 4 * (exp - 64) - 24;
    let scale = f64::from_bits(((1023 + e2) as u64) << 52);
    (sign * frac * scale) as f32
}

/// Apply a SEG-Y coordinate scalar (trace bytes 71-72) to a raw coordinate:
/// a negative scalar divides, a positive one multiplies, 0 means 1
/// (SEG-Y rev 1, trace header bytes 71-72).
pub fn apply_coord_scalar(raw: i32, scalar: i16) -> f64 {
    let v = raw as f64;
    match scalar {
        0 => v,
        s if s < 0 => v / -(s as f64),
        s => v * s as f64,
    }
}

/// The binary-header fields we use (raw values, SEG-Y rev 1 positions).
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct BinaryHeader {
    /// 3201-3204.
    pub job_id: i32,
    /// 3205-3208.
    pub line_number: i32,
    /// 3209-3212.
    pub reel_number: i32,
    /// 3213-3214.
    pub traces_per_ensemble: i16,
    /// 3217-3218, microseconds for time data; millimetres in our depth volumes.
    pub sample_interval: u16,
    /// 3221-3222.
    pub samples_per_trace: u16,
    /// 3225-3226.
    pub format_code: i16,
    /// 3229-3230.
    pub sorting_code: i16,
    /// 3255-3256: 1 metres, 2 feet.
    pub measurement_system: i16,
    /// 3501-3502 as one big-endian 16-bit word: 0x0100 is rev 1.0.
    pub revision: u16,
    /// 3503-3504.
    pub fixed_length_flag: i16,
    /// 3505-3506.
    pub extended_headers: i16,
}

impl BinaryHeader {
    /// The revision as `major.minor` (bytes 3501 and 3502).
    pub fn revision_string(&self) -> String {
        format!("{}.{}", self.revision >> 8, self.revision & 0xFF)
    }
}

/// One trace header, with the coordinate scalar applied.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct TraceHeader {
    /// 1-4.
    pub sequence_line: i32,
    /// 5-8.
    pub sequence_file: i32,
    /// 21-24.
    pub cdp: i32,
    /// 29-30.
    pub trace_id: i16,
    /// 71-72 (raw).
    pub coord_scalar: i16,
    /// 181-184 with the scalar applied (m, or the file's unit).
    pub cdp_x: f64,
    /// 185-188 with the scalar applied.
    pub cdp_y: f64,
    /// 189-192.
    pub inline: i32,
    /// 193-196.
    pub crossline: i32,
    /// 115-116.
    pub sample_count: u16,
    /// 117-118.
    pub sample_interval: u16,
    /// 109-110, ms for time data; z0 in metres in our depth volumes.
    pub delay: i16,
}

/// Everything in a SEG-Y file before the first trace, and its trace layout.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SegyHeaders {
    /// Character set of the textual header.
    pub text_encoding: TextEncoding,
    /// The 40 lines of the textual header, trailing blanks removed.
    pub text: Vec<String>,
    /// Extended textual headers (rev 1), 40 lines each.
    pub extended_text: Vec<Vec<String>>,
    /// Byte order of the binary numbers.
    pub byte_order: ByteOrder,
    /// Binary header.
    pub binary: BinaryHeader,
    /// Sample format.
    pub format: SampleFormat,
    /// Samples per trace (binary header, or the first trace header when that is 0).
    pub sample_count: usize,
    /// Sample interval (binary header, or the first trace header when that is 0):
    /// microseconds for time data, millimetres in our depth volumes.
    pub sample_interval: u16,
    /// Number of traces.
    pub trace_count: usize,
    /// Byte offset of the first trace.
    pub data_offset: u64,
    /// Bytes per trace, header included.
    pub trace_bytes: u64,
    /// Size of the file, bytes.
    pub file_bytes: u64,
}

fn i16_at(buf: &[u8], off: usize, order: ByteOrder) -> i16 {
    let mut a = [0u8; 2];
    if let Some(s) = buf.get(off..off + 2) {
        a.copy_from_slice(s);
    }
    match order {
        ByteOrder::Big => i16::from_be_bytes(a),
        ByteOrder::Little => i16::from_le_bytes(a),
    }
}
fn u16_at(buf: &[u8], off: usize, order: ByteOrder) -> u16 {
    i16_at(buf, off, order) as u16
}
fn i32_at(buf: &[u8], off: usize, order: ByteOrder) -> i32 {
    let mut a = [0u8; 4];
    if let Some(s) = buf.get(off..off + 4) {
        a.copy_from_slice(s);
    }
    match order {
        ByteOrder::Big => i32::from_be_bytes(a),
        ByteOrder::Little => i32::from_le_bytes(a),
    }
}

fn decode_text(bytes: &[u8]) -> (TextEncoding, Vec<String>) {
    let enc = if looks_like_ebcdic(bytes) {
        TextEncoding::Ebcdic
    } else {
        TextEncoding::Ascii
    };
    let lines = bytes
        .chunks(80)
        .map(|line| {
            let s: String = line
                .iter()
                .map(|&c| match enc {
                    TextEncoding::Ebcdic => decode_ebcdic(c),
                    TextEncoding::Ascii => decode_ascii(c),
                })
                .collect();
            s.trim_end().to_string()
        })
        .collect();
    (enc, lines)
}

/// Parse a trace header (240 bytes) in `order`.
fn parse_trace_header(h: &[u8], order: ByteOrder) -> TraceHeader {
    let at = |pos: usize| pos - 1;
    let scalar = i16_at(h, at(b::COORD_SCALAR), order);
    TraceHeader {
        sequence_line: i32_at(h, at(b::TRACE_SEQ_LINE), order),
        sequence_file: i32_at(h, at(b::TRACE_SEQ_FILE), order),
        cdp: i32_at(h, at(b::CDP), order),
        trace_id: i16_at(h, at(b::TRACE_ID), order),
        coord_scalar: scalar,
        cdp_x: apply_coord_scalar(i32_at(h, at(b::CDP_X), order), scalar),
        cdp_y: apply_coord_scalar(i32_at(h, at(b::CDP_Y), order), scalar),
        inline: i32_at(h, at(b::INLINE), order),
        crossline: i32_at(h, at(b::XLINE), order),
        sample_count: u16_at(h, at(b::TRACE_SAMPLES), order),
        sample_interval: u16_at(h, at(b::TRACE_INTERVAL), order),
        delay: i16_at(h, at(b::DELAY), order),
    }
}

/// Decode `raw` samples of `format` in `order` into `out` (same count).
///
/// Integer formats and IEEE float64 are rounded to the nearest f32 (exact for
/// integers up to 2^24 in magnitude); IBM floats see [`ibm_to_f32`].
fn decode_samples(raw: &[u8], format: SampleFormat, order: ByteOrder, out: &mut [f32]) {
    let n = format.bytes();
    for (chunk, o) in raw.chunks_exact(n).zip(out.iter_mut()) {
        let mut w = [0u8; 8];
        // normalise to big-endian bytes, right-aligned in w
        match order {
            ByteOrder::Big => w[8 - n..].copy_from_slice(chunk),
            ByteOrder::Little => {
                for (k, &c) in chunk.iter().enumerate() {
                    w[7 - k] = c;
                }
            }
        }
        let u = u64::from_be_bytes(w);
        // sign-extend an n-byte integer
        let s = {
            let shift = 64 - 8 * n as u32;
            ((u << shift) as i64) >> shift
        };
        *o = match format {
            SampleFormat::IbmFloat32 => ibm_to_f32(u as u32),
            SampleFormat::IeeeFloat32 => f32::from_bits(u as u32),
            SampleFormat::IeeeFloat64 => f64::from_bits(u) as f32,
            SampleFormat::Int8
            | SampleFormat::Int16
            | SampleFormat::Int24
            | SampleFormat::Int32
            | SampleFormat::Int64 => s as f32,
            SampleFormat::UInt8
            | SampleFormat::UInt16
            | SampleFormat::UInt24
            | SampleFormat::UInt32
            | SampleFormat::UInt64 => u as f32,
        };
    }
}

/// Reads a SEG-Y file trace by trace (memory: one trace).
pub struct SegyReader<R: Read + Seek> {
    path: PathBuf,
    src: R,
    headers: SegyHeaders,
    next: usize,
    buf: Vec<u8>,
}

impl SegyReader<BufReader<File>> {
    /// Open `path` and read its headers.
    pub fn open(path: &Path) -> Result<Self> {
        let f = File::open(path).map_err(|e| Error::io(path, e))?;
        SegyReader::from_reader(path, BufReader::with_capacity(1 << 16, f))
    }
}

impl<R: Read + Seek> SegyReader<R> {
    /// Read the headers from `src`; `path` names the source in messages.
    pub fn from_reader(path: &Path, mut src: R) -> Result<Self> {
        let bad = |msg: String| Error::input(path, None, msg);
        let io = |e| Error::io(path, e);
        let len = src.seek(SeekFrom::End(0)).map_err(io)?;
        src.seek(SeekFrom::Start(0)).map_err(io)?;
        let head_len = (TEXT_HEADER_LEN + BINARY_HEADER_LEN) as u64;
        if len < head_len {
            return Err(bad(format!(
                "file is {len} bytes, shorter than the {head_len} bytes of SEG-Y \
                 textual and binary headers (truncated, or not SEG-Y)"
            )));
        }
        let mut head = vec![0u8; head_len as usize];
        src.read_exact(&mut head).map_err(io)?;
        let bin = &head[TEXT_HEADER_LEN..];
        let off = |pos: usize| pos - 1 - TEXT_HEADER_LEN;

        // byte order: the rev 2 constant when present, else the format code
        let order = {
            let c = i32_at(bin, off(b::BIN_BYTE_ORDER), ByteOrder::Big) as u32;
            let fc_be = i16_at(bin, off(b::BIN_FORMAT), ByteOrder::Big);
            let fc_le = i16_at(bin, off(b::BIN_FORMAT), ByteOrder::Little);
            if c == 0x0102_0304 {
                ByteOrder::Big
            } else if c == 0x0403_0201 {
                ByteOrder::Little
            } else if SampleFormat::from_code(fc_be).is_some() || fc_be == 4 {
                ByteOrder::Big
            } else if SampleFormat::from_code(fc_le).is_some() || fc_le == 4 {
                ByteOrder::Little
            } else {
                return Err(bad(format!(
                    "data sample format code {fc_be} (binary header bytes 3225-3226) is \
                     not a SEG-Y format code (1, 2, 3, 5, 6, 7, 8, 9, 10, 11, 12, 15, 16 \
                     are read; {fc_le} if read little-endian): not SEG-Y, or a damaged \
                     binary header"
                )));
            }
        };
        let binary = BinaryHeader {
            job_id: i32_at(bin, off(b::BIN_JOB), order),
            line_number: i32_at(bin, off(b::BIN_LINE), order),
            reel_number: i32_at(bin, off(b::BIN_REEL), order),
            traces_per_ensemble: i16_at(bin, off(b::BIN_TRACES_PER_ENSEMBLE), order),
            sample_interval: u16_at(bin, off(b::BIN_INTERVAL), order),
            samples_per_trace: u16_at(bin, off(b::BIN_SAMPLES), order),
            format_code: i16_at(bin, off(b::BIN_FORMAT), order),
            sorting_code: i16_at(bin, off(b::BIN_SORTING), order),
            measurement_system: i16_at(bin, off(b::BIN_MEASUREMENT), order),
            // the two revision bytes are single bytes: major, minor
            revision: u16::from_be_bytes([
                bin.get(off(b::BIN_REVISION)).copied().unwrap_or(0),
                bin.get(off(b::BIN_REVISION) + 1).copied().unwrap_or(0),
            ]),
            fixed_length_flag: i16_at(bin, off(b::BIN_FIXED_LENGTH), order),
            extended_headers: i16_at(bin, off(b::BIN_EXTENDED_HEADERS), order),
        };
        let format = SampleFormat::from_code(binary.format_code).ok_or_else(|| {
            Error::unsupported(
                path,
                None,
                format!(
                    "data sample format code {} (binary header bytes 3225-3226{}); \
                     codes 1, 2, 3, 5, 6, 7, 8, 9, 10, 11, 12, 15, 16 are read",
                    binary.format_code,
                    if binary.format_code == 4 {
                        ", 4-byte fixed point with gain"
                    } else {
                        ""
                    }
                ),
            )
        })?;
        let (text_encoding, text) = decode_text(&head[..TEXT_HEADER_LEN]);

        // extended textual headers
        let n_ext = binary.extended_headers;
        if n_ext < 0 {
            return Err(Error::unsupported(
                path,
                None,
                format!(
                    "binary header bytes 3505-3506 = {n_ext}: a variable number of extended \
                     textual headers (SEG-Y rev 2, ended by an ((EndText)) stanza) is not read"
                ),
            ));
        }
        let data_offset = head_len + TEXT_HEADER_LEN as u64 * n_ext as u64;
        if len < data_offset {
            return Err(bad(format!(
                "binary header bytes 3505-3506 announce {n_ext} extended textual headers, \
                 which end at byte {data_offset}, but the file has only {len} bytes"
            )));
        }
        let mut extended_text = Vec::with_capacity(n_ext as usize);
        for _ in 0..n_ext {
            let mut t = vec![0u8; TEXT_HEADER_LEN];
            src.read_exact(&mut t).map_err(io)?;
            extended_text.push(decode_text(&t).1);
        }
        if binary.revision >> 8 >= 2 {
            let extra = u16_at(bin, off(b::BIN_EXTRA_TRACE_HEADERS), order);
            if extra > 0 {
                return Err(Error::unsupported(
                    path,
                    None,
                    format!(
                        "SEG-Y rev 2 additional trace headers (binary header bytes \
                         3507-3508 = {extra}) are not read"
                    ),
                ));
            }
        }

        // samples per trace and interval: binary header, else the first trace header
        let mut first = [0u8; TRACE_HEADER_LEN];
        let first_trace = if len >= data_offset + TRACE_HEADER_LEN as u64 {
            src.read_exact(&mut first).map_err(io)?;
            Some(parse_trace_header(&first, order))
        } else {
            None
        };
        let mut sample_count = binary.samples_per_trace as usize;
        if sample_count == 0 && binary.revision >> 8 >= 2 {
            // rev 2: extended number of samples, bytes 3269-3272
            sample_count = i32_at(bin, 3269 - 1 - TEXT_HEADER_LEN, order).max(0) as usize;
        }
        if sample_count == 0 {
            sample_count = first_trace.map(|t| t.sample_count as usize).unwrap_or(0);
        }
        if sample_count == 0 {
            return Err(bad(
                "zero samples per trace: binary header bytes 3221-3222 and the first trace \
                 header bytes 115-116 both say 0"
                    .to_string(),
            ));
        }
        let mut sample_interval = binary.sample_interval;
        if sample_interval == 0 {
            sample_interval = first_trace.map(|t| t.sample_interval).unwrap_or(0);
        }

        let trace_bytes = TRACE_HEADER_LEN as u64 + (sample_count * format.bytes()) as u64;
        let rest = len - data_offset;
        if rest == 0 {
            return Err(bad(format!(
                "no traces: the file ends after its {data_offset} header bytes"
            )));
        }
        let whole = rest / trace_bytes;
        let part = rest % trace_bytes;
        if part != 0 {
            return Err(bad(format!(
                "file size {len} bytes is not a whole number of traces: after the \
                 {data_offset} header bytes come {whole} traces of {trace_bytes} bytes \
                 (240 + {sample_count} samples x {} bytes, {}) and {part} bytes more; \
                 trace {} at byte offset {} is truncated, or the samples per trace \
                 (binary header bytes 3221-3222) or format code is wrong",
                format.bytes(),
                format.name(),
                whole + 1,
                data_offset + whole * trace_bytes
            )));
        }
        src.seek(SeekFrom::Start(data_offset)).map_err(io)?;
        let headers = SegyHeaders {
            text_encoding,
            text,
            extended_text,
            byte_order: order,
            binary,
            format,
            sample_count,
            sample_interval,
            trace_count: whole as usize,
            data_offset,
            trace_bytes,
            file_bytes: len,
        };
        Ok(SegyReader {
            path: path.to_path_buf(),
            src,
            buf: vec![0u8; trace_bytes as usize],
            headers,
            next: 0,
        })
    }

    /// The file's headers and layout.
    pub fn headers(&self) -> &SegyHeaders {
        &self.headers
    }

    /// The file being read.
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// Index (0-based) of the next trace [`Self::next_trace`] returns.
    pub fn position(&self) -> usize {
        self.next
    }

    /// Read the next trace header, and its samples into `samples` (length
    /// `sample_count`) when given; `None` after the last trace. After an I/O
    /// error the reader's position is undefined; other errors leave it at the
    /// following trace.
    pub fn next_trace(&mut self, samples: Option<&mut [f32]>) -> Result<Option<TraceHeader>> {
        if self.next >= self.headers.trace_count {
            return Ok(None);
        }
        let h = &self.headers;
        let offset = h.data_offset + self.next as u64 * h.trace_bytes;
        let trace_no = self.next + 1;
        let path = &self.path;
        let ioerr = |e: std::io::Error| {
            Error::input(
                path,
                None,
                format!("trace {trace_no} at byte offset {offset}: cannot read: {e}"),
            )
        };
        if let Some(out) = samples.as_deref() {
            if out.len() != h.sample_count {
                return Err(Error::inconsistent(format!(
                    "{}: buffer for {} samples given, traces have {}",
                    path.display(),
                    out.len(),
                    h.sample_count
                )));
            }
        }
        if samples.is_some() {
            self.src.read_exact(&mut self.buf).map_err(ioerr)?;
        } else {
            self.src
                .read_exact(&mut self.buf[..TRACE_HEADER_LEN])
                .map_err(ioerr)?;
            let skip = (h.trace_bytes - TRACE_HEADER_LEN as u64) as i64;
            self.src.seek(SeekFrom::Current(skip)).map_err(ioerr)?;
        }
        // the whole trace is consumed: the stream stays aligned whatever follows
        self.next += 1;
        let th = parse_trace_header(&self.buf[..TRACE_HEADER_LEN], h.byte_order);
        if th.sample_count != 0
            && th.sample_count as usize != h.sample_count
            && h.binary.fixed_length_flag != 1
        {
            return Err(Error::unsupported(
                path,
                None,
                format!(
                    "trace {trace_no} at byte offset {offset} has {} samples (trace bytes \
                     115-116) but the file has {} per trace; variable-length traces are \
                     not read",
                    th.sample_count, h.sample_count
                ),
            ));
        }
        if let Some(out) = samples {
            decode_samples(&self.buf[TRACE_HEADER_LEN..], h.format, h.byte_order, out);
        }
        Ok(Some(th))
    }
}

/// A whole SEG-Y file in memory.
#[derive(Debug, Clone, PartialEq)]
pub struct SegyFile {
    /// The file read.
    pub path: PathBuf,
    /// Textual and binary headers, layout.
    pub headers: SegyHeaders,
    /// Trace headers in file order.
    pub traces: Vec<TraceHeader>,
    /// Samples, trace after trace in file order, `headers.sample_count` per trace.
    pub samples: Vec<f32>,
}

impl SegyFile {
    /// Samples of trace `n` (0-based, file order).
    pub fn trace(&self, n: usize) -> Option<&[f32]> {
        let ns = self.headers.sample_count;
        self.samples.get(n * ns..(n + 1) * ns)
    }
}

/// Read a whole SEG-Y file: rev 0 or 1 (rev 2 files without rev 2 extensions),
/// big- or little-endian (detected), sample formats 1 (IBM float, converted
/// exactly), 2, 3, 5, 6, 7, 8, 9, 10, 11, 12, 15, 16, with extended textual
/// headers. Samples become f32, coordinates have their scalar applied in f64.
pub fn read_segy(path: &Path) -> Result<SegyFile> {
    SegyReader::open(path)?.read_all()
}

impl<R: Read + Seek> SegyReader<R> {
    /// Read all remaining traces into memory (see [`read_segy`]).
    pub fn read_all(mut self) -> Result<SegyFile> {
        let h = self.headers().clone();
        let left = h.trace_count - self.next;
        let mut traces = Vec::with_capacity(left);
        let mut samples = vec![0f32; left * h.sample_count];
        for chunk in samples.chunks_exact_mut(h.sample_count) {
            match self.next_trace(Some(chunk))? {
                Some(t) => traces.push(t),
                None => break,
            }
        }
        Ok(SegyFile {
            path: self.path,
            headers: h,
            traces,
            samples,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ibm_examples() {
        // SEG-Y rev 1 Appendix C / IBM hex float examples (from memory, common practice):
        // 0x41100000 = 1.0, 0xC276A000 = -118.625, 0x42640000 = 100.0
        assert_eq!(ibm_to_f32(0x4110_0000), 1.0);
        assert_eq!(ibm_to_f32(0xC276_A000), -118.625);
        assert_eq!(ibm_to_f32(0x4264_0000), 100.0);
        assert_eq!(ibm_to_f32(0x0000_0000), 0.0);
        assert_eq!(ibm_to_f32(0x8000_0000).to_bits(), (-0.0f32).to_bits());
        // unnormalised fraction: 0x40 0x000001 = 2^-24
        assert_eq!(ibm_to_f32(0x4000_0001), 2f32.powi(-24));
        // largest IBM value overflows f32
        assert_eq!(ibm_to_f32(0x7FFF_FFFF), f32::INFINITY);
    }

    #[test]
    fn scalar_rules() {
        assert_eq!(apply_coord_scalar(12345, -100), 123.45);
        assert_eq!(apply_coord_scalar(12345, 10), 123450.0);
        assert_eq!(apply_coord_scalar(12345, 0), 12345.0);
        assert_eq!(apply_coord_scalar(-7, i16::MIN), -7.0 / 32768.0);
    }

    #[test]
    fn integer_samples_sign_extend_in_both_orders() {
        let mut out = [0f32; 2];
        decode_samples(
            &[0xFF, 0xFE, 0x00, 0x05],
            SampleFormat::Int16,
            ByteOrder::Big,
            &mut out,
        );
        assert_eq!(out, [-2.0, 5.0]);
        decode_samples(
            &[0xFE, 0xFF, 0x05, 0x00],
            SampleFormat::Int16,
            ByteOrder::Little,
            &mut out,
        );
        assert_eq!(out, [-2.0, 5.0]);
        decode_samples(
            &[0xFF, 0xFF, 0xFF, 0x00, 0x00, 0x07],
            SampleFormat::Int24,
            ByteOrder::Big,
            &mut out,
        );
        assert_eq!(out, [-1.0, 7.0]);
        decode_samples(&[0xFF, 0x01], SampleFormat::UInt8, ByteOrder::Big, &mut out);
        assert_eq!(out, [255.0, 1.0]);
    }
}
