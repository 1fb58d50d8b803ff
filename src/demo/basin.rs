//! The geology of the fictional Quarvenne Basin: survey grid, horizons, zones,
//! facies and rock properties, all as continuous functions of world position
//! (x, y, z TVDSS). Well logs and grid volumes are both samples of this truth.
//!
//! Map positions are handled in local survey coordinates: `u` (m) along the
//! crossline-number axis (bearing 30 deg) from the first crossline, and `v` (m)
//! along the inline-number axis (bearing 120 deg) from the first inline, so
//! that `u = j * xline_spacing`, `v = i * inline_spacing` at node (i, j).

use super::grf::{normal, uniform, Grf, Ranges};
use crate::grid::SurveyGrid;
use rand::SeedableRng;
use rand_chacha::ChaCha20Rng;
use serde::Serialize;
use std::f64::consts::PI;

/// Name of the fictional basin.
pub const BASIN: &str = "Quarvenne Basin";
/// Name of the fictional field.
pub const FIELD: &str = "Marrowick";
/// Name of the fictional operator.
pub const OPERATOR: &str = "Cindral Exploration Cooperative";

/// Horizons, shallow to deep.
pub const HORIZONS: [&str; 4] = [
    "Top Pellarin",
    "Top Vostrand",
    "Top Kessimer",
    "Base Kessimer",
];
/// Picks file stems of the horizons.
pub const HORIZON_FILES: [&str; 4] = [
    "top_pellarin",
    "top_vostrand",
    "top_kessimer",
    "base_kessimer",
];
/// Zones between consecutive horizons.
pub const ZONES: [&str; 3] = ["Pellarin", "Vostrand", "Kessimer"];
/// Layering rule of each zone, as the project file spells it.
pub const LAYERING: [&str; 3] = ["proportional", "parallel_to_base", "parallel_to_top"];
/// Stratigraphic cell thickness of each zone in the project file, m.
pub const CELL_THICKNESS: [f64; 3] = [4.0, 2.0, 3.0];

/// Facies code of channel sand.
pub const SAND: u8 = 1;
/// Facies code of shale.
pub const SHALE: u8 = 2;
/// Facies code of heterolithic (interbedded sand and shale).
pub const HETEROLITHIC: u8 = 3;
/// Facies codes and names.
pub const FACIES: [(u8, &str); 3] = [
    (SAND, "channel sand"),
    (SHALE, "shale"),
    (HETEROLITHIC, "heterolithic"),
];

/// Zone index of points above the top horizon (truth zone volume).
pub const ZONE_ABOVE: i32 = -1;
/// Zone index of points below the base horizon (truth zone volume).
pub const ZONE_BELOW: i32 = -2;

/// Nominal thickness of the Pellarin zone, m: the proportional coordinate
/// `s = (z - top) / (base - top)` is scaled by it for the random fields.
const PELLARIN_NOMINAL: f64 = 165.0;
/// Fourier modes per random field.
const MODES: usize = 128;

/// The demo survey grid: UTM-like coordinates, azimuth 30 deg, 50 m bins,
/// 51 inlines x 71 crosslines, 1900-2900 m TVDSS at 10 m.
pub fn demo_grid() -> SurveyGrid {
    SurveyGrid {
        x0: 418_750.0,
        y0: 6_412_300.0,
        azimuth: 30.0,
        inline_spacing: 50.0,
        xline_spacing: 50.0,
        inline_first: 1201,
        inline_count: 51,
        xline_first: 3101,
        xline_count: 71,
        z0: 1900.0,
        dz: 10.0,
        z_count: 101,
    }
}

