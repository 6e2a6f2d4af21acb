//! The column's forms against the values they hold.

use super::*;

fn same(values: &[f64]) {
    let c = Column::from_values(values);
    for (i, v) in values.iter().enumerate() {
        assert_eq!(c.get(i).to_bits(), v.to_bits(), "value {i}: {v}");
    }
}

#[test]
fn catalogue_values_fit_in_four_bytes() {
    // As catalogues write them (the demo's generator's forms).
    let text = [
        "9.375664",
        "9.38e-5",
        "106.74707",
        "298.1",
        "-48.82098",
        "271.94057",
        "0",
        "5462",
        "0.01646",
        "-0.0",
    ];
    let values: Vec<f64> = text.iter().map(|t| t.parse().unwrap()).collect();
    let c = Column::from_values(&values);
    assert!(c.wide.is_empty() && !c.plain);
    same(&values);
}

#[test]
fn every_other_value_is_kept_whole_and_exact() {
    let values = [
        2459000.123456,
        f64::NAN,
        -f64::NAN,
        f64::from_bits(f64::NAN.to_bits() | 1),
        f64::INFINITY,
        f64::NEG_INFINITY,
        0.1 + 0.2,
        3.6 * 24.0,
        1e300,
        5e-324,
        -1.5e-9,
        67_108_864.0,
        f64::MAX,
    ];
    same(&values);
    // A NaN's sign is kept (it orders by `total_cmp`).
    let c = Column::from_values(&values);
    assert!(c.get(2).is_sign_negative() && !c.get(1).is_sign_negative());
}

#[test]
fn random_bits_and_random_decimals_come_back_bit_for_bit() {
    // The values only need to be many and varied.
    let mut rng = crate::demo::Rng::new(7);
    let mut next = || rng.next_u64();
    let mut values = Vec::new();
    for _ in 0..20_000 {
        values.push(f64::from_bits(next()));
        let digits = next() % 100_000_000;
        let e = (next() % 12) as i32;
        values.push(format!("{digits}e-{e}").parse().unwrap());
    }
    same(&values);
}

/// Column of `text` parsed as the reader parses it, narrowed.
fn narrowed(text: &[&str]) -> (Vec<f64>, Column) {
    let values: Vec<f64> = text.iter().map(|t| t.parse().unwrap()).collect();
    let mut c = Column::from_values(&values);
    c.narrow();
    (values, c)
}

/// The text of each value as the output writes it: a coded one from
/// its decimal (`push_decimal`), another by its shortest round trip
/// (`output::exact`, Ryu's digits: Adams 2018).
fn texts(c: &Column) -> Vec<String> {
    (0..c.len())
        .map(|i| match c.decimal(i) {
            Some(d) => {
                let mut b = Vec::new();
                crate::output::push_decimal(&mut b, d, false);
                String::from_utf8(b).unwrap()
            }
            None => crate::output::exact(Some(c.get(i))),
        })
        .collect()
}

#[test]
fn narrow_columns_give_back_every_value_and_its_digits() {
    // One exponent for all (`59.7` as 597 tenths, `5038` as 50380).
    let text = ["59.7", "5038", "0.9", "0", "12.5", "NaN"];
    let (values, c) = narrowed(&text);
    assert!(c.narrowed && c.scale == 1 && c.rare.is_empty(), "{c:?}");
    let before = texts(&Column::from_values(&values));
    assert_eq!(texts(&c), before);
    assert_eq!(&before[..3], ["59.7", "5038", "0.9"]);
    // Errors over decades: each value its own exponent.
    let (values, c) = narrowed(&["1.40e-4", "3.06e-3", "2.5e-1", "9e-7", "0.0"]);
    assert!(c.narrowed && c.scale == FLOATING, "{c:?}");
    for (i, v) in values.iter().enumerate() {
        assert_eq!(c.get(i).to_bits(), v.to_bits(), "{v}");
    }
    assert_eq!(texts(&c), texts(&Column::from_values(&values)));
    // A few values that no two bytes hold (negative, deep, not a
    // short decimal) are kept whole; too many, and nothing changes.
    let mut text: Vec<String> = (0..64).map(|i| format!("{}.{}", 500 + i, i % 10)).collect();
    text.extend(["-3.5", "150000.5", "2459000.123456", "-0.0"].map(String::from));
    let refs: Vec<&str> = text.iter().map(String::as_str).collect();
    let (values, c) = narrowed(&refs);
    assert!(c.narrowed && c.rare.len() == 4, "{:?}", c.rare);
    for (i, v) in values.iter().enumerate() {
        assert_eq!(c.get(i).to_bits(), v.to_bits(), "{v}");
    }
    assert_eq!(texts(&c), texts(&Column::from_values(&values)));
    let (_, c) = narrowed(&refs[60..]);
    assert!(!c.narrowed);
}

