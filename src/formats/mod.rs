//! File formats implemented here, strictly: LAS well logs and SEG-Y volumes.
//!
//! Both are small careful modules of our own: the obvious crates were measured to
//! give wrong numbers (see DEVELOPERS.md).

pub mod las;
pub mod segy;