/// The regional survey around the field: the same geology, on 100 m bins over
/// 7 km x 6 km, with the field's wells in its north-western part, so that much
/// of it lies more than 1.5 km from every well (the far field of the priors).
/// Its node (0, 0) is at local position (u, v) = [`REGIONAL_OFFSET`] of the
/// field survey's frame; depths 1900-3100 m TVDSS at 10 m.
pub fn regional_grid() -> SurveyGrid {
    let f = demo_grid();
    let (x0, y0) = f.node_xy(
        REGIONAL_OFFSET.1 / f.inline_spacing,
        REGIONAL_OFFSET.0 / f.xline_spacing,
    );
    SurveyGrid {
        x0: libm::round(x0 * 100.0) / 100.0,
        y0: libm::round(y0 * 100.0) / 100.0,
        azimuth: f.azimuth,
        inline_spacing: 100.0,
        xline_spacing: 100.0,
        inline_first: 101,
        inline_count: 61,
        xline_first: 501,
        xline_count: 71,
        z0: 1900.0,
        dz: 10.0,
        z_count: 121,
    }
}

/// Local position (u, v) in m of the regional survey's first node in the field
/// frame.
pub const REGIONAL_OFFSET: (f64, f64) = (-1000.0, -1000.0);

/// Which survey the demo is generated on.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum DemoSurvey {
    /// The committed demo: the field survey, 2.5 km x 3.5 km on 50 m bins.
    #[default]
    Field,
    /// The regional survey ([`regional_grid`]): the same basin and wells on a
    /// 7 km x 6 km survey, for far-field checks.
    Regional,
}

fn smooth_fold(u: f64, v: f64) -> f64 {
    // An anticline elongated along a bearing oblique to the grid, plus gentle
    // regional folding; negative values are structurally high (shallower).
    let (s, c) = (libm::sin(0.35), libm::cos(0.35));
    let (du, dv) = (u - 1700.0, v - 1150.0);
    let a = du * c + dv * s;
    let b = -du * s + dv * c;
    -30.0 * libm::exp(-(a * a / (1100.0 * 1100.0) + b * b / (650.0 * 650.0)))
        + 5.0 * libm::sin(2.0 * PI * (0.8 * u + 0.6 * v) / 2400.0 + 0.7)
}

/// True depths (m TVDSS) of the four horizons at local map position (u, v).
///
/// Top Pellarin dips about 2.3 deg towards growing crossline (bearing 30) and
/// 0.9 deg towards growing inline, folded by an oblique anticline; the
/// isochores are smooth; the Vostrand zone is a wedge that thins from about
/// 110 m at the first inline to about 4 m at the last (an erosional pinch-out
/// towards bearing 120).
pub fn horizons_uv(u: f64, v: f64) -> [f64; 4] {
    let h1 = 2045.0 + 0.040 * u + 0.016 * v + smooth_fold(u, v);
    let t1 = 165.0 + 30.0 * u / 3500.0 - 12.0 * v / 2500.0 + 4.0 * libm::cos(2.0 * PI * v / 1800.0);
    let t2 = wedge_thickness(u, v);
    let t3 = 145.0 + 18.0 * libm::cos(2.0 * PI * u / 3100.0 + 1.0) + 0.008 * v;
    let h2 = h1 + t1;
    let h3 = h2 + t2;
    [h1, h2, h3, h3 + t3]
}

/// Thickness of the Vostrand wedge, m.
fn wedge_thickness(u: f64, v: f64) -> f64 {
    let t = ((2650.0 - v) / 2650.0).max(0.0);
    3.5 + libm::pow(t, 1.4) * (108.0 + 10.0 * libm::sin(2.0 * PI * u / 2900.0 + 0.4))
}

/// A sand-filled channel of the Vostrand zone: a sinuous belt running roughly
/// along the u axis, with a flat top at `top` m above the zone base and a
/// parabolic cross-section.
#[derive(Debug, Clone, Serialize)]
pub struct Channel {
    /// v of the centre line at u = 1750 m.
    pub v_centre: f64,
    /// Slope dv/du of the belt axis.
    pub slope: f64,
    /// Sinuosity amplitude, m.
    pub amplitude: f64,
    /// Sinuosity wavelength, m.
    pub wavelength: f64,
    /// Sinuosity phase, rad.
    pub phase: f64,
    /// Width, m.
    pub width: f64,
    /// Maximum thickness, m.
    pub thickness: f64,
    /// Height of the flat channel top above the zone base, m.
    pub top: f64,
}

