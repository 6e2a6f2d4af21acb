//! What the catalogue reports of a candidate's own light curve: a
//! pipeline's depth at phase 0.5 and the significance of its odd/even
//! difference (docs/science.md §4.8). Judged by the physics a light curve
//! starsift reads itself is judged by, in every command. Invented
//! catalogues.

mod common;

use common::{agreed, catalogue, checks_rows, starsift, stdout, written};

/// A binary (`B`: its secondary eclipse well above any planet's
/// occultation) beside two planets; a hot Jupiter (`J`) whose occultation
/// is within a planet's reach; a candidate whose odd and even transits
/// differ (`O`) beside two planets; and the same binary as B with the
/// secondary's error left out, judged by the transit's SNR (`S`), or with
/// neither error nor SNR (`N`).
const ROWS: &str = "\
B,B-1,3.7,0.00001,100.5,0.001,9000,2.5,60,0.3,1,1,5772,2000,100,0.4\n\
B,B-2,9.1,0.00001,101.5,0.001,600,3.0,30,0.3,1,1,5772,,,\n\
B,B-3,21.7,0.00001,102.5,0.001,500,4.0,25,0.3,1,1,5772,,,\n\
J,J-1,3.1,0.00001,100.2,0.001,10000,2.8,80,0.3,1,1,5772,40,10,0.5\n\
J,J-2,8.8,0.00001,101.2,0.001,600,3.5,30,0.3,1,1,5772,,,\n\
O,O-1,4.3,0.00001,100.9,0.001,3000,2.6,40,0.3,1,1,5772,,,6.5\n\
O,O-2,10.8,0.00001,101.9,0.001,600,3.6,30,0.3,1,1,5772,,,\n\
O,O-3,23.9,0.00001,102.9,0.001,500,4.6,25,0.3,1,1,5772,,,\n\
S,S-1,3.9,0.00001,100.3,0.001,9000,2.5,60,0.3,1,1,5772,2000,,\n\
S,S-2,9.6,0.00001,101.3,0.001,600,3.0,30,0.3,1,1,5772,,,\n\
N,N-1,4.9,0.00001,100.4,0.001,9000,2.5,,0.3,1,1,5772,2000,,\n\
N,N-2,11.9,0.00001,101.4,0.001,600,3.0,,0.3,1,1,5772,,,\n";

#[test]
fn a_catalogues_own_secondary_eclipse_and_odd_even_difference_are_read() {
    // Before, these columns were kept as extras and read by nothing: B's
    // trio and O's were validated, binary and all.
    let extra = "secondary_depth_ppm,secondary_depth_err_ppm,odd_even_sigma";
    let cat = written("reported", &catalogue(extra, ROWS));
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    // B-1's 2,000 ± 100 ppm at phase 0.5: a planet's occultation behind a
    // 9,000 ppm transit at P = 3.7 d around the Sun (a/R★ = 10.1, Kepler's
    // third law) reaches (5/3)·9000/10.1² = 148 ppm (docs/science.md
    // §4.3, computed offline in Python). An eclipsing binary: its star is
    // held.
    assert_eq!(v["B-1"], "unlikely");
    for s in ["B-2", "B-3"] {
        assert_eq!(v[s], "likely", "{s}");
    }
    // J-1's 40 ± 10 ppm is within a hot Jupiter's reach at 3.1 d (a/R★ =
    // 8.9: 208 ppm, computed as above): nothing.
    for s in ["J-1", "J-2"] {
        assert_eq!(v[s], "validated", "{s}");
    }
    // O-1's odd and even transits differ at 6.5σ: held itself (a planet
    // reaches 3σ by chance now and then), its siblings count on.
    assert_eq!(v["O-1"], "likely");
    for s in ["O-2", "O-3"] {
        assert_eq!(v[s], "validated", "{s}");
    }
    // Without an error, the transit's own noise (9000 / 60 = 150 ppm)
    // judges S-1's secondary; with neither, a warning only.
    assert_eq!(v["S-1"], "unlikely");
    assert_eq!(v["S-2"], "likely");
    assert_eq!(v["N-1"], "validated");
    let rows = checks_rows(c);
    let line = |id: &str| rows[id].clone();
    assert!(
        line("B-1").contains("2000 ± 100 ppm") && line("B-1").contains("an eclipsing binary"),
        "{}",
        line("B-1")
    );
    assert!(line("O-1").contains("6.5σ"), "{}", line("O-1"));
    assert!(line("N-1").contains("warning secondary"), "{}", line("N-1"));
}

#[test]
fn a_secondary_depth_without_a_unit_of_its_own_takes_the_depths() {
    // Invented: every depth written as a fraction (`depth_frac`), the
    // secondary's too, under a name that says no unit. Read as ppm, B-1's 0.002 would be nothing; in the
    // depth's unit it is 2,000 ppm, a binary.
    let extra = "secondary_depth,secondary_depth_err,odd_even_sigma";
    let rows: String = ROWS
        .lines()
        .filter(|l| l.starts_with("B,"))
        .map(|l| format!("{l}\n"))
        .collect();
    let text = catalogue(extra, &rows);
    let mut lines = text.lines();
    let head = lines.next().unwrap().replace("depth_ppm", "depth_frac");
    let mut out = format!("{head}\n");
    for l in lines {
        let mut cells: Vec<String> = l.split(',').map(str::to_string).collect();
        for i in [6, 13, 14] {
            if let Ok(v) = cells[i].parse::<f64>() {
                cells[i] = format!("{}", v * 1e-6);
            }
        }
        out.push_str(&(cells.join(",") + "\n"));
    }
    let cat = written("reported_fraction", &out);
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    assert_eq!(v["B-1"], "unlikely", "{v:?}");
    let summary = stdout(&starsift(&["summary", c]));
    assert!(
        summary.contains("the depth's unit, × 1000000 to ppm"),
        "{summary}"
    );
}

