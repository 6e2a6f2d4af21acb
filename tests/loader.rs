//! Loader tests on fixtures of our own (invented ids): formats, each skip
//! reason, fatal errors, and the demo's histogram.

mod common;

use std::io::Write;

use common::{fixture, scratch};
use starsift::catalogue::{Catalogue, ColumnMap, DepthUnit, Field, LoadError, LoadOptions, Source};

fn load(name: &str) -> Result<Catalogue, LoadError> {
    Catalogue::load(Source::Path(&fixture(name)), &LoadOptions::default())
}

/// Loads bytes from memory under a file name, with the default options.
fn load_bytes(name: &str, data: &[u8]) -> Result<Catalogue, LoadError> {
    Catalogue::load(Source::Bytes { name, data }, &LoadOptions::default())
}

#[test]
fn good_csv_with_comments_quotes_and_multiline_fields() {
    let c = load("good.csv").unwrap();
    assert_eq!(c.len(), 5);
    assert_eq!(c.star_count(), 3);
    assert!(c.skipped.is_empty(), "{:?}", c.skipped);
    let a = c.find_candidate("QX0001-b").unwrap();
    assert_eq!(c.value(Field::PeriodD, a), Some(7.25));
    assert_eq!(c.value(Field::DepthPpm, a), Some(420.5));
    assert_eq!(c.star_id(c.star_of(a)), "QX0001");
    let note = c.extra_headers().position(|h| h == "note").unwrap();
    assert_eq!(c.extra(note, a), "with, a comma");
    let q = c.find_candidate("QX0002-a").unwrap();
    assert_eq!(c.extra(note, q), "a \"quoted\" word");
    assert_eq!(
        c.value(Field::Snr, q),
        None,
        "empty cell is missing, never zero"
    );
    let m = c.find_candidate("QX0003-a").unwrap();
    assert_eq!(c.extra(note, m), "multi\nline note");
    // The row after the multi-line field still loads, from the right line.
    assert!(c.find_candidate("QX0001-c").is_some());
    let s = c.find_star("QX0001").unwrap();
    let ids: Vec<&str> = c.members(s).iter().map(|&m| c.candidate_id(m)).collect();
    assert_eq!(ids, ["QX0001-a", "QX0001-b", "QX0001-c"]);
    assert_eq!(c.histogram(), vec![0, 2, 0, 1]);
    let depth = c.columns.iter().find(|u| u.field == "depth_ppm").unwrap();
    assert!(depth.how.contains("detected"), "{}", depth.how);
}

#[test]
fn tsv_by_extension_and_by_sniffing() {
    for name in ["tabs.tsv", "tabs.txt"] {
        let c = load(name).unwrap();
        assert_eq!((c.len(), c.star_count()), (3, 2), "{name}");
        assert_eq!(c.value(Field::DurationH, 2), Some(3.0));
    }
}

#[test]
fn crlf_and_bom() {
    let c = load("crlf_bom.csv").unwrap();
    assert_eq!(c.len(), 3);
    assert_eq!(c.candidate_id(0), "CR01-1");
    assert_eq!(
        c.star_id(0),
        "CR01",
        "BOM must not stick to the first header or id"
    );
    assert_eq!(
        c.value(Field::DurationH, 2),
        Some(3.0),
        "no stray \\r in the last field"
    );
}

#[test]
fn gzip_is_detected_by_content() {
    let d = scratch("gzip");
    let raw = std::fs::read(fixture("good.csv")).unwrap();
    for name in ["cat.csv.gz", "cat.bin"] {
        let p = d.join(name);
        let mut gz = flate2::write::GzEncoder::new(
            std::fs::File::create(&p).unwrap(),
            flate2::Compression::fast(),
        );
        gz.write_all(&raw).unwrap();
        gz.finish().unwrap();
        let c = Catalogue::load(Source::Path(&p), &LoadOptions::default()).unwrap();
        assert_eq!(c.len(), 5, "{name}");
    }
}

#[test]
fn every_skip_reason_names_line_and_column() {
    let c = load("bad_rows.csv").unwrap();
    let loaded: Vec<&str> = (0..c.len() as u32).map(|i| c.candidate_id(i)).collect();
    // Line 11 names no star: read with a star of its own, not skipped
    // (docs/science.md §3.4).
    assert_eq!(loaded, ["BR01-1", "BR10-1", "BR14-1"]);
    assert_eq!(c.star_id(c.star_of(1)), "host of BR10-1");
    assert!(
        c.notes
            .iter()
            .any(|n| n.contains("1 row gave no star id (empty)")),
        "{:?}",
        c.notes
    );
    assert_eq!(c.rows_seen, 14);
    let got: Vec<(u64, Option<&str>, &str)> = c
        .skipped
        .iter()
        .map(|s| (s.line, s.column.as_deref(), s.reason.as_str()))
        .collect();
    let expect: [(u64, Option<&str>, &str); 11] = [
        (3, Some("period_d"), "period_d: missing"),
        (4, Some("period_d"), "period_d: `abc` is not a number"),
        (5, Some("period_d"), "period_d: must be > 0, got -3"),
        (6, Some("depth_ppm"), "depth_ppm: must be > 0, got 0"),
        (7, Some("duration_h"), "duration_h: must be > 0, got 0"),
        (
            8,
            Some("duration_h"),
            "duration_h: 30 h is not shorter than the period (1.0 d = 24 h)",
        ),
        (9, Some("snr"), "snr: `high` is not a number"),
        (
            10,
            Some("candidate"),
            "candidate: duplicate id `BR01-1` (first on line 2)",
        ),
        (12, None, "has 5 fields, the header has 7"),
        (
            13,
            Some("period_d"),
            "period_d: `inf` is not a finite number",
        ),
        (14, Some("epoch"), "epoch: `nan` is not a finite number"),
    ];
    assert_eq!(got, expect);
}

