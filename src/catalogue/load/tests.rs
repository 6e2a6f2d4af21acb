//! The loader's unit tests.

use super::*;

#[test]
fn delimiter_by_extension_and_sniff() {
    assert_eq!(delimiter_for("a/b.TSV"), Some(b'\t'));
    assert_eq!(delimiter_for("b.tsv.gz"), Some(b'\t'));
    assert_eq!(delimiter_for("b.csv.gz"), Some(b','));
    assert_eq!(delimiter_for("b.txt"), None);
    assert_eq!(sniff(b"# a,b,c\nstar\tcandidate\tperiod\n"), b'\t');
    assert_eq!(sniff(b"star,candidate\tx,y\n"), b',');
}

#[test]
fn record_ends_respect_quotes_and_comments() {
    let b = b"a,\"x\ny\",c\n# \"odd\nd,e\"f,g\n\"h\"\"\n\",i\npartial";
    let mut ends = Vec::new();
    scan_record_ends(b, b',', |e| {
        ends.push(e);
        true
    });
    // Records end after `c`, after the comment, after `g` (a quote inside
    // an unquoted field is literal), and after the escaped-quote field.
    assert_eq!(ends, [10, 17, 25, 34]);
    assert_eq!(last_record_end(b, b','), Some(34));
    assert_eq!(last_record_end(b"a,b\nc,d\ne", b','), Some(8));
    assert_eq!(first_record_end(b"\"a\nb\",c\nd"), Some(8));
}

#[test]
fn text_end_finds_what_a_byte_loop_finds() {
    let mut rng = crate::demo::Rng::new(3);
    let alphabet = b",\n0a.\x80\xff\t\x00\x7f";
    for len in [0, 1, 7, 8, 9, 15, 16, 17, 100, 1000] {
        let bytes: Vec<u8> = (0..len)
            .map(|_| alphabet[rng.below(alphabet.len() as u64) as usize])
            .collect();
        for delimiter in [b',', b'\t'] {
            for p in 0..=len {
                let want = (p..len)
                    .find(|&i| bytes[i] == delimiter || bytes[i] == b'\n')
                    .unwrap_or(len);
                assert_eq!(text_end(&bytes, p, delimiter), want, "{bytes:?} from {p}");
            }
        }
    }
}

/// Parses `text` (rows after a header of `header`) as one chunk, as the
/// loader does: by the one-pass reader when `plain`, else by the
/// general (csv-core) reader, which a quote in a trailing comment forces.
/// The delimiter is a tab when the header has one, else a comma.
fn parse_rows(header: &str, text: &[u8], plain: bool, index_only: bool) -> Part {
    let delimiter = if header.contains('\t') { b'\t' } else { b',' };
    let header: Vec<String> = (header.split(delimiter as char))
        .map(str::to_string)
        .collect();
    let mapping = Mapping::resolve("t.csv", &header, &ColumnMap::default()).expect("header");
    let layout = Layout::new(header, mapping, delimiter, index_only);
    let mut bytes = text.to_vec();
    if !plain {
        bytes.extend_from_slice(b"\n#\"\n");
    }
    let chunk = Chunk {
        seq: 0,
        bytes,
        plain: false,
    };
    layout.parse(&chunk, &hashbrown::DefaultHashBuilder::default(), None)
}

/// A part as comparable text: every kept row and every skip.
fn part_text(p: &Part) -> Vec<String> {
    let mut out: Vec<String> = (0..p.lines.len())
        .map(|r| {
            let nums: Vec<String> = p
                .num
                .iter()
                .filter(|c| r < c.len())
                .map(|c| c.get(r))
                .map(|v| format!("{:?}", v.to_bits()))
                .collect();
            format!(
                "{} {} {} {}",
                p.lines[r],
                p.stars.get(r),
                p.candidates.get(r),
                nums.join(" ")
            )
        })
        .collect();
    out.extend(p.skipped.iter().map(|s| format!("{s:?}")));
    out.push(format!("rows {}", p.rows_seen));
    out
}

