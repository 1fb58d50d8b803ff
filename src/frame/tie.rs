//! Tying gridded horizons to well tops.