#[test]
fn fatal_errors_name_the_file() {
    let e = load("missing_column.csv").unwrap_err();
    let msg = e.to_string();
    assert!(
        matches!(
            e,
            LoadError::MissingColumn {
                field: Field::Epoch,
                ..
            }
        ),
        "{msg}"
    );
    assert!(
        msg.contains("missing_column.csv") && msg.contains("`epoch`") && msg.contains("t0"),
        "{msg}"
    );
    for name in ["empty.csv", "only_comments.csv"] {
        let e = load(name).unwrap_err();
        assert!(matches!(e, LoadError::Empty { .. }), "{name}: {e}");
        assert!(e.to_string().contains(name));
    }
    let e = load("no-such-file.csv").unwrap_err();
    assert!(matches!(e, LoadError::Io { .. }) && e.to_string().contains("no-such-file.csv"));
}

#[test]
fn depth_units_are_never_guessed_silently() {
    let e = load("depth_fraction.csv").unwrap_err();
    assert!(matches!(e, LoadError::DepthUnitUnknown { .. }), "{e}");
    assert!(e.to_string().contains("--depth-unit"));
    let opts = LoadOptions {
        depth_unit: Some(DepthUnit::Fraction),
        ..LoadOptions::default()
    };
    let c = Catalogue::load(Source::Path(&fixture("depth_fraction.csv")), &opts).unwrap();
    assert_eq!(c.value(Field::DepthPpm, 0), Some(500.0));
    // depth_pct names its unit: 0.05 % = 500 ppm.
    let c = load("depth_percent.csv").unwrap();
    assert!((c.value(Field::DepthPpm, 0).unwrap() - 500.0).abs() < 1e-9);
}

#[test]
fn column_map_file_overrides_synonyms() {
    assert!(matches!(
        load("custom_header.csv"),
        Err(LoadError::MissingColumn { .. })
    ));
    let opts = LoadOptions {
        columns: ColumnMap::from_file(&fixture("custom_header.columns.toml")).unwrap(),
        ..LoadOptions::default()
    };
    let c = Catalogue::load(Source::Path(&fixture("custom_header.csv")), &opts).unwrap();
    assert_eq!(c.candidate_id(0), "CM01-1");
    assert_eq!(c.value(Field::DurationH, 0), Some(2.0));
    let bad = LoadOptions {
        columns: ColumnMap::from_toml("epoch = \"Missing\"\n", "m.toml").unwrap(),
        ..opts
    };
    let e = Catalogue::load(Source::Path(&fixture("custom_header.csv")), &bad).unwrap_err();
    assert!(e.to_string().contains("`Missing`"), "{e}");
}

#[test]
fn sorting_returns_an_index_vector_with_missing_last() {
    let c = load("good.csv").unwrap();
    let by = |f, d| -> Vec<&str> {
        c.sorted_by(f, d)
            .iter()
            .map(|&i| c.candidate_id(i))
            .collect()
    };
    assert_eq!(
        by(Field::PeriodD, false),
        ["QX0003-a", "QX0001-a", "QX0001-b", "QX0002-a", "QX0001-c"]
    );
    assert_eq!(
        by(Field::Snr, true),
        ["QX0001-a", "QX0001-b", "QX0001-c", "QX0003-a", "QX0002-a"]
    );
    assert_eq!(by(Field::StarRadiusRsun, false).last(), Some(&"QX0003-a"));
}

#[test]
fn demo_histogram() {
    // The demo plan (src/demo/generate.rs) plus the planted echo neighbour.
    let c = starsift::demo::catalogue().unwrap();
    assert_eq!(c.histogram(), vec![0, 247, 44, 18, 7, 3, 2]);
    assert_eq!((c.star_count(), c.len()), (321, 444));
    assert!(c.skipped.is_empty());
}

