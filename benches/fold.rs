//! Bench: fold and bin a 1,500,000-point light curve (mean, weighted mean
//! and median of 200 bins) against a plain single-threaded loop doing the
//! same in the same run, and the whole `starsift fold` process on a ~48 MB
//! CSV light curve against a plain csv-crate load plus that loop.
//!
//! Run: `cargo bench --bench fold` (writes bench-data/fold/ on first use).

use std::io::Write;
use std::process::Command;
use std::time::Instant;

use starsift::lightcurve::analysis::fold_bin;

const N: usize = 1_500_000;
const BINS: usize = 200;
const PERIOD: f64 = 3.7;
const EPOCH: f64 = 1.3;

/// The plain loop: phase, bin index, sums, then per-bin medians by sorting
/// per-bin vectors.
fn plain(t: &[f64], f: &[f64], e: &[f64]) -> (Vec<f64>, Vec<f64>, Vec<f64>) {
    let mut sum = vec![0.0; BINS];
    let mut n = vec![0usize; BINS];
    let mut ws = vec![0.0; BINS];
    let mut wf = vec![0.0; BINS];
    let mut per: Vec<Vec<f64>> = vec![Vec::new(); BINS];
    for i in 0..t.len() {
        let x = (t[i] - EPOCH) / PERIOD + 0.5;
        let ph = x - x.floor() - 0.5;
        let b = (((ph + 0.5) * BINS as f64) as usize).min(BINS - 1);
        sum[b] += f[i];
        n[b] += 1;
        let w = 1.0 / (e[i] * e[i]);
        ws[b] += w;
        wf[b] += w * f[i];
        per[b].push(f[i]);
    }
    let med = per
        .iter_mut()
        .map(|v| {
            let m = v.len() / 2;
            *v.select_nth_unstable_by(m, f64::total_cmp).1
        })
        .collect();
    (
        (0..BINS).map(|b| sum[b] / n[b] as f64).collect(),
        (0..BINS).map(|b| wf[b] / ws[b]).collect(),
        med,
    )
}

fn best(runs: usize, mut f: impl FnMut()) -> f64 {
    (0..runs)
        .map(|_| {
            let t = Instant::now();
            f();
            t.elapsed().as_secs_f64()
        })
        .fold(f64::INFINITY, f64::min)
}

fn main() {
    let mut rng = starsift::demo::Rng::new(5);
    let t: Vec<f64> = (0..N).map(|i| i as f64 * 2.0 / 1440.0).collect();
    let f: Vec<f64> = (0..N).map(|_| 1.0 + 3e-4 * rng.normal()).collect();
    let e = vec![3e-4; N];
    let p = best(15, || {
        std::hint::black_box(plain(&t, &f, &e));
    });
    let s = best(15, || {
        std::hint::black_box(fold_bin(
            &t,
            &f,
            &e,
            None,
            PERIOD,
            EPOCH,
            0.0,
            (-0.5, 0.5),
            BINS,
        ));
    });
    println!("fold+bin of {N} points into {BINS} bins (mean, weighted mean, median):");
    println!("  plain single-threaded loop  {:.1} ms", p * 1e3);
    println!(
        "  starsift fold_bin           {:.1} ms  = {:.2}x the plain loop",
        s * 1e3,
        s / p
    );

    // The whole command on a CSV light curve.
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let dir = root.join("bench-data/fold");
    std::fs::create_dir_all(&dir).expect("bench-data/fold");
    let lc = dir.join("BENCH1.csv");
    if !lc.exists() {
        let mut w = std::io::BufWriter::new(std::fs::File::create(&lc).expect("create"));
        writeln!(w, "time,flux,flux_err").expect("write");
        for i in 0..N {
            writeln!(w, "{:.6},{:.7},{:.7}", t[i], f[i], e[i]).expect("write");
        }
    }
    let cat = dir.join("cat.csv");
    std::fs::write(&cat, format!("star,candidate,period_d,epoch,depth_ppm,duration_h\nBENCH1,BENCH1-1,{PERIOD},{EPOCH},500,2.5\n"))
        .expect("catalogue");
    let size = std::fs::metadata(&lc).map(|m| m.len()).unwrap_or(0);
    let base = best(3, || {
        let mut rdr = csv::Reader::from_path(&lc).expect("open");
        let (mut tt, mut ff, mut ee) = (Vec::new(), Vec::new(), Vec::new());
        let mut rec = csv::ByteRecord::new();
        while rdr.read_byte_record(&mut rec).expect("read") {
            let num = |i: usize| {
                std::str::from_utf8(&rec[i])
                    .ok()
                    .and_then(|s| s.parse::<f64>().ok())
                    .unwrap_or(f64::NAN)
            };
            tt.push(num(0));
            ff.push(num(1));
            ee.push(num(2));
        }
        std::hint::black_box(plain(&tt, &ff, &ee));
    });
    println!("load + fold of a {:.0} MB CSV:", size as f64 / 1e6);
    println!("  plain csv-crate load + loop {:.3} s", base);
    let bin = root.join("target/release/starsift");
    if bin.exists() {
        let whole = best(3, || {
            let o = Command::new(&bin)
                .args([
                    "fold",
                    cat.to_str().expect("utf-8"),
                    "--candidate",
                    "BENCH1-1",
                    "--lightcurves",
                    dir.to_str().expect("utf-8"),
                    "--format",
                    "csv",
                    "--no-detrend",
                ])
                .output()
                .expect("run");
            assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        });
        println!(
            "  whole `starsift fold --no-detrend` process {:.3} s = {:.2}x",
            whole,
            whole / base
        );
        let whole = best(3, || {
            let o = Command::new(&bin)
                .args([
                    "fold",
                    cat.to_str().expect("utf-8"),
                    "--candidate",
                    "BENCH1-1",
                    "--lightcurves",
                    dir.to_str().expect("utf-8"),
                    "--format",
                    "csv",
                ])
                .output()
                .expect("run");
            assert!(o.status.success());
        });
        println!(
            "  whole `starsift fold` process, detrended {:.3} s (diagnostics included)",
            whole
        );
    }
}
