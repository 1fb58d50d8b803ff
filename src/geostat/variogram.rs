//! Variogram models (nugget plus nested structures, geometric anisotropy), experimental variograms and weighted least-squares fitting.
