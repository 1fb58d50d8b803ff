//! Prior assembly: kriged mean and uncertainty volumes of Vp0, epsilon and
//! delta, the zone volume, per-region sample banks, and the manifest that
//! describes them.

pub mod banks;
pub mod build;
pub mod manifest;
pub mod variograms;
pub mod volume_sampling;
