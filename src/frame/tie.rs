//! Tying gridded horizons to well tops.
//!
//! A gridded horizon and the tops picked in the wells rarely agree. The mistie at a
//! well is `d = z_top - z_surface(x_top, y_top)` (m, z TVDSS positive down; the
//! surface evaluated by bilinear interpolation, [`Surface::z_at_xy`]). [`tie_surface`]
//! adds to the surface's nodes a smooth correction that is exactly `d` at every top,
//! under the same bilinear evaluation, and fades to zero within a radius `R` of the
//! wells. See [`tie_surface_with`] for the method.

use crate::error::{Error, Result};
use crate::frame::gridding::{bilinear_stencil, Surface};
use crate::grid::SurveyGrid;
use nalgebra::{DMatrix, DVector};

/// A horizon top seen in a well: where the trajectory crosses the horizon.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct TiePoint {
    /// Well name.
    pub well: String,
    /// World x of the top, m.
    pub x: f64,
    /// World y of the top, m.
    pub y: f64,
    /// Depth of the top, m TVDSS positive down.
    pub z: f64,
}

/// Settings of the tie.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct TieOptions {
    /// Support radius `R` of the correction, m: nodes farther than `R` plus one cell
    /// diagonal from every top are not changed.
    pub radius: f64,
    /// Largest allowed ratio of the largest node correction to the largest mistie.
    /// Exact honouring of two close tops that disagree forces a steep, possibly
    /// overshooting correction; beyond this ratio the tie is refused with an error
    /// naming the wells. Default [`DEFAULT_MAX_AMPLIFICATION`].
    pub max_amplification: f64,
}

/// Default of [`TieOptions::max_amplification`].
pub const DEFAULT_MAX_AMPLIFICATION: f64 = 3.0;

/// Tops at one level of the multilevel solve are at least this fraction of that
/// level's support radius apart.
pub const LEVEL_SEPARATION: f64 = 0.25;

/// Tops closer than this (m) are one position: with the same depth (within
/// 1e-6 m) they are one constraint, with different depths an error.
pub const COINCIDENT_DISTANCE: f64 = 1e-3;

/// Matrices of a level with a condition number above this are refused.
const MAX_CONDITION: f64 = 1e12;

impl TieOptions {
    /// Options with support radius `radius` (m) and the default amplification limit.
    pub fn new(radius: f64) -> Self {
        TieOptions {
            radius,
            max_amplification: DEFAULT_MAX_AMPLIFICATION,
        }
    }
}

/// The tie at one well.
#[derive(Debug, Clone, serde::Serialize)]
pub struct WellTie {
    /// Well name.
    pub well: String,
    /// World x of the top, m.
    pub x: f64,
    /// World y of the top, m.
    pub y: f64,
    /// Fractional inline number of the top.
    pub inline: f64,
    /// Fractional crossline number of the top.
    pub xline: f64,
    /// Depth of the top, m TVDSS.
    pub z_top: f64,
    /// Surface depth at the top before the tie, m TVDSS.
    pub z_before: f64,
    /// `z_top - z_before`, m (positive: the top is deeper than the surface).
    pub mistie: f64,
    /// `z_top - z_after` after the tie, m (zero up to round-off).
    pub residual: f64,
}

/// One level of the multilevel solve.
#[derive(Debug, Clone, serde::Serialize)]
pub struct TieLevel {
    /// Support radius of the level, m.
    pub radius: f64,
    /// Tops interpolated at this level (all tops of the coarser levels plus new ones).
    pub tops: usize,
    /// Condition number of the level's matrix (ratio of extreme eigenvalues).
    pub condition_number: f64,
}

/// What [`tie_surface`] did.
#[derive(Debug, Clone, serde::Serialize)]
pub struct TieReport {
    /// Horizon name.
    pub surface: String,
    /// Support radius `R`, m.
    pub radius: f64,
    /// Distance from the tops beyond which no node changes: `R` plus one cell diagonal, m.
    pub support: f64,
    /// Per well, in input order.
    pub wells: Vec<WellTie>,
    /// Levels of the multilevel solve, coarse to fine (one level when no two tops are
    /// closer than `LEVEL_SEPARATION * R`).
    pub levels: Vec<TieLevel>,
    /// Largest |mistie| before, m.
    pub max_abs_mistie: f64,
    /// Largest |residual| after, m.
    pub max_abs_residual: f64,
    /// Largest |correction| at a node, m.
    pub max_abs_correction: f64,
    /// Nodes the correction changed.
    pub nodes_changed: usize,
    /// Notes (tops at one position merged).
    pub notes: Vec<String>,
}

