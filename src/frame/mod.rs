//! The structural frame: horizons gridded onto the survey, tied to the well tops,
//! put in stratigraphic order; zones between consecutive horizons.

pub mod gridding;
pub mod horizons;
pub mod strat;
pub mod tie;