#[test]
fn one_pass_rows_read_as_the_general_reader_reads_them() {
    // Every kind of cell the one-pass reader takes or hands on.
    let header = "star,candidate,period,epoch,depth_ppm,duration_h,snr,note";
    let text = "S1,S1-a,10.5,100.25,500,3.5,12,x\n\
                S1,S1-b,2e1,1.5E+2,2.5e-3,1,,\n\
                S2, S2-a,10,100,500,3,nan,y z\n\
                S2,S2-b ,10,100,500,3,NaN,\r\n\
                S3,S3-a,10 ,100,500,3,1,\n\
                S3,S3-b,12345678901234567890,100,500,3,1,q\n\
                S4,S4-a,10,100,500,300,1,q\n\
                S4,S4-b,10,100,-5,3,1,q\n\
                S5,S5-a,10,100,500,3,1\n\
                S5,S5-b,10,100,500,3,1,q,extra\n\
                \n\
                # a comment\n\
                \u{e9}toile,\u{e9}-1,1,2,3,4,5,6\r\n\
                S6,S6-a,10,100,abc,3,1,q\n\
                S6,S6-b,1e999,100,500,3,1e-999,q\n\
                S7,,10,100,500,3,1,q\n\
                S7,S7-a,.5,-.5,+500,3.,1,q\n\
                S7,S7-b,10,100,500,3,1e1234567,q\n\
                S8,S8-a,1,2,3,4,5,last";
    for text in [
        text.as_bytes(),
        &[text.as_bytes(), b"\nS9,S9-\xff,1,2,3,4,5,6"].concat(),
    ] {
        for index_only in [false, true] {
            let plain = parse_rows(header, text, true, index_only);
            let general = parse_rows(header, text, false, index_only);
            assert_eq!(part_text(&plain), part_text(&general));
        }
    }
    let plain = parse_rows(header, text.as_bytes(), true, false);
    assert!(
        plain.lines.len() >= 8 && plain.skipped.len() >= 6,
        "{:?}",
        part_text(&plain)
    );
}

proptest::proptest! {
    #[test]
    fn one_pass_reader_agrees_on_random_rows(
        rows in proptest::collection::vec(
            (0usize..8, proptest::collection::vec(0usize..24, 8), 0usize..10, proptest::bool::ANY),
            1..30,
        )
    ) {
        const IDS: [&str; 8] = ["S1", "S2", " S3", "S4 ", "", "\u{e9}", "a b", "S1"];
        const NUMS: [&str; 24] = [
            "1", "-2.5", "1e3", "1e999", "", "nan", "NA", "abc", " 4", "5 ",
            "12345678901234567890", ".5", "1.", "+3", "0", "2.5E-2",
            ".", "-", "1.2.3", "-.5", "5-", "123456789012345", "1234567890123456", "inf",
        ];
        let header = "star,candidate,period,epoch,depth_ppm,duration_h,snr,impact";
        let mut text = String::new();
        for (i, (id, cells, shape, crlf)) in rows.iter().enumerate() {
            let mut fields = vec![IDS[*id].to_string(), format!("c{i}")];
            fields.extend(cells[..6].iter().map(|&c| NUMS[c].to_string()));
            match shape {
                0 => { fields.pop(); }
                1 => fields.push("x".into()),
                2 => fields = vec!["# note".into()],
                3 => fields = vec![String::new()],
                _ => {}
            }
            text.push_str(&fields.join(","));
            text.push_str(if *crlf { "\r\n" } else { "\n" });
        }
        for index_only in [false, true] {
            let plain = parse_rows(header, text.as_bytes(), true, index_only);
            let general = parse_rows(header, text.as_bytes(), false, index_only);
            proptest::prop_assert_eq!(part_text(&plain), part_text(&general));
            // The same rows as TSV.
            let (header, text) = (header.replace(',', "\t"), text.replace(',', "\t"));
            let plain = parse_rows(&header, text.as_bytes(), true, index_only);
            let general = parse_rows(&header, text.as_bytes(), false, index_only);
            proptest::prop_assert_eq!(part_text(&plain), part_text(&general));
        }
    }
}

#[test]
fn a_checked_decimal_is_a_number() {
    // What the quick check takes (its value unread) must never be a bad cell.
    let take = [
        "0",
        "5038",
        "0.043",
        "-45.64639",
        ".5",
        "5.",
        "-.5",
        "+3",
        "1e3",
        "2.5E-2",
        "1e999",
        "123456789012345678901234567890",
        "1.40e-4",
    ];
    let leave = ["", ".", "-", "e5", "1e", "1e+", "1e1234567", "nan", "--1"];
    for cell in take {
        let row = format!("{cell},rest");
        assert_eq!(
            number_scan(row.as_bytes(), 0).map(|(_, q)| q),
            Some(cell.len()),
            "{cell}"
        );
        assert!(!matches!(parse_cell(cell.as_bytes()), Cell::Bad), "{cell}");
    }
    for cell in leave {
        let row = format!("{cell},rest");
        assert!(
            number_scan(row.as_bytes(), 0).is_none_or(|(_, q)| q != cell.len()),
            "{cell}"
        );
    }
}