#[test]
fn narrow_columns_change_as_the_others_do() {
    let mut text: Vec<String> = (0..40).map(|i| format!("{}.5", i % 7)).collect();
    text.extend(["-2.5", "-0.0", "NaN"].map(String::from));
    let refs: Vec<&str> = text.iter().map(String::as_str).collect();
    let (values, mut c) = narrowed(&refs);
    assert!(c.narrowed);
    let mut by_update = Column::from_values(&values);
    let want = by_update.update(|v| if v <= 0.0 { f64::NAN } else { v });
    let mut missing = c.clone();
    assert_eq!(missing.not_positive_to_missing(), want);
    for (a, b) in missing.iter().zip(by_update.iter()) {
        assert_eq!(a.to_bits(), b.to_bits());
    }
    // A push, an update or an append widens it, values kept.
    c.push(0.1 + 0.2);
    c.append(&narrowed(&["7.5", "8.5"]).1);
    assert!(!c.narrowed);
    let want: Vec<f64> = values
        .iter()
        .copied()
        .chain([0.1 + 0.2, 7.5, 8.5])
        .collect();
    for (a, b) in c.iter().zip(&want) {
        assert_eq!(a.to_bits(), b.to_bits());
    }
    let (_, mut u) = narrowed(&refs);
    assert_eq!(u.update(|v| v * 2.0), 41);
    assert_eq!(u.get(1), 3.0);
}

#[test]
fn random_short_decimals_narrow_bit_for_bit() {
    let mut rng = crate::demo::Rng::new(11);
    for round in 0..200 {
        let digits = 1 + (rng.next_u64() % 5) as u32;
        let spread = rng.next_u64() % 4;
        let values: Vec<f64> = (0..200)
            .map(|_| {
                let m = rng.next_u64() % 10u64.pow(digits);
                let e = (rng.next_u64() % (spread + 1)) as i32 + (round % 6);
                format!("{m}e-{e}").parse().unwrap()
            })
            .collect();
        let mut c = Column::from_values(&values);
        let before = texts(&c);
        c.narrow();
        for (i, v) in values.iter().enumerate() {
            assert_eq!(c.get(i).to_bits(), v.to_bits(), "round {round}: {v}");
        }
        assert_eq!(texts(&c), before, "round {round}");
    }
}

#[test]
fn append_update_filter_and_settle_keep_the_values() {
    let a = [1.5, 2459000.123456, f64::NAN, 7.25];
    let b = [0.1 + 0.2, 3.0, 2459001.5];
    let mut c = Column::from_values(&a);
    c.append(&Column::from_values(&b));
    let all: Vec<f64> = a.iter().chain(&b).copied().collect();
    assert_eq!(c.to_vec().len(), all.len());
    for (x, y) in c.iter().zip(&all) {
        assert_eq!(x.to_bits(), y.to_bits());
    }
    let changed = c.update(|v| if v > 2e6 { v * 24.0 } else { v });
    assert_eq!(changed, 2);
    assert_eq!(c.get(1), 2459000.123456 * 24.0);
    assert_eq!(c.get(6), 2459001.5 * 24.0);
    let mut signs = Column::from_values(&[
        -0.0,
        0.0,
        -2.5,
        3.25,
        f64::NAN,
        -2459000.123456,
        2459000.123456,
        -1e-300,
    ]);
    let mut by_update = signs.clone();
    let want = by_update.update(|v| if v <= 0.0 { f64::NAN } else { v });
    assert_eq!(signs.not_positive_to_missing(), want);
    assert_eq!(want, 5);
    for (a, b) in signs.iter().zip(by_update.iter()) {
        assert_eq!(a.to_bits(), b.to_bits());
    }
    let f = c.filter(&[true, false, true, true, false, true, false]);
    let kept: Vec<f64> = f.iter().collect();
    assert_eq!(kept[0], 1.5);
    assert!(kept[1].is_nan());
    assert_eq!(&kept[2..], &[7.25, 3.0]);
    // Mostly wide: plain.
    let mut w = Column::from_values(&[0.1 + 0.2, 0.7 + 0.1, 1.0]);
    w.settle();
    assert!(w.plain);
    assert_eq!(w.get(0), 0.1 + 0.2);
    assert_eq!(w.get(2), 1.0);
}
