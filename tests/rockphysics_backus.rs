//! Backus averaging, Thomsen parameters and the moving-window Backus log.
//!
//! Sources of the checks (citation details from memory):
//! * Backus, G. E., 1962, Long-wave elastic anisotropy produced by horizontal
//!   layering, JGR 67(11): the averaging formulas, evaluated by hand below.
//! * Thomsen, L., 1986, Weak elastic anisotropy, Geophysics 51(10): definitions
//!   of epsilon, delta, gamma and Table 1 (Taylor sandstone row).
//! * Postma, G. W., 1955, Wave propagation in a stratified medium, Geophysics
//!   20(4); Berryman, J. G., 1979, Long-wave elastic anisotropy in transversely
//!   isotropic media, Geophysics 44(5): layered isotropic media with constant
//!   shear modulus are isotropic; gamma >= 0 and epsilon - delta >= 0.
//! * Liner, C. L., and Fei, T. W., 2007, The Backus number, The Leading Edge
//!   26(4): B = f L / Vs_min.

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use stratiprior::condition::backus::{
    backus_average, backus_log, window_from_backus_number, BackusLog, BackusLogOptions, EdgePolicy,
    IsoLayer, VtiStiffness, WindowLength, SNAP_TOLERANCE_M,
};
use stratiprior::condition::thomsen::{stiffness_from_thomsen, thomsen_from_stiffness, Thomsen};
use stratiprior::Error;

fn layer(vp: f64, vs: f64, rho: f64, thickness: f64) -> IsoLayer {
    IsoLayer {
        vp,
        vs,
        rho,
        thickness,
    }
}

fn close(got: f64, want: f64, tol: f64, what: &str) {
    assert!(
        (got - want).abs() <= tol,
        "{what}: got {got}, want {want} (tolerance {tol})"
    );
}

/// Check 1. The three-layer stack of the task brief; the expected values were
/// computed directly from Backus' formulas (above) and Thomsen's definitions, and
/// are what bruges.rockphysics.anisotropy.backus_parameters / thomsen_parameters
/// (bruges 0.5.4) give for the stack sampled at 1 m with a 15-sample window (odd
/// integer window). Tolerance: half a unit in the last quoted digit.
#[test]
fn three_layer_stack() {
    let layers = [
        layer(3000.0, 1500.0, 2400.0, 3.0),
        layer(2500.0, 1100.0, 2300.0, 5.0),
        layer(4000.0, 2300.0, 2600.0, 7.0),
    ];
    let c = backus_average(&layers).unwrap();
    close(c.c11, 2.831346e10, 0.5e4, "C11");
    close(c.c13, 1.058842e10, 0.5e4, "C13");
    close(c.c33, 2.290132e10, 0.5e4, "C33");
    close(c.c44, 5.242701e9, 0.5e3, "C44");
    close(c.c66, 8.426200e9, 0.5e3, "C66");
    close(c.rho, 2460.0, 1e-9, "rho = (3*2400 + 5*2300 + 7*2600)/15");
    let t = thomsen_from_stiffness(&c);
    close(t.vp0, 3051.1437, 0.5e-4, "Vp0");
    close(t.epsilon, 0.118162, 0.5e-6, "epsilon");
    close(t.delta, -0.075669, 0.5e-6, "delta");
    close(t.gamma, 0.303613, 0.5e-6, "gamma");

    // The same stack as a 1 m log, 15 m window: only the middle sample has its
    // window inside the log (EdgePolicy::Missing) and it equals the stack.
    let mut vp = Vec::new();
    let mut vs = Vec::new();
    let mut rho = Vec::new();
    for l in &layers {
        for _ in 0..l.thickness as usize {
            vp.push(Some(l.vp));
            vs.push(Some(l.vs));
            rho.push(Some(l.rho));
        }
    }
    let depth: Vec<f64> = (0..15).map(|k| 1000.5 + k as f64).collect();
    let log = backus_log(
        "W-1",
        &depth,
        &vp,
        &vs,
        &rho,
        &BackusLogOptions::new(WindowLength::Metres(15.0)),
    )
    .unwrap();
    for (k, s) in log.samples.iter().enumerate() {
        assert_eq!(s.is_some(), k == 7, "sample {k}");
    }
    let s = log.samples[7].unwrap();
    assert_stiffness_close(&s.stiffness, &c, 1e-12, "log window vs stack");
    assert_eq!(s.coverage, 1.0);
}

