//! Well trajectories by the minimum curvature method.
//!
//! A deviation survey is a list of stations (measured depth, inclination,
//! azimuth). Between two stations the minimum curvature method assumes the
//! well follows a circular arc tangent to both station directions; positions
//! between stations are taken on that arc, not on a straight chord.
//!
//! Coordinates are offsets from the surface location: north and east in the
//! grid-north frame (azimuths are degrees from grid north), TVD positive down,
//! all in the unit of the measured depths (metres inside the program).

/// One survey station.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Station {
    /// Measured depth along the hole (m from the datum).
    pub md: f64,
    /// Inclination from vertical, degrees (0 = vertical down, 90 = horizontal).
    pub inclination: f64,
    /// Azimuth, degrees clockwise from grid north.
    pub azimuth: f64,
}

/// Position offset from the surface location.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Offset {
    /// North offset (same unit as MD).
    pub north: f64,
    /// East offset.
    pub east: f64,
    /// True vertical depth below the datum, positive down.
    pub tvd: f64,
}

/// Unit tangent (north, east, down) of a hole direction.
fn tangent(inc_deg: f64, azi_deg: f64) -> [f64; 3] {
    let (si, ci) = inc_deg.to_radians().sin_cos();
    let (sa, ca) = azi_deg.to_radians().sin_cos();
    [si * ca, si * sa, ci]
}

fn angle_between(a: [f64; 3], b: [f64; 3]) -> f64 {
    // 2 asin(|b - a| / 2) is accurate for small angles, unlike acos of the dot product.
    let d = ((b[0] - a[0]).powi(2) + (b[1] - a[1]).powi(2) + (b[2] - a[2]).powi(2)).sqrt();
    2.0 * (d / 2.0).min(1.0).asin()
}

/// Ratio factor of the minimum curvature method.
///
/// `RF = (2 / DL) * tan(DL / 2)` for dogleg angle `DL` in radians, with the
/// limit `RF = 1 + DL^2 / 12` used for tiny doglegs (the series of the exact
/// form). Source: the minimum curvature method as set out in SPE drilling
/// handbooks and in Sawaryn and Thorogood (2005), SPE Drilling & Completion 20(1).
pub fn ratio_factor(dogleg: f64) -> f64 {
    if dogleg.abs() < 1e-4 {
        1.0 + dogleg * dogleg / 12.0
    } else {
        2.0 / dogleg * (dogleg / 2.0).tan()
    }
}

/// Displacement between two stations by the minimum curvature method.
///
/// ```text
/// dN   = dMD / 2 * (sin I1 cos A1 + sin I2 cos A2) * RF
/// dE   = dMD / 2 * (sin I1 sin A1 + sin I2 sin A2) * RF
/// dTVD = dMD / 2 * (cos I1 + cos I2) * RF
/// ```
///
/// with `RF` from [`ratio_factor`] of the dogleg between the two directions.
/// Source: minimum curvature method (Sawaryn and Thorogood 2005, SPE Drilling &
/// Completion 20(1)); the worked example MD 3500 -> 3600 ft, (15, 20) -> (25, 45)
/// deg of published drilling-formula handbooks is in the tests.
pub fn min_curvature_step(a: &Station, b: &Station) -> (Offset, f64) {
    let t1 = tangent(a.inclination, a.azimuth);
    let t2 = tangent(b.inclination, b.azimuth);
    let dl = angle_between(t1, t2);
    let rf = ratio_factor(dl);
    let h = (b.md - a.md) / 2.0 * rf;
    (
        Offset {
            north: h * (t1[0] + t2[0]),
            east: h * (t1[1] + t2[1]),
            tvd: h * (t1[2] + t2[2]),
        },
        rf,
    )
}

/// What is wrong with a list of stations.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum TrajectoryError {
    /// No stations at all.
    #[error("the survey has no stations")]
    Empty,
    /// A station value is NaN or infinite.
    #[error("station {index}: values must be finite numbers")]
    NotFinite {
        /// 0-based station index.
        index: usize,
    },
    /// Measured depth does not increase.
    #[error("station {index}: measured depth {md} m does not increase (previous {prev} m)")]
    MdNotIncreasing {
        /// 0-based station index.
        index: usize,
        /// Its MD.
        md: f64,
        /// Previous MD.
        prev: f64,
    },
    /// Inclination outside 0..=180 degrees.
    #[error("station {index}: inclination {inc} deg is outside 0..180 deg")]
    BadInclination {
        /// 0-based station index.
        index: usize,
        /// The inclination.
        inc: f64,
    },
    /// Negative measured depth.
    #[error("station {index}: measured depth {md} m is negative")]
    NegativeMd {
        /// 0-based station index.
        index: usize,
        /// The MD.
        md: f64,
    },
}

