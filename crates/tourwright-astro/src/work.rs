//! A per-thread tally of solver work: every iterative solver charges its iteration cap when it
//! is called (so the tally bounds the iterations done from above). Tests use it to show that a
//! hostile input's evaluation stays bounded without timing anything.

use std::cell::Cell;

thread_local! {
    static TALLY: Cell<u64> = const { Cell::new(0) };
}

/// Charge `n` iterations to this thread's tally.
#[inline]
pub fn charge(n: u64) {
    TALLY.with(|t| t.set(t.get().saturating_add(n)));
}

/// This thread's tally so far.
pub fn tally() -> u64 {
    TALLY.with(Cell::get)
}

/// Reset this thread's tally to zero and return what it was.
pub fn reset() -> u64 {
    TALLY.with(|t| t.replace(0))
}
