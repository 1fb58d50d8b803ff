//! Unit conversions at the edges of the program. Inside, everything is SI.

/// Feet to metres (international foot, exact).
pub const FT: f64 = 0.3048;
