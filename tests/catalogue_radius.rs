//! A catalogue's own planet radius (`koi_prad`, `pl_rade`, `Planet Radius
//! (R_Jupiter)`...) is evidence the checks read (docs/science.md §2): an
//! eclipsing binary the catalogue sizes at 38 R⊕ on a star of unknown
//! radius was validated before, its radius ignored. Invented catalogues;
//! the limits are docs/science.md's (22.4 R⊕ = 2 R_J firm, 15 R⊕ a
//! warning), the unit from the IAU 2015 nominal radii.

mod common;

use common::{agreed, catalogue, live_of as live, load_text, starsift, stdout, written};
use starsift::catalogue::{CandidateId, Catalogue};
use starsift::checks::{CheckSettings, derive};
use starsift::flags::Flag;
use starsift::odds::Verdict;

/// Rows under the tests' header (star radius the 11th cell, empty where
/// unknown) with one more cell, the catalogue's planet radius.
const ROWS: &str = "\
NOR,NOR-1,3.52,0.00001,100.0,0.001,150000,3.1,900,0.3,,,5772,38.5\n\
NOR,NOR-2,9.81,0.00001,101.2,0.001,800,4.0,25,0.3,,,5772,2.9\n\
FIT,FIT-1,4.10,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,30.0\n\
FIT,FIT-2,9.70,0.00001,101.6,0.001,650,3.6,28,0.3,1,1,5772,2.5\n\
DEP,DEP-1,4.70,0.00001,100.7,0.001,250000,3.0,300,0.3,1,1,5772,2.0\n\
DEP,DEP-2,11.3,0.00001,101.9,0.001,650,3.6,28,0.3,1,1,5772,2.5\n\
OK,OK-1,5.30,0.00001,100.3,0.001,700,3.0,30,0.3,,,5772,2.4\n\
OK,OK-2,12.1,0.00001,101.3,0.001,650,3.6,28,0.3,,,5772,2.3\n";

fn id(cat: &Catalogue, s: &str) -> CandidateId {
    cat.find_candidate(s).unwrap()
}

#[test]
fn the_catalogues_planet_radius_is_read_by_the_size_check() {
    let text = catalogue("koi_prad", ROWS);
    let cat = load_text(&text);
    let live = live(&cat);
    // The star's radius unknown: the catalogue's 38.5 R⊕ is the radius,
    // above 22.4 R⊕: firm, held, unlikely at most 1:1; its sibling held
    // back as the sibling of a false positive (docs/science.md §1.1).
    let nor = id(&cat, "NOR-1");
    assert_eq!(
        derive(&cat, nor, &CheckSettings::default()).radius_rearth,
        Some(38.5)
    );
    assert!(live.flags(nor).contains(Flag::BigRadius));
    assert_eq!(live.verdict(nor), Verdict::Unlikely);
    assert!(live.odds(nor).unwrap() <= 1.0);
    assert_eq!(live.verdict(id(&cat, "NOR-2")), Verdict::Likely);
    // Both known: the larger is read. A fit's 30 R⊕ against the depth's
    // 2.6 R⊕ (700 ppm across 1 R☉), and a depth of 25 % (55 R⊕) against a
    // fit's 2.0 R⊕: each is flagged; the radius shown is the checks' own.
    for s in ["FIT-1", "DEP-1"] {
        let c = id(&cat, s);
        assert!(live.flags(c).contains(Flag::BigRadius), "{s}");
        assert_eq!(live.verdict(c), Verdict::Unlikely, "{s}");
    }
    let fit = derive(&cat, id(&cat, "FIT-1"), &CheckSettings::default());
    assert!((fit.radius_rearth.unwrap() - 2.6).abs() < 0.2, "{fit:?}");
    // Planet-sized either way: a clean pair, validated.
    for s in ["OK-1", "OK-2"] {
        assert_eq!(live.verdict(id(&cat, s)), Verdict::Validated, "{s}");
    }
    // Every command says the same, and names whose radius it was.
    let c = written("catalogue_radius_commands", &text);
    let c = c.to_str().unwrap();
    let v = agreed(c);
    assert_eq!(v["NOR-1"], "unlikely");
    assert_eq!(v["OK-1"], "validated");
    let out = stdout(&starsift(&["checks", c]));
    assert!(
        out.contains("R = 38.5 R⊕ (the catalogue's; its star's radius is unknown) > 22.4"),
        "{out}"
    );
    assert!(
        out.contains("R = 30.0 R⊕ (the catalogue's; its depth and star give 2.6) > 22.4"),
        "{out}"
    );
}

