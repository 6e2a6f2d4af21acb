//! Orbits no planet has (docs/science.md §2): one shorter than the Roche
//! limit of the densest planet (Rappaport et al. 2013), a transit of half
//! its period or more (T₁₄ ≤ P/2 for every circular orbit, Winn 2010 eq. 14), and an
//! orbit inside the catalogue's star (a/R★ < 1 + k: the star less dense
//! than 3π(1+k)³/(GP²), Seager & Mallén-Ornelas 2003). Each is a firm
//! `density-mismatch` on the candidate, in every command. Invented
//! catalogues under the verdict tests' background.

mod common;

use common::{HEAD, agreed, background, checks_rows, written};

/// A double on each star, its second signal an ordinary planet's.
fn rows() -> String {
    [
        // A subgiant (2.2 R☉, 1.2 M☉, ρ★ = 159 kg/m³) and a 6 h signal: by
        // Kepler's law a/R★ = 0.81, inside the star. Before, both
        // candidates were validated (the transit's own density, 488 kg/m³,
        // is within 4× of the star's).
        "SUB,SUB-1,0.251234,0.00001,100.2,0.001,300,2.0,30,,2.2,1.2,5600",
        "SUB,SUB-2,12.3456,0.00001,102.2,0.001,300,7.0,30,,2.2,1.2,5600",
        // A 13.4 h transit every 19.5 h, on a star the catalogue does not
        // describe: its sine read it as a 6.1 h transit before.
        "LONG,LONG-1,0.812345,0.00001,100.3,0.001,500,13.4,30,,,,",
        "LONG,LONG-2,9.87654,0.00001,101.3,0.001,400,4.5,20,,,,",
        // A day's transit every two days: exactly P/2, a body grazing its
        // star at best.
        "HALF,HALF-1,2.000000,0.00001,100.5,0.001,450,24.0,25,,,,",
        "HALF,HALF-2,11.4321,0.00001,101.6,0.001,420,5.0,20,,,,",
        // A 1.7 h signal on an M dwarf (0.45 R☉, 0.47 M☉): a/R★ = 1.2,
        // outside the star, but a planet there would need 45 g/cm³ to
        // survive its tides (Rappaport et al. 2013); validated before.
        "RCH,RCH-1,0.070000,0.00001,100.1,0.001,400,0.4,30,,0.45,0.47,3600",
        "RCH,RCH-2,6.54321,0.00001,101.1,0.001,900,1.6,30,,0.45,0.47,3600",
        // The control: an ultra-short period around a K dwarf (0.68 R☉,
        // 0.71 M☉), 8.6 h, a/R★ = 2.8, a 1.0 h transit: a planet's orbit.
        "USP,USP-1,0.360000,0.00001,100.1,0.001,250,1.0,15,,0.68,0.71,4500",
        "USP,USP-2,7.65432,0.00001,101.1,0.001,500,2.4,20,,0.68,0.71,4500",
    ]
    .iter()
    .map(|r| format!("{r}\n"))
    .collect()
}

#[test]
fn a_transit_too_long_for_any_orbit_or_an_orbit_inside_its_star_validates_nothing() {
    let text = format!("{HEAD}{}{}", background(), rows());
    let c = written("orbits", &text);
    let c = c.to_str().unwrap();
    let v = agreed(c);
    for s in [
        "SUB-1", "SUB-2", "LONG-1", "LONG-2", "HALF-1", "HALF-2", "RCH-1", "RCH-2",
    ] {
        assert_ne!(v[s], "validated", "{s}");
    }
    assert_eq!(v["USP-1"], "validated");
    assert_eq!(v["USP-2"], "validated");
    let rows = checks_rows(c);
    let firm = |s: &str, words: &str| {
        let row = &rows[s];
        // The firm flags' cell, then the warnings'.
        assert!(row.contains(",density-mismatch,"), "{s}: {row}");
        assert!(row.contains(words), "{s}: {row}");
    };
    firm("SUB-1", "lies inside the catalogue star");
    firm("SUB-1", "(a/R★ = 0.81)");
    firm(
        "LONG-1",
        "the transit lasts 13.40 h, half its 19.50 h period or more",
    );
    firm(
        "HALF-1",
        "the transit lasts 24.00 h, half its 48.00 h period or more",
    );
    // The siblings are held by nothing of their own: each is a single now.
    for s in ["SUB-2", "LONG-2", "HALF-2", "RCH-2"] {
        assert!(!rows[s].contains("inside the catalogue star"), "{s}");
        assert!(!rows[s].contains("the transit lasts"), "{s}");
        assert!(!rows[s].contains("tides"), "{s}");
    }
    assert!(
        !rows["USP-1"].contains("density-mismatch"),
        "{}",
        rows["USP-1"]
    );
}
