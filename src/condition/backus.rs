//! Backus (1962) averaging of finely layered isotropic media into an effective VTI medium.
//!
//! Two entry points:
//!
//! * [`backus_average`]: one stack of isotropic layers with thicknesses.
//! * [`backus_log`]: a moving-window Backus average along a well log (Vp, Vs,
//!   density against depth), with Thomsen's parameters of every window, in O(n)
//!   per log from compensated running sums.
//!
//! Sources (citation details from memory):
//! * Backus, G. E., 1962, Long-wave elastic anisotropy produced by horizontal
//!   layering. Journal of Geophysical Research 67(11), 4427-4440.
//! * Liner, C. L., and Fei, T. W., 2007, The Backus number. The Leading Edge
//!   26(4), 420-426 (window length from a dominant frequency).
//! * The averaging formulas in the "A, C, F, L, M" form are also restated in
//!   Mavko, Mukerji and Dvorkin, The Rock Physics Handbook, section "Backus
//!   average".

use super::thomsen::{thomsen_from_stiffness, Thomsen};
use crate::error::{Error, Result};

/// One isotropic layer: P and S velocity (m/s), density (kg/m3), thickness (m).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct IsoLayer {
    /// P velocity, m/s (> 0).
    pub vp: f64,
    /// S velocity, m/s (>= 0; 0 is a fluid).
    pub vs: f64,
    /// Density, kg/m3 (> 0).
    pub rho: f64,
    /// Thickness, m (>= 0; measured along the layering normal).
    pub thickness: f64,
}

/// Stiffnesses of a VTI medium (Voigt notation, Pa) and its density (kg/m3).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct VtiStiffness {
    /// C11, Pa.
    pub c11: f64,
    /// C13, Pa.
    pub c13: f64,
    /// C33, Pa.
    pub c33: f64,
    /// C44, Pa.
    pub c44: f64,
    /// C66, Pa.
    pub c66: f64,
    /// Density, kg/m3.
    pub rho: f64,
}

/// The thickness-weighted sums one Backus average needs.
///
/// With M = lambda + 2 mu = rho vp^2 and mu = rho vs^2 per layer:
/// `[valid, fluid, 1/M, 1/mu (solids only), mu, lambda/M, 4 mu (lambda + mu)/M, rho]`.
const NQ: usize = 8;
const Q_VALID: usize = 0;
const Q_FLUID: usize = 1;
const Q_INV_M: usize = 2;
const Q_INV_MU: usize = 3;
const Q_MU: usize = 4;
const Q_LAM_M: usize = 5;
const Q_A: usize = 6;
const Q_RHO: usize = 7;

/// Why an isotropic sample is not usable.
fn layer_problem(vp: f64, vs: f64, rho: f64) -> Option<&'static str> {
    if !(vp.is_finite() && vs.is_finite() && rho.is_finite()) {
        return Some("values must be finite");
    }
    if vp <= 0.0 {
        return Some("Vp must be > 0 m/s");
    }
    if vs < 0.0 {
        return Some("Vs must be >= 0 m/s");
    }
    if rho <= 0.0 {
        return Some("density must be > 0 kg/m3");
    }
    // Bulk modulus K = rho (vp^2 - 4/3 vs^2) must be positive.
    if 3.0 * vp * vp <= 4.0 * vs * vs {
        return Some("Vp/Vs must exceed sqrt(4/3) (positive bulk modulus)");
    }
    None
}