#[test]
fn large_files_split_across_threads_match_a_serial_read() {
    // Big enough for many 2 MB chunks; quoted fields with line breaks,
    // delimiters and escaped quotes, comment lines with stray quotes, and bad
    // rows and duplicates spread through the file.
    let d = scratch("large");
    let p = d.join("large.csv");
    let mut text = String::from(
        "# a comment with a \" stray quote\nstar,candidate,period_d,epoch,depth_ppm,duration_h,note\n",
    );
    let mut line = 3u64;
    let mut expect_skips = Vec::new();
    let mut loaded = 0usize;
    for i in 0..150_000u64 {
        let star = i / 3;
        let note = match i % 7 {
            0 => "\"two\nlines, \"\"quoted\"\"\"".to_string(),
            1 => "plain".to_string(),
            _ => String::new(),
        };
        if i % 5000 == 17 {
            text.push_str("# comment \" inside the data\n");
            line += 1;
        }
        let period = if i % 9973 == 5 {
            "x".to_string()
        } else {
            format!("{}.5", 1 + i % 50)
        };
        let cand = if i % 20011 == 9 {
            "LF0-0".to_string()
        } else {
            format!("LF{star}-{i}")
        };
        text.push_str(&format!(
            "LF{star},{cand},{period},{}.25,{},2.0,{note}\n",
            1000 + i,
            100 + i % 900
        ));
        if period == "x" || (i > 0 && cand == "LF0-0") {
            expect_skips.push(line);
        } else {
            loaded += 1;
        }
        line += 1 + note.matches('\n').count() as u64;
    }
    std::fs::write(&p, &text).unwrap();
    assert!(text.len() > 5 << 20, "the file must span several chunks");
    let c = Catalogue::load(Source::Path(&p), &LoadOptions::default()).unwrap();
    assert_eq!(c.len(), loaded);
    let lines: Vec<u64> = c.skipped.iter().map(|s| s.line).collect();
    assert_eq!(lines, expect_skips, "{:?}", c.skipped);
    let note = c.extra_headers().position(|h| h == "note").unwrap();
    let q = c.find_candidate("LF2-7").unwrap();
    assert_eq!(c.extra(note, q), "two\nlines, \"quoted\"");
    assert_eq!(c.value(Field::Epoch, q), Some(1007.25));
    // File order is kept: candidate i is row i (less the skipped rows before it).
    let last = c.find_candidate("LF49999-149999").unwrap();
    assert_eq!(last as usize, c.len() - 1);
    // The same bytes read from memory agree.
    let m = load_bytes("large.csv", text.as_bytes()).unwrap();
    assert_eq!(m.len(), c.len());
    assert_eq!(m.skipped, c.skipped);
    let _ = std::fs::remove_dir_all(&d);
}

#[test]
fn an_index_only_load_keeps_the_same_rows_and_skips() {
    // `summary` loads this way: every cell validated, only depth kept.
    let index = LoadOptions {
        index_only: true,
        ..LoadOptions::default()
    };
    let gz = scratch("index-only").join("good.csv.gz");
    {
        let mut e = flate2::write::GzEncoder::new(
            std::fs::File::create(&gz).unwrap(),
            flate2::Compression::fast(),
        );
        e.write_all(&std::fs::read(fixture("good.csv")).unwrap())
            .unwrap();
        e.finish().unwrap();
    }
    let mut paths: Vec<_> = [
        "bad_rows.csv",
        "crlf_bom.csv",
        "escapes.csv",
        "good.csv",
        "tabs.tsv",
        "depth_percent.csv",
    ]
    .map(fixture)
    .to_vec();
    paths.push(gz);
    for path in paths {
        let full = Catalogue::load(Source::Path(&path), &LoadOptions::default()).unwrap();
        let lean = Catalogue::load(Source::Path(&path), &index).unwrap();
        let name = path.display();
        assert_eq!(lean.len(), full.len(), "{name}");
        assert_eq!(lean.histogram(), full.histogram(), "{name}");
        assert_eq!(lean.skipped, full.skipped, "{name}");
        assert_eq!(lean.rows_seen, full.rows_seen, "{name}");
        assert_eq!(
            lean.columns
                .iter()
                .map(|c| (c.field, &c.unit))
                .collect::<Vec<_>>(),
            full.columns
                .iter()
                .map(|c| (c.field, &c.unit))
                .collect::<Vec<_>>(),
            "{name}"
        );
        assert_eq!(
            lean.column(Field::DepthPpm).map(|c| c.to_vec()),
            full.column(Field::DepthPpm).map(|c| c.to_vec()),
            "{name}"
        );
        assert!(lean.column(Field::PeriodD).is_none(), "{name}");
        for c in 0..full.len() as u32 {
            assert_eq!(lean.candidate_id(c), full.candidate_id(c));
            assert_eq!(lean.star_id(lean.star_of(c)), full.star_id(full.star_of(c)));
        }
    }
    // A big file goes through the threaded path.
    let big = scratch("index-only").join("big.csv");
    starsift::demo::write_big(&big, 30_000, 7).unwrap();
    let full = Catalogue::load(Source::Path(&big), &LoadOptions::default()).unwrap();
    let lean = Catalogue::load(Source::Path(&big), &index).unwrap();
    assert_eq!(
        (lean.len(), lean.star_count()),
        (full.len(), full.star_count())
    );
    assert_eq!(lean.histogram(), full.histogram());
    assert_eq!(
        lean.column(Field::DepthPpm).map(|c| c.to_vec()),
        full.column(Field::DepthPpm).map(|c| c.to_vec())
    );
}

