//! Work split over the machine's cores, results in order.

/// How many threads share a long piece of work: the machine's cores, at
/// most 8.
pub fn workers() -> usize {
    std::thread::available_parallelism()
        .map_or(1, |n| n.get())
        .clamp(1, 8)
}

/// `f` of `0..len` cut into one contiguous range per core, each on a
/// thread of its own (the first on this one); the results in the order of
/// the ranges. An empty `len` is one empty range.
pub fn in_parts<R: Send>(len: usize, f: impl Fn(std::ops::Range<usize>) -> R + Sync) -> Vec<R> {
    let size = len.div_ceil(workers()).max(1);
    let f = &f;
    std::thread::scope(|scope| {
        let handles: Vec<_> = (size..len)
            .step_by(size)
            .map(|from| scope.spawn(move || f(from..(from + size).min(len))))
            .collect();
        let mut out = vec![f(0..size.min(len))];
        for h in handles {
            out.push(h.join().unwrap_or_else(|e| std::panic::resume_unwind(e)));
        }
        out
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parts_cover_the_range_once_in_order() {
        for len in [0, 1, 7, 1000] {
            let parts = in_parts(len, |r| r);
            let flat: Vec<usize> = parts.into_iter().flatten().collect();
            assert_eq!(flat, (0..len).collect::<Vec<_>>());
        }
    }
}