/// Check 2. 50/50 stack, Vp 2000/4000, Vs 1000/2000, constant density: by hand
/// from Backus' formulas (in units of rho * 1e6): C33 = 32/5, C44 = 8/5,
/// C66 = 5/2, C13 = 16/5, C11 = 91/10, so epsilon = 27/128, gamma = 9/32 and
/// C13 + C44 = C33 - C44 gives delta = 0.
#[test]
fn two_layer_exact_fractions() {
    for rho in [1000.0, 2450.0] {
        let c = backus_average(&[
            layer(2000.0, 1000.0, rho, 4.0),
            layer(4000.0, 2000.0, rho, 4.0),
        ])
        .unwrap();
        let t = thomsen_from_stiffness(&c);
        close(t.epsilon, 27.0 / 128.0, 1e-12, "epsilon");
        close(t.delta, 0.0, 1e-12, "delta");
        close(t.gamma, 9.0 / 32.0, 1e-12, "gamma");
        close(c.c33 / (rho * 1e6), 32.0 / 5.0, 1e-12, "C33");
        close(c.c11 / (rho * 1e6), 91.0 / 10.0, 1e-12, "C11");
    }
}

/// Check 3. Invariants of layered isotropic media over 3000 seeded random stacks:
/// constant shear modulus gives an isotropic medium (Backus 1962; Postma 1955);
/// gamma >= 0 (C66 = <mu> is an arithmetic and C44 = <1/mu>^-1 a harmonic mean);
/// epsilon - delta >= 0 (Postma 1955; Berryman 1979).
#[test]
fn layered_isotropic_invariants() {
    let mut rng = ChaCha8Rng::seed_from_u64(1955);
    let mut min_gamma = f64::INFINITY;
    let mut min_eta = f64::INFINITY;
    let mut max_iso = 0.0f64;
    for _ in 0..3000 {
        let n = rng.gen_range(2..12);
        // General stack: Vp 1500-6000 m/s, Vs/Vp 0.2-0.8 (Poisson's ratio from
        // 0.47 down to negative values), density 1800-2900 kg/m3.
        let layers: Vec<IsoLayer> = (0..n)
            .map(|_| {
                let vp = rng.gen_range(1500.0..6000.0);
                layer(
                    vp,
                    vp * rng.gen_range(0.2..0.8),
                    rng.gen_range(1800.0..2900.0),
                    rng.gen_range(0.1..10.0),
                )
            })
            .collect();
        let t = thomsen_from_stiffness(&backus_average(&layers).unwrap());
        min_gamma = min_gamma.min(t.gamma);
        min_eta = min_eta.min(t.epsilon - t.delta);

        // Constant shear modulus mu: vs = sqrt(mu / rho) per layer.
        let mu = rng.gen_range(2e9..2e10);
        let layers: Vec<IsoLayer> = (0..n)
            .map(|_| {
                let rho: f64 = rng.gen_range(1800.0..2900.0);
                let vs = (mu / rho).sqrt();
                layer(
                    vs * rng.gen_range(1.2..3.5),
                    vs,
                    rho,
                    rng.gen_range(0.1..10.0),
                )
            })
            .collect();
        let t = thomsen_from_stiffness(&backus_average(&layers).unwrap());
        for v in [t.epsilon, t.delta, t.gamma] {
            max_iso = max_iso.max(v.abs());
        }
    }
    assert!(min_gamma >= 0.0, "gamma < 0: {min_gamma}");
    assert!(min_eta >= -1e-12, "epsilon - delta < 0: {min_eta}");
    assert!(max_iso <= 1e-12, "constant mu not isotropic: {max_iso}");
}

