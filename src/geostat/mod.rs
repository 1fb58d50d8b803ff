//! Geostatistics in stratigraphic coordinates: variograms, neighbourhoods, kriging,
//! indicator kriging of facies.
//!
//! Coordinates are `(x, y, s)`: world x and y in metres and the stratigraphic
//! coordinate `s` in metres (see the stratigraphic frame).

pub mod decluster;
pub mod indicator;
pub mod kriging;
pub mod neighbourhood;
pub mod variogram;

/// A stationary covariance model in `(x, y, s)` space, as kriging needs it.
///
/// Implemented by [`variogram::VariogramModel`]: `C(d) = sill - gamma(d)`.
pub trait CovarianceModel: Send + Sync {
    /// Covariance at separation vector `d = (dx, dy, ds)` (m).
    fn covariance(&self, d: [f64; 3]) -> f64;
    /// Covariance at zero separation (the total sill, nugget included).
    fn sill(&self) -> f64;
    /// Map a point to anisotropy-scaled coordinates in which the model is
    /// isotropic with unit range: Euclidean distances there measure how far
    /// apart two points are for this model. Used by neighbourhood searches.
    fn to_isotropic(&self, p: [f64; 3]) -> [f64; 3];
}
