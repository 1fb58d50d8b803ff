//! The fictional demo basin generator.