/// Check 4. Thomsen (1986) Table 1, Taylor sandstone (from a transcription of the
/// table): Vp0 3368 m/s, Vs0 1829 m/s, rho 2.500 g/cm3, epsilon 0.110,
/// delta -0.035, gamma 0.255. Stiffnesses from Thomsen's definitions, quoted to
/// 1e-4 GPa (tolerance half of that), and the exact round trip.
#[test]
fn taylor_sandstone_round_trip() {
    let t = Thomsen {
        vp0: 3368.0,
        vs0: 1829.0,
        epsilon: 0.110,
        delta: -0.035,
        gamma: 0.255,
    };
    let c = stiffness_from_thomsen(&t, 2500.0).unwrap();
    let gpa = 1e9;
    close(c.c11 / gpa, 34.5974, 0.5e-4, "C11 GPa");
    close(c.c33 / gpa, 28.3586, 0.5e-4, "C33 GPa");
    close(c.c13 / gpa, 10.6139, 0.5e-4, "C13 GPa");
    close(c.c44 / gpa, 8.3631, 0.5e-4, "C44 GPa");
    close(c.c66 / gpa, 12.6283, 0.5e-4, "C66 GPa");
    let back = thomsen_from_stiffness(&c);
    close(back.vp0, t.vp0, 1e-9, "vp0");
    close(back.vs0, t.vs0, 1e-9, "vs0");
    close(back.epsilon, t.epsilon, 1e-12, "epsilon");
    close(back.delta, t.delta, 1e-12, "delta");
    close(back.gamma, t.gamma, 1e-12, "gamma");
}

/// The C13 root: stiffness_from_thomsen(thomsen_from_stiffness(c)) returns the
/// Backus C13 of random layered stacks (where C13 + C44 > 0), and rejects a
/// delta below -(C33 - C44)/(2 C33).
#[test]
fn stiffness_round_trip_and_root() {
    let mut rng = ChaCha8Rng::seed_from_u64(1986);
    for _ in 0..500 {
        let layers: Vec<IsoLayer> = (0..rng.gen_range(2..8))
            .map(|_| {
                let vp = rng.gen_range(1500.0..6000.0);
                layer(
                    vp,
                    vp * rng.gen_range(0.3..0.65),
                    rng.gen_range(1800.0..2900.0),
                    rng.gen_range(0.1..10.0),
                )
            })
            .collect();
        let c = backus_average(&layers).unwrap();
        let back = stiffness_from_thomsen(&thomsen_from_stiffness(&c), c.rho).unwrap();
        assert_stiffness_close(&back, &c, 1e-9, "round trip");
    }
    let t = Thomsen {
        vp0: 3000.0,
        vs0: 1500.0,
        epsilon: 0.1,
        delta: -0.4, // limit is -(1 - 0.25)/2 = -0.375
        gamma: 0.1,
    };
    match stiffness_from_thomsen(&t, 2400.0) {
        Err(Error::Inconsistent(m)) => assert!(m.contains("no real C13"), "{m}"),
        other => panic!("expected an error, got {other:?}"),
    }
    assert!(stiffness_from_thomsen(&Thomsen { vs0: 3100.0, ..t }, 2400.0).is_err());
    assert!(stiffness_from_thomsen(&Thomsen { delta: 0.0, ..t }, f64::NAN).is_err());
}

#[test]
fn fluid_layer_and_bad_layers() {
    // A fluid layer (vs = 0) makes C44 = 0 (harmonic mean), gamma infinite,
    // epsilon and delta finite; by hand: water 1500 m/s, 1000 kg/m3 over a solid.
    let c = backus_average(&[
        layer(1500.0, 0.0, 1000.0, 1.0),
        layer(3000.0, 1500.0, 2400.0, 1.0),
    ])
    .unwrap();
    assert_eq!(c.c44, 0.0);
    let t = thomsen_from_stiffness(&c);
    assert_eq!(t.vs0, 0.0);
    assert_eq!(t.gamma, f64::INFINITY);
    // C33 = 2 / (1/2.25e9 + 1/2.16e10); C66 = 0.5 * 5.4e9.
    close(c.c33, 2.0 / (1.0 / 2.25e9 + 1.0 / 2.16e10), 1e-3, "C33");
    close(c.c66, 2.7e9, 1e-3, "C66");
    assert!(t.epsilon.is_finite() && t.delta.is_finite());

    for (bad, what) in [
        (layer(-1.0, 0.0, 1000.0, 1.0), "Vp must be > 0"),
        (layer(2000.0, 1900.0, 2000.0, 1.0), "sqrt(4/3)"),
        (layer(2000.0, 1000.0, 0.0, 1.0), "density"),
        (layer(2000.0, 1000.0, 2000.0, -1.0), "thickness"),
        (layer(f64::NAN, 1000.0, 2000.0, 1.0), "finite"),
    ] {
        match backus_average(&[layer(3000.0, 1500.0, 2400.0, 1.0), bad]) {
            Err(Error::Inconsistent(m)) => {
                assert!(m.contains("layer 1") && m.contains(what), "{m}")
            }
            other => panic!("expected an error for {bad:?}, got {other:?}"),
        }
    }
    assert!(backus_average(&[]).is_err());
    assert!(backus_average(&[layer(3000.0, 1500.0, 2400.0, 0.0)]).is_err());
}

