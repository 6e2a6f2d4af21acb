//! Containing a failure to the one input that caused it: a panic while one
//! star's light curve is read or diagnosed becomes that star's error message,
//! never the process's (and, in the browser, never a half-restored terminal).

use std::cell::Cell;
use std::panic::{AssertUnwindSafe, catch_unwind};
use std::sync::Once;

thread_local! {
    static INSIDE: Cell<u32> = const { Cell::new(0) };
}

/// True while this thread runs inside [`contained`]: a panic here is caught
/// and reported by the caller, so panic hooks should stay quiet.
pub fn inside() -> bool {
    INSIDE.with(|c| c.get() > 0)
}

/// Installs (once) a panic hook that stays silent for panics [`contained`]
/// will catch and reports every other panic as before.
pub fn install_hook() {
    static ONCE: Once = Once::new();
    ONCE.call_once(|| {
        let previous = std::panic::take_hook();
        std::panic::set_hook(Box::new(move |info| {
            if !inside() {
                previous(info);
            }
        }));
    });
}

/// Runs `f`; a panic inside becomes `Err("internal error while {what}: …")`.
pub fn contained<T>(what: &str, f: impl FnOnce() -> T) -> Result<T, String> {
    install_hook();
    INSIDE.with(|c| c.set(c.get() + 1));
    let out = catch_unwind(AssertUnwindSafe(f));
    INSIDE.with(|c| c.set(c.get() - 1));
    out.map_err(|payload| {
        let why = payload
            .downcast_ref::<&str>()
            .map(|s| s.to_string())
            .or_else(|| payload.downcast_ref::<String>().cloned())
            .unwrap_or_else(|| "unknown cause".into());
        format!("internal error while {what}: {why} (please report it with the file)")
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_panic_becomes_an_error_and_the_thread_goes_on() {
        let r: Result<(), String> = contained("reading x.csv", || panic!("boom"));
        let e = r.unwrap_err();
        assert!(e.contains("reading x.csv") && e.contains("boom"), "{e}");
        assert!(!inside());
        assert_eq!(contained("adding", || 2 + 2), Ok(4));
    }
}
