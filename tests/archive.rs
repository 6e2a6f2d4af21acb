//! Light curves as archives deliver them, through the built binary: several
//! FITS files per star (one per observing segment, each at its own flux
//! level), TIME counted from BJDREFI + BJDREFF, float32 fluxes (corrected and
//! aperture), a QUALITY column whose non-zero samples are corrupt, missing
//! values, gzip. Stars and ids are invented.

mod common;

use std::path::{Path, PathBuf};

use common::{scratch, starsift, stderr, stdout};
use starsift::lightcurve::{ArchiveSegment, write_archive_segment};

const BJDREFI: i64 = 2_457_000;
const PERIOD: f64 = 3.1;
const DURATION_H: f64 = 3.0;
const DEPTH: f64 = 1.5e-3;
/// The transit epoch in full BJD.
const EPOCH_BJD: f64 = 2_458_601.3;

/// One segment: 10-minute cadence from `t0` (days from BJDREFI) for `days`,
/// at flux level `level`, with a box transit, white noise of 300 ppm,
/// every 37th sample flagged (and made a wild outlier), every 101st a NaN.
/// The aperture flux carries a steep trend the corrected one does not.
/// Returns the segment and its count of good samples.
fn segment(seed: u64, t0: f64, days: f64, level: f32) -> (ArchiveSegment, usize) {
    let mut rng = starsift::demo::Rng::new(seed);
    let n = (days * 144.0) as usize;
    let mut s = ArchiveSegment {
        bjdref: (BJDREFI, 0.0),
        ..ArchiveSegment::default()
    };
    let mut good = 0;
    for i in 0..n {
        let t = t0 + i as f64 / 144.0;
        let bjd = t + BJDREFI as f64;
        let phase = ((bjd - EPOCH_BJD) / PERIOD + 0.5).rem_euclid(1.0) - 0.5;
        let dip = if (phase * PERIOD * 24.0).abs() < DURATION_H / 2.0 {
            DEPTH
        } else {
            0.0
        };
        let mut flux = level as f64 * (1.0 - dip + 3e-4 * rng.normal());
        let mut quality = 0;
        if i % 37 == 5 {
            quality = 1 << (i % 12);
            flux *= 1.4;
        }
        if i % 101 == 7 {
            flux = f64::NAN;
        }
        if quality == 0 && flux.is_finite() {
            good += 1;
        }
        s.time.push(t);
        s.pdcsap_flux.push(flux as f32);
        s.pdcsap_flux_err.push(level * 3e-4);
        s.sap_flux.push((flux * (1.0 + 0.02 * (t - t0))) as f32);
        s.quality.push(quality);
    }
    (s, good)
}

/// Three segments of star ARC-1: two as `DIR/ARC-1_<part>.fits`, one gzipped
/// in `DIR/ARC-1/`. Returns the folder and the good-sample count.
fn archive(d: &Path) -> (PathBuf, usize) {
    let dir = d.join("lc");
    std::fs::create_dir_all(dir.join("ARC-1")).unwrap();
    let mut good = 0;
    let parts = [
        (1, 1590.0, 25.0, 11_800.0_f32, dir.join("ARC-1_s01.fits")),
        (2, 1618.0, 24.0, 8_300.0, dir.join("ARC-1_s02.fits")),
        (
            3,
            1700.0,
            25.0,
            14_900.0,
            dir.join("ARC-1").join("s05.fits"),
        ),
    ];
    for (seed, t0, days, level, path) in parts {
        let (s, g) = segment(seed, t0, days, level);
        write_archive_segment(&path, &s).unwrap();
        good += g;
    }
    gzip(&dir.join("ARC-1").join("s05.fits"));
    (dir, good)
}

fn gzip(p: &Path) {
    use std::io::Write;
    let bytes = std::fs::read(p).unwrap();
    let mut gz = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::fast());
    gz.write_all(&bytes).unwrap();
    std::fs::write(p.with_extension("fits.gz"), gz.finish().unwrap()).unwrap();
    std::fs::remove_file(p).unwrap();
}

fn catalogue(d: &Path, epoch: f64) -> PathBuf {
    let p = d.join("cat.csv");
    std::fs::write(
        &p,
        format!(
            "star,candidate,period_d,epoch,depth_ppm,duration_h,star_radius_rsun,star_mass_msun\n\
             ARC-1,ARC-1.01,{PERIOD},{epoch},{},{DURATION_H},1.0,1.0\n",
            DEPTH * 1e6
        ),
    )
    .unwrap();
    p
}

/// `fold` of ARC-1.01 with its light curves in `dir`, and `extra` options.
fn fold(cat: &Path, dir: &Path, extra: &[&str]) -> std::process::Output {
    let mut args = vec![
        "fold",
        cat.to_str().unwrap(),
        "--lightcurves",
        dir.to_str().unwrap(),
        "--candidate",
        "ARC-1.01",
    ];
    args.extend_from_slice(extra);
    starsift(&args)
}

fn fold_csv(cat: &Path, dir: &Path, extra: &[&str]) -> Vec<(f64, f64, f64, u64)> {
    let mut args = vec!["--format", "csv"];
    args.extend_from_slice(extra);
    let o = fold(cat, dir, &args);
    assert!(o.status.success(), "{}", stderr(&o));
    let mut r = csv::Reader::from_reader(o.stdout.as_slice());
    let h = r.headers().unwrap().clone();
    let at = |n: &str| h.iter().position(|x| x == n).unwrap();
    let (p, f, e, c) = (at("phase"), at("flux"), at("flux_err"), at("count"));
    r.records()
        .map(|rec| {
            let rec = rec.unwrap();
            let num = |i: usize| rec[i].parse::<f64>().unwrap_or(f64::NAN);
            (num(p), num(f), num(e), rec[c].parse().unwrap())
        })
        .collect()
}

