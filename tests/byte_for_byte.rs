//! What the commands print, held byte for byte: the demo (light curves
//! read), a generated catalogue of 20,000 candidates, the same with a copy
//! of every tenth signal on an invented neighbour 4″ away (2,000 echoes),
//! and the generated catalogue with three decisions in a ledger, then a
//! second vetter's three (one against the first's): every command that
//! reads a ledger (the `team` rows, from 837ac55; their verdict-bearing
//! rows since the second vetter's keep against the first's rejection as an
//! eclipsing binary holds that candidate back until they agree).
//!
//! Each output (stdout, then stderr) is reduced to an FNV-1a 64-bit hash and
//! its length; the expected values were taken from the build before the
//! survey-scale work on output and checks (commit c215411; the JSON,
//! VOTable and `--where` rows from 0a0adfc, whose other outputs are
//! c215411's; the JSON and report rows since the flags `mixed-host`, `known-fp`,
//! `ellipsoidal` and `known-artefact` joined the blocking list they print), so any change in a byte fails here. When an output changes
//! on purpose, run with `STARSIFT_PRINT_HASHES=1` and paste the printed
//! table.

mod common;

use std::path::Path;
use std::process::Command;

/// FNV-1a, 64 bits (Fowler, Noll, Vo; the published offset basis and
/// prime).
fn fnv1a(bytes: &[u8]) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for &b in bytes {
        h ^= u64::from(b);
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    h
}

/// The clock left out: the report's `written:` line, each ISO 8601
/// time (`2026-12-02T22:02:19.913Z`, a decision's) becomes `<time>`, and
/// each date alone (`2026-12-02`, a decision's day in a held-back
/// reason) `<date>`.
fn without_clock(text: &[u8]) -> Vec<u8> {
    let shape = b"dddd-dd-ddTdd:dd:dd";
    let fits = |shape: &[u8], at: &[u8]| {
        at.len() >= shape.len()
            && shape.iter().zip(at).all(|(&s, &b)| {
                if s == b'd' {
                    b.is_ascii_digit()
                } else {
                    s == b
                }
            })
    };
    let is_time = |at: &[u8]| fits(shape, at);
    let day = &shape[..10];
    let is_date = |at: &[u8]| fits(day, at) && !at.get(10).is_some_and(u8::is_ascii_digit);
    let mut out = Vec::with_capacity(text.len());
    for line in text.split_inclusive(|&b| b == b'\n') {
        if line.starts_with(b"- written: ") {
            continue;
        }
        let mut i = 0;
        while i < line.len() {
            if is_time(&line[i..]) {
                out.extend_from_slice(b"<time>");
                i += shape.len();
                while i < line.len() && (line[i] == b'.' || line[i].is_ascii_digit()) {
                    i += 1;
                }
                if line.get(i) == Some(&b'Z') {
                    i += 1;
                }
            } else if is_date(&line[i..]) && (i == 0 || !line[i - 1].is_ascii_digit()) {
                out.extend_from_slice(b"<date>");
                i += day.len();
            } else {
                out.push(line[i]);
                i += 1;
            }
        }
    }
    out
}

fn run(dir: &Path, args: &[&str]) -> (u64, usize) {
    let o = Command::new(env!("CARGO_BIN_EXE_starsift"))
        .args(args)
        .current_dir(dir)
        .env("NO_COLOR", "1")
        .env("USER", "tester")
        .env("HOME", dir)
        .env("XDG_DATA_HOME", dir.join("data"))
        .output()
        .expect("run starsift");
    let mut all = without_clock(&o.stdout);
    all.extend_from_slice(b"\n--- stderr ---\n");
    all.extend_from_slice(&without_clock(&o.stderr));
    all.extend_from_slice(format!("\n--- status {:?} ---\n", o.status.code()).as_bytes());
    (fnv1a(&all), all.len())
}

/// `gen.csv` with a copy of every tenth row on a new star `CPY…`: the same
/// period and epoch, 0.4 of the depth, 0.0012° north (4.3″).
fn with_echoes(gen_csv: &str) -> String {
    let mut out = String::with_capacity(gen_csv.len() * 11 / 10);
    for (i, line) in gen_csv.lines().enumerate() {
        out.push_str(line);
        out.push('\n');
        if i >= 1 && (i - 1) % 10 == 0 {
            let mut cells: Vec<String> = line.split(',').map(str::to_string).collect();
            cells[0] = format!("CPY{}", &cells[0][3..]);
            cells[1] = format!("CPY{}", &cells[1][3..]);
            let depth: f64 = cells[6].parse().unwrap();
            cells[6] = format!("{:.1}", depth * 0.4);
            let dec: f64 = cells[15].parse().unwrap();
            cells[15] = format!("{:.5}", dec + 0.0012);
            out.push_str(&cells.join(","));
            out.push('\n');
        }
    }
    out
}