#[test]
fn keys_sort_as_a_plain_sort_does() {
    let mut rng = crate::demo::Rng::new(5);
    for n in [0usize, 1, 100, 5000, 70_000] {
        // Few distinct hashes too, so that rows must order equal ones.
        let mut hashes: Vec<u64> = (0..n)
            .map(|i| {
                if i % 3 == 0 {
                    rng.next_u64()
                } else {
                    (rng.next_u64() % 7) << 60
                }
            })
            .collect();
        if n == 5000 {
            // One prefix for all, in falling order: the insertion pass gives up.
            hashes = (0..n as u64).map(|i| (n as u64 - i) << 20).collect();
        }
        let bits = 17;
        let mut want: Vec<u64> = (hashes.iter().enumerate())
            .map(|(i, &h)| (h >> bits << bits) | i as u64)
            .collect();
        want.sort();
        assert_eq!(sorted_keys(&hashes, bits), want, "{n}");
    }
}

#[test]
fn ids_group_by_text_even_when_hashes_collide() {
    // Texts by row, and hashes that collide on purpose: one hash for
    // different texts, and the same text under one hash.
    let texts = ["a", "b", "a", "c", "b", "a", "d"];
    let hashers: [fn(&str) -> u64; 3] = [
        |_| 1 << 40,
        |t| (t.len() as u64) << 40,
        |t| (t.as_bytes()[0] as u64) << 40,
    ];
    for hash in hashers {
        let hashes: Vec<u64> = texts.iter().map(|t| hash(t)).collect();
        let (index, first_of) =
            IdIndex::build(&hashes, |a, b| texts[a as usize] == texts[b as usize]);
        assert_eq!(first_of, [0, 1, 0, 3, 1, 0, 6]);
        for (row, t) in texts.iter().enumerate() {
            let found = index.find(hash(t), |r| texts[r as usize] == *t);
            assert_eq!(found, Some(first_of[row]), "{t}");
        }
        assert_eq!(index.keys.len(), 4);
    }
}

#[test]
fn ids_group_by_text_when_many_texts_share_few_hashes() {
    // 20,000 rows of 3,000 texts under 7 hash parts: every row of a text
    // must find the text's first row, as a plain map by text says.
    let mut state = 0x9e37_79b9_7f4a_7c15u64;
    let mut next = || {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        state
    };
    let texts: Vec<String> = (0..20_000).map(|_| format!("T{}", next() % 3000)).collect();
    let hash = |t: &str| (t.bytes().map(u64::from).sum::<u64>() % 7) << 40;
    let hashes: Vec<u64> = texts.iter().map(|t| hash(t)).collect();
    let (index, first_of) = IdIndex::build(&hashes, |a, b| texts[a as usize] == texts[b as usize]);
    let mut first: std::collections::HashMap<&str, u32> = Default::default();
    for (row, t) in texts.iter().enumerate() {
        let f = *first.entry(t.as_str()).or_insert(row as u32);
        assert_eq!(first_of[row], f, "row {row}");
        assert_eq!(index.find(hash(t), |r| texts[r as usize] == *t), Some(f));
    }
    assert_eq!(index.keys.len(), first.len());
    assert!(index.keys.windows(2).all(|w| w[0] < w[1]));
}

#[test]
fn fast_path_agrees_with_std() {
    for s in [
        "0",
        "-0",
        "1",
        "3.5",
        "-12.25",
        "+7",
        "0.000123",
        "1e3",
        "2.5E-4",
        "123456789.123456",
        "9007199254740993",
        "1e22",
        "1e-22",
        "4.35",
        "0.1",
        "1234.56789",
    ] {
        let std: f64 = s.parse().unwrap();
        match fast_f64(s.as_bytes()) {
            Some(v) => assert_eq!(v.to_bits(), std.to_bits(), "{s}"),
            None => assert!(s == "9007199254740993", "{s} should take the fast path"),
        }
    }
    for s in ["", ".", "-", "1e", "1.2.3", "e5", "1e400", "abc", "1,5"] {
        assert!(fast_f64(s.as_bytes()).is_none(), "{s}");
    }
}