#[test]
fn dimming_light_away_from_the_target_is_another_stars() {
    // Invented: the pipeline's offset of the dimming light from the target
    // (a difference image's centroid) under the Kepler tables' names. C-1's
    // light is 4.0″ ± 0.5″ away (8σ): a background binary's, no planet of
    // C, held alone (its siblings count on, as beside a neighbour's echo,
    // docs/science.md §3.3). D-1's 1.0″ ± 0.5″ (2σ) is the target's.
    let rows = "\
C,C-1,3.7,0.00001,100.5,0.001,3000,2.5,60,0.3,1,1,5772,4.0,0.5\n\
C,C-2,9.1,0.00001,101.5,0.001,600,3.0,30,0.3,1,1,5772,0.2,0.5\n\
C,C-3,21.7,0.00001,102.5,0.001,500,4.0,25,0.3,1,1,5772,,\n\
D,D-1,4.1,0.00001,100.1,0.001,3000,2.5,60,0.3,1,1,5772,1.0,0.5\n\
D,D-2,9.9,0.00001,101.1,0.001,600,3.0,30,0.3,1,1,5772,,\n";
    let cat = written(
        "reported_centroid",
        &catalogue("tce_dikco_msky,tce_dikco_msky_err", rows),
    );
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    assert_eq!(v["C-1"], "unlikely");
    for s in ["C-2", "C-3", "D-1", "D-2"] {
        assert_eq!(v[s], "validated", "{s}");
    }
    let c1 = &checks_rows(c)["C-1"];
    assert!(c1.contains("4.0″ ± 0.5″ from the target (8.0σ"), "{c1}");
}

#[test]
fn a_secondary_depths_error_without_a_unit_takes_the_secondary_depths() {
    // Invented: the secondary in ppt (`Secondary depth (ppt)`), its error
    // under a bare name: 2.0 ± 0.1 ppt, not ± 0.1 ppm.
    let rows = "B,B-1,3.7,0.00001,100.5,0.001,9000,2.5,60,0.3,1,1,5772,2.0,0.1\n";
    let text = catalogue("Secondary depth (ppt),secondary_depth_err", rows);
    let cat = written("reported_ppt", &text);
    let c = cat.to_str().unwrap();
    assert_eq!(agreed(c)["B-1"], "unlikely");
    assert!(checks_rows(c)["B-1"].contains("2000 ± 100 ppm"));
    let summary = stdout(&starsift(&["summary", c]));
    assert!(
        summary.contains("the secondary depth's unit, × 1000 to ppm"),
        "{summary}"
    );
}

#[test]
fn a_centroid_offsets_error_without_a_unit_takes_the_offsets() {
    // Invented: the offset in milliarcseconds, its error under a bare
    // name: 4000 ± 500 mas is 4.0″ ± 0.5″ (8σ), not 4.0″ ± 500″.
    let rows = "C,C-1,3.7,0.00001,100.5,0.001,3000,2.5,60,0.3,1,1,5772,4000,500\n";
    let text = catalogue("Centroid offset (mas),centroid_offset_err", rows);
    let cat = written("reported_mas", &text);
    let c = cat.to_str().unwrap();
    assert_eq!(agreed(c)["C-1"], "unlikely");
    assert!(checks_rows(c)["C-1"].contains("4.0″ ± 0.5″ from the target (8.0σ"));
    // In pixels, no angle: kept as written and said so (only the ratio to
    // its error is read). Before, `summary` called the column arcsec and
    // the finding printed 4.0″.
    let text = catalogue(
        "Centroid offset (pix),centroid_offset_err",
        &rows.replace("4000,500", "4.0,0.5"),
    );
    let cat = written("reported_pix", &text);
    let c = cat.to_str().unwrap();
    assert_eq!(agreed(c)["C-1"], "unlikely");
    assert!(checks_rows(c)["C-1"].contains("4.0 pix ± 0.5 pix from the target (8.0σ"));
    let summary = stdout(&starsift(&["summary", c]));
    let line = summary
        .lines()
        .find(|l| l.contains("Centroid offset (pix)"))
        .unwrap();
    assert!(line.contains("(pix)  pix  "), "{line}");
}

#[test]
fn a_comment_that_names_a_false_positive_is_a_warning_only() {
    // Invented: a team's free-text `Comments`. A person's word in free
    // text can say anything of anything (`EB ruled out`, `nearby EB`): it
    // is shown, never read as the catalogue's verdict.
    let rows = "\
P,P-1,4.4,0.00001,100.3,0.001,700,3.0,30,0.3,1,1,5772,\"possible EB, V-shaped\"\n\
P,P-2,10.4,0.00001,101.3,0.001,650,3.6,28,0.3,1,1,5772,EB ruled out by RVs\n";
    let cat = written("reported_comments", &catalogue("Comments", rows));
    let c = cat.to_str().unwrap();
    let v = agreed(c);
    assert_eq!(v["P-1"], "validated");
    assert_eq!(v["P-2"], "validated");
    let rows = checks_rows(c);
    assert!(
        rows["P-1"]
            .contains("warning known-fp: the catalogue's Comments says `possible EB, V-shaped`"),
        "{}",
        rows["P-1"]
    );
    assert!(!rows["P-2"].contains("known-fp"), "{}", rows["P-2"]);
}
