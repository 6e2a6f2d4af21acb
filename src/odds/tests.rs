//! The model against published inputs and the worked values derived from
//! them in docs/science.md §1.2.

use proptest::prelude::*;
use statrs::distribution::{Discrete, Poisson};

use super::*;

/// Targets searched in the February 2011 catalogue: Borucki et al. 2011,
/// ApJ 736, 19.
const N_BORUCKI_2011: u64 = 156_453;
/// Stars with exactly k candidates, k = 1..6: Latham et al. 2011, ApJL 732, L24.
const HIST_LATHAM_2011: [usize; 7] = [0, 827, 115, 45, 8, 1, 1];

fn model(f: f64) -> Model {
    Model {
        targets: Some(N_BORUCKI_2011),
        fp_fraction: f,
        ..Model::default()
    }
}

fn close(got: f64, want: f64, rel: f64) -> bool {
    ((got - want) / want).abs() <= rel
}

#[test]
fn worked_values_f_0_1() {
    // docs/science.md §1.2, "Full formula, N = 156,453", f = 0.1 [D], from the
    // published N (Borucki 2011) and histogram (Latham 2011).
    let t = table(&model(0.1), &HIST_LATHAM_2011);
    assert!(close(t.lambda, 5.286e-4, 1e-3), "λ = {}", t.lambda);
    let r2 = t.row(2).unwrap();
    assert!(close(r2.e, 0.4149, 1e-3), "E2 = {}", r2.e);
    assert!(close(r2.f, 0.4367, 1e-3), "F2 = {}", r2.f);
    assert!(close(r2.q, 1.899e-3, 1e-3), "q2 = {}", r2.q);
    assert!(
        close(r2.boost_cand, 52.7, 1e-3),
        "B2,cand = {}",
        r2.boost_cand
    );
    assert!(close(r2.boost_sys, 27.7, 2e-3), "B2,sys = {}", r2.boost_sys);
    assert!(
        close(r2.boost_odds, 58.4, 1e-3),
        "B2,odds = {}",
        r2.boost_odds
    );
    let r3 = t.row(3).unwrap();
    assert!(close(r3.e, 0.0609, 2e-3), "E3 = {}", r3.e);
    assert!(close(r3.f, 0.0610, 2e-3), "F3 = {}", r3.f);
    assert!(close(r3.q, 4.517e-4, 1e-3), "q3 = {}", r3.q);
    assert!(
        close(r3.boost_cand, 221.4, 1e-3),
        "B3,cand = {}",
        r3.boost_cand
    );
    assert!(close(r3.boost_sys, 73.9, 2e-3), "B3,sys = {}", r3.boost_sys);
    assert!(
        close(r3.boost_odds, 245.9, 1e-3),
        "B3,odds = {}",
        r3.boost_odds
    );
    // Catalogue mode applies the odds-form boost; k = 1 has B = 1 (docs/science.md §1).
    assert_eq!(r2.boost, r2.boost_odds);
    assert_eq!(t.row(1).unwrap().boost, 1.0);
    assert!(t.warnings.is_empty(), "{:?}", t.warnings);
}

#[test]
fn worked_values_f_1() {
    // docs/science.md §1.2, f = 1.0 rows [D]: every single might be an FP. The odds
    // form is undefined there, so only B_cand = f/q_k and B_sys are checked.
    let t = table(&model(1.0), &HIST_LATHAM_2011);
    assert!(close(t.lambda, 5.286e-3, 1e-3));
    let r2 = t.row(2).unwrap();
    assert!(
        close(r2.e, 2.1718, 1e-3) && close(r2.f, 4.3437, 1e-3),
        "{r2:?}"
    );
    assert!(
        close(r2.q, 1.889e-2, 1e-3) && close(r2.boost_cand, 53.0, 1e-3),
        "{r2:?}"
    );
    assert!(close(r2.boost_sys, 53.0, 2e-3), "{r2:?}");
    let r3 = t.row(3).unwrap();
    assert!(
        close(r3.e, 0.6085, 1e-3) && close(r3.f, 0.6162, 1e-3),
        "{r3:?}"
    );
    assert!(
        close(r3.q, 4.564e-3, 1e-3) && close(r3.boost_cand, 219.1, 1e-3),
        "{r3:?}"
    );
    assert!(close(r3.boost_sys, 74.0, 2e-3), "{r3:?}");
    // The model refuses f = 1 for odds (the (1-f)/f form is undefined).
    assert_eq!(
        check_inputs(&model(1.0), 997),
        Err(ModelError::BadFraction(1.0))
    );
}