impl Channel {
    /// Perpendicular distance (m, approximate) from the centre line.
    fn distance(&self, u: f64, v: f64) -> f64 {
        let arg = 2.0 * PI * u / self.wavelength + self.phase;
        let vc = self.v_centre + self.slope * (u - 1750.0) + self.amplitude * libm::sin(arg);
        let dvdu = self.slope + self.amplitude * 2.0 * PI / self.wavelength * libm::cos(arg);
        (v - vc).abs() / (1.0 + dvdu * dvdu).sqrt()
    }
}

/// The random fields of one region (zone, or above / below the zones).
#[derive(Debug, Clone)]
struct RegionFields {
    facies: Grf,
    vp: Grf,
    eps: Grf,
    delta: Grf,
}

/// The fields' lateral phases at one map position.
#[derive(Debug, Clone)]
pub struct RegionLateral {
    facies: Vec<f64>,
    vp: Vec<f64>,
    eps: Vec<f64>,
    delta: Vec<f64>,
}

/// Rock properties of one point of the truth.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Rock {
    /// Zone index 0.., or [`ZONE_ABOVE`] / [`ZONE_BELOW`].
    pub zone: i32,
    /// Facies code.
    pub facies: u8,
    /// Vertical P velocity Vp0, m/s.
    pub vp: f64,
    /// Vertical S velocity, m/s.
    pub vs: f64,
    /// Bulk density, kg/m3.
    pub rho: f64,
    /// Thomsen epsilon.
    pub eps: f64,
    /// Thomsen delta.
    pub delta: f64,
    /// Gamma ray, API.
    pub gr: f64,
}

/// Per-facies property law: `Vp0 = a + b (z - 2000 m) + zone offset + sd * G`.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct VpLaw {
    /// Vp0 at 2000 m TVDSS, m/s.
    pub a: f64,
    /// Compaction gradient, (m/s)/m.
    pub b: f64,
    /// Standard deviation of the correlated residual, m/s.
    pub sd: f64,
}

/// Vp0 laws of sand, shale, heterolithic.
pub const VP_LAWS: [(u8, VpLaw); 3] = [
    (
        SAND,
        VpLaw {
            a: 3450.0,
            b: 0.50,
            sd: 110.0,
        },
    ),
    (
        SHALE,
        VpLaw {
            a: 2950.0,
            b: 0.60,
            sd: 80.0,
        },
    ),
    (
        HETEROLITHIC,
        VpLaw {
            a: 3180.0,
            b: 0.55,
            sd: 90.0,
        },
    ),
];

/// Vp0 offset of each region (above, Pellarin, Vostrand, Kessimer, below), m/s.
const VP_ZONE_OFFSET: [f64; 5] = [-40.0, 0.0, 50.0, 110.0, 200.0];
/// Epsilon offset of each region for shale and heterolithic.
const EPS_ZONE_OFFSET: [f64; 5] = [0.0, 0.0, -0.01, 0.02, 0.01];

/// Region index 0..5 (above, three zones, below) of a zone index.
fn region_of(zone: i32) -> usize {
    match zone {
        ZONE_ABOVE => 0,
        ZONE_BELOW => 4,
        z => (z.clamp(0, 2) + 1) as usize,
    }
}

/// Vs from Vp0 (both m/s) by lithology.
///
/// Shale: the mudrock line of Castagna, Batzle and Eastwood (1985, Geophysics
/// 50(4), 571-581), `Vp = 1.16 Vs + 1.36 km/s`, so `Vs = (Vp - 1360) / 1.16`.
/// Sand: the sandstone regression of Castagna, Batzle and Kan (1993, in
/// Offset-Dependent Reflectivity, SEG), `Vs = 0.8042 Vp - 0.8559 km/s`
/// (coefficients quoted from memory of the Rock Physics Handbook's table).
/// Heterolithic: the mean of the two lines.
pub fn vs_from_vp(vp: f64, facies: u8) -> f64 {
    let mud = (vp - 1360.0) / 1.16;
    let sand = 0.8042 * vp - 855.9;
    match facies {
        SAND => sand,
        SHALE => mud,
        _ => 0.5 * (mud + sand),
    }
}

