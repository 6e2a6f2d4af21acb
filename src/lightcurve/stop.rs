//! Stopping a long light-curve read that nobody waits for any more: the
//! browser's reader names, for the read it starts on its thread, the
//! question "has the vetter moved on?", which the text reader asks every
//! [`ASK_EVERY`] rows; a read it stops ends with [`LcError::Stopped`],
//! which no cache keeps.

use std::cell::RefCell;

use super::LcError;

/// Rows read between two questions (a 1.5M-row light curve asks 23 times).
pub const ASK_EVERY: usize = 1 << 16;

type Question = Box<dyn Fn() -> bool>;

thread_local! {
    static STOP: RefCell<Option<Question>> = const { RefCell::new(None) };
}

/// Clears the question when the read ends, even by a panic.
struct Asked;

impl Drop for Asked {
    fn drop(&mut self) {
        STOP.with(|s| *s.borrow_mut() = None);
    }
}

/// Runs `f` on this thread with `stop` asked during its reads.
pub fn stoppable<R>(stop: impl Fn() -> bool + 'static, f: impl FnOnce() -> R) -> R {
    STOP.with(|s| *s.borrow_mut() = Some(Box::new(stop)));
    let _asked = Asked;
    f()
}

/// `Err(Stopped)` when this thread's read is no longer wanted.
pub(super) fn check() -> Result<(), LcError> {
    if STOP.with(|s| s.borrow().as_ref().is_some_and(|stop| stop())) {
        Err(LcError::Stopped)
    } else {
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::super::{LcColumns, LightCurve};
    use super::*;

    fn text(rows: usize) -> Vec<u8> {
        let mut t = String::from("time,flux\n");
        for i in 0..rows {
            t.push_str(&format!(
                "{},{}\n",
                i as f64 * 0.001,
                1.0 + (i % 7) as f64 * 1e-4
            ));
        }
        t.into_bytes()
    }

    #[test]
    fn a_read_nobody_waits_for_stops_and_the_question_ends_with_it() {
        let cols = LcColumns::default();
        let long = text(3 * ASK_EVERY);
        let stopped = stoppable(
            || true,
            || LightCurve::from_text("t.csv", long.clone(), &cols),
        );
        assert!(matches!(stopped, Err(LcError::Stopped)), "{stopped:?}");
        // Wanted: read whole.
        let read = stoppable(
            || false,
            || LightCurve::from_text("t.csv", long.clone(), &cols),
        );
        assert_eq!(read.unwrap().time.len(), 3 * ASK_EVERY);
        // The question ended with its read: the next read on this thread
        // is not stopped.
        assert_eq!(
            LightCurve::from_text("t.csv", long, &cols)
                .unwrap()
                .time
                .len(),
            3 * ASK_EVERY
        );
        // A short read is never asked, so never stopped.
        let short = stoppable(
            || true,
            || LightCurve::from_text("t.csv", text(1000), &cols),
        );
        assert_eq!(short.unwrap().time.len(), 1000);
    }
}
