//! Asking the memory for values a loop will read a little later. A loop
//! that reads a catalogue's columns in an order other than the file's (a
//! star's rows, star by star) waits on memory at every row; told some rows
//! ahead, the memory serves many rows at once.

/// Asks for `values[at]`, if there is one: a hint that never changes what
/// the program computes.
#[inline]
pub fn value<T>(values: &[T], at: usize) {
    #[cfg(target_arch = "x86_64")]
    if let Some(x) = values.get(at) {
        // SAFETY: a prefetch never faults and changes no memory; the
        // address is that of a live value.
        unsafe {
            std::arch::x86_64::_mm_prefetch::<{ std::arch::x86_64::_MM_HINT_T0 }>(
                (x as *const T).cast(),
            )
        };
    }
    #[cfg(not(target_arch = "x86_64"))]
    let _ = (values, at);
}

/// Asks for row `at` of each column.
#[inline]
pub fn row(columns: &[&[f64]], at: usize) {
    for col in columns {
        value(col, at);
    }
}

/// How many items ahead [`each_ahead`] asks for what an item will read at
/// random (and half as many for what that leads to).
const AHEAD: usize = 16;

/// `each` of every item in order, having called `ahead(item, false)`
/// [`AHEAD`] items before an item and `ahead(item, true)` half as many
/// before: time for the memory to serve what `each` will read out of order
/// (e.g. where a string starts, then its bytes).
#[inline]
pub fn each_ahead<T>(items: &[T], ahead: &impl Fn(&T, bool), mut each: impl FnMut(&T)) {
    for (k, item) in items.iter().enumerate() {
        if let Some(far) = items.get(k + AHEAD) {
            ahead(far, false);
        }
        if let Some(near) = items.get(k + AHEAD / 2) {
            ahead(near, true);
        }
        each(item);
    }
}

/// An `ahead` for [`each_ahead`] that asks for nothing.
pub fn nothing<T>(_: &T, _: bool) {}