#[test]
fn a_radius_stated_in_jupiter_radii_is_converted() {
    // R_J/R⊕ = 11.209 (IAU 2015 Resolution B3 nominal equatorial radii):
    // 2.3 R_J = 25.8 R⊕, above the firm 22.4; 1.5 R_J = 16.8 R⊕, a
    // warning only; 0.25 R_J = 2.8 R⊕, a planet.
    let rows = "\
JA,JA-1,3.52,0.00001,100.0,0.001,9000,3.1,90,0.3,,,5772,2.3\n\
JA,JA-2,9.81,0.00001,101.2,0.001,800,4.0,25,0.3,,,5772,0.25\n\
JB,JB-1,4.10,0.00001,100.4,0.001,9000,3.0,90,0.3,,,5772,1.5\n\
JB,JB-2,9.70,0.00001,101.6,0.001,650,3.6,28,0.3,,,5772,0.25\n";
    let cat = load_text(&catalogue("Planet Radius (R_Jupiter)", rows));
    let live = live(&cat);
    let s = CheckSettings::default();
    let ja = derive(&cat, id(&cat, "JA-1"), &s).radius_rearth.unwrap();
    assert!((ja - 25.78).abs() < 0.01, "{ja}");
    assert!(live.flags(id(&cat, "JA-1")).contains(Flag::BigRadius));
    assert_eq!(live.verdict(id(&cat, "JA-1")), Verdict::Unlikely);
    let jb = id(&cat, "JB-1");
    assert!(!live.flags(jb).contains(Flag::BigRadius), "warning only");
    let checks = starsift::checks::run(&cat, &s);
    assert!(
        checks
            .findings(jb)
            .any(|f| f.flag == Flag::BigRadius && f.soft)
    );
    assert_eq!(live.verdict(jb), Verdict::Validated);
}