/// The depth of the bins wholly inside the transit, with its error.
fn depth_of(bins: &[(f64, f64, f64, u64)]) -> (f64, f64) {
    let half = 0.4 * DURATION_H / 24.0 / PERIOD;
    let inside: Vec<_> = bins
        .iter()
        .filter(|b| b.0.abs() < half && b.3 > 0)
        .collect();
    assert!(inside.len() >= 3, "{inside:?}");
    let w: f64 = inside.iter().map(|b| 1.0 / (b.2 * b.2)).sum();
    let mean = inside.iter().map(|b| b.1 / (b.2 * b.2)).sum::<f64>() / w;
    (1.0 - mean, w.sqrt().recip())
}

#[test]
fn segmented_fits_fold_with_every_good_sample_and_recover_the_depth() {
    let d = scratch("archive-fold");
    let (dir, good) = archive(&d);
    // The catalogue in full BJD: the headers' BJDREFI makes the times match.
    let cat = catalogue(&d, EPOCH_BJD);
    let bins = fold_csv(&cat, &dir, &[]);
    let folded: u64 = bins.iter().map(|b| b.3).sum();
    assert_eq!(folded as usize, good, "every good sample, no flagged one");
    let (depth, err) = depth_of(&bins);
    assert!(
        (depth - DEPTH).abs() < 4.0 * err,
        "depth {depth} ± {err}, injected {DEPTH}"
    );
    // The table says how many segments and samples, and what was dropped.
    let o = fold(&cat, &dir, &["--format", "json"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let lc = &v["lightcurve"];
    assert_eq!(lc["segments"].as_array().unwrap().len(), 3);
    assert_eq!(lc["samples"], good);
    assert!(lc["dropped_quality"].as_u64().unwrap() > 0);
    assert_eq!(lc["time_zero"], BJDREFI as f64);
    assert!(
        lc["segments"][0]["columns"]
            .as_str()
            .unwrap()
            .contains("PDCSAP_FLUX"),
        "the corrected flux is preferred: {}",
        lc["segments"][0]
    );
    // summary counts the same segments and samples.
    let o = starsift(&[
        "summary",
        cat.to_str().unwrap(),
        "--lightcurves",
        dir.to_str().unwrap(),
        "--format",
        "json",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(s["lightcurves"]["totals"]["segments"], 3);
    assert_eq!(s["lightcurves"]["totals"]["samples"], good);
    // The diagnostics' own depth agrees.
    let dd = &v["diagnostics"]["depth_ppm"];
    let (m, e) = (dd["value"].as_f64().unwrap(), dd["err"].as_f64().unwrap());
    assert!((m - DEPTH * 1e6).abs() < 4.0 * e, "{m} ± {e}");
}

#[test]
fn epochs_counted_from_the_files_zero_fold_the_same() {
    let d = scratch("archive-btjd");
    let (dir, good) = archive(&d);
    // The catalogue in BJD − 2457000, as some archives list it: recognised
    // from the header's zero without an option.
    let cat = catalogue(&d, EPOCH_BJD - BJDREFI as f64);
    let bins = fold_csv(&cat, &dir, &[]);
    assert_eq!(bins.iter().map(|b| b.3).sum::<u64>() as usize, good);
    let (depth, err) = depth_of(&bins);
    assert!((depth - DEPTH).abs() < 4.0 * err, "{depth} ± {err}");
    // The same by hand: the epoch offset as a setting.
    let bins = fold_csv(&cat, &dir, &["--epoch-offset", "2457000"]);
    let (depth, err) = depth_of(&bins);
    assert!((depth - DEPTH).abs() < 4.0 * err, "{depth} ± {err}");
}

#[test]
fn the_quality_mask_keeps_the_bits_it_does_not_name() {
    let d = scratch("archive-mask");
    let (dir, good) = archive(&d);
    let cat = catalogue(&d, EPOCH_BJD);
    // Flags use bits 0..11; a mask of bit 0 only drops a twelfth of them.
    let bins = fold_csv(&cat, &dir, &["--quality-mask", "0x1"]);
    let folded = bins.iter().map(|b| b.3).sum::<u64>() as usize;
    assert!(folded > good, "{folded} vs {good}");
}

#[test]
fn damaged_fits_and_wrong_hdus_name_the_file() {
    let d = scratch("archive-bad");
    let (dir, _) = archive(&d);
    let cat = catalogue(&d, EPOCH_BJD);
    // --hdu 2 is the aperture image.
    let o = fold(&cat, &dir, &["--hdu", "2"]);
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    let e = stderr(&o);
    assert!(e.contains("ARC-1_s01.fits") && e.contains("HDU 2"), "{e}");
    // A truncated file.
    let p = dir.join("ARC-1_s02.fits");
    let bytes = std::fs::read(&p).unwrap();
    std::fs::write(&p, &bytes[..bytes.len() / 3]).unwrap();
    let o = fold(&cat, &dir, &[]);
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(stderr(&o).contains("ARC-1_s02.fits"), "{}", stderr(&o));
    assert!(stdout(&o).is_empty());
}