proptest::proptest! {
    #[test]
    fn fast_path_is_exact(m in 0u64..(1 << 53), frac in 0usize..12, e in -10i32..10, neg: bool) {
        let digits = m.to_string();
        let s = if frac > 0 && frac < digits.len() {
            format!("{}{}.{}e{}", if neg { "-" } else { "" }, &digits[..digits.len() - frac], &digits[digits.len() - frac..], e)
        } else {
            format!("{}{}e{}", if neg { "-" } else { "" }, digits, e)
        };
        let std: f64 = s.parse().unwrap();
        if let Some(v) = fast_f64(s.as_bytes()) {
            proptest::prop_assert_eq!(v.to_bits(), std.to_bits(), "{}", s);
        }
    }
}

proptest::proptest! {
    /// What `is_number` accepts, `parse_cell` reads as a value or as a
    /// non-finite one (missing), never as text that is not a number.
    #[test]
    fn a_checked_number_is_one(cell in "[ ]?[-+]?[0-9]{0,4}[.]?[0-9]{0,3}([eE][-+]?[0-9]{0,6})?[ ]?|[ -~]{0,8}") {
        if is_number(cell.as_bytes()) {
            proptest::prop_assert!(!matches!(parse_cell(cell.as_bytes()), Cell::Bad), "{}", cell);
        }
    }
}

#[test]
fn numbers_are_told_from_text() {
    for yes in ["1", "-2.5", " +3.25e-4 ", "1e400", "0.000123", "5038"] {
        assert!(is_number(yes.as_bytes()), "{yes}");
    }
    for no in [
        "", "nan", "1.", ".5", "1e", "1e123456", "3.5d", "--", "1,5", "0x10",
    ] {
        assert!(!is_number(no.as_bytes()), "{no}");
    }
}

#[test]
fn plain_text_has_no_quote_and_no_bare_cr() {
    assert!(plain_text(b"a,b\r\nc,d\n"));
    assert!(plain_text(b""));
    assert!(!plain_text(b"a,\"b\"\n"));
    assert!(!plain_text(b"a\rb\n"));
    assert!(!plain_text(b"a,b\r"));
}

#[test]
fn cells() {
    assert!(matches!(parse_cell(b" 3.5 "), Cell::Value(v) if v == 3.5));
    assert!(matches!(parse_cell(b"+1e3"), Cell::Value(v) if v == 1000.0));
    assert!(matches!(parse_cell(b"NaN"), Cell::Missing));
    assert!(matches!(parse_cell(b""), Cell::Missing));
    assert!(matches!(parse_cell(b"inf"), Cell::Missing));
    assert!(matches!(parse_cell(b"3.5d"), Cell::Bad));
}

#[test]
fn positions_in_sexagesimal_read_as_degrees() {
    // 1 h of right ascension = 15° (the definition of the hour angle), so
    // 07h29m25.85s = (7 + 29/60 + 25.85/3600) × 15 = 112.3577083…°.
    let close = |a: Option<f64>, b: f64| a.is_some_and(|a| (a - b).abs() < 1e-9);
    assert!(close(
        sexagesimal(b"07:29:25.85", true),
        112.357_708_333_333_33
    ));
    assert!(close(
        sexagesimal(b"07h29m25.85s", true),
        112.357_708_333_333_33
    ));
    assert!(close(sexagesimal(b"12 30 00", true), 187.5));
    // The sign belongs to the whole angle: −00:30:00 is −0.5°.
    assert!(close(sexagesimal(b"-00:30:00", false), -0.5));
    assert!(close(sexagesimal(b"+45:06:07.2", false), 45.102));
    assert!(close(
        sexagesimal(b"-05d06m07.1s", false),
        -5.101_972_222_222_222
    ));
    // 60.00 s, a rounding some tables write.
    assert!(close(sexagesimal(b"10:59:60.00", true), 165.0));
    for bad in [
        &b"1.5"[..],
        b"10:61:00",
        b"10:30:61",
        b"10:30",
        b"1.5:30:00",
        b"a:b:c",
        b"",
    ] {
        assert_eq!(
            sexagesimal(bad, true),
            None,
            "{}",
            String::from_utf8_lossy(bad)
        );
    }
}

