//! Log curves mapped to properties and converted to SI units.
