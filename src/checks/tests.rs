//! The checks on invented catalogues and on the demo's planted cases.

use super::*;

fn load(text: &str) -> Catalogue {
    Catalogue::from_text("t.csv", text)
}

const HEAD: &str = "star,candidate,period_d,period_err_d,epoch,epoch_err_d,depth_ppm,duration_h,snr,impact,star_radius_rsun,star_mass_msun,star_teff_k,ra_deg,dec_deg,mag\n";

#[test]
fn missing_inputs_stay_missing() {
    let c = load("star,candidate,period_d,epoch,depth_ppm,duration_h\nA,A-1,10,100,84.05,13\n");
    let d = derive(&c, 0, &CheckSettings::default());
    assert_eq!(d.radius_rearth, None);
    assert_eq!(d.a_au, None);
    assert_eq!(d.teq_k, None);
    assert_eq!(d.density_star, None);
    assert!(d.density_transit.is_some() && d.assumed_central);
}

#[test]
fn earth_sun_derived() {
    // docs/science.md §2 [D]: the Earth seen transiting the Sun: (R⊕/R☉)² =
    // 84.05 ppm, observed at the centre of a limb-darkened Sun (u = 0.4,
    // 0.26) as 84.05/(1 − 0.4/3 − 0.26/6) = 102.085 ppm → 1.000 R⊕, a sidereal year → 1.0000 au, T_eq 278.33 K, S = 1, central T14
    // 13.10 h; its transit density is the Sun's.
    let text = format!("{HEAD}SUN,EARTH,365.256363,,100,,102.085,13.095,50,0,1,1,5772,,,\n");
    let c = load(&text);
    let d = derive(&c, 0, &CheckSettings::default());
    assert!((d.radius_rearth.unwrap() - 1.000).abs() < 1e-3);
    assert!((d.a_au.unwrap() - 1.0).abs() < 1e-5, "{:?}", d.a_au);
    assert!((d.teq_k.unwrap() - 278.33).abs() < 0.01);
    assert!((d.insolation_earth.unwrap() - 1.0).abs() < 1e-4);
    assert!((d.t14_central_h.unwrap() - 13.10).abs() < 0.01);
    assert!(
        (d.density_ratio.unwrap() - 1.0).abs() < 0.01,
        "{:?}",
        d.density_ratio
    );
}

#[test]
fn density_mismatch_is_one_sided_when_the_impact_parameter_is_unknown() {
    // A Sun-like star (ρ☉ = 1410 kg/m³). With b unknown the transit density
    // is computed at b = 0, its largest value (Seager & Mallén-Ornelas 2003):
    // a genuine planet at b = 0.9 has a short transit that reads as a dense
    // star, which a larger b explains (a warning); a transit far too long
    // for the star no b can explain (firm). P = 10 d, a/R★ = 20.1: central
    // T14 = 4.46 h; at b = 0.9, 1.99 h.
    let head =
        "star,candidate,period_d,epoch,depth_ppm,duration_h,snr,star_radius_rsun,star_mass_msun\n";
    let c = load(&format!(
        "{head}S,S-1,10,100,1000,1.0,30,1,1\nL,L-1,10,100,1000,16,30,1,1\n"
    ));
    let ch = run(&c, &CheckSettings::default());
    assert!(
        ch.warnings(0).contains(Flag::DensityMismatch),
        "{}",
        ch.why(0)
    );
    assert!(
        !ch.flags(0).contains(Flag::DensityMismatch),
        "{}",
        ch.why(0)
    );
    assert!(ch.flags(1).contains(Flag::DensityMismatch), "{}", ch.why(1));
    // With b given, both sides are firm.
    let c = load(
        "star,candidate,period_d,epoch,depth_ppm,duration_h,snr,impact,star_radius_rsun,star_mass_msun\nS,S-1,10,100,1000,1.0,30,0.1,1,1\n",
    );
    assert!(
        run(&c, &CheckSettings::default())
            .flags(0)
            .contains(Flag::DensityMismatch)
    );
}