/// Density (kg/m3) from Vp0 (m/s) by Gardner, Gardner and Gregory (1974,
/// Geophysics 39(6), 770-780): `rho = 0.31 V^0.25` g/cm3 with V in m/s,
/// i.e. `rho = 310 V^0.25` kg/m3.
pub fn gardner_density(vp: f64) -> f64 {
    310.0 * libm::pow(vp, 0.25)
}

/// The whole truth model of the demo basin.
#[derive(Debug, Clone)]
pub struct Basin {
    /// The field survey: the frame of the local coordinates (u, v).
    frame: SurveyGrid,
    /// The survey the demo is generated on.
    grid: SurveyGrid,
    /// Local (u, v) of the survey's node (0, 0), m.
    offset: (f64, f64),
    regions: Vec<RegionFields>,
    /// Vostrand channels.
    pub channels: Vec<Channel>,
}

impl Basin {
    /// Draw the random parts of the basin from `seed`, on the field survey.
    pub fn new(seed: u64) -> Self {
        Self::on_survey(seed, DemoSurvey::Field)
    }

    /// Draw the random parts of the basin from `seed` (the same geology for
    /// every survey) and sample it on `survey`.
    pub fn on_survey(seed: u64, survey: DemoSurvey) -> Self {
        let mut rng = ChaCha20Rng::seed_from_u64(seed ^ 0x5154_4152_5645_4e4e);
        let frame = demo_grid();
        let (grid, offset) = match survey {
            DemoSurvey::Field => (demo_grid(), (0.0, 0.0)),
            DemoSurvey::Regional => (regional_grid(), REGIONAL_OFFSET),
        };
        let mut regions = Vec::with_capacity(5);
        for r in 0..5 {
            // Facies bodies: long along the depositional axis (u), a few metres thick.
            let facies_ranges = Ranges {
                major: 1400.0,
                minor: 700.0,
                angle: 10.0 * (r as f64 - 2.0),
                vertical: 8.0,
            };
            let prop_ranges = Ranges {
                major: 1300.0,
                minor: 600.0,
                angle: 15.0,
                vertical: 4.0,
            };
            regions.push(RegionFields {
                facies: Grf::new(&mut rng, MODES, facies_ranges),
                vp: Grf::new(&mut rng, MODES, prop_ranges),
                eps: Grf::new(&mut rng, MODES, prop_ranges),
                delta: Grf::new(&mut rng, MODES, prop_ranges),
            });
        }
        let channels = (0..11)
            .map(|_| {
                // more channel belts on the thick, proximal side (small v)
                let v_centre = 2400.0 * libm::pow(rng_unit(&mut rng), 1.4);
                let room = (wedge_thickness(1750.0, v_centre) + 4.0).clamp(12.0, 108.0);
                Channel {
                    v_centre,
                    slope: 0.12 * normal(&mut rng).clamp(-1.2, 1.2),
                    amplitude: uniform(&mut rng, 80.0, 260.0),
                    wavelength: uniform(&mut rng, 1400.0, 3200.0),
                    phase: uniform(&mut rng, 0.0, 2.0 * PI),
                    width: uniform(&mut rng, 240.0, 480.0),
                    thickness: uniform(&mut rng, 7.0, 15.0),
                    top: uniform(&mut rng, 8.0, room),
                }
            })
            .collect();
        Basin {
            frame,
            grid,
            offset,
            regions,
            channels,
        }
    }

    /// The survey grid.
    pub fn grid(&self) -> &SurveyGrid {
        &self.grid
    }

    /// The field survey, whose node (i, j) is at local (u, v) = (50 j, 50 i).
    pub fn frame(&self) -> &SurveyGrid {
        &self.frame
    }

    /// Local (u, v) in m of the survey's node (0, 0) (0, 0 on the field survey).
    pub fn survey_offset(&self) -> (f64, f64) {
        self.offset
    }

