//! Gridding scattered picks onto the survey grid.