#[test]
fn skips_in_a_quoted_file_name_the_right_line() {
    // A quote sends a file through the general reader; its line numbers must
    // count CRLF line ends, blank lines and comments as the one-pass reader
    // does (an earlier version used the CSV reader's own count, which
    // skipped them).
    let text = "star,candidate,period,epoch,depth_ppm,duration_h,note\r\n\
                QL1,QL1-a,3.5,100,400,2,\"quoted\"\r\n\
                \r\n\
                # a comment\r\n\
                QL1,QL1-b,x,100,400,2,\r\n\
                QL2,QL2-a,3.5,100,400,2,\"two\r\nlines\"\r\n\
                QL2,QL2-b,3.5,100,-1,2,\r\n";
    let c = load_bytes("quoted.csv", text.as_bytes()).unwrap();
    assert_eq!(c.len(), 2);
    let lines: Vec<u64> = c.skipped.iter().map(|s| s.line).collect();
    assert_eq!(lines, [5, 8], "{:?}", c.skipped);
}

#[test]
fn a_broken_gzip_stream_names_the_file_and_the_line_it_reached() {
    // Several chunks of rows, compressed, then cut short: the rows before
    // the break are read; the error names the file and a line near it.
    let mut text = String::from("star,candidate,period,epoch,depth_ppm,duration_h\n");
    for i in 0..200_000 {
        text.push_str(&format!(
            "GZ{},GZ{i}-b,{}.5,100.25,400,2\n",
            i / 2,
            1 + i % 40
        ));
    }
    let mut gz = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::fast());
    gz.write_all(text.as_bytes()).unwrap();
    let bytes = gz.finish().unwrap();
    let cut = &bytes[..bytes.len() * 3 / 5];
    let err = load_bytes("broken.csv.gz", cut).unwrap_err();
    let LoadError::Read { path, line, .. } = &err else {
        panic!("{err}");
    };
    assert_eq!(path, "broken.csv.gz");
    // Chunks are 2 MB (about 46,000 lines here) and the break is past 60%
    // of the rows: the line is the start of a later chunk, not the first.
    assert!((40_000..=200_001).contains(line), "{err}");
    assert!(err.to_string().starts_with("broken.csv.gz: line "), "{err}");
}

#[test]
fn lines_ended_by_a_cr_alone_load_with_their_line_numbers() {
    // Classic Mac line ends (CR only), as CSV and as TSV found by sniffing.
    let csv = "star,candidate,period,epoch,depth_ppm,duration_h\r\
               MC1,MC1-a,3.5,100,400,2\r\
               # a comment\r\
               MC1,MC1-b,x,100,400,2\r\
               MC2,MC2-a,7.25,100,400,2\r";
    for (name, text) in [
        ("mac.csv", csv.to_string()),
        ("mac.txt", csv.replace(',', "\t")),
    ] {
        let c = load_bytes(name, text.as_bytes()).unwrap();
        assert_eq!(c.len(), 2, "{name}");
        assert_eq!(c.star_count(), 2, "{name}");
        let b = c.find_candidate("MC2-a").unwrap();
        assert_eq!(c.value(Field::PeriodD, b), Some(7.25));
        let lines: Vec<u64> = c.skipped.iter().map(|s| s.line).collect();
        assert_eq!(lines, [4], "{name}: {:?}", c.skipped);
    }
}

#[test]
fn the_fingerprint_comes_from_the_loads_own_read() {
    // The ledger records the catalogue's fingerprint (FNV-1a of its bytes):
    // computed while loading, it equals a second read's, plain or gzipped.
    use std::sync::Arc;
    use std::sync::atomic::{AtomicU64, Ordering};
    let d = common::scratch("fingerprint");
    let text = "star,candidate,period_d,epoch,depth_ppm,duration_h\nS1,S1-1,3.5,10.0,500,2.0\nS2,S2-1,4.5,11.0,600,2.5\n";
    let plain = d.join("cat.csv");
    std::fs::write(&plain, text).unwrap();
    // And a file of many blocks, which a thread of its own hashes in order.
    let mut big = String::from("star,candidate,period_d,epoch,depth_ppm,duration_h\n");
    for i in 0..200_000 {
        big.push_str(&format!("S{i},S{i}-1,{}.5,10.0,500,2.0\n", 1 + i % 40));
    }
    let many = d.join("many.csv");
    std::fs::write(&many, &big).unwrap();
    let gz = d.join("cat.csv.gz");
    let mut enc = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::default());
    std::io::Write::write_all(&mut enc, text.as_bytes()).unwrap();
    std::fs::write(&gz, enc.finish().unwrap()).unwrap();
    for (p, n) in [(&plain, 2), (&gz, 2), (&many, 200_000)] {
        let out = Arc::new(AtomicU64::new(0));
        let opts = starsift::catalogue::LoadOptions {
            fingerprint: Some(Arc::clone(&out)),
            ..Default::default()
        };
        let cat = starsift::catalogue::Catalogue::load(starsift::catalogue::Source::Path(p), &opts)
            .unwrap();
        assert_eq!(cat.len(), n);
        assert_eq!(
            starsift::ledger::fingerprint_text(out.load(Ordering::Relaxed)),
            starsift::ledger::fingerprint(&std::fs::read(p).unwrap()),
            "{}",
            p.display()
        );
    }
}

