//! Colour scales of the QC report.
//!
//! Maps and sections use a cubehelix scale (Green 2011): a helix through the
//! colour cube around the grey diagonal whose perceived intensity rises
//! monotonically with the value, so a figure stays readable when printed in
//! greyscale. The report's parameters are its own (a shorter, warmer turn than
//! the usual defaults, and a lightness range that avoids pure black and white so
//! that missing cells, drawn white, stand out).

/// A cubehelix colour scale.
///
/// For a fraction `f` in `[0, 1]`, mapped first to a lightness
/// `l = (l0 + (l1 - l0) f)^gamma`, with `phi = 2 pi (start / 3 + rotations * (l0 + (l1 - l0) f))`
/// and amplitude `a = hue * l (1 - l) / 2`:
///
/// ```text
/// R = l + a (-0.14861 cos phi + 1.78277 sin phi)
/// G = l + a (-0.29227 cos phi - 0.90649 sin phi)
/// B = l + a ( 1.97294 cos phi)
/// ```
///
/// clipped to `[0, 1]`. Source: D. A. Green (2011), "A colour scheme for the
/// display of astronomical intensity images", Bulletin of the Astronomical
/// Society of India 39, 289-295, equation 2. The deviation from grey is chosen
/// perpendicular to the luminance direction `(0.30, 0.59, 0.11)`, so before
/// clipping the luminance equals `l`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Cubehelix {
    /// Start colour (Green's `s`; 0.5 is purple, 1 red, 2 green, 3 blue).
    pub start: f64,
    /// Turns of the helix over the scale (Green's `r`).
    pub rotations: f64,
    /// Saturation (Green's `h`).
    pub hue: f64,
    /// Lightness exponent (Green's `gamma`).
    pub gamma: f64,
    /// Lightness at fraction 0 (before the exponent).
    pub lightness_low: f64,
    /// Lightness at fraction 1 (before the exponent).
    pub lightness_high: f64,
}

/// The report's sequential scale.
pub const REPORT_SCALE: Cubehelix = Cubehelix {
    start: 2.4,
    rotations: -0.9,
    hue: 1.15,
    gamma: 1.0,
    lightness_low: 0.12,
    lightness_high: 0.94,
};

/// Luminance weights of Green (2011) for R, G, B.
pub const GREEN_LUMINANCE: [f64; 3] = [0.30, 0.59, 0.11];

impl Cubehelix {
    /// The colour at fraction `f` (clamped to `[0, 1]`) as R, G, B in `[0, 1]`.
    pub fn rgb(&self, f: f64) -> [f64; 3] {
        let f = if f.is_finite() {
            f.clamp(0.0, 1.0)
        } else {
            0.0
        };
        let t = self.lightness_low + (self.lightness_high - self.lightness_low) * f;
        let l = t.powf(self.gamma);
        let phi = 2.0 * std::f64::consts::PI * (self.start / 3.0 + self.rotations * t);
        let a = self.hue * l * (1.0 - l) / 2.0;
        let (s, c) = phi.sin_cos();
        [
            (l + a * (-0.14861 * c + 1.78277 * s)).clamp(0.0, 1.0),
            (l + a * (-0.29227 * c - 0.90649 * s)).clamp(0.0, 1.0),
            (l + a * (1.97294 * c)).clamp(0.0, 1.0),
        ]
    }

    /// The colour at fraction `f` as 8-bit R, G, B.
    pub fn rgb8(&self, f: f64) -> [u8; 3] {
        let c = self.rgb(f);
        c.map(|v| (v * 255.0).round().clamp(0.0, 255.0) as u8)
    }
}

/// Luminance `0.30 R + 0.59 G + 0.11 B` of a colour in `[0, 1]` (Green 2011).
pub fn luminance(rgb: [f64; 3]) -> f64 {
    GREEN_LUMINANCE[0] * rgb[0] + GREEN_LUMINANCE[1] * rgb[1] + GREEN_LUMINANCE[2] * rgb[2]
}

/// A value range mapped onto a scale in `levels` equal steps (a stepped scale:
/// each step is one colour, which keeps the figures small and makes values
/// readable off the colour bar).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Stepped {
    /// Value at the low end.
    pub lo: f64,
    /// Value at the high end.
    pub hi: f64,
    /// Number of steps (at least 2).
    pub levels: usize,
}

impl Stepped {
    /// A stepped scale over the finite values of `values` (2nd to 98th
    /// percentile, so that a few outliers do not flatten the map), or `None`
    /// when there are none.
    pub fn over(values: impl Iterator<Item = f64>, levels: usize) -> Option<Stepped> {
        let mut v: Vec<f64> = values.filter(|v| v.is_finite()).collect();
        if v.is_empty() {
            return None;
        }
        v.sort_by(f64::total_cmp);
        let at = |q: f64| v[((v.len() - 1) as f64 * q).round() as usize];
        let (mut lo, mut hi) = (at(0.02), at(0.98));
        if hi - lo <= 1e-12 * (lo.abs() + hi.abs()).max(1e-300) {
            let pad = if lo == 0.0 { 1.0 } else { 0.05 * lo.abs() };
            lo -= pad;
            hi += pad;
        }
        Some(Stepped {
            lo,
            hi,
            levels: levels.max(2),
        })
    }

    /// Step index of `v` (values beyond the range take the end steps).
    pub fn step(&self, v: f64) -> usize {
        let f = (v - self.lo) / (self.hi - self.lo);
        ((f * self.levels as f64).floor().max(0.0) as usize).min(self.levels - 1)
    }

    /// Colour of step `k` on `scale` (the centre of the step).
    pub fn colour(&self, scale: &Cubehelix, k: usize) -> [u8; 3] {
        scale.rgb8((k as f64 + 0.5) / self.levels as f64)
    }

    /// Lower edge value of step `k`.
    pub fn edge(&self, k: usize) -> f64 {
        self.lo + (self.hi - self.lo) * k as f64 / self.levels as f64
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn report_scale_luminance_rises_monotonically() {
        let mut prev = -1.0;
        for i in 0..=1000 {
            let y = luminance(REPORT_SCALE.rgb(i as f64 / 1000.0));
            assert!(y > prev, "luminance falls at {i}: {y} after {prev}");
            prev = y;
        }
    }

    #[test]
    fn unclipped_luminance_is_the_lightness() {
        // Green (2011): the helix deviation is perpendicular to the luminance axis
        let s = Cubehelix {
            hue: 0.5,
            ..REPORT_SCALE
        };
        for i in 0..=20 {
            let f = i as f64 / 20.0;
            let t = s.lightness_low + (s.lightness_high - s.lightness_low) * f;
            let c = s.rgb(f);
            if c.iter().all(|v| *v > 0.0 && *v < 1.0) {
                assert!((luminance(c) - t).abs() < 2e-4, "{f}: {}", luminance(c));
            }
        }
    }

    #[test]
    fn stepped_scale_edges_and_steps() {
        let s = Stepped::over((0..=100).map(f64::from), 10).unwrap();
        assert_eq!(s.lo, 2.0);
        assert_eq!(s.hi, 98.0);
        assert_eq!(s.step(-5.0), 0);
        assert_eq!(s.step(1e9), 9);
        assert_eq!(s.step(s.edge(3) + 1e-9), 3);
        assert!(Stepped::over([f64::NAN].into_iter(), 10).is_none());
        let flat = Stepped::over([5.0, 5.0].into_iter(), 4).unwrap();
        assert!(flat.lo < 5.0 && flat.hi > 5.0);
    }
}