#[test]
fn an_archive_exports_headers_and_bracketed_units_are_read() {
    // Headers as archive exports spell them (invented rows): spaces, the
    // unit in brackets, `err` after it; positions in sexagesimal; a
    // duration in days, converted to hours (1 d = 24 h, SI).
    let text = "TIC ID,TOI,RA,Dec,Period (days),Period (days) err,Epoch (BJD - 2457000),\
                Duration [d],Depth (ppm),TFOPWG Disposition,Stellar log(g) (cm/s^2)\n\
                100,100.01,07:29:25.85,-05:06:07.1,3.5,0.0001,1400.25,0.125,800,PC,4.44\n";
    let cat = Catalogue::from_text("invented.csv", text);
    assert_eq!(cat.len(), 1, "{:?}", cat.skipped);
    assert_eq!(cat.star_id(0), "100");
    assert_eq!(cat.value(Field::PeriodD, 0), Some(3.5));
    assert_eq!(cat.value(Field::PeriodErrD, 0), Some(0.0001));
    assert_eq!(cat.value(Field::Epoch, 0), Some(2_458_400.25));
    assert_eq!(cat.value(Field::DurationH, 0), Some(3.0));
    assert_eq!(cat.value(Field::DepthPpm, 0), Some(800.0));
    // `log(g)` is the quantity's name, `(cm/s^2)` its unit.
    assert_eq!(cat.value(Field::StarLogg, 0), Some(4.44));
    assert!((cat.value(Field::RaDeg, 0).unwrap() - 112.357_708_333_333_33).abs() < 1e-9);
    assert!((cat.value(Field::DecDeg, 0).unwrap() + 5.101_972_222_222_222).abs() < 1e-9);
    assert_eq!(cat.disposition_columns().len(), 1);
    // A unit no rule converts stops the load and names the column.
    let bad = text.replace("Duration [d]", "Duration [fortnights]");
    let e = Catalogue::load(
        Source::Bytes {
            name: "export.csv",
            data: bad.as_bytes(),
        },
        &LoadOptions::default(),
    )
    .unwrap_err()
    .to_string();
    assert!(
        e.contains("Duration [fortnights]") && e.contains("fortnights"),
        "{e}"
    );
}

#[test]
fn positions_in_a_stated_unit_are_read_in_degrees() {
    // 1 h of right ascension = 15° and 1 rad = 180°/π (definitions).
    // Decimal hours stated in the header are converted; sexagesimal cells
    // of the same column are degrees already and are not converted again.
    // (Invented rows.)
    let load = |ra: &str, dec: &str| {
        Catalogue::load(
            Source::Bytes {
                name: "invented.csv",
                data: format!(
                    "star,candidate,{ra},{dec},period,epoch,depth_ppm,duration\n\
                     S1,S1-1,1.5,-0.1,3.5,100.0,800,3.0\n\
                     S2,S2-1,07:30:00,-05:06:07.1,4.5,100.0,800,3.0\n"
                )
                .as_bytes(),
            },
            &LoadOptions::default(),
        )
    };
    let cat = load("RA (h)", "Dec (deg)").unwrap();
    assert_eq!(cat.len(), 2, "{:?}", cat.skipped);
    assert_eq!(cat.value(Field::RaDeg, 0), Some(22.5));
    assert_eq!(cat.value(Field::RaDeg, 1), Some(112.5));
    assert_eq!(cat.value(Field::DecDeg, 0), Some(-0.1));
    let cat = load("RA [rad]", "Dec [rad]").unwrap();
    assert!(
        (cat.value(Field::RaDeg, 0).unwrap() - 1.5 * 180.0 / std::f64::consts::PI).abs() < 1e-9
    );
    assert!((cat.value(Field::DecDeg, 1).unwrap() + 5.101_972_222_222_222).abs() < 1e-9);
    // The frame is not a unit: degrees, as without one.
    for (ra, dec) in [
        ("RA (J2000)", "Dec (J2000)"),
        ("RA [deg; ICRS]", "Dec [h:m:s]"),
    ] {
        let cat = load(ra, dec).unwrap();
        assert_eq!(cat.len(), 2, "{:?}", cat.skipped);
        assert_eq!(cat.value(Field::RaDeg, 0), Some(1.5), "{ra}");
        assert_eq!(cat.value(Field::DecDeg, 0), Some(-0.1), "{dec}");
    }
    // A declination in hours, or a unit not read, stops the load naming
    // the column: a position is never read in a unit it is not in.
    for (ra, dec, col) in [
        ("RA (h)", "Dec (h)", "Dec (h)"),
        ("RA (arcsec)", "Dec", "RA (arcsec)"),
    ] {
        let e = load(ra, dec).unwrap_err().to_string();
        assert!(e.contains(&format!("column `{col}`")), "{e}");
    }
}