#[test]
fn a_depth_in_mmag_beside_one_in_ppm_reads_the_ppm() {
    // Invented rows under a follow-up list's header, which gives the depth
    // twice, `Depth (mmag)` first: before, the mmag column was taken and
    // the whole table refused. The flux depth is read as given.
    let text = "TIC ID,TOI,Period (days),Epoch (BJD),Duration (hours),Depth (mmag),Depth (mmag) err,Depth (ppm),Depth (ppm) err\n\
                100,100.01,3.5,2458700.5,2.5,0.76,0.05,700.0,40\n\
                101,101.01,5.5,2458701.5,3.0,1.09,0.05,1000.0,40\n";
    let c = common::load_text(text);
    let depth = c.columns.iter().find(|u| u.field == "depth_ppm").unwrap();
    assert_eq!(depth.header, "Depth (ppm)");
    assert_eq!(c.value(Field::DepthPpm, 1), Some(1000.0));
    // Only mmag: read as a flux drop by Pogson's ratio (a definition):
    // 1 − 10^(−0.4 × 0.00076) = 699.74 ppm (computed offline in Python).
    let only = "star,candidate,period_d,epoch,duration_h,Depth (mmag)\nA,A-1,3.5,100.5,2.5,0.76\n";
    let c = load_bytes("mmag.csv", only.as_bytes()).unwrap();
    let d = c.value(Field::DepthPpm, 0).unwrap();
    assert!((d - 699.74).abs() < 0.01, "{d}");
    let depth = c.columns.iter().find(|u| u.field == "depth_ppm").unwrap();
    assert_eq!(depth.unit, "mmag (stored as ppm)");
}

#[test]
fn a_stars_parameters_of_zero_or_below_are_unknown() {
    // Invented rows whose unknown stellar values and ephemeris errors were
    // written 0 or -1: read as values they made the star massless and
    // every orbit `crowded`, and errors of a day joined unrelated periods.
    // They are read as missing, and said.
    let text = "star,candidate,period_d,epoch,depth_ppm,duration_h,star_radius_rsun,star_mass_msun,star_teff_k,ror,period_err_d,epoch_err_d\n\
                A,A-1,4.1,100.0,700,3.0,0,0,0,0,0,0\n\
                A,A-2,9.7,101.0,650,3.6,-1,-1,-1,-1,-1,-1\n\
                B,B-1,5.1,100.0,700,3.0,1.1,1.05,5800,0.03,0.0001,0.001\n";
    let c = common::load_text(text);
    for f in [
        Field::StarRadiusRsun,
        Field::StarMassMsun,
        Field::StarTeffK,
        Field::Ror,
        Field::PeriodErrD,
        Field::EpochErrD,
    ] {
        assert_eq!(c.value(f, 0), None, "{f}");
        assert_eq!(c.value(f, 1), None, "{f}");
        assert!(c.value(f, 2).is_some(), "{f}");
    }
    let notes = c.notes.join("\n");
    assert!(
        notes.contains(
            "2 star_mass_msun values of zero or below (`star_mass_msun`) read as unknown"
        ),
        "{notes}"
    );
    let checks = starsift::checks::run(&c, &starsift::checks::CheckSettings::default());
    assert!(!checks.flags(0).contains(starsift::flags::Flag::Crowded));
}

