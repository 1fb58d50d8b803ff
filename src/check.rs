//! The `check` command: load a project and summarise what was read.