#[test]
fn radius_and_snr_flags() {
    let text = format!(
        "{HEAD}B1,B1-1,3,,100,,80000,2,20,0.2,1,1,5772,,,\nB2,B2-1,3,,100,,30000,2,20,0.2,1,1,5772,,,\nB3,B3-1,3,,100,,500,2,6.5,0.2,1,1,5772,,,\n"
    );
    let c = load(&text);
    let ch = run(&c, &CheckSettings::default());
    // √0.08 R☉ = 30.9 R⊕ for a uniform disc; limb darkening (u = 0.4,
    // 0.26, b = 0.2) makes k = √(0.08 · 0.82333/0.99182) = 0.2577, 28.1 R⊕.
    assert!(ch.flags(0).contains(Flag::BigRadius), "{}", ch.why(0));
    assert!(!ch.flags(1).contains(Flag::BigRadius) && ch.warnings(1).contains(Flag::BigRadius)); // 17.2 R⊕
    assert!(ch.flags(2).contains(Flag::LowSnr));
    assert!(ch.why(0).contains("R = 28.1"), "{}", ch.why(0));
}

#[test]
fn pair_checks() {
    // Invented stars: a duplicate, an alias, an unstable pair, a clean pair.
    // The duplicate's second entry (SNR 19) follows the first (SNR 20).
    let text = format!(
        "{HEAD}\
D,D-1,5.0,0.00001,100.0,0.001,500,3,20,0.3,1,1,5772,,,\n\
D,D-2,5.000005,0.00001,100.002,0.001,480,3,19,0.3,1,1,5772,,,\n\
H,H-1,4.0,0.00001,100.0,0.001,500,2.8,20,0.3,1,1,5772,,,\n\
H,H-2,8.0,0.00002,104.0,0.001,500,3.5,25,0.3,1,1,5772,,,\n\
U,U-1,12.4,0.0001,100.0,0.01,600,4,20,0.3,1,1,5772,,,\n\
U,U-2,12.95,0.0001,101.0,0.01,550,4.1,20,0.3,1,1,5772,,,\n\
C,C-1,10.0,0.0001,100.0,0.01,600,3.9,20,0.3,1,1,5772,,,\n\
C,C-2,21.0,0.0001,101.0,0.01,550,5.0,20,0.4,1,1,5772,,,\n"
    );
    let c = load(&text);
    let ch = run(&c, &CheckSettings::default());
    let id = |s: &str| c.find_candidate(s).unwrap();
    let f = |s: &str| ch.flags(id(s));
    let w = |s: &str| ch.warnings(id(s));
    // The copy is flagged firmly and names whom it follows; the
    // representative (highest SNR) carries the link as a warning only.
    assert!(f("D-2").contains(Flag::NearTwin) && !f("D-1").contains(Flag::NearTwin));
    assert!(w("D-1").contains(Flag::NearTwin));
    assert!(
        ch.why(id("D-2")).contains("one signal found twice"),
        "{}",
        ch.why(id("D-2"))
    );
    assert!(
        ch.why(id("D-2")).contains("counts once, as D-1"),
        "{}",
        ch.why(id("D-2"))
    );
    // The alias: H-2 (SNR 25) stands for the signal, H-1 follows it.
    assert!(f("H-1").contains(Flag::Harmonic) && !f("H-2").contains(Flag::Harmonic));
    let g = ch.groups();
    assert_eq!(g.len(), 2);
    let hg = g.group_of(id("H-1")).unwrap();
    assert_eq!(g.members(hg), &[id("H-2"), id("H-1")]);
    assert!(f("U-1").contains(Flag::Crowded) && f("U-2").contains(Flag::Crowded));
    assert!(
        f("C-1").is_empty() && f("C-2").is_empty(),
        "{} / {}",
        ch.why(6),
        ch.why(7)
    );
    assert!(g.group_of(id("C-1")).is_none() && g.group_of(id("U-1")).is_none());
}

