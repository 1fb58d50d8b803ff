//! File formats implemented here, strictly: LAS well logs, SEG-Y volumes and
//! NumPy `.npy` arrays (writer only).
//!
//! Both are small careful modules of our own: the obvious crates were measured to
//! give wrong numbers (see DEVELOPERS.md).

pub mod las;
pub mod npy;
pub mod segy;