fn rel(a: f64, b: f64) -> f64 {
    if a == b {
        0.0
    } else {
        (a - b).abs() / b.abs().max(a.abs())
    }
}

fn assert_stiffness_close(a: &VtiStiffness, b: &VtiStiffness, tol: f64, what: &str) {
    for (x, y, name) in [
        (a.c11, b.c11, "C11"),
        (a.c13, b.c13, "C13"),
        (a.c33, b.c33, "C33"),
        (a.c44, b.c44, "C44"),
        (a.c66, b.c66, "C66"),
        (a.rho, b.rho, "rho"),
    ] {
        assert!(rel(x, y) <= tol, "{what}: {name} {x} vs {y}");
    }
}

/// A random log with irregular spacing, nulls, a gap, rejected samples, a
/// very slow sample and a fluid sample.
struct RandomLog {
    depth: Vec<f64>,
    vp: Vec<Option<f64>>,
    vs: Vec<Option<f64>>,
    rho: Vec<Option<f64>>,
}

fn random_log(seed: u64, n: usize) -> RandomLog {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let mut depth = Vec::with_capacity(n);
    let mut z = 2731.3;
    let (mut vp, mut vs, mut rho) = (Vec::new(), Vec::new(), Vec::new());
    let (mut bv, mut br, mut bd) = (3000.0, 1.9, 2400.0);
    for k in 0..n {
        depth.push(z);
        z += rng.gen_range(0.05..0.3);
        if rng.gen_bool(0.15) {
            bv = rng.gen_range(2000.0..5000.0);
            br = rng.gen_range(1.6..2.4);
            bd = rng.gen_range(2000.0..2700.0);
        }
        let p: f64 = bv * (1.0 + 0.02 * rng.gen_range(-1.0..1.0));
        vp.push((!rng.gen_bool(0.03)).then_some(p));
        vs.push((!rng.gen_bool(0.03)).then_some(p / br));
        rho.push((!rng.gen_bool(0.03)).then_some(bd));
        if (200..230).contains(&k) {
            vs[k] = None; // a gap of 30 samples
        }
    }
    (vp[50], vs[50], rho[50]) = (Some(3000.0), Some(2700.0), Some(2400.0)); // rejected: vp/vs < sqrt(4/3)
    (vp[51], vs[51], rho[51]) = (Some(3000.0), Some(1500.0), Some(-2.0)); // rejected
    vp[5] = Some(3000.0);
    vs[5] = Some(1e-3); // very slow: 1/mu is 1e13 times the others
    rho[5] = Some(2000.0);
    vp[400] = Some(1500.0);
    vs[400] = Some(0.0); // fluid
    rho[400] = Some(1030.0);
    RandomLog { depth, vp, vs, rho }
}

fn usable(vp: Option<f64>, vs: Option<f64>, rho: Option<f64>) -> Option<(f64, f64, f64)> {
    let (p, s, r) = (vp?, vs?, rho?);
    (p.is_finite()
        && s.is_finite()
        && r.is_finite()
        && p > 0.0
        && s >= 0.0
        && r > 0.0
        && 3.0 * p * p > 4.0 * s * s)
        .then_some((p, s, r))
}

