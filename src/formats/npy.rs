//! A small NumPy `.npy` writer (float32, C order, format version 1.0), shared
//! by the demo truth and the sample banks.

use crate::error::Result;
use crate::io_util::write_atomic;
use std::path::Path;

/// NumPy `.npy` format version 1.0 bytes of a little-endian float32 C-order
/// array: magic `\x93NUMPY`, version 1.0, header length (u16 LE), then the
/// header dict `{'descr': '<f4', 'fortran_order': False, 'shape': (...), }`
/// padded with spaces and ended by a newline so that the data start at a
/// multiple of 64 bytes (NumPy enhancement proposal NEP 1, "A simple file
/// format for NumPy arrays").
pub fn npy_f32(shape: &[usize], data: &[f32]) -> Vec<u8> {
    let dims: Vec<String> = shape.iter().map(|d| d.to_string()).collect();
    let shape_text = match dims.len() {
        1 => format!("({},)", dims[0]),
        _ => format!("({})", dims.join(", ")),
    };
    let mut header = format!("{{'descr': '<f4', 'fortran_order': False, 'shape': {shape_text}, }}");
    let unpadded = 10 + header.len() + 1;
    let pad = (64 - unpadded % 64) % 64;
    header.push_str(&" ".repeat(pad));
    header.push('\n');
    let mut out = Vec::with_capacity(10 + header.len() + 4 * data.len());
    out.extend_from_slice(b"\x93NUMPY\x01\x00");
    out.extend_from_slice(&(header.len() as u16).to_le_bytes());
    out.extend_from_slice(header.as_bytes());
    for v in data {
        out.extend_from_slice(&v.to_le_bytes());
    }
    out
}

/// Write a float32 `.npy` file atomically.
pub fn write_npy_f32(path: &Path, shape: &[usize], data: &[f32]) -> Result<()> {
    write_atomic(path, &npy_f32(shape, data))
}
