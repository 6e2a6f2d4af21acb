//! Light curves through the built binary: CSV, gzip and FITS files written
//! here (invented stars), the demo's planted eclipsing binaries, and errors.

mod common;

use std::io::Write;

use common::{scratch, starsift, stderr, stdout};
use starsift::lightcurve::{LcColumns, LightCurve, write_fits};

/// An invented star with one transiting signal; returns the light curve as
/// (time, flux, err).
fn samples() -> (Vec<f64>, Vec<f64>, Vec<f64>) {
    let mut rng = starsift::demo::Rng::new(99);
    let (mut t, mut f, mut e) = (Vec::new(), Vec::new(), Vec::new());
    for i in 0..8000 {
        let ti = 10.0 + i as f64 / 48.0;
        let ph = ((ti - 11.0) / 3.5 + 0.5).rem_euclid(1.0) - 0.5;
        let dip = if (ph * 3.5 * 24.0).abs() < 1.2 {
            1.5e-3
        } else {
            0.0
        };
        t.push(ti);
        f.push(5000.0 * (1.0 - dip + 4e-4 * rng.normal()));
        e.push(2.0);
    }
    (t, f, e)
}

fn catalogue(dir: &std::path::Path) -> std::path::PathBuf {
    let p = dir.join("cat.csv");
    std::fs::write(
        &p,
        "star,candidate,period_d,epoch,depth_ppm,duration_h,star_radius_rsun,star_mass_msun\n\
         LCA,LCA-1,3.5,11.0,1500,2.4,1.0,1.0\nLCB,LCB-1,3.5,11.0,1500,2.4,1.0,1.0\nLCC,LCC-1,5.0,11.0,900,3.0,1.0,1.0\n",
    )
    .unwrap();
    p
}

#[test]
fn fits_written_here_reads_back_exactly() {
    let d = scratch("fits");
    let (t, f, e) = samples();
    let p = d.join("LCA.fits");
    write_fits(&p, &t, &f, &e).unwrap();
    let lc = LightCurve::read(&p, &LcColumns::default()).unwrap();
    assert_eq!(lc.time, t);
    let median = lc.normalised_by;
    for i in 0..t.len() {
        assert_eq!(lc.flux[i] * median, f[i] / median * median);
        assert!((lc.flux_err[i] - e[i] / median).abs() < 1e-18);
    }
    // A named extension and a column override.
    let cols = LcColumns {
        hdu: Some("LIGHTCURVE".into()),
        flux: Some("FLUX".into()),
        ..LcColumns::default()
    };
    assert_eq!(LightCurve::read(&p, &cols).unwrap().time.len(), t.len());
    let bad = LcColumns {
        flux: Some("SAP".into()),
        ..LcColumns::default()
    };
    let err = LightCurve::read(&p, &bad).unwrap_err().to_string();
    assert!(
        err.contains("no flux column") && err.contains("SAP") && err.contains("LCA.fits"),
        "{err}"
    );
    // The same file gzipped (by flate2 here) reads back the same.
    let gz = d.join("LCA.fits.gz");
    let mut enc = flate2::write::GzEncoder::new(
        std::fs::File::create(&gz).unwrap(),
        flate2::Compression::default(),
    );
    enc.write_all(&std::fs::read(&p).unwrap()).unwrap();
    enc.finish().unwrap();
    let from_gz = LightCurve::read(&gz, &LcColumns::default()).unwrap();
    let plain = LightCurve::read(&p, &LcColumns::default()).unwrap();
    assert_eq!(from_gz.time, plain.time);
    assert_eq!(from_gz.flux, plain.flux);
    assert_eq!(from_gz.flux_err, plain.flux_err);
}