/// Wendland's compactly supported function `phi(r) = (1 - r)^4 (4 r + 1)` for
/// `0 <= r < 1`, zero beyond: positive definite in up to three dimensions and C2
/// (Wendland 1995, "Piecewise polynomial, positive definite and compactly supported
/// radial functions of minimal degree", Adv. Comput. Math. 4, 389-396: psi_{3,1}).
pub fn wendland_c2(r: f64) -> f64 {
    if r >= 1.0 {
        0.0
    } else {
        let a = 1.0 - r;
        let a2 = a * a;
        a2 * a2 * (4.0 * r + 1.0)
    }
}

/// Tie `surface` to `tops` with support radius `radius` (m) and the default
/// options; see [`tie_surface_with`].
pub fn tie_surface(
    surface: &mut Surface,
    grid: &SurveyGrid,
    tops: &[TiePoint],
    radius: f64,
) -> Result<TieReport> {
    tie_surface_with(surface, grid, tops, &TieOptions::new(radius))
}

/// A top prepared for the solve.
struct Top {
    /// indices into the caller's tops that share this position
    members: Vec<usize>,
    /// grid-aligned position, m
    u: f64,
    v: f64,
    /// bilinear stencil: node (i, j), weight, node position (u, v)
    stencil: Vec<(usize, usize, f64, f64, f64)>,
    mistie: f64,
}

