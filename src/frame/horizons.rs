//! Horizon surfaces, stratigraphic order and zones.
