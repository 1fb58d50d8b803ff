//! Interpreter's horizon picks: the true horizon plus a smooth bias field of a
//! few metres plus small noise, on a decimated and jittered pattern of the
//! grid, with holes where the seismic is poor.

use super::basin::{horizons_uv, Basin, HORIZONS};
use super::grf::{normal, uniform, Grf, Ranges};
use super::wells::as_written;
use rand::SeedableRng;
use rand_chacha::ChaCha20Rng;
use serde::Serialize;

/// An elliptical area without picks, in local survey coordinates (m).
#[derive(Debug, Clone, Copy, Serialize)]
pub struct Hole {
    /// Centre (u, v), m.
    pub centre: (f64, f64),
    /// Semi-axes along u and v, m.
    pub semi_axes: (f64, f64),
    /// Why there are no picks.
    pub reason: &'static str,
}

impl Hole {
    /// Whether local point (u, v) is inside.
    pub fn contains(&self, u: f64, v: f64) -> bool {
        let a = (u - self.centre.0) / self.semi_axes.0;
        let b = (v - self.centre.1) / self.semi_axes.1;
        a * a + b * b < 1.0
    }
}

/// The holes of each horizon.
pub fn holes(horizon: usize) -> Vec<Hole> {
    match horizon {
        1 => vec![Hole {
            centre: (2250.0, 1300.0),
            semi_axes: (420.0, 260.0),
            reason: "fault shadow",
        }],
        3 => vec![Hole {
            centre: (750.0, 1950.0),
            semi_axes: (320.0, 260.0),
            reason: "poor data under a gas chimney",
        }],
        _ => Vec::new(),
    }
}

/// Separator between x, y and z in each horizon's file: the picks reader
/// accepts spaces, tabs or commas.
pub const SEPARATORS: [&str; 4] = [" ", "\t", " ", ","];

/// Mean offset (m) of each horizon's bias field: the interpreter's systematic
/// depth error.
pub const BIAS_MEAN: [f64; 4] = [1.5, -2.0, 2.5, -1.0];
/// Standard deviation of the white pick noise, m.
pub const PICK_NOISE: f64 = 0.6;

/// One horizon's picks as world (x, y, z) in metres, z TVDSS, as written.
#[derive(Debug, Clone)]
pub struct HorizonPicks {
    /// Horizon index.
    pub horizon: usize,
    /// Points.
    pub points: Vec<(f64, f64, f64)>,
    /// The file text.
    pub text: String,
}

/// Bias field of horizon `h` at local (u, v), m: a component shared by all
/// horizons (velocity-model error) plus the horizon's own.
pub struct Bias {
    common: Grf,
    own: Vec<Grf>,
}

impl Bias {
    /// Draw the bias fields.
    pub fn new(rng: &mut ChaCha20Rng) -> Self {
        let r = Ranges {
            major: 2600.0,
            minor: 1800.0,
            angle: 40.0,
            vertical: 1.0,
        };
        let common = Grf::new(rng, 64, r);
        let own = (0..HORIZONS.len())
            .map(|_| {
                Grf::new(
                    rng,
                    64,
                    Ranges {
                        major: 1600.0,
                        minor: 1100.0,
                        angle: -20.0,
                        vertical: 1.0,
                    },
                )
            })
            .collect();
        Bias { common, own }
    }

    /// Bias (m, positive = picked too deep) of horizon `h` at (u, v).
    pub fn at(&self, h: usize, u: f64, v: f64) -> f64 {
        let own = self.own.get(h).map_or(0.0, |g| g.at(u, v, 0.0));
        BIAS_MEAN.get(h).copied().unwrap_or(0.0) + 1.8 * self.common.at(u, v, 0.0) + 1.2 * own
    }
}

/// Generate the picks of every horizon.
pub fn make_picks(basin: &Basin, seed: u64) -> Vec<HorizonPicks> {
    let grid = basin.grid();
    let mut rng = ChaCha20Rng::seed_from_u64(seed.wrapping_add(0x9c45_0000));
    let bias = Bias::new(&mut rng);
    // local (u, v) of the survey's node (0, 0): (0, 0) on the field survey
    let (u0, v0) = basin.survey_offset();
    let umax = u0 + (grid.xline_count - 1) as f64 * grid.xline_spacing;
    let vmax = v0 + (grid.inline_count - 1) as f64 * grid.inline_spacing;
    let mut out = Vec::with_capacity(HORIZONS.len());
    for (h, name) in HORIZONS.iter().enumerate() {
        let sep = SEPARATORS[h];
        let mut text = format!(
            "# {name}: interpreter's depth picks, {} demo\n# x{sep}y{sep}z  (m; z TVDSS, positive down)\n",
            super::basin::BASIN
        );
        let hs = holes(h);
        let mut points = Vec::new();
        for i in 0..grid.inline_count {
            // every 2nd inline, and every node of every 10th inline (key lines)
            let key_line = i % 10 == 5;
            if i % 2 != h % 2 && !key_line {
                continue;
            }
            for j in 0..grid.xline_count {
                let on_pattern = j % 3 == (i / 2 + h) % 3;
                if !(on_pattern || key_line) {
                    continue;
                }
                // jitter and random drop-outs, drawn for every candidate node
                let du = uniform(&mut rng, -0.35, 0.35) * grid.xline_spacing;
                let dv = uniform(&mut rng, -0.35, 0.35) * grid.inline_spacing;
                let drop = uniform(&mut rng, 0.0, 1.0) < 0.06;
                let noise = PICK_NOISE * normal(&mut rng);
                let u = (u0 + j as f64 * grid.xline_spacing + du).clamp(u0, umax);
                let v = (v0 + i as f64 * grid.inline_spacing + dv).clamp(v0, vmax);
                if drop || hs.iter().any(|o| o.contains(u, v)) {
                    continue;
                }
                let (xw, yw) = grid.node_xy(
                    (v - v0) / grid.inline_spacing,
                    (u - u0) / grid.xline_spacing,
                );
                let x = as_written(xw, 2);
                let y = as_written(yw, 2);
                let (ul, vl) = basin.local(x, y);
                let z = horizons_uv(ul, vl)[h] + bias.at(h, ul, vl) + noise;
                let z = as_written(z, 2);
                text.push_str(&format!("{x:.2}{sep}{y:.2}{sep}{z:.2}\n"));
                points.push((x, y, z));
            }
        }
        out.push(HorizonPicks {
            horizon: h,
            points,
            text,
        });
    }
    out
}