#[test]
fn star_zero_is_a_star_where_the_table_numbers_its_stars_from_zero() {
    // Invented: stars numbered 0, 1, 2 (a simulation's indices): `0` is a
    // star like the others, its two candidates one system. In a table
    // without a star `1` beside it, `0` is a placeholder for an unknown
    // host, and each of its rows a star of its own (docs/science.md §3.4).
    let rows = "A-1,4.1,100.0,700,3.0\nA-2,9.7,101.0,650,3.6\nB-1,5.1,100.0,700,3.0\n";
    let numbered = format!(
        "star,candidate,period_d,epoch,depth_ppm,duration_h\n{}",
        rows.lines()
            .zip(["0", "0", "1"])
            .map(|(r, s)| format!("{s},{r}\n"))
            .collect::<String>()
    );
    let c = common::load_text(&numbered);
    assert_eq!(c.star_of(0), c.star_of(1));
    assert_eq!(c.star_id(c.star_of(0)), "0");
    let placeholder = numbered.replace("\n1,", "\n7000001,");
    let c = common::load_text(&placeholder);
    assert_ne!(c.star_of(0), c.star_of(1));
    assert_eq!(c.star_id(c.star_of(0)), "host of A-1");
    // Prefixed the same way: `TIC 0` beside `TIC 1` is a star.
    let prefixed = numbered
        .replace("\n0,", "\nTIC 0,")
        .replace("\n1,", "\nTIC 1,");
    let c = common::load_text(&prefixed);
    assert_eq!(c.star_id(c.star_of(0)), "TIC 0");
}

#[test]
fn a_time_columns_name_may_state_its_unit() {
    // Invented: a pipeline's table whose names carry the unit
    // (`duration_days`, `period_hours`, `t14_min`). Before, those columns
    // matched no field and the table was refused; a duration in days read
    // as hours would make every transit 24 times too short.
    let c = common::load_text(
        "star,candidate,period_hours,epoch,depth_ppm,duration_days\nA,A-1,84,100.5,700,0.125\n",
    );
    let close = |v: Option<f64>, want: f64| (v.unwrap() - want).abs() < 1e-12;
    assert!(close(c.value(Field::PeriodD, 0), 3.5));
    assert!(close(c.value(Field::DurationH, 0), 3.0));
    let c = common::load_text(
        "star,candidate,period,epoch,depth_ppm,t14_min\nA,A-1,3.5,100.5,700,180\n",
    );
    assert!(close(c.value(Field::DurationH, 0), 3.0));
    // The canonical names keep their own units, with nothing to convert.
    let c = common::load_text(
        "star,candidate,period_d,epoch,depth_ppm,duration_h\nA,A-1,3.5,100.5,700,3\n",
    );
    assert_eq!(c.value(Field::DurationH, 0), Some(3.0));
    let duration = c.columns.iter().find(|u| u.field == "duration_h").unwrap();
    assert_eq!(duration.how, "synonym");
}

#[test]
fn a_depths_name_may_state_parts_per_thousand_or_millimagnitudes() {
    // Invented: a pipeline's table with `depth_ppt` or `depth_mmag`. Before,
    // those columns matched no field and the table was refused for want of
    // a depth (the bracketed `Depth (mmag)` was read).
    let c = common::load_text(
        "star,candidate,period,epoch,depth_ppt,duration\nA,A-1,3.5,100.5,0.7,3\n",
    );
    assert!((c.value(Field::DepthPpm, 0).unwrap() - 700.0).abs() < 1e-9);
    // 1 mmag is a flux drop of 1 − 10^(−0.4 × 0.001) = 920.6 ppm (Pogson's
    // ratio, 100^(1/5) per magnitude).
    let c = common::load_text(
        "star,candidate,period,epoch,depth_mmag,duration\nA,A-1,3.5,100.5,1.0,3\n",
    );
    assert!((c.value(Field::DepthPpm, 0).unwrap() - 920.6).abs() < 0.05);
    // A unit word on another field is no depth unit.
    assert_eq!(Field::from_header("period_mmag"), None);
}

#[test]
fn durations_in_days_under_a_plain_name_are_said() {
    // Invented rows: 3 h transits at 3.1 and 7.4 d, written in days
    // (0.125 d) under a plain `duration`, which is read as hours. Their
    // median is 0.04 of a central transit across the Sun at those periods
    // (Winn 2010's T14), so every output says they look like days. The
    // same rows in hours say nothing.
    let days = "star,candidate,period,epoch,depth_ppm,duration\nM,M-1,3.1,1001.0,800,0.125\nM,M-2,7.4,1002.9,1200,0.125\n";
    let c = common::load_text(days);
    assert!(
        c.notes
            .iter()
            .any(|n| n.contains("look like days read as hours")),
        "{:?}",
        c.notes
    );
    // `summary`'s load, which keeps only the ids, says the same.
    let ids_only = Catalogue::load(
        Source::Bytes {
            name: "invented.csv",
            data: days.as_bytes(),
        },
        &LoadOptions {
            index_only: true,
            ..LoadOptions::default()
        },
    )
    .unwrap();
    assert_eq!(ids_only.notes, c.notes);
    let c = common::load_text(&days.replace("0.125", "3.0"));
    assert!(c.notes.is_empty(), "{:?}", c.notes);
    // Stated in the header, the unit is read and nothing is said.
    let c = common::load_text(&days.replace(",duration\n", ",duration (days)\n"));
    assert!(c.notes.is_empty(), "{:?}", c.notes);
    assert!((c.value(Field::DurationH, 0).unwrap() - 3.0).abs() < 1e-12);
}

