//! Throughput of the SEG-Y writer and reader.
//!
//! Procedure: `cargo run --release --example segy_write_bench -- [INLINES XLINES SAMPLES [DIR]]`
//! (defaults 200 200 500, the system temp folder). Writes a synthetic volume
//! trace by trace with `SegyWriter`, reads it back with `read_volume_on_grid`,
//! and prints the file size, the times and MB/s. The file is removed afterwards.
//! Numbers depend on the disk and its cache; run twice and take the second.

use std::time::Instant;
use stratiprior::formats::segy::{read_volume_on_grid, SegyWriter, VolumeMeta};
use stratiprior::SurveyGrid;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let num = |k: usize, d: usize| -> Result<usize, Box<dyn std::error::Error>> {
        Ok(match args.get(k) {
            Some(s) => s.parse()?,
            None => d,
        })
    };
    let (ni, nj, nz) = (num(0, 200)?, num(1, 200)?, num(2, 500)?);
    let dir = args
        .get(3)
        .map(std::path::PathBuf::from)
        .unwrap_or_else(std::env::temp_dir);
    let grid = SurveyGrid {
        x0: 450000.0,
        y0: 6700000.0,
        azimuth: 30.0,
        inline_spacing: 25.0,
        xline_spacing: 12.5,
        inline_first: 1,
        inline_count: ni,
        xline_first: 1,
        xline_count: nj,
        z0: 0.0,
        dz: 4.0,
        z_count: nz,
    };
    let meta = VolumeMeta {
        property: "vp0".into(),
        statistic: "mean".into(),
        unit: "m/s".into(),
        notes: vec!["throughput test".into()],
    };
    let path = dir.join(format!("stratiprior-bench-{}.sgy", std::process::id()));
    let mut trace = vec![0f32; nz];
    let t = Instant::now();
    let mut w = SegyWriter::create(&path, &grid, &meta)?;
    for n in 0..grid.trace_count() {
        for (k, v) in trace.iter_mut().enumerate() {
            *v = 1500.0 + (n % 97) as f32 + k as f32;
        }
        w.write_trace(&trace)?;
    }
    w.finish()?;
    let tw = t.elapsed().as_secs_f64();
    let bytes = std::fs::metadata(&path)?.len() as f64;
    let t = Instant::now();
    let v = read_volume_on_grid(&path, &grid)?;
    let tr = t.elapsed().as_secs_f64();
    std::fs::remove_file(&path)?;
    let mb = bytes / 1e6;
    println!(
        "{} traces x {nz} samples, {mb:.1} MB: write {tw:.3} s ({:.0} MB/s), read on grid {tr:.3} s ({:.0} MB/s), {} values",
        grid.trace_count(),
        mb / tw,
        mb / tr,
        v.len()
    );
    Ok(())
}
