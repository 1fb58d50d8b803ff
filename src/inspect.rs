//! The `inspect` command: show what the tool reads from one input file.