#[test]
fn fold_reads_csv_gzip_and_fits_alike() {
    let d = scratch("fold");
    let cat = catalogue(&d);
    let lcs = d.join("lcs");
    std::fs::create_dir_all(&lcs).unwrap();
    let (t, f, e) = samples();
    let mut text = String::from("# invented\nTIME,FLUX,FLUX_ERR\n");
    for i in 0..t.len() {
        text.push_str(&format!("{},{},{}\n", t[i], f[i], e[i]));
    }
    text.push_str("30.0,nan,2\n");
    std::fs::write(lcs.join("LCA.csv"), &text).unwrap();
    let mut gz = flate2::write::GzEncoder::new(
        std::fs::File::create(lcs.join("LCB.csv.gz")).unwrap(),
        flate2::Compression::fast(),
    );
    gz.write_all(text.as_bytes()).unwrap();
    gz.finish().unwrap();
    write_fits(&lcs.join("LCC.fits"), &t, &f, &e).unwrap();
    let run = |id: &str| {
        starsift(&[
            "fold",
            cat.to_str().unwrap(),
            "--candidate",
            id,
            "--lightcurves",
            lcs.to_str().unwrap(),
            "--bins",
            "50",
            "--format",
            "csv",
        ])
    };
    let a = run("LCA-1");
    assert!(a.status.success(), "{}", stderr(&a));
    let b = run("LCB-1");
    assert_eq!(stdout(&a), stdout(&b), "CSV and gzipped CSV fold alike");
    let s = stdout(&a);
    assert_eq!(
        s.lines().next(),
        Some("phase,flux,flux_err,count,median,weighted_mean,model")
    );
    assert_eq!(s.lines().count(), 51);
    let c = run("LCC-1");
    assert!(c.status.success(), "{}", stderr(&c));
    // The JSON diagnostics recover the injected depth (1500 ppm) within 3σ.
    let j = starsift(&[
        "fold",
        cat.to_str().unwrap(),
        "--candidate",
        "LCA-1",
        "--lightcurves",
        lcs.to_str().unwrap(),
        "--format",
        "json",
    ]);
    let v: serde_json::Value = serde_json::from_slice(&j.stdout).unwrap();
    let depth = &v["diagnostics"]["depth_ppm"];
    let (val, err) = (
        depth["value"].as_f64().unwrap(),
        depth["err"].as_f64().unwrap(),
    );
    assert!((val - 1500.0).abs() < 3.0 * err, "{val} ± {err}");
    assert_eq!(v["lightcurve"]["dropped"], 1);
    // The light out of transit, fitted orbit by orbit (docs/science.md
    // §4.6): a planet with white noise raises none beyond chance.
    let orbit = &v["diagnostics"]["orbit_variation"];
    assert!(orbit["orbits"].as_u64().unwrap() >= 4, "{orbit}");
    for at in ["at_period_ppm", "at_half_period_ppm"] {
        let t = orbit[at]["z"].as_f64().unwrap();
        assert!(
            t.abs() < orbit["t_needed"].as_f64().unwrap(),
            "{at}: {orbit}"
        );
    }
    assert!(
        v["diagnostics"]["flags"].as_array().unwrap().is_empty(),
        "{}",
        v["diagnostics"]["flags"]
    );
    // Odd and even transits fold separately and together make the whole.
    let count = |parity: &str| -> u64 {
        let o = starsift(&[
            "fold",
            cat.to_str().unwrap(),
            "--candidate",
            "LCA-1",
            "--lightcurves",
            lcs.to_str().unwrap(),
            "--bins",
            "10",
            "--format",
            "csv",
            "--parity",
            parity,
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
        stdout(&o)
            .lines()
            .skip(1)
            .map(|l| l.split(',').nth(3).unwrap().parse::<u64>().unwrap())
            .sum()
    };
    assert_eq!(count("odd") + count("even"), count("all"));
    assert!(count("odd") > 0 && count("even") > 0);
    // The table draws a plot and prints the diagnostics.
    let t = starsift(&[
        "fold",
        cat.to_str().unwrap(),
        "--candidate",
        "LCA-1",
        "--lightcurves",
        lcs.to_str().unwrap(),
        "--window",
        "transit",
    ]);
    let s = stdout(&t);
    assert!(
        s.contains("relative flux (ppm)")
            && s.contains("odd / even")
            && s.contains("flags                  none")
            && s.contains("light with the orbit   at the period"),
        "{s}"
    );
}

#[test]
fn unreadable_light_curves_are_named() {
    let d = scratch("badlc");
    let cat = catalogue(&d);
    let lcs = d.join("lcs");
    std::fs::create_dir_all(&lcs).unwrap();
    std::fs::write(lcs.join("LCA.csv"), "when,brightness\n1,2\n").unwrap();
    std::fs::write(lcs.join("LCB.fits"), "not a fits file at all").unwrap();
    let o = starsift(&[
        "fold",
        cat.to_str().unwrap(),
        "--candidate",
        "LCA-1",
        "--lightcurves",
        lcs.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(
        e.contains("star LCA") && e.contains("LCA.csv") && e.contains("no time column"),
        "{e}"
    );
    let o = starsift(&[
        "fold",
        cat.to_str().unwrap(),
        "--candidate",
        "LCC-1",
        "--lightcurves",
        lcs.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("star LCC: no light curve found"),
        "{}",
        stderr(&o)
    );
    // checks reports each unreadable star and goes on.
    let o = starsift(&[
        "checks",
        cat.to_str().unwrap(),
        "--lightcurves",
        lcs.to_str().unwrap(),
        "--format",
        "json",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let errs = v["lightcurve_errors"].as_array().unwrap();
    assert_eq!(errs.len(), 2, "{errs:?}");
    assert!(
        errs.iter()
            .any(|x| x["star"] == "LCB" && x["error"].as_str().unwrap().contains("FITS"))
    );
    assert_eq!(v["candidates"].as_array().unwrap().len(), 3);
}

#[test]
fn demo_eclipsing_binaries_are_caught_by_their_light_curves() {
    let o = starsift(&["checks", "--lightcurves", "--format", "json"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let flags = |id: &str| -> Vec<String> {
        v["candidates"]
            .as_array()
            .unwrap()
            .iter()
            .find(|c| c["candidate"] == id)
            .unwrap()["flags"]
            .as_array()
            .unwrap()
            .iter()
            .map(|f| f.as_str().unwrap().to_string())
            .collect()
    };
    let truth = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-catalogue/truth.csv"),
    )
    .unwrap();
    for line in truth.lines().skip(1) {
        let f: Vec<&str> = line.split(',').collect();
        let want = match f[2] {
            "eclipsing-binary-odd-even" => "odd-even",
            "eclipsing-binary-secondary" => "secondary",
            "eclipsing-binary-grazing" => "v-shape",
            _ => continue,
        };
        assert!(
            flags(f[0]).iter().any(|x| x == want),
            "{} ({}) lacks {want}: {:?}",
            f[0],
            f[2],
            flags(f[0])
        );
    }
}

/// Damaged or unusual FITS tables are that file's error, never a crash or a
/// huge allocation (regression tests from hostile-input probing).
#[test]
fn damaged_fits_tables_are_errors_not_crashes() {
    let d = scratch("fits-damage");
    let (t, f, e) = samples();
    // A folder whose name CFITSIO would read as a filter.
    let plain = d.join("run1");
    std::fs::create_dir_all(&plain).unwrap();
    write_fits(&plain.join("LCA.fits"), &t, &f, &e).unwrap();
    let odd = d.join("run[1]");
    std::fs::rename(&plain, &odd).unwrap();
    let p = odd.join("LCA.fits");
    assert_eq!(LightCurve::read(&p, &LcColumns::default()).unwrap().time, t);

    // A header claiming 10^10 rows: refused before any column is read.
    let mut bytes = std::fs::read(&p).unwrap();
    let at = bytes
        .windows(8)
        .position(|w| w == b"NAXIS2  ")
        .expect("NAXIS2 card");
    let card = format!("{:<80}", "NAXIS2  =          10000000000");
    bytes[at..at + 80].copy_from_slice(card.as_bytes());
    let lie = d.join("lie.fits");
    std::fs::write(&lie, &bytes).unwrap();
    let m = LightCurve::read(&lie, &LcColumns::default())
        .unwrap_err()
        .to_string();
    assert!(m.contains("lie.fits") && m.contains("NAXIS2"), "{m}");
    assert!(!m.contains("FitsError {"), "debug dump in {m}");

    // A column type the FITS binding does not know (TFORM = '1C', complex,
    // found by the fuzz target) is this file's error, not a panic.
    let mut bytes = std::fs::read(&p).unwrap();
    let at = bytes
        .windows(20)
        .position(|w| w.starts_with(b"TFORM1  = '1D"))
        .expect("TFORM1 card");
    bytes[at + 12] = b'C';
    let complex = d.join("complex.fits");
    std::fs::write(&complex, &bytes).unwrap();
    let m = LightCurve::read(&complex, &LcColumns::default())
        .unwrap_err()
        .to_string();
    assert!(m.contains("complex.fits"), "{m}");

    // A vector column (TFORM = '2D') is named, not indexed out of bounds.
    use fitsio::tables::{ColumnDataType, ColumnDescription};
    let vec_path = d.join("vector.fits");
    let mut ff = fitsio::FitsFile::create(&vec_path).open().unwrap();
    let desc = [
        ColumnDescription::new("TIME")
            .with_type(ColumnDataType::Double)
            .that_repeats(2)
            .create()
            .unwrap(),
        ColumnDescription::new("FLUX")
            .with_type(ColumnDataType::Double)
            .create()
            .unwrap(),
    ];
    let hdu = ff.create_table("LC", &desc).unwrap();
    hdu.write_col(&mut ff, "FLUX", &f[..20]).unwrap();
    drop(ff);
    let m = LightCurve::read(&vec_path, &LcColumns::default())
        .unwrap_err()
        .to_string();
    assert!(m.contains("TIME") && m.contains("vector"), "{m}");
}

/// Epochs in full dates while the light curves count from 2454833 (2457000 is a whole number of 3.5-d periods): every
/// transit is missed, `not-recovered` holds the candidates back, one notice
/// names the offset and the setting, and the setting brings them back.
#[test]
fn epochs_and_light_curves_from_different_zeros_are_named_once() {
    let d = scratch("timezero");
    let cat = d.join("cat.csv");
    std::fs::write(
        &cat,
        "star,candidate,period_d,epoch,depth_ppm,duration_h,snr,star_radius_rsun,star_mass_msun\n\
         LCA,LCA-1,3.5,2454844.0,1500,2.4,60,1.0,1.0\nLCB,LCB-1,3.5,2454844.0,1500,2.4,60,1.0,1.0\n",
    )
    .unwrap();
    let lcs = d.join("lcs");
    std::fs::create_dir_all(&lcs).unwrap();
    let (t, f, e) = samples();
    for star in ["LCA", "LCB"] {
        write_fits(&lcs.join(format!("{star}.fits")), &t, &f, &e).unwrap();
    }
    let run = |extra: &[&str]| {
        let mut args = vec![
            "checks",
            cat.to_str().unwrap(),
            "--lightcurves",
            lcs.to_str().unwrap(),
            "--format",
            "csv",
        ];
        args.extend_from_slice(extra);
        starsift(&args)
    };
    let off = run(&[]);
    assert!(off.status.success(), "{}", stderr(&off));
    let flagged = stdout(&off)
        .lines()
        .filter(|l| l.contains("not-recovered"))
        .count();
    assert_eq!(flagged, 2, "{}", stdout(&off));
    let err = stderr(&off);
    assert_eq!(err.matches("--lc-time-offset 2454833").count(), 1, "{err}");
    assert!(err.contains("lightcurve_time_offset = 2454833"), "{err}");
    let on = run(&["--lc-time-offset", "2454833"]);
    assert!(on.status.success(), "{}", stderr(&on));
    assert!(!stdout(&on).contains("not-recovered"), "{}", stdout(&on));
    assert!(!stderr(&on).contains("--lc-time-offset"), "{}", stderr(&on));
}

/// A fuzz-found input: one byte of the data of a valid FITS light curve
/// changed (offset 3929 to 'W') once panicked with an index out of bounds.
#[test]
fn fuzz_found_fits_byte_change_is_no_panic() {
    let d = scratch("fits-fuzz");
    let p = d.join("valid.fits");
    let t: Vec<f64> = (0..300).map(|i| i as f64 * 0.02).collect();
    let f: Vec<f64> = t.iter().map(|x| 1.0 + 1e-3 * (x * 7.0).sin()).collect();
    write_fits(&p, &t, &f, &vec![1e-3; 300]).unwrap();
    let mut bytes = std::fs::read(&p).unwrap();
    bytes[3929] = 87;
    let q = d.join("changed.fits");
    std::fs::write(&q, &bytes).unwrap();
    if let Ok(lc) = LightCurve::read(&q, &LcColumns::default()) {
        use starsift::lightcurve::analysis::{Context, DetrendSettings, Ephemeris, diagnose};
        let me = Ephemeris {
            period_d: 2.5,
            epoch: 1.0,
            duration_h: 2.0,
        };
        let ctx = Context {
            ror: 0.05,
            a_rstar: Some(10.0),
            teff_k: Some(5500.0),
            catalogue_depth_ppm: Some(1000.0),
            catalogue_snr: Some(20.0),
            star_mass_msun: Some(1.0),
        };
        let _ = diagnose(&lc, &me, &[], &ctx, &DetrendSettings::default());
    }
}

/// A binary hidden in a multi: two planets and an eclipsing binary (odd and
/// even eclipses of different depths) listed on one star, in white plus red
/// noise (invented). Through `odds --lightcurves DIR`, the binary is held
/// back by `odd-even`, never validated, and the planets count as a system
/// of two, not three.
/// The catalogue of star M: two planets and a binary (M-3, its odd
/// eclipses 0.6 of its even ones), and its light curve as (time, flux):
/// invented.
fn hidden_binary(d: &std::path::Path) -> (std::path::PathBuf, Vec<(f64, f64)>) {
    let cat = d.join("cat.csv");
    std::fs::write(
        &cat,
        "star,candidate,period_d,epoch,depth_ppm,duration_h,snr,star_radius_rsun,star_mass_msun\n\
         M,M-1,3.1,1001.0,800,2.5,40,1,1\nM,M-2,7.4,1002.9,1200,3.4,40,1,1\nM,M-3,2.2,1000.4,5000,2.0,40,1,1\n",
    )
    .unwrap();
    let mut rng = starsift::demo::Rng::new(2026);
    let signals = [
        (3.1, 1001.0, 800.0, 2.5, false),
        (7.4, 1002.9, 1200.0, 3.4, false),
        (2.2, 1000.4, 5000.0, 2.0, true),
    ];
    let phi = (-(2.0f64) / 120.0).exp();
    let mut red = 0.0;
    let mut curve = Vec::new();
    for i in 0..20_000 {
        let t = 1000.0 + i as f64 * 2.0 / 1440.0;
        let mut v = 1.0 + 0.001 * (t / 3.0).sin();
        for &(p, e, depth, dur, binary) in &signals {
            let x: f64 = (t - e) / p;
            let cycle = x.round();
            if ((x - cycle) * p * 24.0).abs() < dur / 2.0 {
                let odd = binary && (cycle as i64).rem_euclid(2) == 1;
                v -= if odd { 0.6 * depth } else { depth } * 1e-6;
            }
        }
        red = phi * red + (1.0 - phi * phi).sqrt() * 3e-4 * rng.normal();
        v += red + 3e-4 * rng.normal();
        curve.push((t, v));
    }
    (cat, curve)
}

/// Writes a light curve of (time, flux) samples as CSV under `header`, each
/// row the time and what `cells` makes of the flux (invented).
fn write_curve(
    path: &std::path::Path,
    header: &str,
    curve: &[(f64, f64)],
    cells: impl Fn(f64) -> String,
) {
    let mut text = format!("{header}\n");
    for &(t, v) in curve {
        text.push_str(&format!("{t:.6},{}\n", cells(v)));
    }
    std::fs::write(path, text).unwrap();
}

/// [`write_curve`] as flux with an error of 3 × 10⁻⁴.
fn write_flux(path: &std::path::Path, curve: &[(f64, f64)]) {
    write_curve(path, "time,flux,flux_err", curve, |v| {
        format!("{v:.7},0.0003")
    });
}

/// `odds --format csv` of a catalogue with light curves in `lcs`: each
/// candidate's (flags, verdict, counted, k).
fn odds_rows(
    cat: &std::path::Path,
    lcs: &std::path::Path,
) -> std::collections::BTreeMap<String, [String; 4]> {
    let o = starsift(&[
        "odds",
        cat.to_str().unwrap(),
        "--lightcurves",
        lcs.to_str().unwrap(),
        "--targets",
        "20000",
        "--format",
        "csv",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let out = stdout(&o);
    let mut r = csv::Reader::from_reader(out.as_bytes());
    let h = r.headers().unwrap().clone();
    let at = |name: &str| h.iter().position(|x| x == name).unwrap();
    r.records()
        .map(|x| {
            let x = x.unwrap();
            (
                x[at("candidate")].to_string(),
                ["flags", "verdict", "counted", "k"].map(|n| x[at(n)].to_string()),
            )
        })
        .collect()
}

#[test]
fn a_binary_hidden_in_a_multi_is_held_back_and_not_counted() {
    let d = scratch("hidden-binary");
    let (cat, curve) = hidden_binary(&d);
    let lcs = d.join("lcs");
    std::fs::create_dir_all(&lcs).unwrap();
    write_flux(&lcs.join("M.csv"), &curve);
    let rows = odds_rows(&cat, &lcs);
    let [flags, verdict, counted, _] = &rows["M-3"];
    assert!(flags.contains("odd-even"), "{rows:?}");
    assert_ne!(verdict, "validated", "{rows:?}");
    assert_eq!(counted, "no", "{rows:?}");
    // Its odd and even eclipses (3000 and 5000 ppm) differ far beyond
    // chance, both there: a binary's two eclipses at twice the period
    // (`secondary`, docs/science.md §4.2), so its star hosts a false
    // positive and the two planets are held back with it (§1.1). Before,
    // they stayed a system of two.
    assert!(flags.contains("secondary"), "{rows:?}");
    for planet in ["M-1", "M-2"] {
        assert_eq!(rows[planet][0], "", "{rows:?}");
        assert_ne!(rows[planet][1], "validated", "{rows:?}");
        assert_eq!(rows[planet][2], "no", "{rows:?}");
    }
}

#[test]
fn a_binary_listed_at_its_period_and_half_of_it_holds_its_star() {
    // The same star, its binary listed twice, as pipelines list it: M-3 at
    // half its period (odd and even eclipses alternate) and M-4 at its
    // period (the shallower eclipse at phase 0.5). M-4 is M-3's copy
    // (`harmonic`), so its `secondary` says nothing of the star (an alias
    // folded at twice its period shows its own transit there). Before,
    // M-3, which stands for the signal, carried `odd-even` alone, and the
    // two planets stayed a system; its two eclipses are now read as a
    // binary's (docs/science.md §4.2) and the star is held.
    let d = scratch("binary-twice");
    let (cat, curve) = hidden_binary(&d);
    let mut text = std::fs::read_to_string(&cat).unwrap();
    text.push_str("M,M-4,4.4,1000.4,5000,2.0,30,1,1\n");
    std::fs::write(&cat, text).unwrap();
    let lcs = d.join("lcs");
    std::fs::create_dir_all(&lcs).unwrap();
    write_flux(&lcs.join("M.csv"), &curve);
    let rows = odds_rows(&cat, &lcs);
    assert!(rows["M-4"][0].contains("harmonic"), "{rows:?}");
    assert!(rows["M-3"][0].contains("secondary"), "{rows:?}");
    for planet in ["M-1", "M-2"] {
        assert_ne!(rows[planet][1], "validated", "{rows:?}");
        assert_eq!(rows[planet][2], "no", "{rows:?}");
    }
}

#[test]
fn a_light_curve_in_magnitudes_is_read_as_flux() {
    // The same star, its light curve in magnitudes as ground surveys write
    // it (m = 12 − 2.5 log₁₀ F; an error of 0.000326 mag is 3 × 10⁻⁴ in
    // flux). Before, the file had no flux column: a warning, and the
    // binary was validated with its planets.
    let d = scratch("magnitudes");
    let (cat, curve) = hidden_binary(&d);
    let lcs = d.join("lcs");
    std::fs::create_dir_all(&lcs).unwrap();
    write_curve(&lcs.join("M.csv"), "time,mag,mag_err", &curve, |v| {
        format!("{:.7},0.000326", 12.0 - 2.5 * v.log10())
    });
    let rows = odds_rows(&cat, &lcs);
    assert!(rows["M-3"][0].contains("odd-even"), "{rows:?}");
    assert_ne!(rows["M-3"][1], "validated", "{rows:?}");
    for planet in ["M-1", "M-2"] {
        assert_eq!(rows[planet][0], "", "{rows:?}");
        assert_ne!(rows[planet][1], "validated", "{rows:?}");
    }
}

#[test]
fn a_light_curve_that_cannot_be_read_validates_nothing() {
    // The star's light curve is there but unreadable (no flux column): the
    // evidence is unseen, so no candidate of it is validated; each is
    // `not-recovered`, saying why. Before, a warning, and all three
    // (the binary too) were validated from the catalogue alone.
    let d = scratch("unread-lc");
    let (cat, curve) = hidden_binary(&d);
    let lcs = d.join("lcs");
    std::fs::create_dir_all(&lcs).unwrap();
    write_curve(&lcs.join("M.csv"), "time,counts", &curve, |v| {
        format!("{:.1}", 1e5 * v)
    });
    let rows = odds_rows(&cat, &lcs);
    for c in ["M-1", "M-2", "M-3"] {
        assert_eq!(rows[c][0], "not-recovered", "{rows:?}");
        assert_ne!(rows[c][1], "validated", "{rows:?}");
    }
    let o = starsift(&[
        "checks",
        cat.to_str().unwrap(),
        "--lightcurves",
        lcs.to_str().unwrap(),
    ]);
    let out = stdout(&o);
    assert!(
        out.contains("could not be read") && out.contains("no flux column"),
        "{out}"
    );
}

#[test]
fn a_star_sized_eclipse_in_the_light_curve_is_big_radius_whatever_the_catalogue_says() {
    // Invented: three signals of a Sun-like star, the catalogue giving each
    // 800-1200 ppm, but the light curve shows S-2's eclipses 10 % deep
    // (R ≥ 31 R⊕ around 1 R☉: a star). Before, only the catalogue's depth
    // gave the radius: the three were validated. Now S-2 is `big-radius`
    // from its light curve (docs/science.md §4.7), and holds its star.
    let d = scratch("lc-big-radius");
    let cat = d.join("cat.csv");
    std::fs::write(
        &cat,
        "star,candidate,period_d,epoch,depth_ppm,duration_h,snr,star_radius_rsun,star_mass_msun\n\
         S,S-1,3.1,1001.0,800,2.5,40,1,1\nS,S-2,7.4,1002.9,1200,3.4,40,1,1\nS,S-3,17.9,1004.4,1000,4.5,40,1,1\n",
    )
    .unwrap();
    let lcs = d.join("lcs");
    std::fs::create_dir_all(&lcs).unwrap();
    let mut rng = starsift::demo::Rng::new(7);
    let signals = [
        (3.1, 1001.0, 800.0, 2.5),
        (7.4, 1002.9, 100_000.0, 3.4),
        (17.9, 1004.4, 1000.0, 4.5),
    ];
    let curve: Vec<(f64, f64)> = (0..30_000)
        .map(|i| {
            let t = 1000.0 + i as f64 * 2.0 / 1440.0;
            let mut v = 1.0 + 3e-4 * rng.normal();
            for &(p, e, depth, dur) in &signals {
                let x: f64 = (t - e) / p;
                if ((x - x.round()) * p * 24.0).abs() < dur / 2.0 {
                    v -= depth * 1e-6;
                }
            }
            (t, v)
        })
        .collect();
    write_flux(&lcs.join("S.csv"), &curve);
    let rows = odds_rows(&cat, &lcs);
    assert!(rows["S-2"][0].contains("big-radius"), "{rows:?}");
    for c in ["S-1", "S-2", "S-3"] {
        assert_ne!(rows[c][1], "validated", "{rows:?}");
    }
}

#[test]
fn a_light_curve_folder_that_gives_no_star_its_curve_is_said() {
    // Invented: the folder's files are named otherwise than by the
    // catalogue's star ids. Before, nothing was said: every verdict was
    // made without light curves, as if none had been given. A folder that
    // does not exist is an error before anything is read.
    let d = scratch("lc-folder-unmatched");
    let cat = catalogue(&d);
    let lcs = d.join("lcs");
    std::fs::create_dir_all(&lcs).unwrap();
    std::fs::write(lcs.join("target-LCA-lc.csv"), "time,flux\n1,1\n").unwrap();
    let o = starsift(&[
        "checks",
        cat.to_str().unwrap(),
        "--lightcurves",
        lcs.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let e = stderr(&o);
    assert!(
        e.contains("no light curve in") && e.contains("target-LCA-lc.csv"),
        "{e}"
    );
    let o = starsift(&[
        "checks",
        cat.to_str().unwrap(),
        "--lightcurves",
        d.join("no-such-folder").to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("no such folder"), "{}", stderr(&o));
}

#[test]
fn archive_named_light_curves_are_found_by_the_stars_number() {
    // Invented: star `KIC 42` (the binary's system of `hidden_binary`), its
    // light curve named as an archive names them, the number zero-padded
    // (`kplr000000042-…_llc.csv`). Before, no file was the star's and its
    // binary was validated with its planets.
    let d = scratch("lc-archive-names");
    let (cat, curve) = hidden_binary(&d);
    let text = std::fs::read_to_string(&cat)
        .unwrap()
        .replace("\nM,", "\nKIC 42,");
    std::fs::write(&cat, text).unwrap();
    let lcs = d.join("lcs");
    std::fs::create_dir_all(&lcs).unwrap();
    write_flux(&lcs.join("kplr000000042-2009131105131_llc.csv"), &curve);
    let rows = odds_rows(&cat, &lcs);
    assert!(rows["M-3"][0].contains("odd-even"), "{rows:?}");
    assert_ne!(rows["M-3"][1], "validated", "{rows:?}");
}

#[test]
fn a_binary_seen_in_the_light_curve_under_another_star_id_at_the_same_place_holds_the_star() {
    // Invented: one star under two ids in a merged table, `T601` with its
    // two planets and, 0.8″ away, `G99` with the binary, whose light curve
    // shows its two eclipses (`secondary`, docs/science.md §4.2). Before,
    // only the catalogue's word (`known-fp`) at one id held the other; a
    // light curve's signs held only their own id, and T601's planets were
    // validated. A binary 34″ away holds nothing (§3.4).
    let d = scratch("binary-other-id");
    let (_, curve) = hidden_binary(&d);
    let lcs = d.join("lcs");
    std::fs::create_dir_all(&lcs).unwrap();
    // Only the binaries' ids have a light curve: the planets' ids are held,
    // or not, by the place alone.
    for star in ["G99", "G98"] {
        write_flux(&lcs.join(format!("{star}.csv")), &curve);
    }
    let cat = d.join("merged.csv");
    std::fs::write(
        &cat,
        format!(
            "star,candidate,period_d,epoch,depth_ppm,duration_h,snr,star_radius_rsun,star_mass_msun,ra,dec\n\
         T601,T601-1,3.1,1001.0,800,2.5,40,1,1,150.00000,20.00000\n\
         T601,T601-2,7.4,1002.9,1200,3.4,40,1,1,150.00000,20.00000\n\
         G99,G99-3,2.2,1000.4,5000,2.0,40,1,1,150.00020,20.00010\n\
         T602,T602-1,3.1,1001.0,810,2.5,40,1,1,151.00000,20.00000\n\
         T602,T602-2,7.4,1002.9,1210,3.4,40,1,1,151.00000,20.00000\n\
         G98,G98-3,2.2,1000.4,5100,2.0,40,1,1,151.01000,20.00000\n{}",
            // Singles far away, for the model's false-positive rate
            // (without one it cannot be estimated, docs/science.md §1.2).
            (0..40)
                .map(|i| format!(
                    "S{i},S{i}-1,{:.3},1000.1,900,2.5,40,1,1,{}.5,-30.0\n",
                    4.0 + 0.37 * i as f64,
                    200 + i
                ))
                .collect::<String>()
        ),
    )
    .unwrap();
    let rows = odds_rows(&cat, &lcs);
    for binary in ["G99-3", "G98-3"] {
        assert!(rows[binary][0].contains("secondary"), "{rows:?}");
    }
    for planet in ["T601-1", "T601-2"] {
        assert_ne!(rows[planet][1], "validated", "{rows:?}");
        assert_eq!(rows[planet][2], "no", "{rows:?}");
    }
    for planet in ["T602-1", "T602-2"] {
        assert_eq!(rows[planet][1], "validated", "{rows:?}");
    }
    let o = starsift(&[
        "odds",
        cat.to_str().unwrap(),
        "--lightcurves",
        lcs.to_str().unwrap(),
        "--targets",
        "20000",
    ]);
    let e = stderr(&o);
    assert!(
        e.contains("1 star within 2″ of a false positive under another star id (star T601)"),
        "{e}"
    );
    let out = stdout(&o);
    assert!(
        out.contains("a false positive by its checks (secondary"),
        "{out}"
    );
}
