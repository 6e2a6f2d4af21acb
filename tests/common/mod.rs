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
