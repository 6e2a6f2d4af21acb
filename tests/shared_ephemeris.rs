//! One ephemeris on many stars all over the sky (docs/science.md §3.3):
//! the instrument's own signal, or one eclipse's light carried across the
//! detector (Coughlin et al. 2014, from memory), no planet of any of them.
//! Invented catalogues under the verdict tests' background: eight stars
//! far apart, each a candidate at one period and epoch (to their errors,
//! with depths and durations of their own) beside a candidate of its own.
//! Before, with positions, nothing compared them (they lie farther apart
//! than the echo radius) and all sixteen were validated; without, each had
//! only a warning and all were validated too.

mod common;

use common::{HEAD, agreed, background, checks_rows, written};

/// The eight stars; `phase(i)` is where star i's shared-period signal
/// falls, in days after the others'; `deep` multiplies one star's depth.
fn rows(positions: bool, phase: impl Fn(usize) -> f64, deep: Option<usize>) -> String {
    let mut t = String::new();
    for i in 0..8 {
        let s = format!("CM{i}");
        // Spread on the sky: 17° apart in right ascension, 9° in declination.
        let place = if positions {
            format!(
                ",{:.5},{:.5}",
                30.0 + 17.0 * i as f64,
                -40.0 + 9.0 * i as f64
            )
        } else {
            ",,".to_string()
        };
        let depth = 300 + 23 * i as u32;
        let depth = if deep == Some(i) { 6 * depth } else { depth };
        let jitter = [0.0, 2e-5, -1e-5, 3e-5, -2e-5, 1e-5, -3e-5, 0.0][i];
        t.push_str(&format!(
            "{s},{s}-1,{:.5},0.00004,{:.4},0.002,{depth},{:.2},14,,1,1,5772{place}\n",
            13.70012 + jitter,
            1325.402 + phase(i),
            4.0 + 0.13 * i as f64,
        ));
        t.push_str(&format!(
            "{s},{s}-2,{:.5},0.00002,1326.1,0.001,500,3.0,25,,1,1,5772{place}\n",
            5.1 + 0.37 * i as f64
        ));
    }
    t
}

fn catalogue(
    test: &str,
    positions: bool,
    phase: impl Fn(usize) -> f64,
    deep: Option<usize>,
) -> String {
    let head = format!("{},ra_deg,dec_deg\n", HEAD.trim_end());
    let bg: String = background().lines().map(|l| format!("{l},,\n")).collect();
    let c = written(test, &format!("{head}{bg}{}", rows(positions, phase, deep)));
    c.to_str().unwrap().to_string()
}

#[test]
fn one_ephemeris_on_eight_stars_far_apart_validates_none_of_its_copies() {
    // Epochs within 3 minutes of each other.
    let jitter = |i: usize| [0.0, 0.002, -0.001, 0.0015, -0.002, 0.001, 0.0, -0.0015][i];
    for positions in [true, false] {
        let c = catalogue("shared", positions, jitter, None);
        let v = agreed(&c);
        let rows = checks_rows(&c);
        for i in 0..8 {
            let (one, two) = (format!("CM{i}-1"), format!("CM{i}-2"));
            assert_eq!(v[&one], "unlikely", "{one} ({positions})");
            assert_ne!(v[&two], "validated", "{two} ({positions})");
            let row = &rows[&one];
            assert!(
                row.contains("the same ephemeris as 7 signals on other stars"),
                "{row}"
            );
            assert!(row.contains("no planet of this star"), "{row}");
        }
    }
}