#[test]
fn a_bare_planet_radius_in_jupiter_radii_is_told_by_its_depths_and_stars() {
    // A column named `planet_radius` without a unit, in Jupiter radii (as
    // many tables give it). Where the star's radius is known, R★√δ says
    // which: 700 ppm across 1 R☉ is 2.9 R⊕ = 0.26 R_J (docs/science.md §2;
    // R_J/R⊕ = 11.209, IAU 2015 Resolution B3). BIN-1's star has no
    // radius, so its catalogue radius, 2.5 R_J = 28.0 R⊕, is its size:
    // above the firm 22.4 R⊕. Before, read as 2.5 R⊕, BIN's pair was
    // validated.
    let rows = "\
JA,JA-1,4.10,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,0.26\n\
JA,JA-2,9.70,0.00001,101.6,0.001,650,3.6,28,0.3,1,1,5772,0.25\n\
JB,JB-1,5.30,0.00001,100.3,0.001,1200,3.0,30,0.3,0.9,0.9,5500,0.30\n\
JC,JC-1,6.10,0.00001,100.9,0.001,400,3.2,20,0.3,1.2,1.1,6000,0.22\n\
BIN,BIN-1,3.52,0.00001,100.0,0.001,6000,3.1,90,0.3,,,5772,2.5\n\
BIN,BIN-2,9.81,0.00001,101.2,0.001,800,4.0,25,0.3,,,5772,0.26\n";
    let text = catalogue("planet_radius", rows);
    let cat = load_text(&text);
    let s = CheckSettings::default();
    let bin = derive(&cat, id(&cat, "BIN-1"), &s).radius_rearth.unwrap();
    assert!((bin - 28.02).abs() < 0.01, "{bin}");
    let live = live(&cat);
    assert!(live.flags(id(&cat, "BIN-1")).contains(Flag::BigRadius));
    assert_eq!(live.verdict(id(&cat, "BIN-1")), Verdict::Unlikely);
    // Every command says the same, and says why.
    let c = written("catalogue_radius_bare_jupiter", &text);
    let c = c.to_str().unwrap();
    let v = agreed(c);
    assert_eq!(v["BIN-1"], "unlikely");
    assert_eq!(v["JA-1"], "validated");
    let o = starsift(&["summary", c]);
    let err = common::stderr(&o) + &stdout(&o);
    assert!(
        err.contains("the planet radii (`planet_radius`) are read as Jupiter radii"),
        "{err}"
    );
    // In Earth radii the same column stays as written.
    let earth = rows
        .replace(",2.5\n", ",28.0\n")
        .replace(",0.26\n", ",2.9\n")
        .replace(",0.25\n", ",2.8\n")
        .replace(",0.30\n", ",3.4\n")
        .replace(",0.22\n", ",2.5\n");
    let cat = load_text(&catalogue("planet_radius", &earth));
    let ja = derive(&cat, id(&cat, "JA-2"), &s).catalogue_radius_rearth;
    assert_eq!(ja, Some(2.8));
    let bin = derive(&cat, id(&cat, "BIN-1"), &s).catalogue_radius_rearth;
    assert_eq!(bin, Some(28.0));
    // No row with a radius gives its star's: nothing tells the unit, the
    // column is read as Earth radii, and every output says so.
    let starless = written(
        "catalogue_radius_bare_starless",
        &catalogue(
            "planet_radius",
            "JA,JA-1,4.10,0.00001,100.4,0.001,700,3.0,30,0.3,,,5772,0.26\n\
             JA,JA-2,9.70,0.00001,101.6,0.001,650,3.6,28,0.3,,,5772,0.25\n",
        ),
    );
    let starless = starless.to_str().unwrap();
    let o = starsift(&["odds", starless, "--format", "csv"]);
    assert!(
        common::stderr(&o).contains(
            "the planet radii (`planet_radius`) state no unit, and no row gives a depth and a star radius"
        ),
        "{}",
        common::stderr(&o)
    );
}

#[test]
fn a_radius_in_a_unit_not_converted_stops_the_load_naming_the_column() {
    let c = written(
        "catalogue_radius_unit",
        &catalogue("Planet Radius (furlongs)", ""),
    );
    let o = starsift(&["summary", c.to_str().unwrap()]);
    assert!(!o.status.success());
    let err = common::stderr(&o);
    assert!(err.contains("Planet Radius (furlongs)"), "{err}");
    assert!(err.contains("not a radius unit"), "{err}");
}

#[test]
fn a_radius_of_zero_or_below_is_unknown_and_said() {
    // `0` and `-1` are what tables write for an unknown value (common
    // practice, no source): no radius, not a planet of size 0.
    let rows = "\
ZR,ZR-1,4.10,0.00001,100.4,0.001,700,3.0,30,0.3,,,5772,0\n\
ZR,ZR-2,9.70,0.00001,101.6,0.001,650,3.6,28,0.3,,,5772,-1\n";
    let text = catalogue("planet_radius", rows);
    let cat = load_text(&text);
    let s = CheckSettings::default();
    assert_eq!(derive(&cat, id(&cat, "ZR-1"), &s).radius_rearth, None);
    assert_eq!(derive(&cat, id(&cat, "ZR-2"), &s).radius_rearth, None);
    let c = written("catalogue_radius_zero", &text);
    let o = starsift(&["odds", c.to_str().unwrap()]);
    let err = common::stderr(&o);
    assert!(
        err.contains(
            "2 planet_radius_rearth values of zero or below (`planet_radius`) read as unknown"
        ),
        "{err}"
    );
}

