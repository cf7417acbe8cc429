//! The time budget as every phase sees it: a deadline consulted cheaply (the clock is
//! read once every few calls), remembering once it has passed.

use std::cell::Cell;
use std::time::Instant;

/// How many [`Clock::tick`] calls pass between two readings of the clock.
const EVERY: u32 = 32;

/// A deadline shared by the phases of one minimisation.
#[derive(Debug)]
pub(crate) struct Clock {
    deadline: Option<Instant>,
    ticks: Cell<u32>,
    expired: Cell<bool>,
}

impl Clock {
    /// A clock that runs out at `deadline`.
    pub(crate) fn until(deadline: Instant) -> Clock {
        Clock {
            deadline: Some(deadline),
            ticks: Cell::new(0),
            expired: Cell::new(false),
        }
    }

    /// A clock that never runs out (the public entry points without a budget).
    /// A clock of `deadline`, unbounded when there is none.
    pub(crate) fn until_opt(deadline: Option<Instant>) -> Clock {
        match deadline {
            Some(d) => Clock::until(d),
            None => Clock::unbounded(),
        }
    }

    pub(crate) fn unbounded() -> Clock {
        Clock {
            deadline: None,
            ticks: Cell::new(0),
            expired: Cell::new(false),
        }
    }

    /// The deadline, if any.
    pub(crate) fn deadline(&self) -> Option<Instant> {
        self.deadline
    }

    /// One unit of work done; `true` once the deadline has passed (the clock is read
    /// every [`EVERY`] ticks, so a unit of work should be small).
    #[inline]
    pub(crate) fn tick(&self) -> bool {
        if self.expired.get() {
            return true;
        }
        let t = self.ticks.get().wrapping_add(1);
        self.ticks.set(t);
        if t % EVERY == 0 {
            self.now()
        } else {
            false
        }
    }

    /// Reads the clock now; `true` once the deadline has passed.
    pub(crate) fn now(&self) -> bool {
        if self.expired.get() {
            return true;
        }
        if let Some(d) = self.deadline {
            if Instant::now() >= d {
                self.expired.set(true);
            }
        }
        self.expired.get()
    }

    /// Records that a clock of the same deadline (another task's) saw it pass.
    pub(crate) fn mark_expired(&self) {
        self.expired.set(true);
    }

    /// Whether the deadline was seen to pass (without reading the clock).
    pub(crate) fn expired(&self) -> bool {
        self.expired.get()
    }
}
