//! The loader never panics, whatever the bytes (proptest).

use proptest::prelude::*;
use starsift::catalogue::{Catalogue, LoadOptions, Source};

fn load(data: &[u8]) {
    let _ = Catalogue::load(
        Source::Bytes {
            name: "fuzz.csv",
            data,
        },
        &LoadOptions::default(),
    );
}

const HEADER: &str = "star,candidate,period_d,epoch,depth_ppm,duration_h,snr,note\n";

fn cell() -> impl Strategy<Value = String> {
    prop_oneof![
        Just(String::new()),
        Just("nan".to_string()),
        Just("inf".to_string()),
        Just("-0".to_string()),
        any::<f64>().prop_map(|v| v.to_string()),
        (0.0f64..500.0).prop_map(|v| format!("{v:.3}")),
        "[a-zA-Z0-9 \"#,\\t\\r\\n\\x1b\\x00-\\x1f]{0,12}",
        "\"[^\"]{0,8}\"",
    ]
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    #[test]
    fn random_bytes_never_panic(data in proptest::collection::vec(any::<u8>(), 0..600)) {
        load(&data);
        let mut with_header = HEADER.as_bytes().to_vec();
        with_header.extend_from_slice(&data);
        load(&with_header);
    }

    #[test]
    fn random_csv_never_panics_and_accounts_for_every_row(
        rows in proptest::collection::vec(proptest::collection::vec(cell(), 0..10), 0..30)
    ) {
        let mut text = HEADER.to_string();
        for r in &rows {
            text.push_str(&r.join(","));
            text.push('\n');
        }
        if let Ok(c) = Catalogue::load(Source::Bytes { name: "fuzz.csv", data: text.as_bytes() }, &LoadOptions::default()) {
            prop_assert_eq!(c.rows_seen as usize, c.len() + c.skipped.len());
            let total: usize = c.histogram().iter().enumerate().map(|(k, n)| k * n).sum();
            prop_assert_eq!(total, c.len());
            for i in 0..c.len() as u32 {
                let s = c.star_of(i);
                prop_assert!(c.members(s).contains(&i));
                prop_assert_eq!(c.find_candidate(c.candidate_id(i)), Some(i));
            }
        }
    }
}