/// The documented definition, computed window by window with backus_average
/// (O(n w)): cells half-way between samples, overlap lengths as thicknesses,
/// window ends snapped onto cell boundaries within SNAP_TOLERANCE_M.
fn direct(
    log: &RandomLog,
    length: f64,
    edges: EdgePolicy,
    min_coverage: f64,
) -> Vec<Option<VtiStiffness>> {
    let n = log.depth.len();
    let d = &log.depth;
    let mut e = vec![d[0] - 0.5 * (d[1] - d[0])];
    for k in 1..n {
        e.push(0.5 * (d[k - 1] + d[k]));
    }
    e.push(d[n - 1] + 0.5 * (d[n - 1] - d[n - 2]));
    let snap = |x: f64| -> f64 {
        for &b in &e {
            if (x - b).abs() < SNAP_TOLERANCE_M {
                return b;
            }
        }
        x
    };
    (0..n)
        .map(|i| {
            let (mut a, mut b) = (d[i] - 0.5 * length, d[i] + 0.5 * length);
            match edges {
                EdgePolicy::Missing => {
                    if a < e[0] - SNAP_TOLERANCE_M || b > e[n] + SNAP_TOLERANCE_M {
                        return None;
                    }
                    a = a.max(e[0]);
                    b = b.min(e[n]);
                }
                EdgePolicy::Shrink => {
                    a = a.max(e[0]);
                    b = b.min(e[n]);
                }
                EdgePolicy::Extend => {}
            }
            let (a, b) = (snap(a), snap(b));
            let mut layers = Vec::new();
            for k in 0..n {
                // Extension: the end cells reach to infinity.
                let top = if k == 0 { f64::NEG_INFINITY } else { e[k] };
                let bot = if k == n - 1 { f64::INFINITY } else { e[k + 1] };
                let h = bot.min(b) - top.max(a);
                if h <= 0.0 {
                    continue;
                }
                if let Some((p, s, r)) = usable(log.vp[k], log.vs[k], log.rho[k]) {
                    layers.push(layer(p, s, r, h));
                }
            }
            let covered: f64 = layers.iter().map(|l| l.thickness).sum();
            if covered <= 0.0 || covered / (b - a) < min_coverage * (1.0 - 1e-9) {
                return None;
            }
            Some(backus_average(&layers).unwrap())
        })
        .collect()
}

/// Check 5. The O(n) moving window equals the direct per-window backus_average on
/// a random irregular log with nulls (all three edge policies, a window that
/// does not line up with the samples), to 1e-9 relative in the stiffnesses and
/// 1e-9 in epsilon, delta, gamma (absolute below 1, relative above).
#[test]
fn moving_window_equals_direct() {
    let log = random_log(7, 900);
    let mut worst_c = 0.0f64;
    let mut worst_t = 0.0f64;
    let mut compared = 0;
    for (length, edges, cov) in [
        (3.7, EdgePolicy::Missing, 0.8),
        (3.7, EdgePolicy::Shrink, 0.8),
        (3.7, EdgePolicy::Extend, 0.8),
        (11.03, EdgePolicy::Missing, 0.5),
        (0.11, EdgePolicy::Extend, 1.0), // shorter than most cells
    ] {
        let mut opts = BackusLogOptions::new(WindowLength::Metres(length));
        opts.edges = edges;
        opts.min_coverage = cov;
        let fast = backus_log("W-2", &log.depth, &log.vp, &log.vs, &log.rho, &opts).unwrap();
        assert_eq!(fast.rejected, vec![50, 51]);
        assert_eq!(fast.window_length, length);
        let slow = direct(&log, length, edges, cov);
        let mut some = 0;
        for (i, (f, s)) in fast.samples.iter().zip(&slow).enumerate() {
            assert_eq!(f.is_some(), s.is_some(), "L {length} {edges:?}: sample {i}");
            let (Some(f), Some(s)) = (f, s) else { continue };
            some += 1;
            for (x, y) in [
                (f.stiffness.c11, s.c11),
                (f.stiffness.c13, s.c13),
                (f.stiffness.c33, s.c33),
                (f.stiffness.c44, s.c44),
                (f.stiffness.c66, s.c66),
                (f.stiffness.rho, s.rho),
            ] {
                worst_c = worst_c.max(rel(x, y));
            }
            let t = thomsen_from_stiffness(s);
            for (x, y) in [
                (f.thomsen.epsilon, t.epsilon),
                (f.thomsen.delta, t.delta),
                (f.thomsen.gamma, t.gamma),
            ] {
                if y.is_infinite() {
                    assert_eq!(x, y, "sample {i}");
                } else {
                    // Absolute for values below 1, relative above (gamma is
                    // huge in windows holding the very slow sample).
                    worst_t = worst_t.max((x - y).abs() / y.abs().max(1.0));
                }
            }
        }
        assert!(
            some > 100,
            "L {length} {edges:?}: only {some} samples with values"
        );
        compared += some;
    }
    eprintln!("compared {compared} windows: max rel stiffness diff {worst_c:e}, max Thomsen diff {worst_t:e}");
    assert!(worst_c <= 1e-9, "stiffness differs by {worst_c:e}");
    assert!(worst_t <= 1e-9, "Thomsen parameter differs by {worst_t:e}");
}