#[test]
fn leading_order_closed_forms() {
    // docs/science.md §1.2 leading order and §1.4 closed forms for N = 156,453 [D].
    let n = N_BORUCKI_2011 as f64;
    let (n1, n2, n3) = (827.0, 115.0, 45.0);
    assert!(close(2.0 * n * n2 / (n1 * n1), 52.6, 1e-3));
    assert!(close(n * n2 / (n1 * n1), 26.3, 2e-3));
    assert!(close(3.0 * n * n3 / (n1 * n2), 222.0, 2e-3));
    assert!(close(n * n3 / (n1 * n2), 74.0, 1e-3));
    // The full formula agrees with them to first order in λ.
    let t = table(&model(0.1), &HIST_LATHAM_2011);
    assert!(close(
        t.row(2).unwrap().boost_cand,
        2.0 * n * n2 / (n1 * n1),
        5e-3
    ));
    assert!(close(
        t.row(2).unwrap().boost_sys,
        n * n2 / ((1.0 - 0.05) * n1 * n1),
        5e-3
    ));
    assert!(close(
        t.row(3).unwrap().boost_cand,
        3.0 * n * n3 / (n1 * n2),
        5e-3
    ));
    assert!(close(t.row(3).unwrap().boost_sys, n * n3 / (n1 * n2), 5e-3));
    // B2,cand does not depend on f at leading order (docs/science.md §1.2).
    let t1 = table(&model(1.0), &HIST_LATHAM_2011);
    assert!(close(
        t1.row(2).unwrap().boost_cand,
        t.row(2).unwrap().boost_cand,
        1e-2
    ));
}

#[test]
fn threshold_is_p_100_over_101() {
    // docs/science.md §1.1 (Lissauer et al. 2014; Rowe et al. 2014):
    // validated at planet:FP odds ≥ 100:1, i.e. P ≥ 100/101.
    assert_eq!(probability(DEFAULT_THRESHOLD), 100.0 / 101.0);
    assert_eq!(verdict(100.0, 100.0, false, true), Verdict::Validated);
    assert_eq!(verdict(99.99, 100.0, false, true), Verdict::Likely);
    assert_eq!(verdict(0.5, 100.0, false, true), Verdict::Unlikely);
    assert_eq!(verdict(1e6, 100.0, true, true), Verdict::Rejected);
    // Not counted (a blocking flag, or a copy of another signal): never
    // validated, whatever the odds.
    assert_eq!(verdict(1e6, 100.0, false, false), Verdict::Likely);
}

#[test]
fn odds_with_f_0_1() {
    // docs/science.md §1.2 [D]: with f = 0.1 (prior odds 9), B = 25 → 225:1,
    // P = 0.99558; B = 54 → 486:1, P = 0.99795; B = 100 → 900:1, P = 0.99889.
    for (b, o, p) in [
        (25.0, 225.0, 0.99558),
        (54.0, 486.0, 0.99795),
        (100.0, 900.0, 0.99889),
    ] {
        let got = posterior_odds(b, 0.1);
        assert!((got - o).abs() < 1e-9, "{got}");
        assert!((probability(got) - p).abs() < 5e-6);
    }
    // B ≥ 11.1 is needed to validate with f = 0.1 [D].
    assert!(posterior_odds(11.2, 0.1) >= 100.0 && posterior_odds(11.1, 0.1) < 100.0);
    assert_eq!(format_odds(225.0), "225:1");
    assert_eq!(format_odds(0.04), "1:25");
}

#[test]
fn poisson_terms_agree_with_statrs() {
    for lambda in [5.286e-4, 5.286e-3, 0.3, 2.5] {
        let d = Poisson::new(lambda).unwrap();
        for j in 0..=12u64 {
            let want = d.pmf(j);
            let got = poisson(lambda, j as usize);
            assert!(
                (got - want).abs() <= 1e-12 * want.max(1e-300),
                "λ={lambda} j={j}: {got} vs {want}"
            );
        }
    }
    // No overflow far beyond any real multiplicity.
    assert!(poisson(5e-4, 170).is_finite() && poisson(5e-4, 170) >= 0.0);
}