    /// Local map coordinates (u, v) in metres of world point (x, y).
    pub fn local(&self, x: f64, y: f64) -> (f64, f64) {
        let (i, j) = self.frame.xy_to_ij(x, y);
        (j * self.frame.xline_spacing, i * self.frame.inline_spacing)
    }

    /// True horizon depths (m TVDSS) at world point (x, y).
    pub fn horizons(&self, x: f64, y: f64) -> [f64; 4] {
        let (u, v) = self.local(x, y);
        horizons_uv(u, v)
    }

    /// Zone index of depth `z` given the horizon depths at that map position.
    pub fn zone_of(z: f64, h: &[f64; 4]) -> i32 {
        if z < h[0] {
            ZONE_ABOVE
        } else if z < h[1] {
            0
        } else if z < h[2] {
            1
        } else if z < h[3] {
            2
        } else {
            ZONE_BELOW
        }
    }

    /// Lateral phases of region `r`'s fields at (u, v).
    pub fn lateral(&self, r: usize, u: f64, v: f64) -> RegionLateral {
        let f = &self.regions[r.min(self.regions.len() - 1)];
        RegionLateral {
            facies: f.facies.lateral(u, v),
            vp: f.vp.lateral(u, v),
            eps: f.eps.lateral(u, v),
            delta: f.delta.lateral(u, v),
        }
    }

    /// Rock at world point (x, y, z TVDSS m).
    pub fn rock(&self, x: f64, y: f64, z: f64) -> Rock {
        let (u, v) = self.local(x, y);
        let h = horizons_uv(u, v);
        let zone = Self::zone_of(z, &h);
        let lat = self.lateral(region_of(zone), u, v);
        self.rock_with(u, v, z, &h, zone, &lat)
    }

    /// Rock at (u, v, z) given the horizons there, the zone and the lateral
    /// phases of the zone's region (from [`Basin::lateral`] with the zone's
    /// region index, see [`Basin::region_index`]).
    pub fn rock_with(
        &self,
        u: f64,
        v: f64,
        z: f64,
        h: &[f64; 4],
        zone: i32,
        lat: &RegionLateral,
    ) -> Rock {
        let r = region_of(zone);
        let f = &self.regions[r];
        // stratigraphic vertical coordinate of the region, m
        let w = match zone {
            ZONE_ABOVE => z - h[0],
            0 => (z - h[0]) / (h[1] - h[0]) * PELLARIN_NOMINAL,
            1 => h[2] - z,
            2 => z - h[2],
            _ => z - h[3],
        };
        let facies = match zone {
            0 => {
                let s = (z - h[0]) / (h[1] - h[0]);
                let g = f.facies.at_lateral(&lat.facies, w)
                    + 0.9 * (0.4 - s)
                    + 0.7 * (u / 3500.0 - 0.5);
                if g >= 1.0 {
                    SAND
                } else if g >= 0.25 {
                    HETEROLITHIC
                } else {
                    SHALE
                }
            }
            1 => self.vostrand_facies(u, v, w, f.facies.at_lateral(&lat.facies, w)),
            2 => {
                let g = f.facies.at_lateral(&lat.facies, w)
                    + 0.6 * libm::sin(2.0 * PI * w / 38.0 + 0.5)
                    - 0.6 * (v / 2500.0 - 0.5)
                    + 0.3 * (u / 3500.0 - 0.5);
                if g > 1.05 {
                    SAND
                } else if g > -0.1 {
                    HETEROLITHIC
                } else {
                    SHALE
                }
            }
            _ => SHALE,
        };
        let gvp = f.vp.at_lateral(&lat.vp, w);
        let geps = f.eps.at_lateral(&lat.eps, w);
        let gdel = f.delta.at_lateral(&lat.delta, w);
        let law = VP_LAWS
            .iter()
            .find(|(c, _)| *c == facies)
            .map(|(_, l)| *l)
            .unwrap_or(VP_LAWS[1].1);
        let vp = law.a + law.b * (z - 2000.0) + VP_ZONE_OFFSET[r] + law.sd * gvp;
        // epsilon partly anti-correlated with the Vp residual in shaly rock
        let ge = 0.9 * geps - 0.436 * gvp;
        let (eps, delta) = match facies {
            SAND => (
                (0.02 + 0.010 * geps).clamp(0.0, 0.05),
                (0.004 + 0.008 * gdel).clamp(-0.02, 0.03),
            ),
            SHALE => {
                let m = 0.15 + 0.000_05 * (z - 2000.0) + EPS_ZONE_OFFSET[r];
                let e = (m + 0.025 * ge).clamp(0.10, 0.25);
                (e, (0.065 + 0.3 * (e - m) + 0.012 * gdel).clamp(0.03, 0.12))
            }
            _ => {
                let m = 0.075 + EPS_ZONE_OFFSET[r];
                let e = (m + 0.018 * ge).clamp(0.03, 0.14);
                (e, (0.032 + 0.3 * (e - m) + 0.010 * gdel).clamp(0.0, 0.07))
            }
        };
        let gr = match facies {
            SAND => 38.0,
            SHALE => 108.0,
            _ => 72.0,
        } - 6.0 * gvp;
        Rock {
            zone,
            facies,
            vp,
            vs: vs_from_vp(vp, facies),
            rho: gardner_density(vp),
            eps,
            delta,
            gr,
        }
    }

