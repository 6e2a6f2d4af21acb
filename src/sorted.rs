//! Searches in sorted lists that start from where the answer is likely to
//! be: a cursor that moves on (the echo sweep), or a guess from the value
//! (ids by hash).

/// The first place at or after `from` in `list` where `before` is false
/// (`before` true up to some place and false after it): by galloping, so
/// a cursor that moves far (a cell's signals span every period) costs the
/// logarithm of the distance, not the distance.
pub fn advance<T>(list: &[T], from: usize, before: impl Fn(&T) -> bool) -> usize {
    let mut step = 1;
    let mut lo = from;
    while lo < list.len() && before(&list[lo]) {
        let next = (lo + step).min(list.len());
        if next < list.len() && before(&list[next]) {
            lo = next + 1;
            step *= 2;
        } else {
            return lo + 1 + list[lo + 1..next].partition_point(&before);
        }
    }
    lo
}

/// The first place in `list` where `before` is false (as
/// `slice::partition_point`), searched from `guess` outwards by galloping:
/// a guess near the answer (an evenly spread key's share of the list)
/// reads a few neighbouring places, not the twenty far-apart ones of a
/// binary search of a million. Any guess gives the right place.
pub fn partition_point_near<T>(list: &[T], guess: usize, before: impl Fn(&T) -> bool) -> usize {
    let mut from = guess.min(list.len());
    let mut step = 1;
    // Back until a place before the answer (or the start).
    while from > 0 && (from == list.len() || !before(&list[from])) {
        from = from.saturating_sub(step);
        step *= 2;
    }
    advance(list, from, before)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn advance_finds_what_a_step_by_step_walk_finds() {
        let list: Vec<u32> = (0..300).map(|x| x / 3).collect();
        for from in 0..=list.len() {
            for bound in 0..=101 {
                let mut walk = from;
                while walk < list.len() && list[walk] < bound {
                    walk += 1;
                }
                assert_eq!(advance(&list, from, |&x| x < bound), walk, "{from} {bound}");
            }
        }
    }

    #[test]
    fn a_search_from_any_guess_finds_the_partition_point() {
        // `slice::partition_point` (the standard library's binary search)
        // is the reference.
        for len in [0usize, 1, 2, 5, 300] {
            let list: Vec<u32> = (0..len as u32).map(|x| x / 3).collect();
            for bound in 0..=101 {
                let want = list.partition_point(|&x| x < bound);
                for guess in 0..=len + 2 {
                    let got = partition_point_near(&list, guess, |&x| x < bound);
                    assert_eq!(got, want, "len {len} bound {bound} guess {guess}");
                }
            }
        }
    }
}
