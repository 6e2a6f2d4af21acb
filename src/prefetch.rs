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