#[test]
fn a_table_that_numbers_each_stars_signals_names_them_star_dot_number() {
    // Invented rows in the layout of the archives' threshold-crossing event
    // tables (`ticid`, `tce_plnt_num`, `tce_*`; from memory of their column
    // lists): no candidate column. Before, the table was refused for a
    // missing candidate. Each signal is now `<star>.<nn>`, the rows keep
    // their line numbers (a comment line first), and the table says how the
    // candidates were named.
    let text = "# invented events\n\
        ticid,tce_plnt_num,tce_period,tce_time0bt,tce_depth,tce_duration,tce_model_snr\n\
        901,1,3.5,1325.1,500,2.5,12\n\
        901,2,7.9,1326.3,400,3.0,11\n\
        902,1,5.5,1325.1,500,2.5,12\n\
        902,1,5.5,1325.1,500,2.5,12\n";
    let c = load_bytes("events.csv", text.as_bytes()).unwrap();
    let ids: Vec<&str> = (0..c.len() as u32).map(|i| c.candidate_id(i)).collect();
    assert_eq!(ids, ["901.01", "901.02", "902.01"]);
    assert_eq!(c.star_id(c.star_of(1)), "901");
    assert_eq!(c.value(Field::PeriodD, 1), Some(7.9));
    assert_eq!(c.value(Field::DepthPpm, 2), Some(500.0));
    // The copy of 902's signal is refused on its own line, 6.
    assert_eq!(c.skipped.len(), 1);
    assert_eq!(c.skipped[0].line, 6);
    assert!(
        c.skipped[0].reason.contains("902.01"),
        "{}",
        c.skipped[0].reason
    );
    assert!(
        c.notes.iter().any(|n| n.contains("tce_plnt_num")),
        "{:?}",
        c.notes
    );
    // The same as an IPAC table, as the archives serve these tables, its
    // units in the header (`BJD-2454833`: the epochs become full dates).
    let ipac = concat!(
        "\\fixlen = T\n",
        "|  kepid|tce_plnt_num|tce_period|tce_time0bk|tce_depth|tce_duration|\n",
        "|   long|         int|    double|     double|   double|      double|\n",
        "|       |            |      days|BJD-2454833|      ppm|       hours|\n",
        "     901            1        3.5       170.5       500          2.5 \n",
        "     901            2        7.9       162.5       400          3.0 \n",
    );
    let path = scratch("numbered-ipac").join("events.tbl");
    std::fs::write(&path, ipac).unwrap();
    let c = Catalogue::load(Source::Path(&path), &LoadOptions::default()).unwrap();
    assert_eq!(c.candidate_id(1), "901.02");
    assert_eq!(c.value(Field::Epoch, 0), Some(2454833.0 + 170.5));
    // A table that names its candidates keeps its names.
    let named = "kepid,kepoi_name,tce_plnt_num,period,epoch,depth_ppm,duration_h\n\
        5,K00005.01,1,3.5,100.1,500,2.5\n";
    let c = load_bytes("named.csv", named.as_bytes()).unwrap();
    assert_eq!(c.candidate_id(0), "K00005.01");
}

/// Every value the catalogue keeps is the standard library's reading of
/// its cell (Rust's `str::parse::<f64>`, correctly rounded), bit for bit,
/// however the column stores it: few digits (four bytes), full Julian
/// dates with many decimals, exponents, signs, missing cells; read by the
/// quick reader, and by the general one (a table with quoted cells).
#[test]
fn kept_values_are_the_cells_read_exactly() {
    for quoted in [false, true] {
        kept_values_read_exactly(quoted);
    }
}

fn kept_values_read_exactly(quoted: bool) {
    let mut text = String::from("star,candidate,period,epoch,depth_ppm,duration_h,dec_deg,snr\n");
    let mut want = Vec::new();
    for i in 0..3000u32 {
        let period = format!("{}.{:06}", 1 + i % 97, (i * 7919) % 1_000_000);
        let epoch = if i % 3 == 0 {
            format!("2459{:03}.{:06}", i % 1000, (i * 104_729) % 1_000_000)
        } else {
            format!("{}.{:05}", 100 + i % 50, (i * 31) % 100_000)
        };
        let depth = match i % 4 {
            0 => format!("{}e2", 1 + i % 90),
            1 => format!("{}.{}", 200 + i, i % 10),
            2 => format!("{}", 150 + i),
            _ => format!(
                "{}.{:012}",
                300 + i % 7,
                u64::from(i) * 123_456_789 % 1_000_000_000_000
            ),
        };
        let dec = format!("-{}.{:05}", i % 89, (i * 13) % 100_000);
        let snr = if i % 5 == 0 {
            String::new()
        } else {
            format!("{}.{}", 7 + i % 30, i % 10)
        };
        let (star, cand) = (format!("S{i}"), format!("S{i}-1"));
        let cand_cell = if quoted && i % 7 == 0 {
            format!("\"{cand}\"")
        } else {
            cand
        };
        text.push_str(&format!(
            "{star},{cand_cell},{period},{epoch},{depth},3.5,{dec},{snr}\n"
        ));
        want.push([period, epoch, depth, dec, snr]);
    }
    let cat = load_bytes("exact.csv", text.as_bytes()).unwrap();
    assert_eq!(cat.len(), want.len());
    let fields = [
        Field::PeriodD,
        Field::Epoch,
        Field::DepthPpm,
        Field::DecDeg,
        Field::Snr,
    ];
    for (c, cells) in want.iter().enumerate() {
        let c = cat.find_candidate(&format!("S{c}-1")).unwrap();
        for (field, cell) in fields.iter().zip(cells) {
            let got = cat.value(*field, c);
            let expected = (!cell.is_empty()).then(|| cell.parse::<f64>().unwrap());
            assert_eq!(
                got.map(f64::to_bits),
                expected.map(f64::to_bits),
                "{field:?} of `{cell}` (quoted: {quoted})"
            );
        }
    }
}