#[test]
fn a_false_positive_probability_in_percent_is_stored_as_a_fraction() {
    // A probability cannot exceed 1: values above 1 and none above 100 are
    // percent; so is a column whose header states `%`. (Invented rows.)
    let rows = "S,S-1,3.5,100.0,800,3.0,75\nS,S-2,7.5,100.5,800,3.0,2\n";
    let seen = Catalogue::from_text(
        "invented.csv",
        &format!("star,candidate,period,epoch,depth,duration,fpp\n{rows}"),
    );
    assert_eq!(seen.value(Field::Fpp, 0), Some(0.75));
    assert_eq!(seen.value(Field::Fpp, 1), Some(0.02));
    let stated = Catalogue::from_text(
        "invented.csv",
        "star,candidate,period,epoch,depth,duration,FPP (%)\nS,S-1,3.5,100.0,800,3.0,0.5\n",
    );
    assert_eq!(stated.value(Field::Fpp, 0), Some(0.005));
    // Fractions stay as they are.
    let plain = Catalogue::from_text(
        "invented.csv",
        "star,candidate,period,epoch,depth,duration,fpp\nS,S-1,3.5,100.0,800,3.0,0.5\n",
    );
    assert_eq!(plain.value(Field::Fpp, 0), Some(0.5));
}

#[test]
fn ids_that_number_each_stars_candidates_are_named_by_star() {
    // Invented: candidates numbered 1, 2 within each star, as pipelines
    // write them; many repeats across stars, so each is `star/id`, and a
    // repeat within one star is still a duplicate.
    let head = "star,candidate,period,epoch,depth,duration\n";
    let numbered = format!(
        "{head}A,1,3.5,100.0,800,3.0\nA,2,7.9,100.5,800,3.0\nB,1,4.5,100.0,800,3.0\n\
         C,1,5.5,100.0,800,3.0\nC,1,5.5,100.0,800,3.0\n"
    );
    let cat = Catalogue::from_text("invented.csv", &numbered);
    assert_eq!(cat.len(), 4);
    assert_eq!(cat.candidate_id(1), "A/2");
    assert_eq!(cat.members(cat.find_star("A").unwrap()).len(), 2);
    assert!(cat.find_candidate("B/1").is_some());
    assert_eq!(cat.skipped.len(), 1);
    assert!(
        cat.skipped[0].reason.contains("duplicate id `C/1`"),
        "{:?}",
        cat.skipped
    );
    assert!(
        cat.notes[0].contains("numbered per star"),
        "{:?}",
        cat.notes
    );
    // One candidate put on two stars in a catalogue of named candidates is
    // a duplicate, as before.
    let mut named = String::from(head);
    for i in 0..30 {
        named.push_str(&format!("S{i},S{i}.01,3.5,100.0,800,3.0\n"));
    }
    named.push_str("S99,S3.01,3.5,100.0,800,3.0\n");
    let cat = Catalogue::from_text("invented.csv", &named);
    assert_eq!((cat.len(), cat.skipped.len()), (30, 1));
    assert!(cat.notes.is_empty());
}

#[test]
fn probabilities_as_limits_or_with_errors_are_their_numbers() {
    for (cell, want) in [
        ("<0.001", 0.001),
        ("> 0.99", 0.99),
        ("<=1e-3", 0.001),
        ("≥0.5", 0.5),
        ("~0.2", 0.2),
        ("0.97±0.01", 0.97),
        ("0.97 +/- 0.01", 0.97),
        (">=99%", 0.99),
        ("0.3", 0.3),
    ] {
        assert_eq!(bounded_number(cell.as_bytes()), Some(want), "{cell}");
    }
    for bad in ["high", "<", "FP", ""] {
        assert_eq!(bounded_number(bad.as_bytes()), None, "{bad}");
    }
}