#[test]
fn loose_checks_common_practice() {
    // docs/science.md §1, common practice, no source: a second candidate raises the
    // odds by a factor of order tens, a third by more, and three-candidate
    // systems reach at least 99 %.
    let t = table(&model(0.1), &HIST_LATHAM_2011);
    let b2 = t.row(2).unwrap().boost;
    let b3 = t.row(3).unwrap().boost;
    assert!((10.0..100.0).contains(&b2), "{b2}");
    assert!(b3 > b2);
    assert!(probability(posterior_odds(b3, 0.1)) >= 0.99);
}

#[test]
fn modes_and_degenerate_inputs() {
    assert_eq!(
        BoostMode::parse("fixed:3=100,2=25").unwrap(),
        BoostMode::Fixed(vec![(2, 25.0), (3, 100.0)])
    );
    assert!(BoostMode::parse("fixed:1=5").is_err());
    assert!(BoostMode::parse("fixed:2=x").unwrap_err().contains("`x`"));
    assert!(BoostMode::parse("wild").is_err());
    let fixed = Model {
        targets: None,
        mode: BoostMode::parse("fixed:2=25,3=100").unwrap(),
        ..Model::default()
    };
    assert_eq!(check_inputs(&fixed, 10), Ok(()));
    let t = table(&fixed, &[0, 5, 2, 1, 0, 1]);
    assert_eq!(
        t.rows.iter().map(|r| r.boost).collect::<Vec<_>>(),
        [1.0, 25.0, 100.0, 100.0, 100.0]
    );
    let mut m = model(0.1);
    m.targets = None;
    assert!(
        check_inputs(&m, 5)
            .unwrap_err()
            .to_string()
            .contains("--targets")
    );
    m.targets = Some(10);
    assert_eq!(
        check_inputs(&m, 11),
        Err(ModelError::TooFewTargets {
            targets: 10,
            stars: 11
        })
    );
    for f in [0.0, -0.1, 1.5, f64::NAN] {
        m.targets = Some(1000);
        m.fp_fraction = f;
        assert!(check_inputs(&m, 5).is_err(), "{f}");
    }
    // Few targets: the model expects more FP pairs than exist → clamped, warned.
    let t = table(
        &Model {
            targets: Some(60),
            ..model(0.1)
        },
        &[0, 50, 1],
    );
    assert!(t.row(2).unwrap().q < 1.0);
    assert!(
        t.warnings.iter().any(|w| w.contains("k = 2")),
        "{:?}",
        t.warnings
    );
    // No singles: λ = 0, floored, warned, still finite.
    let t = table(&model(0.1), &[0, 0, 3, 1]);
    assert!(t.rows.iter().all(|r| r.boost.is_finite() && r.boost > 0.0));
    assert!(!t.warnings.is_empty());
}

proptest! {
    #[test]
    fn table_is_always_finite(
        hist in proptest::collection::vec(0usize..2000, 1..14),
        extra in 0u64..1_000_000,
        f in 0.001f64..0.999,
    ) {
        let mut h = vec![0];
        h.extend(hist);
        let stars: usize = h.iter().sum();
        let m = Model { targets: Some(stars as u64 + extra), fp_fraction: f, ..Model::default() };
        prop_assert!(check_inputs(&m, stars).is_ok());
        for mode in [BoostMode::Catalogue, BoostMode::System] {
            let t = table(&Model { mode, ..m.clone() }, &h);
            for r in &t.rows {
                prop_assert!(r.q > 0.0 && r.q < 1.0, "{:?}", r);
                prop_assert!(r.boost.is_finite() && r.boost > 0.0, "{:?}", r);
                let o = posterior_odds(r.boost, f);
                prop_assert!(o.is_finite() && o > 0.0);
                prop_assert!(probability(o).is_finite());
            }
        }
    }
}

proptest! {
    /// The classes of prior and the list of f are the distinct values in
    /// total order, as sorting every candidate's value and dropping repeats
    /// gave (the same values, so the same odds and the same bytes).
    #[test]
    fn distinct_values_are_those_of_sorting_them_all(
        picks in proptest::collection::vec(0usize..7, 0..300)
    ) {
        let pool = [0.1, 0.25, -0.0, 0.0, f64::NAN, 1e-300, 0.1 + 1e-17];
        let values: Vec<f64> = picks.iter().map(|&i| pool[i]).collect();
        let mut all = values.clone();
        all.sort_by(f64::total_cmp);
        all.dedup();
        let got = live::distinct_sorted(&values);
        prop_assert_eq!(
            got.iter().map(|v| v.to_bits()).collect::<Vec<_>>(),
            all.iter().map(|v| v.to_bits()).collect::<Vec<_>>()
        );
    }
}
