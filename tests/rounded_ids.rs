//! Star ids written as rounded floats (`1.23457e+08`, as `%g` prints a
//! number; `4.295806720123457e+18`, a 19-digit id through a double): the
//! digits that told stars apart are gone, so two stars' single signals
//! read as one star's pair and were validated (docs/science.md §3.4).
//! Invented catalogues.

mod common;

use common::{agreed, catalogue, starsift, stderr, written};

/// Under the tests' header: a pair on a star whose id is rounded, the same
/// with positions that show one place, the same with a position on one row
/// only, and a pair on a star written in full.
const ROWS: &str = "\
1.23457e+08,R-1,4.1,0.00001,100.0,0.001,700,3.0,30,0.3,1,1,5772,,\n\
1.23457e+08,R-2,9.7,0.00001,101.0,0.001,650,3.6,28,0.3,1,1,5772,,\n\
4.295806720123457e+18,P-1,4.3,0.00001,100.2,0.001,700,3.0,30,0.3,1,1,5772,10.0,-20.0\n\
4.295806720123457e+18,P-2,9.9,0.00001,101.2,0.001,650,3.6,28,0.3,1,1,5772,10.0,-20.0\n\
1.5e+09,M-1,4.7,0.00001,100.6,0.001,700,3.0,30,0.3,1,1,5772,11.0,-21.0\n\
1.5e+09,M-2,10.9,0.00001,101.6,0.001,650,3.6,28,0.3,1,1,5772,,\n\
123456789,F-1,4.5,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,,\n\
123456789,F-2,10.3,0.00001,101.4,0.001,650,3.6,28,0.3,1,1,5772,,\n";

#[test]
fn a_star_id_written_as_a_rounded_float_makes_no_system_without_positions() {
    let c = written("rounded_ids", &catalogue("ra_deg,dec_deg", ROWS));
    let c = c.to_str().unwrap();
    let v = agreed(c);
    // Rounded, no position: held by mixed-host, at its prior (nothing says
    // it is no planet).
    assert_eq!(v["R-1"], "likely");
    assert_eq!(v["R-2"], "likely");
    // Rounded, but its rows at one place (docs/science.md §3.4): a pair.
    assert_eq!(v["P-1"], "validated");
    // Rounded, one row without a position: that row could be another
    // star's.
    assert_eq!(v["M-1"], "likely");
    assert_eq!(v["M-2"], "likely");
    // Written in full: a pair.
    assert_eq!(v["F-1"], "validated");
    let o = starsift(&["odds", c, "--format", "csv"]);
    let out = common::stdout(&o);
    let row = out.lines().find(|l| l.contains(",R-1,")).unwrap();
    assert!(row.contains("mixed-host"), "{row}");
    // Every output says why, once, naming the first such id and its line
    // (the header and the background's 580 rows come first).
    let err = stderr(&o);
    assert!(
        err.contains("3 star ids are whole numbers written as rounded floating-point numbers, such as `1.23457e+08` (line 582)"),
        "{err}"
    );
}