/// Tie `surface` to the well `tops`: after the call, `surface.z_at_xy(grid, x, y)`
/// equals each top's `z` to round-off (about 1e-9 m), and nodes farther than
/// `R + cell diagonal` from every top are unchanged.
///
/// **Method.** Radial basis function interpolation (Hardy 1971, "Multiquadric
/// equations of topography and other irregular surfaces", J. Geophys. Res. 76,
/// 1905-1915) of the misties with Wendland's compactly supported C2 function
/// [`wendland_c2`] (Wendland 1995), posed on the grid nodes: the correction at node n
/// is
///
/// ```text
/// c(n) = sum_k lambda_k  sum_{m in S_k} b_km phi(|x_n - x_m| / R)
/// ```
///
/// where `S_k` are the four nodes of the bilinear stencil of top k with weights `b_km`
/// ([`bilinear_stencil`]). Requiring the bilinear evaluation of `c` to equal the
/// misties `d` gives the symmetric system
///
/// ```text
/// (B K B^T) lambda = d,    K_nm = phi(|x_n - x_m| / R),  B_km = b_km
/// ```
///
/// (generalised, Hermite-Birkhoff interpolation with the functionals "bilinear
/// evaluation at the top"; Wendland, Scattered Data Approximation, 2005, ch. 16).
/// `B K B^T` is positive definite when the tops' stencil rows are independent, so it
/// is solved by Cholesky factorisation (nalgebra). With one well the correction is
/// one bump of radius R; it is zero beyond R plus a cell diagonal.
///
/// **Close tops.** One radius cannot honour two tops far closer together than R
/// without large, overshooting dipoles, and the system becomes ill-conditioned. The
/// solve is therefore multilevel (Floater & Iske 1996, "Multistep scattered data
/// interpolation using compactly supported radial basis functions", J. Comput. Appl.
/// Math. 73, 65-78): level 0 uses radius R on tops at least `LEVEL_SEPARATION * R`
/// apart (taken greedily in input order); each further level halves the radius, adds
/// the tops now far enough apart, and interpolates what is left of the misties at all
/// tops taken so far (zero at the tops already honoured, so they stay honoured). The
/// last level holds every top, so all are honoured exactly. When all tops are
/// `LEVEL_SEPARATION * R` apart this is plain one-level interpolation with radius R.
///
/// **Refused ties (errors).** A top outside the grid or not finite (naming the
/// well); two tops closer than [`COINCIDENT_DISTANCE`] with different depths
/// (same depth: merged into one constraint and noted); a level matrix with
/// condition number above 1e12 (tops in one cell that a bilinear surface cannot
/// honour together, e.g. three on a line, naming the wells); a correction larger
/// than `max_amplification` times the largest mistie (close wells whose tops
/// disagree; naming the pair with the steepest implied slope). `radius` must be
/// finite and positive.
pub fn tie_surface_with(
    surface: &mut Surface,
    grid: &SurveyGrid,
    tops: &[TiePoint],
    options: &TieOptions,
) -> Result<TieReport> {
    let name = surface.name.clone();
    let radius = options.radius;
    if !(radius.is_finite() && radius > 0.0) {
        return Err(Error::inconsistent(format!(
            "tying horizon {name}: the tie radius must be a positive number of metres, got {radius}"
        )));
    }
    if !(options.max_amplification.is_finite() && options.max_amplification > 0.0) {
        return Err(Error::inconsistent(format!(
            "tying horizon {name}: the amplification limit must be positive, got {}",
            options.max_amplification
        )));
    }
    if !surface.fits(grid) {
        return Err(Error::inconsistent(format!(
            "tying horizon {name}: the surface has {} x {} nodes but the survey grid {} x {}",
            surface.z.nrows(),
            surface.z.ncols(),
            grid.inline_count,
            grid.xline_count
        )));
    }
    let (ni, nj) = (grid.inline_count, grid.xline_count);
    let (hs_i, hs_j) = (grid.inline_spacing, grid.xline_spacing);
    let support = radius + hs_i.hypot(hs_j);

    // prepare the tops
    let mut prepared: Vec<Top> = Vec::new();
    let mut notes = Vec::new();
    let mut before = Vec::with_capacity(tops.len());
    for (idx, t) in tops.iter().enumerate() {
        if !(t.x.is_finite() && t.y.is_finite() && t.z.is_finite()) {
            return Err(Error::inconsistent(format!(
                "tying horizon {name}: the top in well {} is not finite (x {}, y {}, z {})",
                t.well, t.x, t.y, t.z
            )));
        }
        let st = bilinear_stencil(grid, t.x, t.y).ok_or_else(|| {
            let (fi, fj) = grid.xy_to_ij(t.x, t.y);
            Error::inconsistent(format!(
                "tying horizon {name}: the top in well {} at x {}, y {} is outside the survey grid \
                 (inline {:.2}, crossline {:.2}; the grid spans inlines {}-{} and crosslines {}-{})",
                t.well,
                t.x,
                t.y,
                grid.inline_first as f64 + fi,
                grid.xline_first as f64 + fj,
                grid.inline_first,
                grid.inline_number(ni.saturating_sub(1)),
                grid.xline_first,
                grid.xline_number(nj.saturating_sub(1))
            ))
        })?;
        let z_before = surface.z_at_xy(grid, t.x, t.y).ok_or_else(|| {
            Error::inconsistent(format!(
                "tying horizon {name}: no surface depth at the top of well {}",
                t.well
            ))
        })?;
        before.push(z_before);
        let mistie = t.z - z_before;
        let (fi, fj) = grid.xy_to_ij(t.x, t.y);
        let (u, v) = (fj * hs_j, fi * hs_i);
        // same position as an earlier top?
        if let Some(p) = prepared
            .iter_mut()
            .find(|p| (p.u - u).hypot(p.v - v) < COINCIDENT_DISTANCE)
        {
            let first = p.members.first().copied().unwrap_or(idx);
            let other = tops.get(first).unwrap_or(t);
            if (other.z - t.z).abs() > 1e-6 {
                return Err(Error::inconsistent(format!(
                    "tying horizon {name}: wells {} and {} reach the horizon at the same position \
                     (x {}, y {}) but at different depths ({} m and {} m TVDSS); a surface cannot \
                     honour both",
                    other.well, t.well, t.x, t.y, other.z, t.z
                )));
            }
            notes.push(format!(
                "wells {} and {} reach the horizon at the same position and depth: tied as one top",
                other.well, t.well
            ));
            p.members.push(idx);
            continue;
        }
        let stencil = st
            .iter()
            .filter(|s| s.2 != 0.0)
            .map(|&(i, j, w)| (i, j, w, j as f64 * hs_j, i as f64 * hs_i))
            .collect();
        prepared.push(Top {
            members: vec![idx],
            u,
            v,
            stencil,
            mistie,
        });
    }

    let mut corr = ndarray::Array2::<f64>::zeros((ni, nj));
    let mut levels = Vec::new();
    let mut selected: Vec<usize> = Vec::new();
    let mut in_set = vec![false; prepared.len()];
    let mut rho = radius;
    let mut level = 0usize;
    while selected.len() < prepared.len() {
        // add the tops far enough from those already taken
        let mut added = false;
        for k in 0..prepared.len() {
            if in_set[k] {
                continue;
            }
            let far = selected.iter().all(|&s| {
                (prepared[s].u - prepared[k].u).hypot(prepared[s].v - prepared[k].v)
                    >= LEVEL_SEPARATION * rho
            });
            if far {
                in_set[k] = true;
                selected.push(k);
                added = true;
            }
        }
        if added {
            let cond = solve_level(&prepared, &selected, rho, grid, &mut corr, &name, tops)?;
            levels.push(TieLevel {
                radius: rho,
                tops: selected.len(),
                condition_number: cond,
            });
        }
        rho *= 0.5;
        level += 1;
        if level > 200 {
            // cannot happen: tops are at least COINCIDENT_DISTANCE apart
            return Err(Error::inconsistent(format!(
                "tying horizon {name}: the multilevel solve did not take all tops"
            )));
        }
    }

    let max_abs_mistie = prepared.iter().map(|p| p.mistie.abs()).fold(0.0, f64::max);
    let max_abs_correction = corr.iter().map(|c| c.abs()).fold(0.0, f64::max);
    if max_abs_correction > options.max_amplification * max_abs_mistie + 1e-9 {
        // name the pair with the steepest implied slope
        let mut worst: Option<(f64, usize, usize, f64)> = None;
        for a in 0..prepared.len() {
            for b in a + 1..prepared.len() {
                let d = (prepared[a].u - prepared[b].u).hypot(prepared[a].v - prepared[b].v);
                let slope = (prepared[a].mistie - prepared[b].mistie).abs() / d;
                if worst.map_or(true, |w| slope > w.0) {
                    worst = Some((slope, a, b, d));
                }
            }
        }
        let pair = worst
            .and_then(|(slope, a, b, d)| {
                let wa = prepared[a].members.first().and_then(|&i| tops.get(i))?;
                let wb = prepared[b].members.first().and_then(|&i| tops.get(i))?;
                Some(format!(
                    "; the steepest disagreement is between wells {} and {}, {:.1} m apart with \
                     misties {:.3} m and {:.3} m (a slope of {:.4} m/m)",
                    wa.well, wb.well, d, prepared[a].mistie, prepared[b].mistie, slope
                ))
            })
            .unwrap_or_default();
        return Err(Error::inconsistent(format!(
            "tying horizon {name}: honouring all tops exactly would move nodes by up to {:.3} m, \
             more than {} times the largest mistie ({:.3} m){pair}. Check those tops, leave one \
             of the wells out of the tie, or allow a larger amplification",
            max_abs_correction, options.max_amplification, max_abs_mistie
        )));
    }

    surface.z += &corr;
    let nodes_changed = corr.iter().filter(|c| **c != 0.0).count();
    let mut wells = Vec::with_capacity(tops.len());
    let mut max_abs_residual = 0.0f64;
    for (t, zb) in tops.iter().zip(&before) {
        let z_after = surface.z_at_xy(grid, t.x, t.y).unwrap_or(f64::NAN);
        let residual = t.z - z_after;
        max_abs_residual = max_abs_residual.max(residual.abs());
        let (fi, fj) = grid.xy_to_ij(t.x, t.y);
        wells.push(WellTie {
            well: t.well.clone(),
            x: t.x,
            y: t.y,
            inline: grid.inline_first as f64 + fi,
            xline: grid.xline_first as f64 + fj,
            z_top: t.z,
            z_before: *zb,
            mistie: t.z - zb,
            residual,
        });
    }
    Ok(TieReport {
        surface: name,
        radius,
        support,
        wells,
        levels,
        max_abs_mistie,
        max_abs_residual,
        max_abs_correction,
        nodes_changed,
        notes,
    })
}