#[test]
fn an_eclipse_pair_is_one_binary() {
    // Invented: one eclipsing binary listed twice, primary and secondary
    // (same period, second epoch half a period later). Two planets cannot
    // share an orbit (zero Hill separation, Gladman 1993), so this is one
    // signal (docs/science.md §3.1); the secondary at 2,500 ppm is far above
    // what a planet's occultation can reach ((5/3)·δ·(R★/a)² ≈ 70 ppm at
    // a/R★ ≈ 16 for P = 6 d around the Sun; docs/science.md §4.3), so every
    // member is flagged `secondary`.
    let text = format!(
        "{HEAD}\
E,E-1,6.0,0.00001,100.0,0.001,9000,3.2,60,0.2,1,1,5772,,,\n\
E,E-2,6.0000003,0.00001,103.0,0.001,2500,3.2,25,0.2,1,1,5772,,,\n\
P,P-1,6.0,0.00001,100.0,0.001,8900,3.2,60,0.2,1,1,5772,,,\n\
P,P-2,6.0000003,0.00001,103.0,0.001,40,3.2,8,0.2,1,1,5772,,,\n\
X,X-1,9.0,0.00001,100.0,0.001,900,3.2,20,0.2,1,1,5772,,,\n\
X,X-2,9.0,0.00001,103.1,0.001,850,3.2,19,0.2,1,1,5772,,,\n"
    );
    let c = load(&text);
    let ch = run(&c, &CheckSettings::default());
    let id = |s: &str| c.find_candidate(s).unwrap();
    assert!(
        ch.flags(id("E-2")).contains(Flag::HalfPhase),
        "{}",
        ch.why(id("E-2"))
    );
    assert!(
        ch.why(id("E-2")).contains("phase 0.500"),
        "{}",
        ch.why(id("E-2"))
    );
    for m in ["E-1", "E-2"] {
        assert!(
            ch.flags(id(m)).contains(Flag::Secondary),
            "{m}: {}",
            ch.why(id(m))
        );
    }
    // A faint same-period signal within a planet's occultation ceiling:
    // still one signal (the copy is held), but the primary is not called a
    // binary for it.
    assert!(ch.flags(id("P-2")).contains(Flag::HalfPhase));
    assert!(
        !ch.flags(id("P-1")).contains(Flag::Secondary),
        "{}",
        ch.why(id("P-1"))
    );
    // An eccentric binary: the second eclipse at phase 0.34, not 0.5, is
    // still one binary.
    assert!(
        ch.flags(id("X-2")).contains(Flag::HalfPhase),
        "{}",
        ch.why(id("X-2"))
    );
    assert!(
        ch.flags(id("X-1")).contains(Flag::Secondary),
        "{}",
        ch.why(id("X-1"))
    );
    assert!(
        !ch.flags(id("X-1")).contains(Flag::Crowded),
        "{}",
        ch.why(id("X-1"))
    );
}

#[test]
fn a_true_resonance_with_offset_transits_stays_two_planets() {
    // Invented: periods 2:1 within the errors but the longer period's
    // transits fall at phase 0.34 of the shorter's (offset 1.7 d ≫ T14):
    // two planets in resonance, not an alias, nor a binary's other eclipse
    // (that would fall at phase 0.5; docs/science.md §3.1).
    let text = format!(
        "{HEAD}\
R,R-1,5.0,0.00001,100.0,0.001,500,3,20,0.3,1,1,5772,,,\n\
R,R-2,10.0,0.00002,101.7,0.001,450,3.8,18,0.3,1,1,5772,,,\n"
    );
    let c = load(&text);
    let ch = run(&c, &CheckSettings::default());
    assert!(ch.groups().is_empty());
    assert!(
        ch.flags(0).is_empty() && ch.flags(1).is_empty(),
        "{} / {}",
        ch.why(0),
        ch.why(1)
    );
}

#[test]
fn one_signal_found_by_two_searches_years_apart_is_one_signal() {
    // Invented: one eclipsing binary (true period 2.5 d) found twice, at P
    // by a mission-long search (period ±0.00002 d, epoch 1200.0) and at 2P
    // by one early sector's search (period ±0.0008 d, epoch 100.0, 1,100
    // days and 220 of its cycles before). Carried those 220 cycles, the
    // sector's ephemeris lands 8.4 h from the mission's transit, more than
    // T14 + 3σ of the epochs (2.6 h), but well within its own propagated
    // error, 3 × 220 × 0.0008 d = 12.7 h; carried the other way, the
    // mission's ephemeris (440 cycles × 0.00002 d) lands 0.11 h from the
    // sector's transit (docs/science.md §3.1). Without period errors, the
    // pair's own disagreement (|5.0016 − 2 × 2.50001| d) stands for them.
    // A resonant pair of precise periods stays two planets however far
    // apart its epochs (carried 150 cycles: 0.003 d, against an offset of
    // 1.7 d).
    let text = format!(
        "{HEAD}\
A,A-1,2.50001,0.00002,1200.0,0.001,8000,2.4,60,0.3,1,1,5772,,,\n\
A,A-2,5.0016,0.0008,100.0,0.002,8000,2.4,40,0.3,1,1,5772,,,\n\
B,B-1,2.50001,,1200.0,,8000,2.4,60,0.3,1,1,5772,,,\n\
B,B-2,5.0016,,100.0,,8000,2.4,40,0.3,1,1,5772,,,\n\
R,R-1,5.0,0.00001,100.0,0.001,500,3,20,0.3,1,1,5772,,,\n\
R,R-2,10.0,0.00002,1601.7,0.001,450,3.8,18,0.3,1,1,5772,,,\n"
    );
    let (c, ch) = loaded_and_checked(&text);
    for copy in ["A-2", "B-2"] {
        assert!(
            flagged(&c, &ch, copy, Flag::Harmonic),
            "{copy}: {}",
            ch.why(c.find_candidate(copy).unwrap())
        );
    }
    let why = |s: &str| ch.why(c.find_candidate(s).unwrap());
    assert!(why("A-2").contains("offset 0.11 h"), "{}", why("A-2"));
    assert!(
        ch.groups()
            .group_of(c.find_candidate("R-1").unwrap())
            .is_none()
    );
    assert!(!flagged(&c, &ch, "R-2", Flag::Harmonic), "{}", why("R-2"));

    // Only one way carried and only by the error: the mission's period is
    // given loosely too, so the test at its epoch fails (carried 440
    // cycles of ±0.0004 d its ephemeris lands anywhere in the orbit; the
    // sector's, carried to 1200.0, passes as above).
    let loose = text.replace("A,A-1,2.50001,0.00002", "A,A-1,2.5012,0.0004");
    let (c, ch) = loaded_and_checked(&loose);
    let why = ch.why(c.find_candidate("A-2").unwrap());
    assert!(flagged(&c, &ch, "A-2", Flag::Harmonic), "{why}");
    assert!(
        why.contains("within the") && why.contains("220 cycles of the period's error"),
        "{why}"
    );
}

