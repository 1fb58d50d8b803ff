//! SEG-Y rev 1 volumes on the survey grid: streaming writer and checking reader.
//!
//! # Layout we write (design overview, fixed)
//!
//! * 3200-byte textual header in EBCDIC, 40 cards of 80 characters `C 1 ` .. `C40 `,
//!   saying what the volume is (property, statistic, unit), the grid, the depth
//!   convention and the byte locations below;
//! * 400-byte big-endian binary header, format revision 0x0100 (bytes 3501-3502),
//!   fixed-length-trace flag 1 (3503-3504), no extended textual headers (3505-3506);
//! * one 240-byte big-endian trace header plus `z_count` IEEE float32 big-endian
//!   samples (format code 5) per (inline, crossline), ordered inline by inline,
//!   crossline fastest ([`crate::grid::SurveyGrid::trace_index`]).
//!
//! Depth is stored the way time-based readers expect: the sample-interval fields
//! (binary 3217-3218, trace 117-118) hold `dz` in **millimetres** and the delay
//! recording time (trace 109-110) holds the first sample's depth `z0` in
//! **metres**, so a reader that reports samples in milliseconds shows depth in
//! metres.
//!
//! Byte positions in this module's docs are 1-based as in the SEG-Y standard
//! (SEG-Y rev 1, SEG Technical Standards Committee, 2002); offsets in code are
//! 0-based (`position - 1`).

mod ebcdic;
mod writer;

pub use writer::{textual_header_lines, write_volume, SegyWriter};

/// What a volume holds; written into the textual header.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct VolumeMeta {
    /// Property name as in the manifest, e.g. `vp0`, `epsilon`, `facies_probability:sand`.
    pub property: String,
    /// Statistic, e.g. `mean`, `std`, `value`.
    pub statistic: String,
    /// Unit of the samples, e.g. `m/s` or `1` (dimensionless).
    pub unit: String,
    /// Free lines for the textual header (wrapped at 76 characters; truncated
    /// with a marker when the 40 cards are full).
    pub notes: Vec<String>,
}

/// Trace-header and binary-header byte positions (1-based, SEG-Y rev 1) used by
/// this module.
pub mod bytes {
    /// Trace sequence number within line (i32).
    pub const TRACE_SEQ_LINE: usize = 1;
    /// Trace sequence number within file (i32).
    pub const TRACE_SEQ_FILE: usize = 5;
    /// Ensemble (CDP) number (i32).
    pub const CDP: usize = 21;
    /// Trace number within the ensemble (i32).
    pub const TRACE_IN_ENSEMBLE: usize = 25;
    /// Trace identification code (i16); 1 = seismic data.
    pub const TRACE_ID: usize = 29;
    /// Number of vertically summed traces (i16).
    pub const VERTICAL_SUM: usize = 31;
    /// Number of horizontally stacked traces (i16).
    pub const HORIZONTAL_STACK: usize = 33;
    /// Data use (i16); 1 = production.
    pub const DATA_USE: usize = 35;
    /// Scalar applied to all coordinates (i16): negative divides, positive multiplies, 0 = 1.
    pub const COORD_SCALAR: usize = 71;
    /// Source X (i32).
    pub const SOURCE_X: usize = 73;
    /// Source Y (i32).
    pub const SOURCE_Y: usize = 77;
    /// Group X (i32).
    pub const GROUP_X: usize = 81;
    /// Group Y (i32).
    pub const GROUP_Y: usize = 85;
    /// Coordinate units (i16); 1 = length (metres or feet).
    pub const COORD_UNITS: usize = 89;
    /// Delay recording time, ms (i16); our depth volumes: z0 in metres.
    pub const DELAY: usize = 109;
    /// Number of samples in this trace (u16).
    pub const TRACE_SAMPLES: usize = 115;
    /// Sample interval of this trace, microseconds (u16); our depth volumes: dz in mm.
    pub const TRACE_INTERVAL: usize = 117;
    /// CDP X (i32).
    pub const CDP_X: usize = 181;
    /// CDP Y (i32).
    pub const CDP_Y: usize = 185;
    /// Inline number (i32).
    pub const INLINE: usize = 189;
    /// Crossline number (i32).
    pub const XLINE: usize = 193;

    /// Binary header: job identification number (i32).
    pub const BIN_JOB: usize = 3201;
    /// Binary header: line number (i32).
    pub const BIN_LINE: usize = 3205;
    /// Binary header: reel number (i32).
    pub const BIN_REEL: usize = 3209;
    /// Binary header: data traces per ensemble (i16).
    pub const BIN_TRACES_PER_ENSEMBLE: usize = 3213;
    /// Binary header: sample interval, microseconds (u16); our depth volumes: dz in mm.
    pub const BIN_INTERVAL: usize = 3217;
    /// Binary header: sample interval of original recording (u16).
    pub const BIN_INTERVAL_ORIG: usize = 3219;
    /// Binary header: samples per trace (u16).
    pub const BIN_SAMPLES: usize = 3221;
    /// Binary header: samples per trace of original recording (u16).
    pub const BIN_SAMPLES_ORIG: usize = 3223;
    /// Binary header: data sample format code (i16).
    pub const BIN_FORMAT: usize = 3225;
    /// Binary header: ensemble fold (i16).
    pub const BIN_FOLD: usize = 3227;
    /// Binary header: trace sorting code (i16); 4 = horizontally stacked.
    pub const BIN_SORTING: usize = 3229;
    /// Binary header: vertical sum code (i16); 1 = no sum.
    pub const BIN_VERTICAL_SUM: usize = 3231;
    /// Binary header: measurement system (i16); 1 = metres, 2 = feet.
    pub const BIN_MEASUREMENT: usize = 3255;
    /// Binary header (rev 2): byte-order constant 0x01020304 in the file's byte order (u32).
    pub const BIN_BYTE_ORDER: usize = 3297;
    /// Binary header: SEG-Y format revision number (u16, 0x0100 = rev 1.0).
    pub const BIN_REVISION: usize = 3501;
    /// Binary header: fixed-length trace flag (i16); 1 = all traces have the binary header's length.
    pub const BIN_FIXED_LENGTH: usize = 3503;
    /// Binary header: number of 3200-byte extended textual headers (i16); -1 = variable (rev 2).
    pub const BIN_EXTENDED_HEADERS: usize = 3505;
    /// Binary header (rev 2): number of additional 240-byte trace headers (u16).
    pub const BIN_EXTRA_TRACE_HEADERS: usize = 3507;
}

/// Size of the textual header, bytes.
pub const TEXT_HEADER_LEN: usize = 3200;
/// Size of the binary header, bytes.
pub const BINARY_HEADER_LEN: usize = 400;
/// Size of a trace header, bytes.
pub const TRACE_HEADER_LEN: usize = 240;
/// The coordinate scalar we write: -100, coordinates in centimetres.
pub const COORD_SCALAR_WRITTEN: i16 = -100;
