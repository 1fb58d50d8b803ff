//! Well conditioning: Vp0, epsilon and delta per log sample (from curves, or by
//! Backus averaging of the fine layering and Thomsen's definitions), and
//! blocking into stratigraphic cells.

pub mod backus;
pub mod blocking;
pub mod intrinsic;
pub mod logs;
pub mod output;
pub mod thomsen;