#[test]
fn echo_flags_the_fainter_copy() {
    let text = format!(
        "{HEAD}\
BRIGHT,BRIGHT-1,3.2,0.000001,100.0,0.0005,3000,2.5,80,0.3,1,1,5772,50.0,-15.0,10.0\n\
FAINT,FAINT-1,3.2000005,0.000002,100.0003,0.001,150,2.5,12,0.3,0.8,0.8,5200,50.002,-15.001,13.8\n\
FAR,FAR-1,3.2000005,0.000002,100.0003,0.001,150,2.5,12,0.3,0.8,0.8,5200,51.0,-15.0,13.8\n\
OTHER,OTHER-1,3.2,0.000001,101.1,0.0005,150,2.5,12,0.3,0.8,0.8,5200,50.001,-15.0,13.8\n"
    );
    let c = load(&text);
    let ch = run(&c, &CheckSettings::default());
    assert!(ch.flags(1).contains(Flag::Echo), "{}", ch.why(1));
    assert!(
        ch.why(1).contains("likely light from BRIGHT"),
        "{}",
        ch.why(1)
    );
    assert!(!ch.flags(0).contains(Flag::Echo) && ch.warnings(0).contains(Flag::Echo));
    assert!(
        !ch.flags(2).contains(Flag::Echo),
        "3,600″ away: {}",
        ch.why(2)
    );
    assert!(
        !ch.flags(3).contains(Flag::Echo),
        "other phase: {}",
        ch.why(3)
    );
}

#[test]
fn demo_planted_cases_are_flagged() {
    let c = crate::demo::catalogue().unwrap();
    let ch = run(&c, &CheckSettings::default());
    let truth = include_str!("../../demo-catalogue/truth.csv");
    let mut clean_flagged = 0;
    let mut clean = 0;
    for line in truth.lines().skip(1) {
        let f: Vec<&str> = line.split(',').collect();
        let id = c.find_candidate(f[0]).unwrap();
        let flags = ch.flags(id);
        let want = match f[2] {
            "background-blend" => Some(Flag::DensityMismatch),
            "duplicate" => Some(Flag::NearTwin),
            "period-alias" => Some(Flag::Harmonic),
            "unstable-pair" => Some(Flag::Crowded),
            "echo-copy" => Some(Flag::Echo),
            "low-snr-planet" => Some(Flag::LowSnr),
            "planet" => {
                clean += 1;
                if !flags.is_empty() {
                    clean_flagged += 1;
                }
                None
            }
            _ => None,
        };
        if let Some(w) = want {
            assert!(
                flags.contains(w),
                "{} ({}) lacks {w}: {}",
                f[0],
                f[2],
                ch.why(id)
            );
        }
    }
    // Few clean planets raise a firm flag (the demo's siblings of planted
    // duplicates and aliases do, by design).
    assert!(
        clean_flagged * 20 < clean,
        "{clean_flagged} of {clean} clean planets flagged"
    );
}