/// Per-layer quantities (not yet thickness-weighted), see [`NQ`].
fn layer_quantities(vp: f64, vs: f64, rho: f64) -> [f64; NQ] {
    let vp2 = vp * vp;
    let vs2 = vs * vs;
    let m = rho * vp2;
    let mu = rho * vs2;
    let fluid = mu == 0.0;
    let mut q = [0.0; NQ];
    q[Q_VALID] = 1.0;
    q[Q_FLUID] = if fluid { 1.0 } else { 0.0 };
    q[Q_INV_M] = 1.0 / m;
    q[Q_INV_MU] = if fluid { 0.0 } else { 1.0 / mu };
    q[Q_MU] = mu;
    // lambda / M = 1 - 2 vs^2 / vp^2 ; 4 mu (lambda + mu) / M = 4 rho vs^2 (vp^2 - vs^2) / vp^2
    q[Q_LAM_M] = 1.0 - 2.0 * vs2 / vp2;
    q[Q_A] = 4.0 * rho * vs2 * (vp2 - vs2) / vp2;
    q[Q_RHO] = rho;
    q
}

/// Stiffness from thickness-weighted integrals `s` (each `sum h q`), normalised by
/// the valid thickness `s[Q_VALID]` (> 0).
fn stiffness_from_sums(s: &[f64; NQ]) -> VtiStiffness {
    let h = s[Q_VALID];
    let inv_m = s[Q_INV_M] / h;
    let c33 = 1.0 / inv_m;
    let c44 = if s[Q_FLUID] > 0.0 {
        0.0
    } else {
        h / s[Q_INV_MU]
    };
    let c66 = s[Q_MU] / h;
    let lam_m = s[Q_LAM_M] / h;
    let c13 = lam_m * c33;
    let c11 = s[Q_A] / h + lam_m * lam_m * c33;
    VtiStiffness {
        c11,
        c13,
        c33,
        c44,
        c66,
        rho: s[Q_RHO] / h,
    }
}

/// Backus (1962) average of a stack of isotropic layers: the long-wavelength
/// effective VTI medium.
///
/// With lambda, mu the Lame moduli of each layer (lambda + 2 mu = rho vp^2,
/// mu = rho vs^2) and `<.>` the thickness-weighted mean over the stack
/// (Backus 1962, JGR 67(11), 4427-4440; in the A, C, F, L, M notation
/// A = C11, C = C33, F = C13, L = C44, M = C66):
///
/// ```text
/// C33 = < 1/(lambda+2mu) >^-1
/// C44 = < 1/mu >^-1
/// C66 = < mu >
/// C13 = < lambda/(lambda+2mu) > C33
/// C11 = < 4 mu (lambda+mu)/(lambda+2mu) > + < lambda/(lambda+2mu) >^2 C33
/// rho = < rho >
/// ```
///
/// Fluid layers (vs = 0, mu = 0) are accepted: the harmonic mean gives C44 = 0
/// (a fluid film decouples shear across the layering), the other averages are
/// unchanged; [`thomsen_from_stiffness`] then gives vs0 = 0 and gamma = +inf.
/// Zero-thickness layers do not contribute.
///
/// Errors (`Error::Inconsistent`, naming the 0-based layer index) when a value
/// is not finite, thickness < 0, vp <= 0, vs < 0, rho <= 0, or vp/vs <= sqrt(4/3)
/// (negative bulk modulus), and when the total thickness is 0.
pub fn backus_average(layers: &[IsoLayer]) -> Result<VtiStiffness> {
    let mut sums = [Compensated::default(); NQ];
    for (i, l) in layers.iter().enumerate() {
        if !l.thickness.is_finite() || l.thickness < 0.0 {
            return Err(Error::inconsistent(format!(
                "Backus average: layer {i}: thickness must be finite and >= 0 m, got {}",
                l.thickness
            )));
        }
        if let Some(p) = layer_problem(l.vp, l.vs, l.rho) {
            return Err(Error::inconsistent(format!(
                "Backus average: layer {i} (vp {} m/s, vs {} m/s, rho {} kg/m3): {p}",
                l.vp, l.vs, l.rho
            )));
        }
        if l.thickness == 0.0 {
            continue;
        }
        let q = layer_quantities(l.vp, l.vs, l.rho);
        for (s, qk) in sums.iter_mut().zip(q) {
            s.add(l.thickness * qk);
        }
    }
    let s: [f64; NQ] = std::array::from_fn(|k| sums[k].value());
    if s[Q_VALID] <= 0.0 {
        return Err(Error::inconsistent(
            "Backus average: the layers have zero total thickness",
        ));
    }
    Ok(stiffness_from_sums(&s))
}