/// Coverage rule and edge policies on a regular 1 m log: the 10 m window
/// [z-5, z+5] holds 9 whole cells and two half cells; with 2 whole cells missing
/// 80% is covered (kept), with 3 missing 70% (None).
#[test]
fn coverage_and_edges() {
    let n = 60;
    let depth: Vec<f64> = (0..n).map(|k| 500.0 + k as f64).collect();
    let vp: Vec<Option<f64>> = (0..n)
        .map(|k| Some(2500.0 + 40.0 * (k % 7) as f64))
        .collect();
    let vs: Vec<Option<f64>> = (0..n)
        .map(|k| Some(1200.0 + 30.0 * (k % 5) as f64))
        .collect();
    let mut rho: Vec<Option<f64>> = vec![Some(2300.0); n];
    rho[28] = None;
    rho[30] = None;
    let opts = BackusLogOptions::new(WindowLength::Metres(10.0));
    let log = backus_log("W-3", &depth, &vp, &vs, &rho, &opts).unwrap();
    let s = log.samples[29].unwrap();
    close(s.coverage, 0.8, 1e-12, "coverage");
    rho[32] = None;
    let log = backus_log("W-3", &depth, &vp, &vs, &rho, &opts).unwrap();
    assert!(log.samples[29].is_none());
    // Sample 31's window [26, 36] misses cells 28, 30, 32: 70%.
    assert!(log.samples[31].is_none());

    // Ends: with Missing the first and last 5 samples have no full window; sample
    // 5's window [500, 510] starts inside the log (top 499.5), sample 54's
    // [549, 559] ends inside it (bottom 559.5).
    let rho = vec![Some(2300.0); n];
    let log = backus_log("W-3", &depth, &vp, &vs, &rho, &opts).unwrap();
    let have: Vec<bool> = log.samples.iter().map(|s| s.is_some()).collect();
    for (k, h) in have.iter().enumerate() {
        assert_eq!(*h, (5..n - 5).contains(&k), "sample {k}");
    }
    let mut shrink = opts;
    shrink.edges = EdgePolicy::Shrink;
    let log = backus_log("W-3", &depth, &vp, &vs, &rho, &shrink).unwrap();
    assert!(log.samples.iter().all(|s| s.is_some()));
    // Sample 0 with Shrink: the window is [499.5, 505], cells 0..4 and half of 5.
    let mut layers: Vec<IsoLayer> = (0..5)
        .map(|k| layer(vp[k].unwrap(), vs[k].unwrap(), 2300.0, 1.0))
        .collect();
    layers.push(layer(vp[5].unwrap(), vs[5].unwrap(), 2300.0, 0.5));
    assert_stiffness_close(
        &log.samples[0].unwrap().stiffness,
        &backus_average(&layers).unwrap(),
        1e-12,
        "shrunk window",
    );
}