#[test]
fn echo_by_physics_deeper_is_source_twice_the_period_and_no_positions() {
    // Invented: a faint star's deep eclipse (2 %) leaks into a bright
    // neighbour as a shallow copy: dilution only makes a copy shallower, so
    // the deeper is the source whatever the magnitudes (docs/science.md §3.3;
    // Coughlin et al. 2014, AJ 147, 119, from memory).
    let text = format!(
        "{HEAD}\
FAINT,FAINT-1,3.2,0.000001,100.0,0.0005,20000,2.5,80,0.3,0.8,0.8,5200,50.0,-15.0,14.0\n\
BRIGHT,BRIGHT-1,3.2000005,0.000002,100.0003,0.001,150,2.5,12,0.3,1,1,5772,50.002,-15.001,10.0\n\
HALF,HALF-1,6.4000010,0.000004,103.2002,0.001,120,2.5,10,0.3,1,1,5772,50.003,-15.0,11.0\n"
    );
    let c = load(&text);
    let ch = run(&c, &CheckSettings::default());
    assert!(ch.flags(1).contains(Flag::Echo), "{}", ch.why(1));
    assert!(!ch.flags(0).contains(Flag::Echo) && ch.warnings(0).contains(Flag::Echo));
    // The same signal at twice the period (2:1) is matched too.
    assert!(ch.flags(2).contains(Flag::Echo), "{}", ch.why(2));
    assert!(ch.why(2).contains("period ratio 2:1"), "{}", ch.why(2));
    // Without positions the same match is only a warning.
    let bare = "star,candidate,period_d,epoch,depth_ppm,duration_h\n\
A,A-1,3.2,100.0,20000,2.5\nB,B-1,3.2000001,100.0003,150,2.5\n";
    let c = load(bare);
    let ch = run(&c, &CheckSettings::default());
    assert!(
        !ch.flags(1).contains(Flag::Echo) && ch.warnings(1).contains(Flag::Echo),
        "{}",
        ch.why(1)
    );
    // So is a match where one of the two has no position in a table that
    // gives positions (an empty cell, or a declination beyond the pole):
    // not taken for two stars half the sky apart.
    for (ra, dec) in [("", ""), ("50.001", "95.0")] {
        let gap = format!(
            "star,candidate,period_d,epoch,depth_ppm,duration_h,ra_deg,dec_deg\n\
A,A-1,3.2,100.0,20000,2.5,50.0,-15.0\nB,B-1,3.2000001,100.0003,150,2.5,{ra},{dec}\n"
        );
        let c = load(&gap);
        let ch = run(&c, &CheckSettings::default());
        assert!(
            !ch.flags(1).contains(Flag::Echo) && ch.warnings(1).contains(Flag::Echo),
            "`{ra}`, `{dec}`: {}",
            ch.why(1)
        );
        assert!(
            ch.why(1).contains("no positions to say how close"),
            "{}",
            ch.why(1)
        );
        assert!(ch.warnings(0).contains(Flag::Echo), "{}", ch.why(0));
    }
}

#[test]
fn a_neighbours_echo_found_by_one_sector_is_matched_within_its_errors() {
    // Invented: a binary on a faint star and its light in a neighbour 8″
    // away, each found by one short search: periods 3.0000 ± 0.0006 d and
    // 3.0012 ± 0.0008 d, 4 × 10⁻⁴ apart, within 3σ of their combined error
    // (0.003 d) but beyond the 5 × 10⁻⁵ bound of catalogues without
    // positions. Before, the copy counted towards its star's system.
    let text = format!(
        "{HEAD}\
NA,NA-1,3.0000,0.0006,1500.10,0.002,9000,2.8,60,0.3,1,1,5772,120.0,-30.0,14.0\n\
NB,NB-1,3.0012,0.0008,1500.11,0.003,700,2.8,20,0.3,1,1,5772,120.002,-30.001,10.0\n\
NC,NC-1,3.0060,0.0008,1500.11,0.003,700,2.8,20,0.3,1,1,5772,120.004,-30.001,10.0\n"
    );
    let (c, ch) = loaded_and_checked(&text);
    assert!(flagged(&c, &ch, "NB-1", Flag::Echo), "{}", ch.why(1));
    // 2 × 10⁻³ apart, 6σ: not the same signal.
    assert!(!flagged(&c, &ch, "NC-1", Flag::Echo), "{}", ch.why(2));
}

