//! Tables of threshold-crossing events: a pipeline's detections before
//! vetting. A noisy star's false alarms come several to a star, which the
//! multiplicity model (false positives at random; Lissauer et al. 2012,
//! ApJ 750, 112, §3) does not allow for, so an event counts in its star's
//! system only once a vetter keeps it (docs/science.md §1.1).

mod common;
use common::*;

/// The verdict tests' background (invented clean systems) and a noisy
/// star's three false alarms, as an event table lays them out
/// (`kepid`, `tce_plnt_num`, `tce_*`; from memory of the archives' column
/// lists): no candidate column, each event numbered on its star. The false
/// alarms sit at long periods (a year and near it), shallow and near the
/// detection threshold, as such events do.
fn events_table() -> String {
    let mut t = String::from(
        "kepid,tce_plnt_num,tce_period,tce_time0bk,tce_depth,tce_duration,tce_model_snr\n",
    );
    for line in background().lines() {
        let f: Vec<&str> = line.split(',').collect();
        let (star, number) = f[1].rsplit_once('-').unwrap();
        assert_eq!(star, f[0]);
        // Star ids as numbers, as the archives give them.
        let id = 100_000 + star_number(star);
        t.push_str(&format!(
            "{id},{number},{},{},{},{},{}\n",
            f[2], f[4], f[6], f[7], f[8]
        ));
    }
    for (n, (p, t0)) in [(372.1, 140.2), (455.3, 157.5), (291.7, 174.8)]
        .iter()
        .enumerate()
    {
        t.push_str(&format!("999999,{},{p},{t0},150,9.0,7.4\n", n + 1));
    }
    t
}

/// A number for each background star id (`BG2x7` → 2007).
fn star_number(star: &str) -> u32 {
    let (k, i) = star.trim_start_matches("BG").split_once('x').unwrap();
    k.parse::<u32>().unwrap() * 1000 + i.parse::<u32>().unwrap()
}

#[test]
fn no_event_is_validated_until_a_vetter_keeps_it() {
    let cat = written("events-unvetted", &events_table());
    let c = cat.to_str().unwrap();
    // Every command agrees, and no event is validated: the noisy star's
    // three false alarms made a 3-system, validated, before. Most of a
    // pipeline's events are no planet (of the 34,032 events of Kepler's
    // last search about 4,000 became planet candidates; Thompson et al.
    // 2018, ApJS 235, 38, from memory): one not kept is `unlikely`, 1:1.
    let v = agreed(c);
    assert!(v.values().all(|v| v == "unlikely"), "{v:?}");
    assert_eq!(v["999999.01"], "unlikely");
    // Each says why, and every output says what the table is.
    let o = starsift(&["odds", c, "--format", "csv"]);
    let out = stdout(&o);
    let row = out.lines().find(|l| l.starts_with("999999,")).unwrap();
    assert!(row.contains("an event not yet kept by a vetter"), "{row}");
    assert!(
        stderr(&o).contains("threshold-crossing events, not yet candidates"),
        "{}",
        stderr(&o)
    );
    let o = starsift(&["summary", c]);
    assert!(
        stdout(&o).contains("threshold-crossing events, not yet candidates"),
        "{}",
        stdout(&o)
    );
}

