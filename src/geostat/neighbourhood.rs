//! Kriging neighbourhoods that draw from several wells.
