//! Backus (1962) averaging of finely layered isotropic media into an effective VTI medium.