#[test]
fn a_star_is_found_by_another_spelling_among_thousands() {
    // Invented: 6,000 stars (past the small-catalogue sort), each found
    // by its id as written and by another spelling of it (case, a
    // hyphen for the space, leading zeros: docs/science.md §3.4).
    let mut text = String::from("star,candidate,period,epoch,depth,duration\n");
    for i in 0..6000 {
        text.push_str(&format!("TIC {i},C{i}-1,{}.5,100.0,800,3.0\n", 3 + i % 7));
    }
    let cat = Catalogue::from_text("invented.csv", &text);
    assert_eq!(cat.star_count(), 6000);
    for i in [0, 1, 999, 4095, 4096, 5999] {
        let s = cat.find_star(&format!("TIC {i}")).unwrap();
        assert_eq!(cat.find_star(&format!("tic-{i}")), Some(s), "{i}");
        assert_eq!(cat.find_star(&format!("TIC 000{i}")), Some(s), "{i}");
    }
    assert_eq!(cat.find_star("tic-6000"), None);
    assert_eq!(cat.find_star("KIC 12"), None);
}

/// Spellings joined among thousands of stars, whichever half of the hash
/// space their key falls in: three spellings of one star are one star,
/// under the first written (docs/science.md §3.4).
#[test]
fn three_spellings_of_one_star_among_thousands_are_one_star() {
    let mut text = String::from("star,candidate,period,epoch,depth,duration\n");
    for i in 0..5000 {
        text.push_str(&format!("TIC {i},C{i}-1,{}.5,100.0,800,3.0\n", 3 + i % 7));
    }
    let joined = [7, 1234, 4096, 4999];
    for i in joined {
        text.push_str(&format!("TIC{i},C{i}-2,11.5,100.0,800,3.0\n"));
        text.push_str(&format!("tic-000{i},C{i}-3,17.5,100.0,800,3.0\n"));
    }
    let cat = Catalogue::from_text("invented.csv", &text);
    assert_eq!(cat.star_count(), 5000);
    for i in joined {
        let c = |j: usize| cat.find_candidate(&format!("C{i}-{j}")).unwrap();
        assert_eq!(cat.members(cat.star_of(c(1))).len(), 3, "{i}");
        for j in 2..=3 {
            assert_eq!(cat.star_of(c(j)), cat.star_of(c(1)), "{i}");
        }
        assert_eq!(cat.star_id(cat.star_of(c(3))), format!("TIC {i}"));
    }
}

/// A second read given the first read's ids (`LoadOptions::ids_from`, the
/// browser's read of the values) is the catalogue a plain read makes, in
/// everything it holds; it shares the first read's ids when its rows name
/// the same, and groups its own otherwise (a duplicate dropped, a star
/// written two ways, a row naming no star).
#[test]
fn a_read_given_the_ids_of_a_first_read_is_a_plain_read() {
    let demo = crate::demo::CATALOGUE_CSV;
    let head = "star,candidate,period,epoch,depth,duration,star_radius\n";
    let duplicate =
        format!("{head}A1,A1-a,3,1,100,2,1\nA1,A1-a,3,1,100,2,1\nB2,B2-a,5,1,200,3,0\n");
    let spelled = format!("{head}KQ 100,k1,3,1,100,2,1\nKQ100,k2,5,1,200,3,1\nKQ7,k3,4,1,90,2,1\n");
    let hostless =
        format!("{head}S9,ZZ-901.01,3,1,100,2,1\n,ZZ-901.02,5,1,200,3,1\n,QQ-5.01,4,1,90,2,1\n");
    // A row naming no star and of no family keeps a star of its own, the
    // same in both reads: the note that says so must stay.
    let own = format!("{head}S9,ZZ-901.01,3,1,100,2,1\n,QQ-5.01,4,1,90,2,1\n");
    // The file rewritten between the reads: one candidate moved to
    // another star, as many rows, the same candidate ids.
    let last = demo.trim_end().rfind('\n').unwrap() + 1;
    let moved = format!(
        "{}ZZ0{}",
        &demo[..last],
        &demo[last + demo[last..].find(',').unwrap()..]
    );
    for (first, text, shared) in [
        (demo, demo, Some(true)),
        (demo, moved.as_str(), Some(false)),
        (duplicate.as_str(), duplicate.as_str(), Some(false)),
        (spelled.as_str(), spelled.as_str(), None),
        (hostless.as_str(), hostless.as_str(), None),
        (own.as_str(), own.as_str(), Some(false)),
    ] {
        let load_of = |text: &str, opts: &LoadOptions| {
            Catalogue::load(
                Source::Bytes {
                    name: "catalogue.csv",
                    data: text.as_bytes(),
                },
                opts,
            )
            .unwrap()
        };
        let load = |opts: &LoadOptions| load_of(text, opts);
        let ids = std::sync::Arc::new(load_of(
            first,
            &LoadOptions {
                index_only: true,
                ..Default::default()
            },
        ));
        let plain = load(&LoadOptions::default());
        let second = load(&LoadOptions {
            ids_from: Some(std::sync::Arc::clone(&ids)),
            ..Default::default()
        });
        if let Some(shared) = shared {
            assert_eq!(
                std::sync::Arc::ptr_eq(&ids.candidates, &second.candidates),
                shared,
                "{text}"
            );
        }
        assert!(second.same_rows(&plain), "{text}");
        assert_eq!(second.same_rows(&ids), first == text);
        assert_eq!(second.skipped, plain.skipped);
        assert_eq!(second.load_warnings(), plain.load_warnings());
        assert_eq!(
            format!("{:?}", second.columns),
            format!("{:?}", plain.columns)
        );
        for &field in &NUMERIC {
            let bits = |c: &Catalogue| {
                c.column(field)
                    .map(|v| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>())
            };
            assert_eq!(bits(&second), bits(&plain), "{field:?}");
        }
        for c in 0..plain.len() as CandidateId {
            assert_eq!(second.find_candidate(plain.candidate_id(c)), Some(c));
            assert_eq!(second.lightcurve(c), plain.lightcurve(c));
            for i in 0..plain.extra_headers().count() {
                assert_eq!(second.extra(i, c), plain.extra(i, c));
            }
        }
        for s in 0..plain.star_count() as StarId {
            assert_eq!(second.members(s), plain.members(s));
            assert_eq!(second.find_star(plain.star_id(s)), Some(s));
        }
    }
}

