//! Blocking: conditioned logs averaged into the stratigraphic cells of their zone.
//!
//! Each log sample has a zone, a stratigraphic coordinate `s` and so a layer
//! (see [`crate::frame::strat`]). All samples of one well in one (zone, layer)
//! cell are averaged into one blocked sample:
//!
//! * Vp0 by slowness averaging, `v = n / sum(1 / v_i)`: the velocity that keeps
//!   the vertical travel time through the cell (the time-average rule; common
//!   practice for upscaling sonic velocities to a vertical grid);
//! * epsilon and delta arithmetically, `mean(e_i)` (the Thomsen parameters of a
//!   stack are, to first order in weak anisotropy, thickness-weighted means of
//!   the parts: Thomsen 1986);
//! * facies as the most frequent code in the cell (ties to the smaller code),
//!   with the count of each code kept;
//! * position (x, y, z, s) as the mean of the samples' positions.
//!
//! Each property keeps its own sample count, since logs have different gaps.

use serde::Serialize;
use std::collections::BTreeMap;

/// One conditioned log sample, ready for blocking.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CondSample {
    /// World x, m.
    pub x: f64,
    /// World y, m.
    pub y: f64,
    /// Depth, m TVDSS.
    pub z: f64,
    /// Zone index.
    pub zone: usize,
    /// Layer index in the zone.
    pub layer: usize,
    /// Stratigraphic coordinate, m.
    pub s: f64,
    /// Vp0, m/s.
    pub vp0: Option<f64>,
    /// Thomsen epsilon.
    pub epsilon: Option<f64>,
    /// Thomsen delta.
    pub delta: Option<f64>,
    /// Facies code.
    pub facies: Option<i32>,
}

/// One blocked sample: a well's average over one stratigraphic cell.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BlockedSample {
    /// Index of the well in the study.
    pub well: usize,
    /// Zone index.
    pub zone: usize,
    /// Layer index.
    pub layer: usize,
    /// Mean world x, m.
    pub x: f64,
    /// Mean world y, m.
    pub y: f64,
    /// Mean depth, m TVDSS.
    pub z: f64,
    /// Mean stratigraphic coordinate, m.
    pub s: f64,
    /// Slowness-averaged Vp0, m/s.
    pub vp0: Option<f64>,
    /// Mean epsilon.
    pub epsilon: Option<f64>,
    /// Mean delta.
    pub delta: Option<f64>,
    /// Most frequent facies code.
    pub facies: Option<i32>,
    /// Samples in the cell (any property present).
    pub count: usize,
    /// Samples with Vp0, epsilon, delta.
    pub counts: [usize; 3],
    /// Count of each facies code in the cell.
    pub facies_counts: BTreeMap<i32, usize>,
}

#[derive(Default)]
struct Acc {
    n: usize,
    x: f64,
    y: f64,
    z: f64,
    s: f64,
    slow: f64,
    nv: usize,
    eps: f64,
    ne: usize,
    del: f64,
    nd: usize,
    facies: BTreeMap<i32, usize>,
}

/// Block one well's conditioned samples. Samples outside every zone are not
/// passed in. The result is sorted by (zone, layer).
pub fn block_well(well: usize, samples: &[CondSample]) -> Vec<BlockedSample> {
    let mut cells: BTreeMap<(usize, usize), Acc> = BTreeMap::new();
    for p in samples {
        if p.vp0.is_none() && p.epsilon.is_none() && p.delta.is_none() && p.facies.is_none() {
            continue;
        }
        let a = cells.entry((p.zone, p.layer)).or_default();
        a.n += 1;
        a.x += p.x;
        a.y += p.y;
        a.z += p.z;
        a.s += p.s;
        if let Some(v) = p.vp0 {
            a.slow += 1.0 / v;
            a.nv += 1;
        }
        if let Some(e) = p.epsilon {
            a.eps += e;
            a.ne += 1;
        }
        if let Some(d) = p.delta {
            a.del += d;
            a.nd += 1;
        }
        if let Some(f) = p.facies {
            *a.facies.entry(f).or_default() += 1;
        }
    }
    cells
        .into_iter()
        .map(|((zone, layer), a)| {
            let n = a.n as f64;
            // most frequent code; BTreeMap order makes ties go to the smaller code
            let facies = a
                .facies
                .iter()
                .fold(None::<(i32, usize)>, |best, (&c, &k)| match best {
                    Some((_, bk)) if bk >= k => best,
                    _ => Some((c, k)),
                })
                .map(|(c, _)| c);
            BlockedSample {
                well,
                zone,
                layer,
                x: a.x / n,
                y: a.y / n,
                z: a.z / n,
                s: a.s / n,
                vp0: (a.nv > 0).then(|| a.nv as f64 / a.slow),
                epsilon: (a.ne > 0).then(|| a.eps / a.ne as f64),
                delta: (a.nd > 0).then(|| a.del / a.nd as f64),
                facies,
                count: a.n,
                counts: [a.nv, a.ne, a.nd],
                facies_counts: a.facies,
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn s(layer: usize, vp0: f64, eps: f64, f: i32) -> CondSample {
        CondSample {
            x: 0.0,
            y: 0.0,
            z: layer as f64,
            zone: 0,
            layer,
            s: layer as f64,
            vp0: Some(vp0),
            epsilon: Some(eps),
            delta: None,
            facies: Some(f),
        }
    }

    #[test]
    fn slowness_average_keeps_travel_time() {
        // Two equal-thickness samples at 2000 and 4000 m/s: travel time per metre
        // (1/2000 + 1/4000) / 2 = 3/8000 s, so the average velocity is 8000/3 m/s.
        let b = block_well(
            3,
            &[
                s(1, 2000.0, 0.1, 2),
                s(1, 4000.0, 0.3, 1),
                s(2, 3000.0, 0.0, 1),
            ],
        );
        assert_eq!(b.len(), 2);
        assert!((b[0].vp0.unwrap() - 8000.0 / 3.0).abs() < 1e-9);
        assert!((b[0].epsilon.unwrap() - 0.2).abs() < 1e-12);
        assert_eq!(b[0].delta, None);
        assert_eq!(b[0].facies, Some(1)); // tie 1:1 goes to the smaller code
        assert_eq!(b[0].counts, [2, 2, 0]);
        assert_eq!(b[1].layer, 2);
        assert_eq!(b[0].well, 3);
    }
}