/// How long the moving Backus window is.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum WindowLength {
    /// A fixed length in metres (of the depth axis passed to [`backus_log`]).
    Metres(f64),
    /// From the Backus number of Liner and Fei (2007, The Leading Edge 26(4)):
    /// B = f L / Vs_min, so L = B Vs_min / f, with `frequency_hz` the dominant
    /// frequency f of the seismic data (Hz) and Vs_min the minimum shear
    /// velocity. B around 1/3 is the usual choice for the limit below which the
    /// layered stack behaves as its effective (Backus) medium (Liner and Fei
    /// 2007; value as commonly quoted, from memory).
    ///
    /// Vs_min is the minimum Vs over the whole log (over the usable samples with
    /// Vs > 0; fluid samples are left out as they have no shear wavelength), so a
    /// log gets one window length. Pass a sub-log (one zone) to get a window per
    /// zone.
    BackusNumber {
        /// Backus number B (dimensionless, > 0).
        b: f64,
        /// Dominant frequency, Hz (> 0).
        frequency_hz: f64,
    },
}

/// What to do where the window reaches past the ends of the log.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum EdgePolicy {
    /// No value (None) where the window is not fully inside the log. Default.
    #[default]
    Missing,
    /// Clip the window to the log; the window becomes shorter and off-centre
    /// near the ends. The coverage rule is applied to the clipped length.
    Shrink,
    /// Let the first and last samples continue beyond the log ends ("edge
    /// padding"; common practice for smoothing filters, and what the bruges
    /// moving average does).
    Extend,
}

/// Settings of a moving-window Backus average along a log.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BackusLogOptions {
    /// Window length.
    pub window: WindowLength,
    /// Smallest fraction (0, 1] of the window length that must be covered by
    /// usable samples; below it the output is None. Default 0.8.
    pub min_coverage: f64,
    /// Behaviour at the ends of the log. Default [`EdgePolicy::Missing`].
    pub edges: EdgePolicy,
}

impl BackusLogOptions {
    /// Options with `window`, coverage 0.8 and [`EdgePolicy::Missing`].
    pub fn new(window: WindowLength) -> Self {
        BackusLogOptions {
            window,
            min_coverage: 0.8,
            edges: EdgePolicy::Missing,
        }
    }
}

/// The effective medium of one window.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BackusSample {
    /// Backus-averaged stiffnesses and density.
    pub stiffness: VtiStiffness,
    /// Thomsen parameters of `stiffness`.
    pub thomsen: Thomsen,
    /// Fraction of the window length covered by usable samples (0, 1].
    pub coverage: f64,
}

/// Result of [`backus_log`].
#[derive(Debug, Clone, PartialEq)]
pub struct BackusLog {
    /// Window length used, m.
    pub window_length: f64,
    /// The Vs_min used for [`WindowLength::BackusNumber`] (m/s); None for
    /// [`WindowLength::Metres`].
    pub vs_min: Option<f64>,
    /// One entry per input sample; None where the window has too little usable
    /// data or (with [`EdgePolicy::Missing`]) reaches past the log ends.
    pub samples: Vec<Option<BackusSample>>,
    /// Indices of samples that had Vp, Vs and density but physically impossible
    /// values (vp <= 0, vs < 0, rho <= 0, vp/vs <= sqrt(4/3), not finite). They
    /// are treated as missing; the caller should report them.
    pub rejected: Vec<usize>,
}