/// Check 7. Backus number (Liner and Fei 2007): L = B Vs_min / f. Worked number:
/// B = 0.3, Vs_min = 1100 m/s, f = 25 Hz gives L = 0.3 * 1100 / 25 = 13.2 m
/// (and back: B = 25 * 13.2 / 1100 = 0.3). Vs_min is the minimum over the log.
#[test]
fn backus_number_window() {
    close(
        window_from_backus_number(0.3, 1100.0, 25.0).unwrap(),
        13.2,
        1e-12,
        "L",
    );
    assert!(window_from_backus_number(0.3, 0.0, 25.0).is_err());
    assert!(window_from_backus_number(0.3, 1100.0, -5.0).is_err());

    let n = 400;
    let depth: Vec<f64> = (0..n).map(|k| 1200.0 + 0.25 * k as f64).collect();
    let vp: Vec<Option<f64>> = (0..n)
        .map(|k| Some(2600.0 + 900.0 * ((k as f64) / 23.0).sin()))
        .collect();
    let mut vs: Vec<Option<f64>> = (0..n)
        .map(|k| Some(1300.0 + 150.0 * ((k as f64) / 17.0).cos()))
        .collect();
    vs[123] = Some(1100.0); // the minimum
    vs[124] = None;
    vs[300] = Some(0.0); // a fluid sample does not set Vs_min
    let rho = vec![Some(2350.0); n];
    let by_b = BackusLogOptions::new(WindowLength::BackusNumber {
        b: 0.3,
        frequency_hz: 25.0,
    });
    let log = backus_log("W-4", &depth, &vp, &vs, &rho, &by_b).unwrap();
    assert_eq!(log.vs_min, Some(1100.0));
    close(log.window_length, 13.2, 1e-12, "window length");
    let by_m = backus_log(
        "W-4",
        &depth,
        &vp,
        &vs,
        &rho,
        &BackusLogOptions::new(WindowLength::Metres(log.window_length)),
    )
    .unwrap();
    assert_eq!(by_m.vs_min, None);
    assert_eq!(log.samples, by_m.samples);
    // The fluid sample makes C44 = 0 in every window holding its cell.
    let fluid: Vec<usize> = (0..n)
        .filter(|&k| log.samples[k].is_some_and(|s| s.stiffness.c44 == 0.0))
        .collect();
    assert_eq!(fluid.first(), Some(&(300 - 26)));
    assert_eq!(fluid.last(), Some(&(300 + 26)));
}

#[test]
fn backus_log_errors() {
    let depth = [1.0, 2.0, 3.0];
    let v = [Some(3000.0); 3];
    let s = [Some(1500.0); 3];
    let r = [Some(2400.0); 3];
    let opts = BackusLogOptions::new(WindowLength::Metres(2.0));
    let msg = |res: stratiprior::Result<BackusLog>| match res {
        Err(Error::Inconsistent(m)) => m,
        other => panic!("expected an error, got {other:?}"),
    };
    let m = msg(backus_log("W-9", &depth, &v[..2], &s, &r, &opts));
    assert!(m.contains("W-9") && m.contains("same length"), "{m}");
    let m = msg(backus_log("W-9", &[1.0, 3.0, 2.0], &v, &s, &r, &opts));
    assert!(
        m.contains("strictly increasing") && m.contains("samples 1 and 2"),
        "{m}"
    );
    let m = msg(backus_log(
        "W-9",
        &depth[..1],
        &v[..1],
        &s[..1],
        &r[..1],
        &opts,
    ));
    assert!(m.contains("at least two"), "{m}");
    let mut bad = opts;
    bad.min_coverage = 0.0;
    assert!(msg(backus_log("W-9", &depth, &v, &s, &r, &bad)).contains("coverage"));
    bad = BackusLogOptions::new(WindowLength::Metres(f64::NAN));
    assert!(msg(backus_log("W-9", &depth, &v, &s, &r, &bad)).contains("window length"));
    bad = BackusLogOptions::new(WindowLength::BackusNumber {
        b: 0.3,
        frequency_hz: 30.0,
    });
    let m = msg(backus_log("W-9", &depth, &v, &[None; 3], &r, &bad));
    assert!(m.contains("minimum Vs"), "{m}");
    bad = BackusLogOptions::new(WindowLength::BackusNumber {
        b: 0.3,
        frequency_hz: 0.0,
    });
    assert!(msg(backus_log("W-9", &depth, &v, &s, &r, &bad)).contains("frequency"));
}
