//! Fuzzing in the repository (proptest: cargo-fuzz needs a nightly
//! compiler, which CI does not have). One target per parser a user's file
//! or typing reaches: light-curve CSV (parsed, then diagnosed), light-curve
//! FITS (a valid file with bytes changed), key maps, filters, and the
//! catalogue through the checks. None may panic or hang.
//!
//! CI runs a few hundred inputs per target; a long run sets the count:
//! `STARSIFT_FUZZ_CASES=100000 cargo test --release --test fuzz`.

use proptest::prelude::*;
use proptest::test_runner::Config;

use starsift::lightcurve::analysis::{Context, DetrendSettings, Ephemeris, diagnose};
use starsift::lightcurve::{LcColumns, LightCurve};

fn config() -> Config {
    let cases = std::env::var("STARSIFT_FUZZ_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(300);
    Config {
        cases,
        failure_persistence: None,
        ..Config::default()
    }
}

/// Numbers as files hold them, the awkward ones often.
fn number() -> impl Strategy<Value = String> {
    prop_oneof![
        Just("nan".to_string()),
        Just("inf".to_string()),
        Just("-inf".to_string()),
        Just("".to_string()),
        Just("1e308".to_string()),
        Just("-1e12".to_string()),
        Just("0".to_string()),
        any::<f64>().prop_map(|v| v.to_string()),
        (0.0f64..2.0).prop_map(|v| format!("{v:.6}")),
        (0.0f64..400.0).prop_map(|v| format!("{v:.4}")),
        "[0-9eE.+-]{1,8}",
    ]
}

fn ephemeris() -> impl Strategy<Value = Ephemeris> {
    let p = prop_oneof![
        Just(f64::NAN),
        Just(0.0),
        Just(-3.0),
        Just(1e-9),
        Just(1e9),
        0.05f64..500.0,
    ];
    let d = prop_oneof![Just(f64::NAN), Just(0.0), Just(1e6), 0.1f64..30.0];
    (p, -1e7f64..1e7, d).prop_map(|(period_d, epoch, duration_h)| Ephemeris {
        period_d,
        epoch,
        duration_h,
    })
}

fn context() -> Context {
    Context {
        ror: 0.05,
        a_rstar: Some(10.0),
        teff_k: Some(5500.0),
        catalogue_depth_ppm: Some(1000.0),
        catalogue_snr: Some(20.0),
        star_mass_msun: Some(1.0),
    }
}

proptest! {
    #![proptest_config(config())]

    #[test]
    fn light_curve_csv_then_diagnostics(
        rows in proptest::collection::vec((number(), number(), number()), 0..300),
        sorted in any::<bool>(),
        me in ephemeris(),
        others in proptest::collection::vec(ephemeris(), 0..3),
    ) {
        let mut text = String::from("time,flux,flux_err\n");
        let mut rows = rows;
        if sorted {
            rows.sort_by(|a, b| a.0.cmp(&b.0));
        }
        for (t, f, e) in &rows {
            text.push_str(&format!("{t},{f},{e}\n"));
        }
        if let Ok(lc) = LightCurve::from_text("fuzz.csv", text.into_bytes(), &LcColumns::default()) {
            let _ = diagnose(&lc, &me, &others, &context(), &DetrendSettings::default());
        }
    }

    #[test]
    fn light_curve_csv_bytes(data in proptest::collection::vec(any::<u8>(), 0..2000)) {
        let mut with_header = b"time,flux\n".to_vec();
        with_header.extend_from_slice(&data);
        let _ = LightCurve::from_text("fuzz.csv", data, &LcColumns::default());
        let _ = LightCurve::from_text("fuzz.csv", with_header, &LcColumns::default());
    }

    #[test]
    fn light_curve_fits_with_bytes_changed(
        changes in proptest::collection::vec((0usize..8640, any::<u8>()), 1..12),
        truncate in proptest::option::of(0usize..8640),
    ) {
        let mut bytes = valid_fits().to_vec();
        for (at, b) in changes {
            if at < bytes.len() {
                bytes[at] = b;
            }
        }
        if let Some(n) = truncate {
            bytes.truncate(n);
        }
        let path = scratch_file();
        std::fs::write(&path, &bytes).unwrap();
        if let Ok(lc) = LightCurve::read(&path, &LcColumns::default()) {
            let me = Ephemeris { period_d: 2.5, epoch: 1.0, duration_h: 2.0 };
            let _ = diagnose(&lc, &me, &[], &context(), &DetrendSettings::default());
        }
    }

    #[test]
    fn key_maps(
        lines in proptest::collection::vec(
            (
                prop_oneof![Just("quit".to_string()), Just("keep".to_string()), Just("reject".to_string()), "[a-z-]{0,10}"],
                proptest::collection::vec(prop_oneof![Just("ctrl-c".to_string()), Just("a".to_string()), Just("f13".to_string()), "[ -~]{0,6}"], 0..4),
                "[ -~\\n\\t]{0,6}",
            ),
            0..8,
        ),
    ) {
        let mut text = String::new();
        for (name, keys, junk) in &lines {
            let keys: Vec<String> = keys.iter().map(|k| format!("{k:?}")).collect();
            text.push_str(&format!("{name} = [{}]{junk}\n", keys.join(", ")));
        }
        let _ = starsift::tui::keymap::Keymap::load(&[("fuzz.toml", &text)]);
    }

    #[test]
    fn filters(text in prop_oneof![
        "[a-z_:=<>!&|() 0-9.,\"'*-]{0,60}",
        "\\PC{0,40}",
        "(k|radius|period|flag|verdict|decision|snr)(=|<|>|<=|>=|!=|:)[a-z0-9.-]{0,8}( (and|or|not) [a-z]{1,6}(=|<)[0-9]{0,3}){0,4}",
    ]) {
        let _ = starsift::query::Filter::parse(&text);
    }

    #[test]
    fn catalogue_through_the_checks(
        rows in proptest::collection::vec(
            (
                "[A-C]{1}",
                proptest::collection::vec(number(), 5),
                proptest::option::of((-90.0f64..90.0, 0.0f64..360.0)),
            ),
            0..40,
        ),
    ) {
        let mut text = String::from("star,candidate,period_d,epoch,depth_ppm,duration_h,snr,ra_deg,dec_deg,star_radius_rsun,star_mass_msun\n");
        for (i, (star, v, pos)) in rows.iter().enumerate() {
            let (dec, ra) = pos.unwrap_or((f64::NAN, f64::NAN));
            text.push_str(&format!("{star},{star}-{i},{},{},{},{},{},{ra},{dec},1,1\n", v[0], v[1], v[2], v[3], v[4]));
        }
        if let Ok(cat) = starsift::catalogue::Catalogue::load(
            starsift::catalogue::Source::Bytes { name: "fuzz.csv", data: text.as_bytes() },
            &starsift::catalogue::LoadOptions::default(),
        ) {
            let checks = starsift::checks::run(&cat, &starsift::checks::CheckSettings::default());
            prop_assert_eq!(checks.groups().len() <= cat.len(), true);
        }
    }
}

/// A valid FITS light curve, written once.
fn valid_fits() -> &'static [u8] {
    static BYTES: std::sync::OnceLock<Vec<u8>> = std::sync::OnceLock::new();
    BYTES.get_or_init(|| {
        let path =
            std::env::temp_dir().join(format!("starsift-fuzz-{}-valid.fits", std::process::id()));
        let t: Vec<f64> = (0..300).map(|i| i as f64 * 0.02).collect();
        let f: Vec<f64> = t.iter().map(|x| 1.0 + 1e-3 * (x * 7.0).sin()).collect();
        starsift::lightcurve::write_fits(&path, &t, &f, &vec![1e-3; 300]).unwrap();
        let b = std::fs::read(&path).unwrap();
        let _ = std::fs::remove_file(&path);
        b
    })
}

/// A file name per thread, reused from case to case.
fn scratch_file() -> std::path::PathBuf {
    let tid = format!("{:?}", std::thread::current().id())
        .chars()
        .filter(char::is_ascii_digit)
        .collect::<String>();
    std::env::temp_dir().join(format!("starsift-fuzz-{}-{tid}.fits", std::process::id()))
}