#[test]
fn radius_ratios_in_percent_are_read_as_percent() {
    // `rp_rs` as a percentage (2.6 for k = 0.026): read as a fraction it
    // made every candidate 280 R⊕ and `unlikely`. A depth of 700 ppm is
    // k ≈ 0.026 (δ ≈ k², docs/science.md §2), so the depths say which.
    let rows = "\
RP,RP-1,4.10,0.00001,100.4,0.001,700,3.0,30,0.3,1,1,5772,2.6\n\
RP,RP-2,9.70,0.00001,101.6,0.001,650,3.6,28,0.3,1,1,5772,2.5\n";
    // The background's rows give no ratio: these two decide.
    for (header, said) in [("rp_rs", false), ("Rp/Rs (%)", true)] {
        let text = catalogue(header, rows);
        let cat = load_text(&text);
        let r = derive(&cat, id(&cat, "RP-1"), &CheckSettings::default());
        // k = 0.026 around 1 R☉: 0.026 × 109.08 = 2.84 R⊕.
        assert!(
            (r.radius_rearth.unwrap() - 2.84).abs() < 0.01,
            "{header}: {r:?}"
        );
        assert_eq!(
            live(&cat).verdict(id(&cat, "RP-1")),
            Verdict::Validated,
            "{header}"
        );
        let c = written(&format!("catalogue_radius_pct_{said}"), &text);
        let o = starsift(&["odds", c.to_str().unwrap()]);
        let err = common::stderr(&o);
        // Detected: said in every output; stated: nothing to say.
        assert_eq!(err.contains("are read as percent"), !said, "{err}");
        let summary = stdout(&starsift(&["summary", c.to_str().unwrap()]));
        assert!(
            summary.contains("percent (stored as a fraction)"),
            "{summary}"
        );
    }
    // Fractions stay fractions.
    let text = catalogue("rp_rs", rows)
        .replace(",2.6\n", ",0.026\n")
        .replace(",2.5\n", ",0.025\n");
    let cat = load_text(&text);
    let r = derive(&cat, id(&cat, "RP-1"), &CheckSettings::default());
    assert!((r.radius_rearth.unwrap() - 2.84).abs() < 0.01, "{r:?}");
}