#[test]
fn thousands_of_copies_of_one_signal_stay_linear() {
    // A hostile catalogue: one ephemeris and one position copied 400 times on
    // each of 5 stars. Every copy is caught (near-twin on its star, echo
    // across stars) and the findings grow linearly, not with the pairs.
    let mut text = String::from(
        "star,candidate,period_d,epoch,depth_ppm,duration_h,snr,star_radius_rsun,star_mass_msun,ra_deg,dec_deg\n",
    );
    for s in 0..5 {
        for j in 0..400 {
            // Each star's depth its own: the same row on two stars is
            // one row under two ids (`copies`), not an echo.
            let depth = 500 + s;
            text.push_str(&format!(
                "S{s},S{s}-{j},3.3,100.1,{depth},2.5,20,1,1,10,20\n"
            ));
        }
    }
    let c = load(&text);
    let ch = run(&c, &CheckSettings::default());
    let n = c.len() as CandidateId;
    let copies = (0..n)
        .filter(|&x| ch.flags(x).contains(Flag::NearTwin))
        .count();
    assert_eq!(copies, 5 * 399, "all but one per star are copies");
    assert!(
        (0..n).all(
            |x| ch.flags(x).contains(Flag::NearTwin) || ch.warnings(x).contains(Flag::NearTwin)
        )
    );
    let echoes = (0..n).filter(|&x| ch.flags(x).contains(Flag::Echo)).count();
    // The deepest star's signals are the source; every signal of the four
    // shallower stars is a copy of its light.
    assert!(echoes >= 4 * 400, "{echoes} echo copies");
    let findings: usize = (0..n).map(|x| ch.findings(x).count()).sum();
    assert!(
        findings <= 4 * c.len(),
        "{findings} findings for {} candidates",
        c.len()
    );
}

#[test]
fn a_run_shares_its_flags_stage_by_stage_when_asked() {
    let cat = crate::demo::catalogue().unwrap();
    // Asked: the last stage's flags are the run's own.
    let progress = CheckProgress::sharing_flags();
    let ch = run_counted(&cat, &CheckSettings::default(), &progress);
    assert_eq!(progress.take_flags().as_deref(), Some(ch.all_flags()));
    assert_eq!(progress.take_flags(), None, "taken once");
    // Not asked: nothing is kept.
    let progress = CheckProgress::default();
    run_counted(&cat, &CheckSettings::default(), &progress);
    assert_eq!(progress.take_flags(), None);
}

#[test]
fn a_run_counts_its_work_to_the_whole() {
    // Every candidate's work is counted once per part, whatever the
    // catalogue holds: the status line ends at 100 %, never short of it.
    let demo = crate::demo::catalogue().unwrap();
    let bare = load(
        "star,candidate,period_d,epoch,depth_ppm,duration_h\n\
         S1,S1-a,3.5,10.0,500,2.0\nS1,S1-b,7.0,10.5,600,2.5\nS2,S2-a,3.5,10.0,700,2.0\n",
    );
    for cat in [&demo, &bare] {
        let progress = CheckProgress::default();
        assert_eq!(progress.percent(cat.len()), 0);
        let counted = run_counted(cat, &CheckSettings::default(), &progress);
        assert_eq!(progress.percent(cat.len()), 100);
        // Counting changes nothing found.
        let plain = run(cat, &CheckSettings::default());
        for c in 0..cat.len() as CandidateId {
            assert_eq!(counted.flags(c), plain.flags(c));
        }
    }
}

/// A catalogue from its text, and its checks under the default settings.
fn loaded_and_checked(text: &str) -> (Catalogue, Checks) {
    let c = load(text);
    let ch = run(&c, &CheckSettings::default());
    (c, ch)
}

/// Whether candidate `id` carries the blocking `flag`.
fn flagged(c: &Catalogue, ch: &Checks, id: &str, flag: Flag) -> bool {
    ch.flags(c.find_candidate(id).unwrap()).contains(flag)
}

