//! The checked-in demo is exactly what the generator makes with its fixed seed.

mod common;

use std::io::Read;
use std::path::Path;

use common::scratch;

fn gunzip(p: &Path) -> String {
    let mut s = String::new();
    flate2::read::GzDecoder::new(std::fs::File::open(p).unwrap())
        .read_to_string(&mut s)
        .unwrap();
    s
}

#[test]
fn demo_regenerates_identically() {
    let fresh = scratch("demo");
    starsift::demo::write_demo(&fresh).unwrap();
    let kept = Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-catalogue");
    for f in ["catalogue.csv", "survey.toml", "truth.csv"] {
        let a = std::fs::read_to_string(kept.join(f)).unwrap();
        let b = std::fs::read_to_string(fresh.join(f)).unwrap();
        assert!(
            a == b,
            "demo-catalogue/{f} differs from a fresh generation; run `cargo run --release -- generate demo`"
        );
    }
    let mut names: Vec<_> = std::fs::read_dir(fresh.join("lightcurves"))
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    names.sort();
    assert!(
        names.len() >= 30,
        "at least 30 light curves, got {}",
        names.len()
    );
    for n in &names {
        let a = gunzip(&kept.join("lightcurves").join(n));
        let b = gunzip(&fresh.join("lightcurves").join(n));
        assert!(a == b, "light curve {n:?} differs");
        assert!(a.lines().count() > 19_000);
    }
    let _ = std::fs::remove_dir_all(&fresh);
}

#[test]
fn demo_has_the_planted_cases() {
    let truth = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-catalogue/truth.csv"),
    )
    .unwrap();
    for case in [
        "eclipsing-binary-odd-even",
        "eclipsing-binary-secondary",
        "background-blend",
        "duplicate",
        "period-alias",
        "unstable-pair",
        "echo-source",
        "echo-copy",
    ] {
        assert!(truth.contains(&format!(",{case},")), "no planted {case}");
    }
}