    /// Region index (0 above, 1..=3 zones, 4 below) of a zone index.
    pub fn region_index(zone: i32) -> usize {
        region_of(zone)
    }

    /// Facies of the Vostrand zone at height `d` m above its base.
    fn vostrand_facies(&self, u: f64, v: f64, d: f64, g: f64) -> u8 {
        let mut levee = false;
        for c in &self.channels {
            let r = c.distance(u, v);
            let half = 0.5 * c.width;
            if r < half {
                let q = r / half;
                let bottom = c.top - c.thickness * (1.0 - q * q);
                if d <= c.top && d >= bottom {
                    return SAND;
                }
            }
            if r < half + 140.0 && d <= c.top + 1.5 && d >= c.top - c.thickness - 1.0 {
                levee = true;
            }
        }
        if levee || g + 0.5 * (1.0 - v / 1250.0) > 0.7 {
            HETEROLITHIC
        } else {
            SHALE
        }
    }
}

fn rng_unit(rng: &mut ChaCha20Rng) -> f64 {
    uniform(rng, 0.0, 1.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn horizons_are_ordered_and_inside_the_depth_axis() {
        let g = demo_grid();
        for i in 0..g.inline_count {
            for j in 0..g.xline_count {
                let h = horizons_uv(j as f64 * 50.0, i as f64 * 50.0);
                assert!(h[0] > g.z0 + 60.0 && h[3] < g.z_last() - 60.0, "{h:?}");
                assert!(h[1] - h[0] > 100.0 && h[3] - h[2] > 100.0);
                // the wedge thins to a few metres but never to zero
                assert!(h[2] - h[1] > 3.0);
            }
        }
        let thin = horizons_uv(1750.0, 2500.0);
        let thick = horizons_uv(1750.0, 0.0);
        assert!(thin[2] - thin[1] < 8.0 && thick[2] - thick[1] > 90.0);
    }

    #[test]
    fn published_rock_physics_relations() {
        // Gardner et al. (1974): 0.31 * 3000^0.25 g/cm3 = 0.31 * 7.40083 = 2.29426 g/cm3.
        assert!((gardner_density(3000.0) - 2294.26).abs() < 0.01);
        // Castagna et al. (1985) mudrock line: Vp 3.0 km/s -> Vs (3.0 - 1.36) / 1.16 km/s.
        assert!((vs_from_vp(3000.0, SHALE) - 1413.79).abs() < 0.01);
        // Castagna et al. (1993) sandstone: Vp 3.5 km/s -> 0.8042 * 3.5 - 0.8559 = 1.9588 km/s.
        assert!((vs_from_vp(3500.0, SAND) - 1958.8).abs() < 0.01);
    }
}
