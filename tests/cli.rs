//! The built binary on fixture files, valid and invalid.

mod common;

use common::{fixture, starsift, stderr, stdout};

#[test]
fn summary_json_shape() {
    let o = starsift(&[
        "summary",
        fixture("bad_rows.csv").to_str().unwrap(),
        "--format",
        "json",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    // Line 11 names no star: loaded with a star of its own.
    assert_eq!(v["stars"], 3);
    assert_eq!(v["candidates"], 3);
    assert_eq!(v["histogram"], serde_json::json!({"1": 3}));
    assert_eq!(v["skipped_rows"], 11);
    let skipped = v["skipped"].as_array().unwrap();
    assert_eq!(skipped.len(), 11);
    assert_eq!(
        skipped[0],
        serde_json::json!({"line": 3, "column": "period_d", "reason": "period_d: missing"})
    );
    let cols = v["columns"].as_array().unwrap();
    assert!(
        cols.iter()
            .any(|c| c["field"] == "snr" && c["header"] == "snr")
    );
}

#[test]
fn no_arguments_wants_a_terminal_and_says_what_else_there_is() {
    // Without a terminal the browser refuses, naming the headless commands.
    let o = starsift(&[]);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(
        e.contains("needs a terminal") && e.contains("summary"),
        "{e}"
    );
    let o = starsift(&["summary"]);
    let s = stdout(&o);
    assert!(
        s.contains("built-in demo") && s.contains("candidates  444"),
        "{s}"
    );
}

#[test]
fn summary_table_lists_skips_and_mapping() {
    let o = starsift(&["summary", fixture("good.csv").to_str().unwrap()]);
    assert!(o.status.success());
    let s = stdout(&o);
    assert!(
        s.contains("stars       3") && s.contains("kept as extra columns: note"),
        "{s}"
    );
    let o = starsift(&["summary", fixture("bad_rows.csv").to_str().unwrap()]);
    let s = stdout(&o);
    assert!(s.contains("skipped rows (11 of 11)"), "{s}");
    assert!(
        s.contains("    10  candidate   candidate: duplicate id `BR01-1` (first on line 2)"),
        "{s}"
    );
}

#[test]
fn summary_csv_is_the_histogram() {
    let o = starsift(&[
        "summary",
        fixture("good.csv").to_str().unwrap(),
        "--format",
        "csv",
    ]);
    assert_eq!(
        stdout(&o),
        "multiplicity,stars,candidates\n1,2,2\n2,0,0\n3,1,3\n"
    );
}

#[test]
fn bad_input_exits_2_naming_the_file() {
    for (name, needle) in [
        ("missing_column.csv", "no column for required field `epoch`"),
        ("empty.csv", "the file is empty"),
        ("no-such.csv", "cannot read"),
        ("depth_fraction.csv", "--depth-unit"),
    ] {
        let o = starsift(&["summary", fixture(name).to_str().unwrap()]);
        assert_eq!(o.status.code(), Some(2), "{name}");
        let e = stderr(&o);
        assert!(e.contains(name) && e.contains(needle), "{name}: {e}");
        assert!(o.stdout.is_empty());
    }
    let o = starsift(&[
        "summary",
        fixture("depth_fraction.csv").to_str().unwrap(),
        "--depth-unit",
        "fraction",
    ]);
    assert!(o.status.success());
    let o = starsift(&["summary", "--bogus"]);
    assert_eq!(o.status.code(), Some(2));
}

#[test]
fn escape_sequences_never_reach_the_terminal() {
    for format in ["table", "json", "csv"] {
        let o = starsift(&[
            "summary",
            fixture("escapes.csv").to_str().unwrap(),
            "--format",
            format,
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
        assert!(
            !o.stdout.contains(&0x1b) && !o.stdout.contains(&0x07),
            "{format}: {:?}",
            stdout(&o)
        );
        assert!(!o.stderr.contains(&0x1b));
    }
    let o = starsift(&["summary", fixture("escapes.csv").to_str().unwrap()]);
    assert!(
        stdout(&o).contains("depth_ppm: `x\\x1b]0;owned\\x07` is not a number"),
        "{}",
        stdout(&o)
    );
}

#[test]
fn checks_command_outputs() {
    let o = starsift(&["checks", "--format", "csv"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = stdout(&o);
    let header = s.lines().next().unwrap();
    assert!(
        header.starts_with("star,candidate,radius_rearth,a_au,"),
        "{header}"
    );
    for col in ["teq_k", "insolation_earth", "density_ratio", "flags", "why"] {
        assert!(header.split(',').any(|h| h == col), "{col} missing");
    }
    assert_eq!(s.lines().count(), 445);
    // --only keeps the candidates with that flag; the echo copy names its source.
    let o = starsift(&["checks", "--only", "echo", "--format", "json"]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let list = v["candidates"].as_array().unwrap();
    assert_eq!(list.len(), 2, "source (warning) and copy (flag)");
    let copy = list
        .iter()
        .find(|c| c["flags"].as_array().unwrap().iter().any(|f| f == "echo"))
        .unwrap();
    assert!(
        copy["findings"][0]["why"]
            .as_str()
            .unwrap()
            .contains("likely light from")
    );
    let o = starsift(&["checks", "--only", "wobble"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("unknown flag"));
    // The table explains every flag.
    let o = starsift(&["checks"]);
    let s = stdout(&o);
    assert!(
        s.contains("why (flags firm") && s.contains("near-twin: with HWT47246-s1: period ratio"),
        "{s}"
    );
}

#[test]
fn broken_pipe_exits_quietly() {
    use std::io::Read;
    let mut child = std::process::Command::new(env!("CARGO_BIN_EXE_starsift"))
        // More than a pipe buffer (64 KiB) of output, so the write really fails.
        .args(["checks", "--format", "csv"])
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    let mut first = [0u8; 16];
    child
        .stdout
        .as_mut()
        .unwrap()
        .read_exact(&mut first)
        .unwrap();
    drop(child.stdout.take());
    let out = child.wait_with_output().unwrap();
    assert_eq!(out.status.code(), Some(0));
    assert!(
        out.stderr.is_empty(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

#[test]
fn odds_where_lists_the_matching_candidates_under_the_whole_catalogue_model() {
    let all = starsift(&["odds", "--format", "json"]);
    assert!(all.status.success(), "{}", stderr(&all));
    let all: serde_json::Value = serde_json::from_slice(&all.stdout).unwrap();
    let o = starsift(&["odds", "--where", "k>=5", "--format", "json"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let some: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let listed = some["candidates"].as_array().unwrap();
    let want = (all["candidates"].as_array().unwrap().iter())
        .filter(|c| c["k"].as_u64().unwrap() >= 5)
        .count();
    assert!(want > 0 && want < 444, "{want}");
    assert_eq!(listed.len(), want);
    assert_eq!(some["filter"], "k>=5");
    // The model, its table and the counts are the whole catalogue's.
    for key in ["model", "table", "counts"] {
        assert_eq!(some[key], all[key], "{key}");
    }
    let bad = starsift(&["odds", "--where", "k>>5"]);
    assert_eq!(bad.status.code(), Some(2));
    assert!(stderr(&bad).contains("--where k>>5"), "{}", stderr(&bad));
}

/// Error messages pass one terminal guard: a header carrying OSC 52 and
/// OSC 0 sequences, a filter and a light-curve folder with escapes, never
/// put an escape on the terminal. Machine formats stay byte-exact: an id
/// with a backslash and a note with a tab come back from `export` as they
/// went in.
#[test]
fn errors_are_guarded_and_exports_are_byte_exact() {
    let d = common::scratch("guard");
    let bad = d.join("bad.csv");
    std::fs::write(
        &bad,
        "star,cand\x1b]52;c;ZXZpbA==\x07idate\x1b]0;owned\x07,period_d\nA,A-1,3\n",
    )
    .unwrap();
    for args in [
        vec!["summary", bad.to_str().unwrap()],
        vec!["odds", "--where", "k=\x1b]0;x\x07"],
        vec![
            "fold",
            "--candidate",
            "HWT10850-s1",
            "--lightcurves",
            "/nope/\x1b]0;x\x07",
        ],
    ] {
        let o = starsift(&args);
        assert!(!o.status.success(), "{args:?}");
        assert!(
            !o.stderr.contains(&0x1b) && !o.stderr.contains(&0x07),
            "{args:?}: {}",
            stderr(&o)
        );
    }
    let cat = d.join("cat.csv");
    std::fs::write(
        &cat,
        "star,candidate,period_d,epoch,depth_ppm,duration_h\nA\\B,A\\B-1,3.5,100,500,2.5\n",
    )
    .unwrap();
    let o = starsift(&[
        "decide",
        cat.to_str().unwrap(),
        "--candidate",
        "A\\B-1",
        "--decision",
        "parked",
        "--note",
        "see\tlog",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let export = |format: &str| {
        let o = starsift(&[
            "export",
            cat.to_str().unwrap(),
            "--no-lightcurves",
            "--targets",
            "1000",
            "--format",
            format,
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
        o
    };
    let o = export("csv");
    // The header is the first line: a reader needs no comment option.
    let mut r = csv::Reader::from_reader(&o.stdout[..]);
    let h = r.headers().unwrap().clone();
    let row = r.records().next().unwrap().unwrap();
    let col = |name: &str| row[h.iter().position(|x| x == name).unwrap()].to_string();
    assert_eq!(col("candidate"), "A\\B-1");
    assert_eq!(col("star"), "A\\B");
    assert_eq!(col("note"), "see\tlog");
    let o = export("json");
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let rows = v.as_array().unwrap();
    assert_eq!(rows[0]["candidate"], "A\\B-1");
    assert_eq!(rows[0]["note"], "see\tlog");
}

#[test]
fn bad_flags_are_named_before_any_catalogue_is_read() {
    // The catalogue does not exist: a flag error that names the flag (and
    // not the missing file) proves the flags were checked first.
    let missing = "/nonexistent/catalogue.csv";
    for (args, flag) in [
        (
            vec!["fold", missing, "--candidate", "X", "--bins", "0"],
            "--bins",
        ),
        (vec!["odds", missing, "--boost", "bogus"], "bogus"),
        (vec!["odds", missing, "--fp-fraction", "7"], "--fp-fraction"),
        // No N anywhere (no survey.toml beside a missing file): said before
        // the catalogue is looked for, by every command that gives verdicts.
        (vec!["odds", missing], "--targets N"),
        (vec!["export", missing], "--targets N"),
        (vec!["report", missing], "--targets N"),
        (vec!["export", missing, "--where", "k>>2"], "--where"),
        (vec!["checks", missing, "--only", "nonsense"], "--only"),
        (
            vec!["plot", missing, "--candidate", "X", "-o", "x.jpg"],
            ".svg or .png",
        ),
        (
            vec![
                "decide",
                missing,
                "--candidate",
                "X",
                "--decision",
                "rejected",
            ],
            "reason",
        ),
    ] {
        let o = starsift(&args);
        assert_eq!(o.status.code(), Some(2), "{args:?}");
        let e = stderr(&o);
        assert!(
            e.contains(flag) && !e.contains("nonexistent"),
            "{args:?}: {e}"
        );
    }
}