const COMMANDS: [&[&str]; 11] = [
    &["odds", "--format", "csv"],
    &["odds"],
    &["odds", "--format", "json"],
    &[
        "odds",
        "--format",
        "json",
        "--where",
        "k>=2 verdict:validated",
    ],
    &["checks", "--format", "csv"],
    &["checks"],
    &["checks", "--format", "json"],
    &["export"],
    &["export", "--format", "json"],
    &["export", "--format", "votable"],
    &["report"],
];

/// (case, command, FNV-1a of stdout + stderr + status, length).
const EXPECTED: &[(&str, &str, u64, usize)] = &[
    ("gen", "generate", 0x2d940c46437c816c, 74),
    ("demo", "odds --format csv", 0x8616edc02566ef56, 42538),
    ("gen", "odds --format csv", 0x3d9d5e21c89b1853, 1982069),
    ("echo", "odds --format csv", 0x6e1bea7c5a8d96df, 2138069),
    ("demo", "odds", 0x443d098db1207dc6, 39301),
    ("gen", "odds", 0x1a16f6f3c57bd232, 1681628),
    ("echo", "odds", 0x8ea93f30b7091d47, 1905733),
    ("demo", "odds --format json", 0x62e54dbe00570431, 160899),
    ("gen", "odds --format json", 0x417b8810b3d7ff30, 7090580),
    ("echo", "odds --format json", 0x027c627aa906feef, 7808652),
    (
        "demo",
        "odds --format json --where k>=2 verdict:validated",
        0x66c3fb4ee26fbd45,
        75413,
    ),
    (
        "gen",
        "odds --format json --where k>=2 verdict:validated",
        0x04ea93e0a4bb871d,
        4311,
    ),
    (
        "echo",
        "odds --format json --where k>=2 verdict:validated",
        0x285e593d7f07efe6,
        4383,
    ),
    ("demo", "checks --format csv", 0xd3f165fea62fe89c, 100764),
    ("gen", "checks --format csv", 0xa01c747cf1c3eb70, 4322154),
    ("echo", "checks --format csv", 0x19ce76f868d6dc68, 5329711),
    ("demo", "checks", 0x445b3df0d7865b37, 40871),
    ("gen", "checks", 0x850e9e48bb8fa8ef, 1587009),
    ("echo", "checks", 0x7378011b7148c574, 2385223),
    ("demo", "checks --format json", 0x03cd0f622130196b, 295205),
    ("gen", "checks --format json", 0xb558a37bba54ca86, 12864955),
    ("echo", "checks --format json", 0xdaf39cefbea0fa70, 15140280),
    ("demo", "export", 0xe7d851fe6e8dd770, 102214),
    ("gen", "export", 0xd7d1c4bc59072dce, 4051614),
    ("echo", "export", 0xf7b8e0b1f8c0b5a4, 4421481),
    ("demo", "export --format json", 0xad58a7bf6caf071c, 294700),
    ("gen", "export --format json", 0xb43164553a694976, 11384229),
    ("echo", "export --format json", 0x316ad1dab1de8757, 12510984),
    (
        "demo",
        "export --format votable",
        0xcdb7d12e8697b587,
        238519,
    ),
    (
        "gen",
        "export --format votable",
        0xbaf76d92251d9276,
        9175663,
    ),
    (
        "echo",
        "export --format votable",
        0x4b66ba9af218ad15,
        10059654,
    ),
    ("demo", "report", 0xad1d3f712143c59e, 16671),
    ("gen", "report", 0x933b9cf73dc04620, 2544),
    ("echo", "report", 0xeedee77dfb1e98d7, 114648),
    ("demo", "summary", 0x25448f7676f8f115, 1991),
    ("gen", "summary", 0x55408ce93e313e46, 1654),
    ("ledger", "decide --from", 0xab0575173d17932f, 90),
    ("ledger", "odds --format csv", 0x4197f027f7cd38a6, 1989076),
    ("ledger", "export", 0xdfddc07ba813728f, 4058707),
    // Printed by the build of 837ac55, before the ledger's reads changed
    // (where vetters disagree, the stamps of export, report's tally, the
    // history written as read).
    ("team", "decide --from", 0xc38f37c3ad8f0771, 90),
    ("team", "odds --format csv", 0xe3fcb5174243e9c8, 1989216),
    ("team", "export", 0x76ae408cbbf364e6, 4058828),
    ("team", "export --vetter bob", 0x826e48dc9b746859, 4046325),
    ("team", "report", 0xe58860c6ef9fd1ef, 3067),
    ("team", "history", 0x516326ad6a65368e, 522),
    ("team", "history --format csv", 0xa7cad4a1a64196af, 472),
    ("team", "history --format json", 0x8aa08303dad20f15, 1812),
    ("team", "history --vetter bob", 0xcf576d5528fa5bae, 290),
    (
        "team",
        "history --candidate SYN0000003-s1 --format json",
        0x822b9aa91e03651b,
        687,
    ),
];

