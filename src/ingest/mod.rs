//! Reading the study's inputs: well table, deviation surveys, tops, logs, horizon picks.

pub mod csvtab;
pub mod logs;
pub mod picks;
pub mod trajectory;
pub mod wells;
