//! LAS 1.2 / 2.0 well-log files: strict reader and LAS 2.0 writer.