impl BackusLog {
    /// Vertical P velocity per sample, m/s.
    pub fn vp0(&self) -> Vec<Option<f64>> {
        self.samples
            .iter()
            .map(|s| s.map(|s| s.thomsen.vp0))
            .collect()
    }
    /// Thomsen epsilon per sample.
    pub fn epsilon(&self) -> Vec<Option<f64>> {
        self.samples
            .iter()
            .map(|s| s.map(|s| s.thomsen.epsilon))
            .collect()
    }
    /// Thomsen delta per sample.
    pub fn delta(&self) -> Vec<Option<f64>> {
        self.samples
            .iter()
            .map(|s| s.map(|s| s.thomsen.delta))
            .collect()
    }
    /// Thomsen gamma per sample.
    pub fn gamma(&self) -> Vec<Option<f64>> {
        self.samples
            .iter()
            .map(|s| s.map(|s| s.thomsen.gamma))
            .collect()
    }
}

/// Window ends closer than this (m) to a sample-cell boundary are moved onto it,
/// so that windows meant to hold whole cells (L = N dz on a regular log) do not
/// pick up slivers of the neighbours from rounding.
pub const SNAP_TOLERANCE_M: f64 = 1e-6;

/// Window length (m) for Backus number `b`, minimum shear velocity `vs_min`
/// (m/s) and dominant frequency `frequency_hz` (Hz): L = B Vs_min / f
/// (Liner and Fei 2007, The Leading Edge 26(4): B = f L / Vs_min).
///
/// Errors when any input is not finite and > 0.
pub fn window_from_backus_number(b: f64, vs_min: f64, frequency_hz: f64) -> Result<f64> {
    for (name, v) in [
        ("Backus number", b),
        ("minimum Vs (m/s)", vs_min),
        ("dominant frequency (Hz)", frequency_hz),
    ] {
        if !(v.is_finite() && v > 0.0) {
            return Err(Error::inconsistent(format!(
                "Backus window: {name} must be finite and > 0, got {v}"
            )));
        }
    }
    Ok(b * vs_min / frequency_hz)
}