/// Bilinear evaluation of the node field `corr` at a prepared top.
fn eval(corr: &ndarray::Array2<f64>, top: &Top) -> f64 {
    top.stencil
        .iter()
        .map(|&(i, j, w, _, _)| w * corr.get((i, j)).copied().unwrap_or(0.0))
        .sum()
}

/// Interpolate the remaining misties at the `selected` tops with radius `rho` and
/// add the level's correction to `corr`. Returns the matrix's condition number.
fn solve_level(
    prepared: &[Top],
    selected: &[usize],
    rho: f64,
    grid: &SurveyGrid,
    corr: &mut ndarray::Array2<f64>,
    name: &str,
    tops: &[TiePoint],
) -> Result<f64> {
    let m = selected.len();
    let mut a = DMatrix::<f64>::zeros(m, m);
    let mut rhs = DVector::<f64>::zeros(m);
    for (r, &kr) in selected.iter().enumerate() {
        let tr = &prepared[kr];
        rhs[r] = tr.mistie - eval(corr, tr);
        for (c, &kc) in selected.iter().enumerate().skip(r) {
            let tc = &prepared[kc];
            let mut s = 0.0;
            for &(_, _, wa, ua, va) in &tr.stencil {
                for &(_, _, wb, ub, vb) in &tc.stencil {
                    s += wa * wb * wendland_c2((ua - ub).hypot(va - vb) / rho);
                }
            }
            a[(r, c)] = s;
            a[(c, r)] = s;
        }
    }
    let eig = a.clone().symmetric_eigen();
    let (mut imin, mut lmin, mut lmax) = (0usize, f64::INFINITY, 0.0f64);
    for (k, &l) in eig.eigenvalues.iter().enumerate() {
        if l < lmin {
            lmin = l;
            imin = k;
        }
        lmax = lmax.max(l.abs());
    }
    let cond = if lmin > 0.0 {
        lmax / lmin
    } else {
        f64::INFINITY
    };
    let chol = if cond <= MAX_CONDITION {
        a.cholesky()
    } else {
        None
    };
    let Some(chol) = chol else {
        // the wells with the largest share in the null direction
        let vec = eig.eigenvectors.column(imin);
        let vmax = vec.iter().map(|x| x.abs()).fold(0.0, f64::max);
        let mut involved: Vec<usize> = Vec::new();
        for (r, &k) in selected.iter().enumerate() {
            if vec[r].abs() >= 0.3 * vmax {
                involved.extend(&prepared[k].members);
            }
        }
        involved.sort_unstable();
        let names: Vec<String> = involved
            .iter()
            .filter_map(|&i| tops.get(i).map(|t| t.well.clone()))
            .collect();
        return Err(Error::inconsistent(format!(
            "tying horizon {name}: the tops of wells {} cannot be honoured together by a surface \
             interpolated bilinearly between grid nodes (they lie in one grid cell in a \
             configuration whose equations are dependent, such as three tops on a line; \
             condition number {cond:.3e}). Leave one of them out of the tie or use a finer grid",
            names.join(", ")
        )));
    };
    let lambda = chol.solve(&rhs);
    let (ni, nj) = corr.dim();
    let (hs_i, hs_j) = (grid.inline_spacing, grid.xline_spacing);
    for (r, &k) in selected.iter().enumerate() {
        let lam = lambda[r];
        if lam == 0.0 {
            continue;
        }
        for &(ci, cj, w, cu, cv) in &prepared[k].stencil {
            let di = (rho / hs_i).ceil() as usize;
            let dj = (rho / hs_j).ceil() as usize;
            let (i_lo, i_hi) = (ci.saturating_sub(di), ci.saturating_add(di).min(ni - 1));
            let (j_lo, j_hi) = (cj.saturating_sub(dj), cj.saturating_add(dj).min(nj - 1));
            for i in i_lo..=i_hi {
                let dv = i as f64 * hs_i - cv;
                for j in j_lo..=j_hi {
                    let du = j as f64 * hs_j - cu;
                    let phi = wendland_c2(du.hypot(dv) / rho);
                    if phi != 0.0 {
                        corr[(i, j)] += lam * w * phi;
                    }
                }
            }
        }
    }
    Ok(cond)
}