#[test]
fn the_deepest_of_them_by_far_is_only_warned_and_unshared_ephemerides_are_not_flagged() {
    // One star's eclipse six times deeper than any other's: perhaps the
    // source whose light the others carry, and maybe a planet; warned.
    let jitter = |i: usize| [0.0, 0.002, -0.001, 0.0015, -0.002, 0.001, 0.0, -0.0015][i];
    let c = catalogue("shared_deep", true, jitter, Some(3));
    let v = agreed(&c);
    let rows = checks_rows(&c);
    assert_eq!(v["CM3-1"], "validated");
    assert!(rows["CM3-1"].contains("perhaps the eclipse whose light they carry"));
    assert_eq!(v["CM0-1"], "unlikely");
    // One row listed on the eight star ids, digit for digit (a merged
    // table): one signal under eight ids (`copies`), not the instrument's.
    let c = catalogue("shared_rows", true, |_| 0.0, None);
    let same = std::fs::read_to_string(&c).unwrap();
    let same = same
        .lines()
        .map(|l| {
            let cells: Vec<&str> = l.split(',').collect();
            if cells[1].starts_with("CM") && cells[1].ends_with("-1") {
                let mut cells: Vec<String> = cells.iter().map(|s| s.to_string()).collect();
                cells[2] = "13.70012".into();
                cells[6] = "300".into();
                cells[7] = "4.00".into();
                cells.join(",")
            } else {
                l.to_string()
            }
        })
        .collect::<Vec<_>>()
        .join("\n");
    std::fs::write(&c, same + "\n").unwrap();
    let rows = checks_rows(&c);
    assert!(
        !rows["CM0-1"].contains("anywhere on the sky"),
        "{}",
        rows["CM0-1"]
    );
    assert!(rows["CM0-1"].contains("mixed-host"), "{}", rows["CM0-1"]);
    // The same periods with epochs spread over the orbit (a day apart):
    // eight planets that happen to share a period, each validated.
    let c = catalogue("shared_not", true, |i| i as f64 * 1.0, None);
    let v = agreed(&c);
    for i in 0..8 {
        assert_eq!(v[&format!("CM{i}-1")], "validated", "CM{i}-1");
        assert_eq!(v[&format!("CM{i}-2")], "validated", "CM{i}-2");
    }
}

#[test]
fn one_ephemeris_on_forty_stars_is_flagged_on_each_and_a_row_listed_twice_with_it() {
    // Forty stars, each a candidate at one period and epoch (to their
    // errors) beside one of its own; the first star's shared row listed
    // digit for digit again under a forty-first star id (a merged table).
    // Each is sought among its nearest matches only, sixteen at most once
    // flagged (`shared::ENOUGH`): the finding says "or more". The second
    // star's shared row is listed again, first in the file, as the only
    // candidate of another star id (FA0, judged for nothing: no sibling).
    let mut t = String::new();
    for i in 0..40 {
        let s = format!("FS{i}");
        let jitter = (i % 7) as f64 * 3e-4 - 9e-4;
        t.push_str(&format!(
            "{s},{s}-1,{:.5},0.00004,{:.4},0.002,{},{:.2},14,,1,1,5772,,\n",
            13.70012 + (i % 5) as f64 * 1e-5 - 2e-5,
            1325.402 + jitter,
            300 + 7 * i,
            4.0 + 0.03 * i as f64,
        ));
        t.push_str(&format!(
            "{s},{s}-2,{:.5},0.00002,1326.1,0.001,500,3.0,25,,1,1,5772,,\n",
            5.1 + 0.37 * i as f64
        ));
    }
    let first = t.lines().next().unwrap().replace("FS0,FS0-1", "FT0,FT0-1");
    let single = t.lines().nth(2).unwrap().replace("FS1,FS1-1", "FA0,FA0-1");
    t = format!("{single}\n{t}");
    t.push_str(&format!(
        "{first}\nFT0,FT0-2,9.91,0.00002,1326.3,0.001,500,3.0,25,,1,1,5772,,\n"
    ));
    let head = format!("{},ra_deg,dec_deg\n", HEAD.trim_end());
    let bg: String = background().lines().map(|l| format!("{l},,\n")).collect();
    let c = written("shared_forty", &format!("{head}{bg}{t}"));
    let c = c.to_str().unwrap();
    let v = agreed(c);
    let rows = checks_rows(c);
    for i in 0..40 {
        let one = format!("FS{i}-1");
        assert_eq!(v[&one], "unlikely", "{one}");
        assert!(
            rows[&one].contains("the same ephemeris as 16 or more signals on other stars"),
            "{}",
            rows[&one]
        );
        assert_ne!(v[&format!("FS{i}-2")], "validated", "FS{i}-2");
    }
    // The row listed twice: one signal under two ids, and the
    // instrument's under both.
    assert_eq!(v["FT0-1"], "unlikely");
    assert!(rows["FT0-1"].contains("mixed-host"), "{}", rows["FT0-1"]);
    assert!(
        rows["FT0-1"].contains("anywhere on the sky"),
        "{}",
        rows["FT0-1"]
    );
    // Listed first under a star id of no other candidate, the row is still
    // judged under the id that has a sibling.
    assert!(rows["FS1-1"].contains("mixed-host"), "{}", rows["FS1-1"]);
    assert!(
        rows["FS1-1"].contains("anywhere on the sky"),
        "{}",
        rows["FS1-1"]
    );
    assert_ne!(v["FA0-1"], "validated");
}