/// Moving-window Backus average along a well log, with Thomsen's parameters.
///
/// `depth` (m, strictly increasing) holds the sample depths; `vp`, `vs` (m/s) and
/// `rho` (kg/m3) the log values, None where missing. `well` names the well in
/// error messages.
///
/// **Depth axis.** Backus averaging is along the normal to the layering. Pass
/// true vertical depth (TVD/TVDSS) for deviated wells: for near-flat layering
/// the vertical thickness of a sample is its thickness along the normal (common
/// practice). Measured depth is right only for vertical wells.
///
/// **Cells.** Sample k stands for the depth interval ("cell") from half-way to
/// its upper neighbour to half-way to its lower neighbour; the end samples get
/// the same half-spacing outward as inward, so a regular log of n samples at
/// spacing dz covers n dz. Irregular spacing is allowed.
///
/// **Window.** Output sample i is the Backus average ([`backus_average`]) of the
/// piecewise-constant medium over [z_i - L/2, z_i + L/2]: each cell contributes
/// with the length of its overlap with the window as thickness. On a regular log
/// with L = N dz, N odd, the window holds exactly the N cells centred on sample
/// i (boxcar of N samples). Window ends within [`SNAP_TOLERANCE_M`] of a cell
/// boundary are put on it.
///
/// **Missing data.** A sample is usable when Vp, Vs and density are all present
/// and physical (see [`BackusLog::rejected`]). The averages are over the usable
/// part of the window (its thicknesses renormalised). The output is None when the
/// usable length is below `min_coverage` times the window length (default 80%),
/// or zero.
///
/// **Ends.** See [`EdgePolicy`].
///
/// **Window length.** [`WindowLength::Metres`], or from the Backus number with
/// Vs_min over the whole log ([`window_from_backus_number`]); returned in
/// [`BackusLog::window_length`].
///
/// **Cost and accuracy.** O(n) per log: the thickness-weighted integrals over a
/// window are differences of running (prefix) sums, located with two pointers.
/// The running sums are kept in double-double (compensated, Knuth two-sum)
/// arithmetic, so that a difference of two large prefix sums keeps full f64
/// accuracy even next to very large terms (e.g. 1/mu of a very slow sample far
/// up the log); the result equals the direct per-window [`backus_average`] to
/// about 1e-15 relative (tests/rockphysics_backus.rs; plain f64 prefix sums
/// differ by 1e-3 on the same test log, which has a sample with Vs = 1 mm/s).
///
/// Errors (`Error::Inconsistent`, naming the well) when the arrays differ in
/// length, there are fewer than two samples, depths are not finite or not
/// strictly increasing, the window length is not finite and > 0, min_coverage
/// is not in (0, 1], or (Backus number) no usable sample has Vs > 0.
pub fn backus_log(
    well: &str,
    depth: &[f64],
    vp: &[Option<f64>],
    vs: &[Option<f64>],
    rho: &[Option<f64>],
    options: &BackusLogOptions,
) -> Result<BackusLog> {
    let n = depth.len();
    if vp.len() != n || vs.len() != n || rho.len() != n {
        return Err(Error::inconsistent(format!(
            "well {well}: Backus log: depth, Vp, Vs and density must have the same \
             length, got {}, {}, {}, {}",
            n,
            vp.len(),
            vs.len(),
            rho.len()
        )));
    }
    if n < 2 {
        return Err(Error::inconsistent(format!(
            "well {well}: Backus log needs at least two samples, got {n}"
        )));
    }
    for (k, w) in depth.windows(2).enumerate() {
        if !(w[0].is_finite() && w[1].is_finite()) || w[1] <= w[0] {
            return Err(Error::inconsistent(format!(
                "well {well}: Backus log: depths must be finite and strictly \
                 increasing, got {} then {} at samples {} and {}",
                w[0],
                w[1],
                k,
                k + 1
            )));
        }
    }
    let mc = options.min_coverage;
    if !(mc.is_finite() && mc > 0.0 && mc <= 1.0) {
        return Err(Error::inconsistent(format!(
            "well {well}: Backus log: minimum coverage must be in (0, 1], got {mc}"
        )));
    }

    // Usable samples and their quantities.
    let mut q = vec![[0.0; NQ]; n];
    let mut rejected = Vec::new();
    let mut vs_min: Option<f64> = None;
    for k in 0..n {
        let (Some(p), Some(s), Some(r)) = (vp[k], vs[k], rho[k]) else {
            continue;
        };
        if layer_problem(p, s, r).is_some() {
            rejected.push(k);
            continue;
        }
        q[k] = layer_quantities(p, s, r);
        if s > 0.0 {
            vs_min = Some(vs_min.map_or(s, |m| m.min(s)));
        }
    }

    let (length, vs_min_used) = match options.window {
        WindowLength::Metres(l) => {
            if !(l.is_finite() && l > 0.0) {
                return Err(Error::inconsistent(format!(
                    "well {well}: Backus window length must be finite and > 0 m, got {l}"
                )));
            }
            (l, None)
        }
        WindowLength::BackusNumber { b, frequency_hz } => {
            let Some(vmin) = vs_min else {
                return Err(Error::inconsistent(format!(
                    "well {well}: Backus number window needs the minimum Vs, but no \
                     sample has usable Vp, Vs > 0 and density"
                )));
            };
            let l = window_from_backus_number(b, vmin, frequency_hz)
                .map_err(|e| Error::inconsistent(format!("well {well}: {e}")))?;
            (l, Some(vmin))
        }
    };

    // Cell boundaries e[0..=n].
    let mut e = Vec::with_capacity(n + 1);
    e.push(depth[0] - 0.5 * (depth[1] - depth[0]));
    for w in depth.windows(2) {
        e.push(0.5 * (w[0] + w[1]));
    }
    e.push(depth[n - 1] + 0.5 * (depth[n - 1] - depth[n - 2]));

    // Prefix integrals P[k] = sum_{j<k} h_j q_j in double-double.
    let mut prefix = Vec::with_capacity(n + 1);
    let mut run = [Compensated::default(); NQ];
    prefix.push(run);
    for k in 0..n {
        let h = e[k + 1] - e[k];
        for (r, qk) in run.iter_mut().zip(q[k]) {
            r.add(h * qk);
        }
        prefix.push(run);
    }

    let (top, bottom) = (e[0], e[n]);
    let half = 0.5 * length;
    let mut samples = Vec::with_capacity(n);
    let (mut ka, mut kb) = (0usize, 0usize);
    for &z in depth {
        let (mut a, mut b) = (z - half, z + half);
        match options.edges {
            EdgePolicy::Missing => {
                if a < top - SNAP_TOLERANCE_M || b > bottom + SNAP_TOLERANCE_M {
                    samples.push(None);
                    continue;
                }
                a = a.max(top);
                b = b.min(bottom);
            }
            EdgePolicy::Shrink => {
                a = a.max(top);
                b = b.min(bottom);
            }
            EdgePolicy::Extend => {}
        }
        // Windows move down monotonically: advance the cell pointers.
        let (ka2, a2) = locate(&e, ka, a);
        let (kb2, b2) = locate(&e, kb, b);
        ka = ka2;
        kb = kb2;
        let (a, b) = (a2, b2);
        let win = b - a;
        if win <= 0.0 {
            samples.push(None);
            continue;
        }
        let ints: [f64; NQ] = std::array::from_fn(|c| {
            let pb = prefix[kb][c];
            let pa = prefix[ka][c];
            pb.minus(&pa) + (b - e[kb]) * q[kb][c] - (a - e[ka]) * q[ka][c]
        });
        let valid = ints[Q_VALID];
        let coverage = valid / win;
        if valid <= 0.0 || coverage < mc * (1.0 - 1e-9) {
            samples.push(None);
            continue;
        }
        let stiffness = stiffness_from_sums(&ints);
        let thomsen = thomsen_from_stiffness(&stiffness);
        samples.push(Some(BackusSample {
            stiffness,
            thomsen,
            coverage: coverage.min(1.0),
        }));
    }

    Ok(BackusLog {
        window_length: length,
        vs_min: vs_min_used,
        samples,
        rejected,
    })
}