/// A well path: stations with their minimum-curvature positions.
#[derive(Debug, Clone, serde::Serialize)]
pub struct Trajectory {
    stations: Vec<Station>,
    positions: Vec<Offset>,
}

impl Trajectory {
    /// A vertical well (position is the surface location at every depth).
    pub fn vertical() -> Self {
        let s = Station {
            md: 0.0,
            inclination: 0.0,
            azimuth: 0.0,
        };
        Trajectory {
            stations: vec![s],
            positions: vec![Offset {
                north: 0.0,
                east: 0.0,
                tvd: 0.0,
            }],
        }
    }

    /// Build from survey stations, in increasing MD.
    ///
    /// If the first station is below MD 0, a vertical tie-on station at MD 0 (the
    /// datum, directly above the surface location) is assumed, as is common
    /// practice when a survey starts below the datum.
    pub fn from_stations(stations: &[Station]) -> Result<Self, TrajectoryError> {
        if stations.is_empty() {
            return Err(TrajectoryError::Empty);
        }
        for (index, s) in stations.iter().enumerate() {
            if !(s.md.is_finite() && s.inclination.is_finite() && s.azimuth.is_finite()) {
                return Err(TrajectoryError::NotFinite { index });
            }
            if s.md < 0.0 {
                return Err(TrajectoryError::NegativeMd { index, md: s.md });
            }
            if !(0.0..=180.0).contains(&s.inclination) {
                return Err(TrajectoryError::BadInclination {
                    index,
                    inc: s.inclination,
                });
            }
            if index > 0 && s.md <= stations[index - 1].md {
                return Err(TrajectoryError::MdNotIncreasing {
                    index,
                    md: s.md,
                    prev: stations[index - 1].md,
                });
            }
        }
        let mut st: Vec<Station> = Vec::with_capacity(stations.len() + 1);
        if stations[0].md > 0.0 {
            st.push(Station {
                md: 0.0,
                inclination: 0.0,
                azimuth: 0.0,
            });
        }
        st.extend(stations.iter().map(|s| Station {
            azimuth: s.azimuth.rem_euclid(360.0),
            ..*s
        }));
        let mut positions = Vec::with_capacity(st.len());
        let mut p = Offset {
            north: 0.0,
            east: 0.0,
            tvd: 0.0,
        };
        positions.push(p);
        for w in st.windows(2) {
            let (d, _) = min_curvature_step(&w[0], &w[1]);
            p = Offset {
                north: p.north + d.north,
                east: p.east + d.east,
                tvd: p.tvd + d.tvd,
            };
            positions.push(p);
        }
        Ok(Trajectory {
            stations: st,
            positions,
        })
    }

    /// The stations (including an assumed tie-on at MD 0, if one was added).
    pub fn stations(&self) -> &[Station] {
        &self.stations
    }

    /// Minimum-curvature positions of the stations.
    pub fn station_positions(&self) -> &[Offset] {
        &self.positions
    }

    /// Position at measured depth `md`, on the circular arc between the
    /// surrounding stations.
    ///
    /// Between stations 1 and 2 with dogleg `DL`, the hole direction at arc
    /// fraction `f = (md - md1) / (md2 - md1)` is the spherical interpolation
    /// `t(f) = (sin((1 - f) DL) t1 + sin(f DL) t2) / sin DL`, and the position is
    /// the minimum-curvature step from station 1 to a station at `md` with that
    /// direction: exactly the point on the arc. Above the first station the path
    /// is vertical; below the last station it continues straight along the last
    /// direction (common practice for projecting to TD).
    pub fn position_at_md(&self, md: f64) -> Offset {
        let n = self.stations.len();
        let first = &self.stations[0];
        if md <= first.md {
            let p = self.positions[0];
            return Offset {
                tvd: p.tvd - (first.md - md),
                ..p
            };
        }
        let last = &self.stations[n - 1];
        if md >= last.md {
            let t = tangent(last.inclination, last.azimuth);
            let p = self.positions[n - 1];
            let d = md - last.md;
            return Offset {
                north: p.north + d * t[0],
                east: p.east + d * t[1],
                tvd: p.tvd + d * t[2],
            };
        }
        // index of the last station with md <= target
        let k = self.stations.partition_point(|s| s.md <= md) - 1;
        let a = &self.stations[k];
        let b = &self.stations[k + 1];
        let t1 = tangent(a.inclination, a.azimuth);
        let t2 = tangent(b.inclination, b.azimuth);
        let dl = angle_between(t1, t2);
        let f = (md - a.md) / (b.md - a.md);
        let t = if dl < 1e-9 {
            t1
        } else {
            let s = dl.sin();
            let w1 = ((1.0 - f) * dl).sin() / s;
            let w2 = (f * dl).sin() / s;
            [
                w1 * t1[0] + w2 * t2[0],
                w1 * t1[1] + w2 * t2[1],
                w1 * t1[2] + w2 * t2[2],
            ]
        };
        let mid = Station {
            md,
            inclination: t[2].clamp(-1.0, 1.0).acos().to_degrees(),
            azimuth: t[1].atan2(t[0]).to_degrees(),
        };
        let (d, _) = min_curvature_step(a, &mid);
        let p = self.positions[k];
        Offset {
            north: p.north + d.north,
            east: p.east + d.east,
            tvd: p.tvd + d.tvd,
        }
    }

