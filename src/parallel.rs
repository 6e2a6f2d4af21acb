//! Work split over the machine's cores, results in order.

/// How many threads share a long piece of work: the machine's cores, at
/// most 8.
pub fn workers() -> usize {
    std::thread::available_parallelism()
        .map_or(1, |n| n.get())
        .clamp(1, 8)
}

/// Lowers the calling thread to the lowest scheduling priority (nice 19;
/// on Linux a thread has its own): work that is worth having early but
/// must not slow the work the user waits for, such as the browser's
/// orders sorted ahead of their first use while the checks run. Does
/// nothing elsewhere, or when the system refuses.
pub fn run_when_idle() {
    #[cfg(target_os = "linux")]
    // SAFETY: gettid and setpriority read no memory of ours; a failure is
    // an error code, ignored (the thread keeps its priority).
    unsafe {
        let tid = libc::syscall(libc::SYS_gettid) as libc::id_t;
        libc::setpriority(libc::PRIO_PROCESS, tid, 19);
    }
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

/// `f` of every item, on one thread per core (this one among them), each
/// taking the next item not yet taken: for items of unequal work, such
/// as a catalogue's columns.
pub fn each_mut<T: Send>(items: &mut [T], f: impl Fn(&mut T) + Sync) {
    let next = std::sync::Mutex::new(items.iter_mut());
    let work = || {
        loop {
            let item = match next.lock() {
                Ok(mut it) => it.next(),
                Err(_) => None,
            };
            match item {
                Some(item) => f(item),
                None => return,
            }
        }
    };
    std::thread::scope(|scope| {
        for _ in 1..workers() {
            scope.spawn(work);
        }
        work();
    });
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

    #[test]
    fn each_item_is_worked_once() {
        let mut items: Vec<usize> = (0..100).collect();
        each_mut(&mut items, |x| *x *= 2);
        assert_eq!(items, (0..100).map(|x| 2 * x).collect::<Vec<_>>());
        each_mut(&mut Vec::<usize>::new(), |x| *x += 1);
    }
}