#[test]
fn every_command_prints_what_it_printed_before() {
    let dir = common::scratch("byte-for-byte");
    let gen_out = run(
        &dir,
        &[
            "generate",
            "big",
            "--candidates",
            "20000",
            "--seed",
            "7",
            "--out",
            "gen.csv",
        ],
    );
    let gen_csv = std::fs::read_to_string(dir.join("gen.csv")).expect("gen.csv written");
    std::fs::write(dir.join("echo.csv"), with_echoes(&gen_csv)).unwrap();
    std::fs::write(
        dir.join("decisions.csv"),
        "candidate,decision,reason,note\n\
         SYN0000003-s1,rejected,eclipsing-binary,secondary seen\n\
         SYN0000010-s1,rejected,artefact,\n\
         SYN0000012-s1,kept,,\"looks fine, for now\"\n",
    )
    .unwrap();
    let mut got: Vec<(String, String, u64, usize)> = Vec::new();
    let key = |args: &[&str]| args.join(" ");
    got.push(("gen".into(), "generate".into(), gen_out.0, gen_out.1));
    let model = ["--no-lightcurves", "--targets", "40000"];
    for command in COMMANDS {
        let (h, n) = run(&dir, command);
        got.push(("demo".into(), key(command), h, n));
        for case in ["gen", "echo"] {
            let file = format!("{case}.csv");
            let mut args: Vec<&str> = command.to_vec();
            args.push(&file);
            args.extend(model);
            let (h, n) = run(&dir, &args);
            got.push((case.into(), key(command), h, n));
        }
    }
    for (case, args) in [("demo", &["summary"][..]), ("gen", &["summary", "gen.csv"])] {
        let (h, n) = run(&dir, args);
        got.push((case.into(), "summary".into(), h, n));
    }
    // Decisions: a batch, then the commands that read them.
    let ledger = ["--ledger", "gen.sqlite"];
    let mut decide = vec![
        "decide",
        "gen.csv",
        "--from",
        "decisions.csv",
        "--vetter",
        "ann",
    ];
    decide.extend(model);
    decide.extend(ledger);
    let (h, n) = run(&dir, &decide);
    got.push(("ledger".into(), "decide --from".into(), h, n));
    for command in [&["odds", "--format", "csv"][..], &["export"]] {
        let mut args: Vec<&str> = command.to_vec();
        args.push("gen.csv");
        args.extend(model);
        args.extend(ledger);
        let (h, n) = run(&dir, &args);
        got.push(("ledger".into(), key(command), h, n));
    }
    // A second vetter: one decision against the first's, one with it, one
    // of their own; then every command that reads the ledger.
    std::fs::write(
        dir.join("second.csv"),
        "candidate,decision,reason,note\n\
         SYN0000003-s1,kept,,no secondary in my look\n\
         SYN0000012-s1,kept,,\n\
         SYN0000020-s1,parked,,\n",
    )
    .unwrap();
    let mut decide = vec![
        "decide",
        "gen.csv",
        "--from",
        "second.csv",
        "--vetter",
        "bob",
    ];
    decide.extend(model);
    decide.extend(ledger);
    let (h, n) = run(&dir, &decide);
    got.push(("team".into(), "decide --from".into(), h, n));
    for command in [
        &["odds", "--format", "csv"][..],
        &["export"],
        &["export", "--vetter", "bob"],
        &["report"],
        &["history"],
        &["history", "--format", "csv"],
        &["history", "--format", "json"],
        &["history", "--vetter", "bob"],
        &[
            "history",
            "--candidate",
            "SYN0000003-s1",
            "--format",
            "json",
        ],
    ] {
        let mut args: Vec<&str> = command.to_vec();
        args.push("gen.csv");
        if command[0] != "history" {
            args.extend(model);
        }
        args.extend(ledger);
        let (h, n) = run(&dir, &args);
        got.push(("team".into(), key(command), h, n));
    }
    if std::env::var_os("STARSIFT_PRINT_HASHES").is_some() {
        for (case, command, h, n) in &got {
            println!("    ({case:?}, {command:?}, {h:#018x}, {n}),");
        }
    }
    let mut wrong = Vec::new();
    for (case, command, h, n) in &got {
        match EXPECTED.iter().find(|e| e.0 == case && e.1 == command) {
            Some(e) if e.2 == *h && e.3 == *n => {}
            Some(e) => wrong.push(format!(
                "{case} `{command}`: {h:#018x} ({n} bytes), expected {:#018x} ({} bytes)",
                e.2, e.3
            )),
            None => wrong.push(format!("{case} `{command}`: no expected value")),
        }
    }
    assert!(
        EXPECTED.len() == got.len(),
        "{} expected, {} run",
        EXPECTED.len(),
        got.len()
    );
    assert!(wrong.is_empty(), "outputs changed:\n{}", wrong.join("\n"));
    let _ = std::fs::remove_dir_all(&dir);
}
