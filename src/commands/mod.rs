//! The commands that run a stage of the pipeline on a whole project and write
//! its outputs: `condition`, `variogram`, `build`.

pub mod condition;
pub mod variogram;