#[test]
fn the_transits_own_density_bounds_the_size_of_a_star_of_unknown_radius() {
    // No star radius, mass or planet radius: a 30 % eclipse at 3.2 d
    // lasting 2.5 h implies ρ★ ≈ 5,800 kg/m³ at b = 0 (Seager &
    // Mallén-Ornelas 2003), and no star of that density is smaller than
    // 0.42 R☉ (docs/science.md §2), so the companion is at least 22.7 R⊕:
    // an eclipsing binary, which a planet beside it made a validated pair
    // before. A hot Jupiter on an early M dwarf (3.2 % at 3.3 d for 2.2 h,
    // as a 1 R_J planet on a 0.57 R☉, 0.57 M☉ star gives; values from
    // memory of such a system) is bounded at 8.5 R⊕ and stays a planet.
    let rows = "\
DEEP,DEEP-1,3.2,0.00001,100.0,0.001,300000,2.5,900,,,,\n\
DEEP,DEEP-2,7.7,0.00001,101.3,0.001,800,3.1,25,,,,\n\
MJ,MJ-1,3.325,0.00001,100.2,0.001,32000,2.17,200,,,,\n\
MJ,MJ-2,8.9,0.00001,101.7,0.001,900,2.8,20,,,,\n";
    let text = format!("{}{}{rows}", common::HEAD, common::background());
    let cat = load_text(&text);
    let live = live(&cat);
    let deep = id(&cat, "DEEP-1");
    assert!(live.flags(deep).contains(Flag::BigRadius));
    assert_eq!(live.verdict(deep), Verdict::Unlikely);
    assert_eq!(live.verdict(id(&cat, "DEEP-2")), Verdict::Likely);
    let d = derive(&cat, deep, &CheckSettings::default());
    assert_eq!(d.radius_rearth, None, "the radius shown stays unknown");
    assert!((d.least_star_rsun.unwrap() - 0.42).abs() < 0.01, "{d:?}");
    assert!(d.least_radius_rearth.unwrap() > 22.4, "{d:?}");
    let mj = derive(&cat, id(&cat, "MJ-1"), &CheckSettings::default());
    assert!(
        (mj.least_radius_rearth.unwrap() - 8.5).abs() < 0.5,
        "{mj:?}"
    );
    for s in ["MJ-1", "MJ-2"] {
        assert!(!live.flags(id(&cat, s)).contains(Flag::BigRadius), "{s}");
        assert_eq!(live.verdict(id(&cat, s)), Verdict::Validated, "{s}");
    }
    // Every command says the same, and says why.
    let path = written("least-star", &text);
    let c = path.to_str().unwrap();
    let v = agreed(c);
    assert_eq!(v["DEEP-1"], "unlikely");
    assert_eq!(v["DEEP-2"], "likely");
    assert_eq!(v["MJ-1"], "validated");
    let o = starsift(&["checks", c, "--format", "csv"]);
    let row = stdout(&o)
        .lines()
        .find(|l| l.starts_with("DEEP,DEEP-1,"))
        .unwrap()
        .to_string();
    assert!(row.contains("allows no star smaller than 0.42 R☉"), "{row}");
}

#[test]
fn a_dilution_column_is_read_as_the_others_share_of_the_light_by_its_values() {
    // A fit's dilution factor (the target's share, 1 = undiluted) read as
    // contamination made every candidate 1,000 times deeper than seen (c
    // near 1): 80 R⊕ and more, `big-radius`, every verdict `unlikely`.
    // Three conventions, told by their values (invented rows): the
    // target's share (at most 1, most at least 0.5), the factor that
    // undoes the dilution of a depth (at least 1: δ_true = δ·D, so
    // c = 1 − 1/D), and the others' share (as `contamination`).
    let rows = |d: [&str; 2]| {
        format!(
            "A,A-1,3.52,0.00001,100.0,0.001,800,3.1,90,0.3,1,1,5772,{}\n\
             A,A-2,9.81,0.00001,101.2,0.001,700,4.0,25,0.3,1,1,5772,{}\n",
            d[0], d[1]
        )
    };
    let cases = [
        (["1.0", "0.8"], [0.0, 0.2]),
        (["1.0", "1.25"], [0.0, 0.2]),
        (["0.0", "0.2"], [0.0, 0.2]),
    ];
    for (cells, want) in cases {
        let text = catalogue("dilution", &rows(cells));
        let cat = load_text(&text);
        // Said wherever it was converted.
        let said = cat
            .notes
            .iter()
            .any(|n| n.contains("`dilution` is read as"));
        assert_eq!(said, cells[0] == "1.0", "{cells:?} {:?}", cat.notes);
        for (s, w) in ["A-1", "A-2"].iter().zip(want) {
            let c = cat
                .value(starsift::catalogue::Field::Contamination, id(&cat, s))
                .unwrap();
            assert!((c - w).abs() < 1e-12, "{cells:?} {s}: {c}");
        }
        // Planet-sized as they are (800 ppm, diluted 0 or 20 %, across 1 R☉):
        // a clean pair.
        let live = live(&cat);
        for s in ["A-1", "A-2"] {
            assert_eq!(
                live.verdict(id(&cat, s)),
                Verdict::Validated,
                "{cells:?} {s}"
            );
        }
    }
}