/// The cell index k (clamped to 0..n-1) with e[k] <= x < e[k+1], searching
/// forward from `start`, and x snapped onto a boundary within
/// [`SNAP_TOLERANCE_M`]. Beyond the ends the end cells are used (extension).
fn locate(e: &[f64], start: usize, x: f64) -> (usize, f64) {
    let n = e.len() - 1;
    let mut k = start.min(n - 1);
    while k + 1 < n && e[k + 1] <= x {
        k += 1;
    }
    // Snap to the nearest boundary of cell k (or the next one).
    if k + 1 < n && e[k + 1] - x < SNAP_TOLERANCE_M {
        return (k + 1, e[k + 1]);
    }
    let mut xs = x;
    if (x - e[k]).abs() < SNAP_TOLERANCE_M {
        xs = e[k];
    } else if k + 1 == n && (x - e[n]).abs() < SNAP_TOLERANCE_M {
        xs = e[n];
    }
    (k, xs)
}

/// A double-double accumulator (Knuth/Dekker two-sum), so that differences of
/// running sums lose no accuracy to the size of the sums.
#[derive(Debug, Clone, Copy, Default)]
struct Compensated {
    hi: f64,
    lo: f64,
}

impl Compensated {
    fn add(&mut self, x: f64) {
        let (s, err) = two_sum(self.hi, x);
        let lo = self.lo + err;
        let (hi, lo) = fast_two_sum(s, lo);
        self.hi = hi;
        self.lo = lo;
    }

    fn value(&self) -> f64 {
        self.hi + self.lo
    }

    /// self - other, rounded to f64.
    fn minus(&self, other: &Compensated) -> f64 {
        let (s, err) = two_sum(self.hi, -other.hi);
        s + (err + (self.lo - other.lo))
    }
}

fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    let bb = s - a;
    (s, (a - (s - bb)) + (b - bb))
}

fn fast_two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    (s, b - (s - a))
}
