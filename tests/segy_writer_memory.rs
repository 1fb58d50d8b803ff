//! The SEG-Y writer streams: its memory does not grow with the volume.
//!
//! This test binary counts heap bytes with its own global allocator, writes a
//! 20 MB volume trace by trace, and checks that the peak extra heap stays far
//! below the size of the volume (a writer that buffered the volume would need
//! 10 MB of samples alone). Only one test lives in this binary so no other
//! thread allocates meanwhile.

use std::alloc::{GlobalAlloc, Layout, System};
use std::sync::atomic::{AtomicUsize, Ordering};
use stratiprior::formats::segy::{SegyWriter, VolumeMeta};
use stratiprior::SurveyGrid;

struct Counting;
static CURRENT: AtomicUsize = AtomicUsize::new(0);
static PEAK: AtomicUsize = AtomicUsize::new(0);

unsafe impl GlobalAlloc for Counting {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        let p = System.alloc(layout);
        if !p.is_null() {
            let now = CURRENT.fetch_add(layout.size(), Ordering::SeqCst) + layout.size();
            PEAK.fetch_max(now, Ordering::SeqCst);
        }
        p
    }
    unsafe fn dealloc(&self, ptr: *mut u8, layout: Layout) {
        System.dealloc(ptr, layout);
        CURRENT.fetch_sub(layout.size(), Ordering::SeqCst);
    }
}

#[global_allocator]
static ALLOC: Counting = Counting;

#[test]
fn writer_memory_is_constant_and_file_size_exact() {
    let grid = SurveyGrid {
        x0: 500000.0,
        y0: 6000000.0,
        azimuth: 15.0,
        inline_spacing: 25.0,
        xline_spacing: 25.0,
        inline_first: 1,
        inline_count: 200,
        xline_first: 1,
        xline_count: 200,
        z0: 0.0,
        dz: 10.0,
        z_count: 64,
    };
    let meta = VolumeMeta {
        property: "vp0".into(),
        statistic: "mean".into(),
        unit: "m/s".into(),
        notes: vec![],
    };
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("big.sgy");
    let mut trace = vec![0f32; grid.z_count];

    let base = CURRENT.load(Ordering::SeqCst);
    PEAK.store(base, Ordering::SeqCst);
    let mut w = SegyWriter::create(&path, &grid, &meta).unwrap();
    for n in 0..grid.trace_count() {
        for (k, v) in trace.iter_mut().enumerate() {
            *v = (n * 7 + k) as f32;
        }
        w.write_trace(&trace).unwrap();
    }
    assert!(
        w.write_trace(&trace).is_err(),
        "one trace too many must fail"
    );
    w.finish().unwrap();
    let peak = PEAK.load(Ordering::SeqCst) - base;

    let volume_bytes = grid.trace_count() * grid.z_count * 4;
    // 64 KiB write buffer + one trace + headers; allow 512 KiB
    assert!(
        peak < 512 * 1024,
        "writer peak heap {peak} bytes for a {volume_bytes}-byte volume"
    );
    // SEG-Y rev 1: 3200 + 400 header bytes, then 240 + 4 * ns per trace
    let size = std::fs::metadata(&path).unwrap().len() as usize;
    assert_eq!(size, 3600 + grid.trace_count() * (240 + 4 * grid.z_count));
}
