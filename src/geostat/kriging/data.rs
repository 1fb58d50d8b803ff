//! Conditioning data (blocked well samples) and kriging targets.

use crate::error::{Error, Result};

/// One blocked well sample: a property value in one stratigraphic cell of one well.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Sample {
    /// Well identifier (any integer, unique per well).
    pub well: u32,
    /// Layer index: the integer index of the stratigraphic cell within the zone.
    pub layer: i32,
    /// Position `(x, y, s)` in m: world x and y, stratigraphic coordinate s.
    pub pos: [f64; 3],
    /// The property value (in the property's SI unit).
    pub value: f64,
    /// External drift value at the sample (kriging with an external drift).
    pub drift: Option<f64>,
    /// Known trend (local mean) at the sample (simple kriging with a trend).
    pub trend: Option<f64>,
}

impl Sample {
    /// A sample without drift or trend values.
    pub fn new(well: u32, layer: i32, pos: [f64; 3], value: f64) -> Self {
        Sample {
            well,
            layer,
            pos,
            value,
            drift: None,
            trend: None,
        }
    }
}

/// A validated set of samples, sorted by well identifier and then layer.
///
/// The order is the order of [`SampleSet::samples`]; neighbourhoods and kriging
/// refer to samples by their index in it.
#[derive(Debug, Clone)]
pub struct SampleSet {
    samples: Vec<Sample>,
    /// Per well: identifier and index range in `samples`.
    wells: Vec<(u32, std::ops::Range<usize>)>,
}

impl SampleSet {
    /// Validate and sort `samples`.
    ///
    /// Errors: a non-finite coordinate, value, drift or trend; two samples of one
    /// well in the same layer.
    pub fn new(mut samples: Vec<Sample>) -> Result<Self> {
        for sm in &samples {
            let finite = sm.pos.iter().all(|c| c.is_finite())
                && sm.value.is_finite()
                && sm.drift.map_or(true, f64::is_finite)
                && sm.trend.map_or(true, f64::is_finite);
            if !finite {
                return Err(Error::inconsistent(format!(
                    "kriging data: well {} layer {}: position, value, drift and trend must be \
                     finite numbers, got position {:?} value {} drift {:?} trend {:?}",
                    sm.well, sm.layer, sm.pos, sm.value, sm.drift, sm.trend
                )));
            }
        }
        samples.sort_by_key(|a| (a.well, a.layer));
        let mut wells: Vec<(u32, std::ops::Range<usize>)> = Vec::new();
        for (i, sm) in samples.iter().enumerate() {
            match wells.last_mut() {
                Some((id, r)) if *id == sm.well => {
                    if samples[i - 1].layer == sm.layer {
                        return Err(Error::inconsistent(format!(
                            "kriging data: well {} has two samples in layer {} (expected at most \
                             one blocked sample per well and layer)",
                            sm.well, sm.layer
                        )));
                    }
                    r.end = i + 1;
                }
                _ => wells.push((sm.well, i..i + 1)),
            }
        }
        Ok(SampleSet { samples, wells })
    }

    /// The samples, sorted by well identifier and then layer.
    pub fn samples(&self) -> &[Sample] {
        &self.samples
    }

    /// Number of samples.
    pub fn len(&self) -> usize {
        self.samples.len()
    }

    /// True when there are no samples.
    pub fn is_empty(&self) -> bool {
        self.samples.is_empty()
    }

    /// Number of wells.
    pub fn well_count(&self) -> usize {
        self.wells.len()
    }

    /// Per well (in increasing identifier order): identifier and the index range
    /// of its samples in [`SampleSet::samples`].
    pub fn wells(&self) -> &[(u32, std::ops::Range<usize>)] {
        &self.wells
    }
}

/// A location to estimate.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Target {
    /// Position `(x, y, s)` in m.
    pub pos: [f64; 3],
    /// External drift value at the target (needed by kriging with an external drift).
    pub drift: Option<f64>,
    /// Trend value at the target (needed by simple kriging with a trend).
    pub trend: Option<f64>,
}

impl Target {
    /// A target without drift or trend values.
    pub fn at(pos: [f64; 3]) -> Self {
        Target {
            pos,
            drift: None,
            trend: None,
        }
    }
}