#[test]
fn kept_events_make_their_stars_systems() {
    let cat = written("events-kept", &events_table());
    let c = cat.to_str().unwrap();
    // A vetter keeps both events of one background double and one of the
    // noisy star's, and rejects another of its as noise.
    let dir = cat.parent().unwrap();
    let batch = dir.join("batch.csv");
    std::fs::write(
        &batch,
        "candidate,decision,reason,note\n\
         102000.01,kept,,\n\
         102000.02,kept,,\n\
         999999.01,kept,,\n\
         999999.02,rejected,artefact,\n",
    )
    .unwrap();
    let o = starsift(&[
        "decide",
        c,
        "--from",
        batch.to_str().unwrap(),
        "--vetter",
        "ana",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let kv = k_and_verdict(&["odds", c, "--format", "csv"]);
    assert_eq!(
        agreed(c),
        kv.iter()
            .map(|(c, (_, v))| (c.clone(), v.clone()))
            .collect()
    );
    // The kept double is a 2-system of the kept events, validated.
    assert_eq!(kv["102000.01"], ("2".into(), "validated".into()));
    assert_eq!(kv["102000.02"], ("2".into(), "validated".into()));
    // The noisy star's kept event is alone in its system, at the prior of
    // a single; the one not yet kept is held; the rejected one is rejected.
    assert_eq!(kv["999999.01"], ("1".into(), "likely".into()));
    assert_eq!(kv["999999.03"], ("0".into(), "unlikely".into()));
    assert_eq!(kv["999999.02"].1, "rejected");
    // Every other event is held, not counted.
    assert_eq!(kv["102001.01"], ("0".into(), "unlikely".into()));
}

#[test]
fn an_event_table_that_names_its_events_is_one_too() {
    // `tce_*` quantities under a named id column: still detections.
    let named = events_table().replacen("kepid,tce_plnt_num", "kepid,candidate", 1);
    let named: String = named
        .lines()
        .enumerate()
        .map(|(i, l)| {
            if i == 0 {
                return format!("{l}\n");
            }
            let (star, rest) = l.split_once(',').unwrap();
            let (n, rest) = rest.split_once(',').unwrap();
            format!("{star},{star}-{n},{rest}\n")
        })
        .collect();
    let cat = written("events-named", &named);
    let v = agreed(cat.to_str().unwrap());
    assert!(v.values().all(|v| v == "unlikely"), "{v:?}");
    // The same rows as vetted candidates (`period`, not `tce_period`)
    // count at once: the noisy star's three make a system, as the model
    // reads any candidates it is given.
    let candidates = named.replacen("tce_period", "period", 1);
    let cat = written("events-as-candidates", &candidates);
    let v = agreed(cat.to_str().unwrap());
    assert_eq!(v["999999-1"], "validated");
    assert_eq!(v["102000-1"], "validated");
}

#[test]
fn keeping_an_event_in_a_session_counts_it_as_a_fresh_build_would() {
    // The browser's path: decisions one at a time on the live state, each
    // checked against the state built from nothing (`Live::rebuilt`).
    use starsift::decision::Decision;
    let cat = load_text(&events_table());
    let mut live = live_of(&cat);
    let id = |s: &str| cat.find_candidate(s).unwrap();
    assert_eq!(live.counts().validated, 0);
    assert_eq!(live.counts().unlikely, cat.len());
    assert!(!live.counted(id("102000.01")));
    assert_eq!(live.odds(id("102000.01")), Some(1.0));
    live.set_decision(id("102000.01"), Decision::Kept);
    assert!(live.counted(id("102000.01")) && !live.counted(id("102000.02")));
    assert_eq!(live.k(id("102000.01")), 1);
    live.set_decision(id("102000.02"), Decision::Kept);
    assert_eq!(live.k(id("102000.02")), 2);
    // With no kept single the false-positive rate cannot be estimated
    // (docs/science.md §1.2): no boost yet, the pair at its prior.
    assert_eq!(live.boost(id("102000.02")), Some(1.0));
    assert_eq!(
        live.verdict(id("102000.02")),
        starsift::odds::Verdict::Likely
    );
    // A kept single gives the model its singles: the pair is validated.
    live.set_decision(id("101000.01"), Decision::Kept);
    assert_eq!(
        live.verdict(id("102000.02")),
        starsift::odds::Verdict::Validated
    );
    assert!(live.same_odds_state(&live.rebuilt(&cat).unwrap()));
    // Parked is not kept: the event is held again.
    live.set_decision(id("102000.02"), Decision::Parked);
    assert_eq!(live.k(id("102000.01")), 1);
    assert!(live.same_odds_state(&live.rebuilt(&cat).unwrap()));
}