    /// Largest inclination of any station, degrees.
    pub fn max_inclination(&self) -> f64 {
        self.stations
            .iter()
            .map(|s| s.inclination)
            .fold(0.0, f64::max)
    }

    /// Whether the well is vertical (every inclination below 0.5 degree, common practice).
    pub fn is_vertical(&self) -> bool {
        self.max_inclination() < 0.5
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn st(md: f64, inclination: f64, azimuth: f64) -> Station {
        Station {
            md,
            inclination,
            azimuth,
        }
    }

    #[test]
    fn handbook_worked_example() {
        // Worked example of a published drilling-formulas handbook, reproduced with
        // the PyPI packages wellpathpy and welly: MD 3500 ft (15, 20) -> 3600 ft (25, 45).
        let (d, rf) = min_curvature_step(&st(3500.0, 15.0, 20.0), &st(3600.0, 25.0, 45.0));
        assert!((d.north - 27.2183).abs() < 5e-5, "dN {}", d.north);
        assert!((d.east - 19.4508).abs() < 5e-5, "dE {}", d.east);
        assert!((d.tvd - 94.0123).abs() < 5e-5, "dTVD {}", d.tvd);
        assert!((rf - 1.004280).abs() < 5e-7, "RF {rf}");
    }

    #[test]
    fn quarter_circle_build_is_exact() {
        // Analytic: a build from vertical to horizontal over MD 0..100 is a quarter
        // circle of radius R = 100 / (pi / 2), so TVD = N = 200 / pi at MD 100.
        let t = Trajectory::from_stations(&[st(0.0, 0.0, 0.0), st(100.0, 90.0, 0.0)]).unwrap();
        let p = t.position_at_md(100.0);
        let r = 200.0 / std::f64::consts::PI;
        assert!((p.tvd - r).abs() < 1e-12 && (p.north - r).abs() < 1e-12);
        assert!(p.east.abs() < 1e-12);
        // On the arc, not the chord: at MD 50 the angle is 45 deg.
        let q = t.position_at_md(50.0);
        let a = std::f64::consts::FRAC_PI_4;
        assert!((q.tvd - r * a.sin()).abs() < 1e-12, "tvd {}", q.tvd);
        assert!((q.north - r * (1.0 - a.cos())).abs() < 1e-12);
    }

    #[test]
    fn interpolation_matches_station_positions_and_is_continuous() {
        let t = Trajectory::from_stations(&[
            st(0.0, 0.0, 0.0),
            st(400.0, 10.0, 70.0),
            st(900.0, 35.0, 110.0),
            st(1500.0, 35.0, 110.0),
        ])
        .unwrap();
        for (s, p) in t.stations().iter().zip(t.station_positions()) {
            let q = t.position_at_md(s.md);
            assert!((q.north - p.north).abs() < 1e-9 && (q.tvd - p.tvd).abs() < 1e-9);
        }
        // tiny MD steps give tiny moves, and the path length equals the MD step
        let mut prev = t.position_at_md(0.0);
        for k in 1..=3000 {
            let md = k as f64 * 0.5;
            let p = t.position_at_md(md);
            let d = ((p.north - prev.north).powi(2)
                + (p.east - prev.east).powi(2)
                + (p.tvd - prev.tvd).powi(2))
            .sqrt();
            assert!(d <= 0.5 + 1e-9 && d > 0.4999, "step {d} at {md}");
            prev = p;
        }
    }

    #[test]
    fn bad_surveys_are_rejected() {
        assert_eq!(
            Trajectory::from_stations(&[]).unwrap_err(),
            TrajectoryError::Empty
        );
        assert!(matches!(
            Trajectory::from_stations(&[st(0.0, 0.0, 0.0), st(0.0, 1.0, 0.0)]),
            Err(TrajectoryError::MdNotIncreasing { index: 1, .. })
        ));
        assert!(matches!(
            Trajectory::from_stations(&[st(0.0, 190.0, 0.0)]),
            Err(TrajectoryError::BadInclination { .. })
        ));
    }
}
