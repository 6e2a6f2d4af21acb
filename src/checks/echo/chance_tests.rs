//! The control of the echo search without positions (docs/science.md
//! §3.3): on signals placed at random it matches as many pairs as the
//! search does, and it does not match a copy of a signal's light.

use super::*;
use crate::checks::{CheckProgress, CheckSettings};

/// Invented: `n` unrelated signals, one per star, without positions:
/// periods log-uniform over 1–100 d known to 10⁻⁴ of themselves, epochs
/// spread over 1000 days known to 0.01 d, so that a match of period
/// carries its epoch over tens of cycles and chance matches are many.
/// Then `copies` copies of the first signals' light on stars of their own
/// (a tenth of the depth, the epoch a whole number of cycles later).
fn random_signals(n: usize, copies: usize, seed: u64) -> Catalogue {
    let mut rng = crate::demo::Rng::new(seed);
    let mut text = String::from(
        "star,candidate,period_d,period_err_d,epoch,epoch_err_d,depth_ppm,duration_h\n",
    );
    let mut rows = Vec::new();
    for i in 0..n {
        let period = 10f64.powf(rng.uniform(0.0, 2.0));
        let epoch = rng.uniform(0.0, 1000.0);
        let depth = rng.uniform(200.0, 5000.0);
        let row = (period, epoch, depth);
        rows.push(row);
        text.push_str(&format!(
            "R{i},R{i}-1,{period:.7},{:.2e},{epoch:.4},0.01,{depth:.1},3\n",
            period * 1e-4
        ));
    }
    for (i, &(period, epoch, depth)) in rows.iter().take(copies).enumerate() {
        let later = epoch + period * rng.below(20) as f64;
        text.push_str(&format!(
            "C{i},C{i}-1,{period:.7},{:.2e},{later:.4},0.01,{:.1},3\n",
            period * 1e-4,
            depth / 10.0
        ));
    }
    Catalogue::from_text("invented.csv", &text)
}

fn search(cat: &Catalogue) -> Echoes {
    check(cat, &CheckSettings::default(), &CheckProgress::default())
}

#[test]
fn on_unrelated_signals_the_control_matches_as_many_pairs() {
    // Chance only: the search's pairs and the control's are two counts of
    // the same rare event, each Poisson; they agree within 5σ of their
    // difference, for several catalogues.
    for seed in [1, 2, 3] {
        let echoes = search(&random_signals(12_000, 0, seed));
        let Chance { matched, control } = echoes.chance;
        let (m, c) = (matched as f64, control as f64);
        assert!(
            m > 200.0,
            "seed {seed}: too few chance matches to test ({m})"
        );
        assert!(
            (m - c).abs() <= 5.0 * (m + c).sqrt(),
            "seed {seed}: {m} matched, {c} control"
        );
        // About all of them chance: none is called likely light from a
        // neighbour.
        assert!(
            echoes.findings.iter().all(|f| !f.2.contains("likely")),
            "seed {seed}"
        );
    }
}

#[test]
fn the_control_does_not_match_copies_of_a_signal() {
    // 200 copies of real light on top of the chance matches: the search
    // finds them, the control does not, so the matches beyond the
    // control's count are the copies (within 5σ of the chance counts).
    let cat = random_signals(4000, 200, 7);
    let echoes = search(&cat);
    let Chance { matched, control } = echoes.chance;
    let excess = matched as f64 - control as f64;
    let noise = 5.0 * (matched as f64 + control as f64).sqrt();
    assert!(
        (excess - 200.0).abs() <= noise,
        "{matched} matched, {control} control"
    );
    // Every copy is found, and says what chance explains; a sixth of the
    // matches are chance, so a copy is still likely light from its source.
    for i in 0..200 {
        let c = cat.find_candidate(&format!("C{i}-1")).unwrap_or(u32::MAX);
        let said: Vec<&str> = (echoes.findings.iter())
            .filter(|f| f.0 == c)
            .map(|f| f.2.as_str())
            .collect();
        assert!(
            said.iter()
                .any(|w| w.contains("likely ") && w.contains(", or chance: about ")),
            "C{i}-1: {said:?}"
        );
    }
    let note = echoes.chance.note().unwrap_or_default();
    assert!(
        note.contains(&format!("{matched} pairs")) && note.contains(&format!("{control} pair")),
        "{note}"
    );
}

#[test]
fn one_match_and_no_chance_keeps_its_words() {
    // Two signals only: the control matches nothing, so the match is
    // said as ever ("likely") and the catalogue gets no note.
    let cat = Catalogue::from_text(
        "invented.csv",
        "star,candidate,period_d,epoch,depth_ppm,duration_h\n\
A,A-1,3.2,100.0,20000,2.5\nB,B-1,3.2000001,100.0003,150,2.5\n",
    );
    let echoes = search(&cat);
    assert_eq!((echoes.chance.matched, echoes.chance.control), (1, 0));
    assert!(echoes.chance.note().is_none());
    assert!(
        echoes
            .findings
            .iter()
            .all(|f| f.2.contains("likely") && !f.2.contains("or chance")),
        "{:?}",
        echoes.findings
    );
}
