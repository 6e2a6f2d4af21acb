//! Helpers shared by the integration tests.
#![allow(dead_code)]

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

pub fn fixture(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures")
        .join(name)
}

/// A fresh, empty scratch folder for one test.
pub fn scratch(test: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("starsift-test-{}-{test}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

pub fn starsift(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_starsift"))
        .args(args)
        .env("NO_COLOR", "1")
        .output()
        .expect("run starsift")
}

pub fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

pub fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// Runs starsift (which must succeed) and reads its CSV output: for each
/// candidate, its `k` and `verdict`.
pub fn k_and_verdict(args: &[&str]) -> std::collections::BTreeMap<String, (String, String)> {
    let o = starsift(args);
    assert!(o.status.success(), "{}", stderr(&o));
    let text = stdout(&o);
    let mut r = csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .from_reader(text.as_bytes());
    let h = r.headers().unwrap().clone();
    let col = |n: &str| h.iter().position(|x| x == n).unwrap();
    let (ci, ki, vi) = (col("candidate"), col("k"), col("verdict"));
    r.records()
        .map(|rec| {
            let rec = rec.unwrap();
            (
                rec[ci].to_string(),
                (rec[ki].to_string(), rec[vi].to_string()),
            )
        })
        .collect()
}

/// An invented catalogue from its text, loaded with the default options.
pub fn load_text(text: &str) -> starsift::catalogue::Catalogue {
    starsift::catalogue::Catalogue::load(
        starsift::catalogue::Source::Bytes {
            name: "invented.csv",
            data: text.as_bytes(),
        },
        &starsift::catalogue::LoadOptions::default(),
    )
    .unwrap()
}

/// The header of the invented catalogues of the verdict tests.
pub const HEAD: &str = "star,candidate,period_d,period_err_d,epoch,epoch_err_d,depth_ppm,duration_h,snr,impact,star_radius_rsun,star_mass_msun,star_teff_k\n";

/// Invented clean systems that give the model a histogram: 400 singles,
/// 60 doubles, 20 triples (periods spread so no pair is an alias or
/// unstable).
pub fn background() -> String {
    let mut t = String::new();
    // Every star its own periods (no two stars share an ephemeris).
    let mut n = 0;
    let mut row = |s: &str, j: usize, p: f64| {
        n += 1;
        let p = p * (1.0 + 0.0007 * n as f64);
        t.push_str(&format!(
            "{s},{s}-{j},{p:.6},0.00001,100.{j},0.001,600,3.0,25,0.3,1,1,5772\n"
        ));
    };
    for i in 0..400 {
        row(&format!("BG1x{i}"), 1, 3.3);
    }
    for i in 0..60 {
        let s = format!("BG2x{i}");
        row(&s, 1, 3.3);
        row(&s, 2, 7.9);
    }
    for i in 0..20 {
        let s = format!("BG3x{i}");
        row(&s, 1, 3.3);
        row(&s, 2, 7.9);
        row(&s, 3, 17.7);
    }
    t
}

/// The background (its new cells empty) and `rows`, under `header_extra`.
pub fn catalogue(header_extra: &str, rows: &str) -> String {
    let head = format!("{},{header_extra}\n", HEAD.trim_end());
    let blanks = ",".repeat(header_extra.split(',').count());
    let bg: String = background()
        .lines()
        .map(|l| format!("{l}{blanks}\n"))
        .collect();
    format!("{head}{bg}{rows}")
}

/// The catalogue `text` written for test `test`, with a survey.toml giving
/// N beside it.
pub fn written(test: &str, text: &str) -> std::path::PathBuf {
    let dir = scratch(test);
    let cat = dir.join("cat.csv");
    std::fs::write(&cat, text).unwrap();
    std::fs::write(dir.join("survey.toml"), "targets_searched = 50000\n").unwrap();
    cat
}

/// Each candidate's verdict from a command's CSV (its k left aside: held
/// candidates show 0).
pub fn verdicts(args: &[&str]) -> std::collections::BTreeMap<String, String> {
    k_and_verdict(args)
        .into_iter()
        .map(|(c, (_, v))| (c, v))
        .collect()
}

/// Records in the ledger beside catalogue `c` that `vetter` rejected
/// `candidate` for `reason`.
pub fn reject(c: &str, candidate: &str, reason: &str, vetter: &str) {
    let o = starsift(&[
        "decide",
        c,
        "--candidate",
        candidate,
        "--decision",
        "rejected",
        "--reason",
        reason,
        "--vetter",
        vetter,
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
}

/// The verdicts of `odds`, checked to be those of `export` and `checks`.
pub fn agreed(c: &str) -> std::collections::BTreeMap<String, String> {
    let odds = verdicts(&["odds", c, "--format", "csv"]);
    assert_eq!(odds, verdicts(&["export", c, "--format", "csv"]));
    assert_eq!(odds, verdicts(&["checks", c, "--format", "csv"]));
    odds
}

/// The checks and the live odds of `cat` under `model`, every candidate
/// open, as every command builds them.
pub fn live_under(
    cat: &starsift::catalogue::Catalogue,
    model: starsift::odds::Model,
) -> starsift::odds::Live {
    let checks = starsift::checks::run(cat, &starsift::checks::CheckSettings::default());
    starsift::odds::Live::with_state(
        cat,
        model,
        checks.all_flags().to_vec(),
        checks.groups().clone(),
        vec![starsift::decision::Decision::Open; cat.len()],
    )
    .unwrap()
}

/// [`live_under`] the verdict tests' model: N = 50,000 targets, the rest
/// the defaults.
pub fn live_of(cat: &starsift::catalogue::Catalogue) -> starsift::odds::Live {
    live_under(
        cat,
        starsift::odds::Model {
            targets: Some(50_000),
            ..starsift::odds::Model::default()
        },
    )
}

/// Each candidate's row of `starsift checks CATALOGUE --format csv`, by id.
pub fn checks_rows(c: &str) -> std::collections::BTreeMap<String, String> {
    stdout(&starsift(&["checks", c, "--format", "csv"]))
        .lines()
        .skip(1)
        .filter_map(|l| Some((l.split(',').nth(1)?.to_string(), l.to_string())))
        .collect()
}