#[test]
fn a_k2_style_candidate_table_is_read_by_its_own_names() {
    // Invented rows under the K2 candidate table's names (`hostname`,
    // `epic_candname`, `pl_trandur` in hours; from memory of the archive's
    // column list): before, the load stopped for want of a star column.
    // Its depth, in percent there, is refused until the unit is said, as
    // any bare depth whose median is below 50.
    let text = "pl_name,hostname,epic_candname,disposition,pl_orbper,pl_tranmid,pl_trandep,pl_trandur\n\
        ,EPIC 900,EPIC 900.01,CANDIDATE,10.05,2456813.4,0.12,2.6\n\
        ,EPIC 900,EPIC 900.02,CANDIDATE,24.6,2456812.3,0.09,3.1\n";
    let e = load_bytes("k2.csv", text.as_bytes())
        .unwrap_err()
        .to_string();
    assert!(e.contains("depth"), "{e}");
    let opts = LoadOptions {
        depth_unit: Some(DepthUnit::Percent),
        ..Default::default()
    };
    let c = Catalogue::load(
        starsift::catalogue::Source::Bytes {
            name: "k2.csv",
            data: text.as_bytes(),
        },
        &opts,
    )
    .unwrap();
    assert_eq!(c.len(), 2);
    assert_eq!(c.star_id(c.star_of(1)), "EPIC 900");
    assert_eq!(c.candidate_id(1), "EPIC 900.02");
    assert_eq!(c.value(Field::DurationH, 1), Some(3.1));
    assert_eq!(c.value(Field::DepthPpm, 0), Some(1200.0));
}

#[test]
fn units_in_an_archives_comment_lines_above_the_header_are_read() {
    // The exoplanet archives write `# COLUMN name: description [unit]`
    // above a CSV table (from memory); a K2-style table gives its depths
    // in percent there and nowhere else. Invented rows. Before, its
    // depths (median 0.06) stopped the load as of no known unit.
    let text = "\
# An invented archive table
#
# COLUMN epic_hostname:  Host Name
# COLUMN epic_candname:  Candidate Name
# COLUMN pl_orbper:      Orbital Period [days]
# COLUMN pl_trandep:     Transit Depth [%]
# COLUMN pl_trandur:     Transit Duration [hours]
# COLUMN planet_radius:  Planet Radius [Jupiter radii]
#
epic_hostname,epic_candname,pl_orbper,pl_tranmid,pl_trandep,pl_trandur,planet_radius
EPIC 1,EPIC 1.01,3.52,2457100.1,0.08,3.1,0.2
EPIC 1,EPIC 1.02,9.81,2457101.2,0.05,4.0,0.3
EPIC 2,EPIC 2.01,4.10,2457100.4,6.0,3.0,2.5
";
    let cat = load_bytes("k2_like.csv", text.as_bytes()).unwrap();
    let depth = |s: &str| cat.value(Field::DepthPpm, cat.find_candidate(s).unwrap());
    // 1 % = 10⁴ ppm (a definition).
    assert_eq!(depth("EPIC 2.01"), Some(60_000.0));
    assert_eq!(depth("EPIC 1.01"), Some(800.0));
    // R_J/R⊕ = 11.209 (IAU 2015 Resolution B3).
    let r = cat
        .value(
            Field::PlanetRadiusRearth,
            cat.find_candidate("EPIC 2.01").unwrap(),
        )
        .unwrap();
    assert!((r - 28.02).abs() < 0.01, "{r}");
    // A unit the header gives itself is its own: `(ppm)` beside a comment
    // that says percent.
    let own = text.replace(",pl_trandep,", ",pl_trandep (ppm),");
    let cat = load_bytes("k2_own_unit.csv", own.as_bytes()).unwrap();
    let d = cat.value(Field::DepthPpm, cat.find_candidate("EPIC 1.02").unwrap());
    assert_eq!(d, Some(0.05));
}
