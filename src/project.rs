//! The project file (TOML) that describes one study.
