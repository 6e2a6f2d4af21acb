//! Bench: a hostile catalogue — one ephemeris and one position copied 450
//! times on each of 1,000 stars (450,000 rows) — through `starsift odds`,
//! with the wall time and the peak memory of the process. Targets: ≤ 5 s
//! and ≤ 500 MB. Peak memory is read with GNU time (`/usr/bin/time`) when
//! it is installed.
//!
//! Run: `cargo bench --bench hostile` (writes bench-data/hostile/ on first use).

use std::io::Write;
use std::process::Command;
use std::time::Instant;

fn main() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("bench-data/hostile");
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("copies.csv");
    if !path.exists() {
        let mut f = std::io::BufWriter::new(std::fs::File::create(&path).unwrap());
        writeln!(f, "star,candidate,period_d,epoch,depth_ppm,duration_h,snr,star_radius_rsun,star_mass_msun,ra_deg,dec_deg").unwrap();
        for s in 0..1000 {
            for j in 0..450 {
                writeln!(f, "S{s},S{s}-{j},3.3,100.1,500,2.5,20,1,1,10.0,20.0").unwrap();
            }
        }
    }
    let bin = env!("CARGO_BIN_EXE_starsift");
    let args = [
        "odds",
        path.to_str().unwrap(),
        "--targets",
        "100000",
        "--format",
        "csv",
    ];
    let gnu_time = std::path::Path::new("/usr/bin/time").exists();
    let start = Instant::now();
    let out = if gnu_time {
        Command::new("/usr/bin/time")
            .arg("-f")
            .arg("%M")
            .arg(bin)
            .args(args)
            .output()
    } else {
        Command::new(bin).args(args).output()
    }
    .expect("run starsift");
    let secs = start.elapsed().as_secs_f64();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let peak = if gnu_time {
        String::from_utf8_lossy(&out.stderr)
            .lines()
            .last()
            .and_then(|l| l.trim().parse::<f64>().ok())
            .map_or("unknown".into(), |kb| format!("{:.0} MB", kb / 1024.0))
    } else {
        "unknown (no /usr/bin/time)".into()
    };
    println!(
        "hostile catalogue, 450 copies × 1,000 stars, starsift odds: {secs:.2} s, peak memory {peak}; targets ≤ 5 s, ≤ 500 MB"
    );
}