#[test]
fn rows_of_one_star_far_apart_are_not_one_star() {
    // Two planets of one host share its position; rows of one id 1° apart
    // (a placeholder for unknown hosts, say) are several stars. Periods far
    // apart, so no other check of the pair fires.
    // Each star's depths its own: the same row on two stars would be one
    // row under two ids (`copies`).
    let row = |star: &str, n: u32, p: f64, ra: f64, dec: f64| {
        let depth = 400 + star.bytes().map(u32::from).sum::<u32>();
        format!(
            "{star},{star}-{n},{p},0.00001,100.0,0.001,{depth},2.5,30,0.3,1,1,5772,{ra},{dec},11\n"
        )
    };
    let text = [
        HEAD.to_string(),
        row("ONE", 1, 3.1, 50.0, -15.0),
        row("ONE", 2, 11.7, 50.0, -15.0),
        row("NEAR", 1, 3.1, 80.0, 10.0),
        // 100″ north: within the echo radius (120″), still one place.
        row("NEAR", 2, 11.7, 80.0, 10.0 + 100.0 / 3600.0),
        row("APART", 1, 3.1, 120.0, 30.0),
        row("APART", 2, 11.7, 121.0, 30.0),
        row("APART", 3, 25.3, f64::NAN, f64::NAN),
        // Only one row with a position: nothing to compare.
        row("HALF", 1, 3.1, 200.0, 5.0),
        row("HALF", 2, 11.7, f64::NAN, f64::NAN),
    ]
    .concat();
    let (c, ch) = loaded_and_checked(&text);
    let mixed = |id: &str| flagged(&c, &ch, id, Flag::MixedHost);
    for id in ["ONE-1", "ONE-2", "NEAR-1", "NEAR-2", "HALF-1", "HALF-2"] {
        assert!(
            !mixed(id),
            "{id}: {}",
            ch.why(c.find_candidate(id).unwrap())
        );
    }
    // 1° of right ascension at dec 30° is cos 30° × 3600″ = 3118″ (from
    // the haversine formula); every member is held, the one without a
    // position too.
    for id in ["APART-1", "APART-2", "APART-3"] {
        assert!(mixed(id), "{id}");
    }
    let why = ch.why(c.find_candidate("APART-3").unwrap());
    assert!(
        why.contains("lie 3118″ apart (APART-1 and APART-2)"),
        "{why}"
    );
    // A smaller echo radius narrows "one place" with it.
    let tight = CheckSettings {
        echo_radius_arcsec: 60.0,
        ..CheckSettings::default()
    };
    let ch = run(&c, &tight);
    assert!(
        ch.flags(c.find_candidate("NEAR-2").unwrap())
            .contains(Flag::MixedHost)
    );
}

#[test]
fn rows_of_one_star_that_disagree_on_the_star_are_not_one_star() {
    // No positions: the rows' brightness and stellar parameters tell
    // stars apart (docs/science.md §3.4). Within the limits (1 mag, a
    // factor 2 in radius, 1.5 in temperature) a star's rows agree; beyond
    // them they are several stars.
    let row = |star: &str, n: u32, p: f64, r: f64, teff: f64, mag: f64| {
        let depth = 400 + star.bytes().map(u32::from).sum::<u32>();
        format!(
            "{star},{star}-{n},{p},0.00001,100.0,0.001,{depth},2.5,30,0.3,{r},1,{teff},,,{mag}\n"
        )
    };
    let text = [
        HEAD.to_string(),
        row("SAME", 1, 3.1, 1.0, 5772.0, 12.0),
        row("SAME", 2, 11.7, 1.0, 5772.0, 12.0),
        // Fitted anew per candidate: 0.4 mag, 60 % in radius, 800 K apart.
        row("FIT", 1, 3.1, 1.0, 5400.0, 12.0),
        row("FIT", 2, 11.7, 1.6, 6200.0, 12.4),
        row("MAG", 1, 3.1, 1.0, 5772.0, 11.0),
        row("MAG", 2, 11.7, 1.0, 5772.0, 12.2),
        row("RAD", 1, 3.1, 0.5, 5772.0, f64::NAN),
        row("RAD", 2, 11.7, 1.2, 5772.0, f64::NAN),
        row("TEFF", 1, 3.1, 1.0, 4000.0, f64::NAN),
        row("TEFF", 2, 11.7, 1.0, 6500.0, f64::NAN),
    ]
    .concat();
    let (c, ch) = loaded_and_checked(&text);
    let mixed = |id: &str| flagged(&c, &ch, id, Flag::MixedHost);
    for id in ["SAME-1", "SAME-2", "FIT-1", "FIT-2"] {
        assert!(
            !mixed(id),
            "{id}: {}",
            ch.why(c.find_candidate(id).unwrap())
        );
    }
    for id in ["MAG-1", "MAG-2", "RAD-1", "RAD-2", "TEFF-1", "TEFF-2"] {
        assert!(mixed(id), "{id}");
    }
    let why = ch.why(c.find_candidate("MAG-2").unwrap());
    assert!(
        why.contains("give magnitudes 11 (MAG-1) and 12.2 (MAG-2)"),
        "{why}"
    );
}