#[test]
fn ids_found_together_are_those_found_one_by_one() {
    let mut text = String::from("star,candidate,period,epoch,depth_ppm,duration_h\n");
    for i in 0..300 {
        let (star, n) = (i / 3, i % 3 + 1);
        text.push_str(&format!("S{star},C{star}.0{n},{}.5,100,500,2\n", i % 7 + 1));
    }
    let cat = Catalogue::from_text("invented.csv", &text);
    let mut rng = crate::demo::Rng::new(11);
    // Every id, in a shuffled order with repeats, among ids the catalogue
    // lacks (a prefix, a suffix, the empty id, a star's id).
    let mut ids: Vec<String> = (0..cat.len() as CandidateId)
        .map(|c| cat.candidate_id(c).to_string())
        .collect();
    ids.extend(["C1", "C1.011", "", "S4", "c1.01", "C99.03 "].map(String::from));
    for _ in 0..200 {
        let at = rng.below(ids.len() as u64) as usize;
        ids.push(ids[at].clone());
    }
    for i in (1..ids.len()).rev() {
        ids.swap(i, rng.below(i as u64 + 1) as usize);
    }
    let found = cat.find_candidates(&ids);
    let one_by_one: Vec<_> = ids.iter().map(|id| cat.find_candidate(id)).collect();
    assert_eq!(found, one_by_one);
    assert_eq!(cat.len(), 300);
    assert!(found.iter().filter(|f| f.is_none()).count() >= 6);
    assert!(cat.find_candidates::<&str>(&[]).is_empty());
}

#[test]
fn durations_in_minutes_under_a_plain_name_are_said() {
    // Invented rows: 3 h transits at 13.1 and 27.4 d written in minutes
    // (180) under a plain `duration`, read as hours: 42 and 33 times a
    // central transit across the Sun at those periods (Winn 2010's T14,
    // 4.3 and 5.5 h), so the load says they look like minutes. The same
    // rows in hours say nothing, and stated in the header they are read.
    let minutes = "star,candidate,period,epoch,depth_ppm,duration\n\
                   M,M-1,13.1,1001.0,800,180\nM,M-2,27.4,1002.9,1200,180\n";
    let cat = Catalogue::from_text("invented.csv", minutes);
    assert!(
        cat.notes
            .iter()
            .any(|n| n.contains("look like minutes read as hours")
                && n.contains("`duration (minutes)`")),
        "{:?}",
        cat.notes
    );
    let cat = Catalogue::from_text("invented.csv", &minutes.replace(",180", ",3"));
    assert!(cat.notes.is_empty(), "{:?}", cat.notes);
    let stated = minutes.replace(",duration\n", ",duration (minutes)\n");
    let cat = Catalogue::from_text("invented.csv", &stated);
    assert!(cat.notes.is_empty(), "{:?}", cat.notes);
    assert!((cat.value(Field::DurationH, 0).unwrap() - 3.0).abs() < 1e-12);
}
