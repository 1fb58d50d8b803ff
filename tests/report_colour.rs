//! The report's colour scale against matplotlib 3.10.9 (PyPI), which implements
//! Green (2011), "A colour scheme for the display of astronomical intensity
//! images", Bull. Astr. Soc. India 39, 289-295, equation 2; and the scale's
//! greyscale property (luminance rising with the value).
//!
//! Reference values: `tests/reference/cubehelix_matplotlib.py` (live with
//! `STRATIPRIOR_PYTHON`; else the committed golden file, see `tests/pyref`).

mod pyref;

use pyref::{arr, load};
use stratiprior::report::colour::{luminance, Cubehelix, REPORT_SCALE};

#[test]
fn cubehelix_matches_matplotlib() {
    let golden = pyref::repo("tests/golden/report/cubehelix_matplotlib.json");
    let v = pyref::live("cubehelix_matplotlib.py", "matplotlib and numpy", &golden)
        .unwrap_or_else(|| load(&golden));
    let cases = v["cases"].as_array().unwrap();
    assert_eq!(cases.len(), 2);
    for c in cases {
        let s = Cubehelix {
            start: c["start"].as_f64().unwrap(),
            rotations: c["rotations"].as_f64().unwrap(),
            hue: c["hue"].as_f64().unwrap(),
            gamma: c["gamma"].as_f64().unwrap(),
            lightness_low: c["lightness_low"].as_f64().unwrap(),
            lightness_high: c["lightness_high"].as_f64().unwrap(),
        };
        if c["name"] == "report" {
            assert_eq!(
                s, REPORT_SCALE,
                "the reference case is not the report's scale"
            );
        }
        let f = arr(&c["f"]);
        let rgb = c["rgb"].as_array().unwrap();
        for (x, want) in f.iter().zip(rgb) {
            let want = arr(want);
            let got = s.rgb(*x);
            for k in 0..3 {
                // matplotlib's channel functions are not clipped; the scale clips to [0, 1]
                let w = want[k].clamp(0.0, 1.0);
                assert!(
                    (got[k] - w).abs() < 1e-12,
                    "{} f={x} channel {k}: {} vs {w}",
                    c["name"],
                    got[k]
                );
            }
        }
    }
}

#[test]
fn report_scale_reads_in_greyscale() {
    // luminance (Green's weights 0.30, 0.59, 0.11) strictly rises, and also
    // with the Rec. 709 weights 0.2126, 0.7152, 0.0722 (ITU-R BT.709) on the
    // 8-bit colours the SVGs carry
    let mut prev = (-1.0, -1.0);
    for i in 0..=255 {
        let f = f64::from(i) / 255.0;
        let y = luminance(REPORT_SCALE.rgb(f));
        let c = REPORT_SCALE.rgb8(f).map(|v| f64::from(v) / 255.0);
        let y709 = 0.2126 * c[0] + 0.7152 * c[1] + 0.0722 * c[2];
        assert!(y > prev.0, "Green luminance falls at {i}");
        assert!(
            y709 >= prev.1 - 2e-3,
            "Rec. 709 luminance falls at {i}: {y709} after {}",
            prev.1
        );
        prev = (y, y709);
    }
    // a usable range: dark at the low end, light at the high end
    assert!(luminance(REPORT_SCALE.rgb(0.0)) < 0.2);
    assert!(luminance(REPORT_SCALE.rgb(1.0)) > 0.85);
}