#[test]
fn pairs_no_host_could_keep_are_crowded_even_where_the_star_is_unknown() {
    // No stellar radius or mass: each planet is taken as small as its depth
    // allows, around the smallest main-sequence star (0.1 R☉, 0.1 M☉). Two
    // 1000 ppm planets there are about 0.34 R⊕ and 0.027 M⊕ (Weiss &
    // Marcy 2014), Hill-unstable (2√3 mutual Hill radii, Gladman 1993) below
    // a period ratio of about 1.04 (computed offline in Python from those
    // two formulas, uniform disc).
    let text = "star,candidate,period_d,epoch,depth_ppm,duration_h\n\
                TIGHT,TIGHT-1,10.0,100.0,1000,2.5\nTIGHT,TIGHT-2,10.2,100.3,1000,2.5\n\
                WIDE,WIDE-1,10.0,100.0,1000,2.5\nWIDE,WIDE-2,10.6,100.3,1000,2.5\n";
    let c = load(text);
    let ch = run(&c, &CheckSettings::default());
    let crowded = |id: &str| {
        ch.flags(c.find_candidate(id).unwrap())
            .contains(Flag::Crowded)
    };
    for id in ["TIGHT-1", "TIGHT-2"] {
        assert!(crowded(id), "{id}");
    }
    let why = ch.why(c.find_candidate("TIGHT-1").unwrap());
    assert!(
        why.contains("the smallest main-sequence star assumed (0.1 R☉, 0.1 M☉)"),
        "{why}"
    );
    for id in ["WIDE-1", "WIDE-2"] {
        assert!(
            !crowded(id),
            "{id}: {}",
            ch.why(c.find_candidate(id).unwrap())
        );
    }
}

#[test]
fn epochs_from_two_zeros_are_said() {
    // Invented: one row's epoch in BJD, another's in BJD − 2457000.
    let mixed = format!(
        "{HEAD}\
M,M-1,4.1,0.00001,2458400.1,0.001,700,3.0,30,0.3,1,1,5772,,,\n\
N,N-1,5.3,0.00001,1400.6,0.001,700,3.0,30,0.3,1,1,5772,,,\n"
    );
    let (_, ch) = loaded_and_checked(&mixed);
    assert!(
        ch.notes().iter().any(|n| n.contains("different zeros")
            && n.contains("M-1, 2458400.1")
            && n.contains("N-1, 1400.6")),
        "{:?}",
        ch.notes()
    );
    let one = mixed.replace("1400.6", "2458401.6");
    assert!(loaded_and_checked(&one).1.notes().is_empty());
    // One binary at P and 2P on one star, its epochs from the two zeros
    // and its periods without errors: it cannot be told from one signal.
    let twice = format!(
        "{HEAD}\
E,E-1,2.5,,2458400.1,,8000,2.4,60,0.3,1,1,5772,,,\n\
E,E-2,5.0,,1401.35,,8000,2.4,40,0.3,1,1,5772,,,\n"
    );
    let (c, ch) = loaded_and_checked(&twice);
    assert!(flagged(&c, &ch, "E-2", Flag::Harmonic), "{}", ch.why(1));
    assert!(ch.why(1).contains("offset unknown"), "{}", ch.why(1));
}

#[test]
fn a_copys_signs_are_no_false_positives_to_another_star_id() {
    // As the odds read a star (a copy's flags do not mark it): a
    // representative's `secondary` (its group flag a warning) is a false
    // positive's sign, a copy's (its group flag firm) is not, and the
    // catalogue's word always is.
    let mut ch = Checks::none(3);
    ch.add(0, Flag::Secondary, false, "eclipse".into());
    ch.add(0, Flag::Harmonic, true, "stands for 1".into());
    ch.add(1, Flag::Secondary, false, "its own transit".into());
    ch.add(1, Flag::Harmonic, false, "copy of 0".into());
    ch.add(2, Flag::KnownFp, false, "EB".into());
    ch.add(2, Flag::NearTwin, false, "copy".into());
    assert!(shows_false_positive(&ch, 0));
    assert!(!shows_false_positive(&ch, 1));
    assert!(shows_false_positive(&ch, 2));
    assert!(false_positive_words(&ch, 0).contains("(secondary)"));
    assert!(false_positive_words(&ch, 2).contains("the catalogue"));
}
