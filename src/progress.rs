//! Progress and cancellation of long work, shared between a worker thread and whoever
//! watches it (the app's progress bar and Cancel button).

use std::sync::atomic::{AtomicBool, AtomicU32, Ordering};

/// Progress of one piece of work, from 0 to 1, and a request to stop.
#[derive(Debug, Default)]
pub struct Progress {
    fraction_bits: AtomicU32,
    cancelled: AtomicBool,
}

impl Progress {
    /// A fresh progress at 0.
    #[must_use]
    pub fn new() -> Self {
        Self::default()
    }

    /// Sets the fraction done (clamped to 0–1).
    pub fn set(&self, fraction: f32) {
        self.fraction_bits
            .store(fraction.clamp(0.0, 1.0).to_bits(), Ordering::Relaxed);
    }

    /// The fraction done, 0–1.
    #[must_use]
    pub fn fraction(&self) -> f32 {
        f32::from_bits(self.fraction_bits.load(Ordering::Relaxed))
    }

    /// Asks the work to stop as soon as it can.
    pub fn cancel(&self) {
        self.cancelled.store(true, Ordering::Relaxed);
    }

    /// Whether stopping was asked for.
    #[must_use]
    pub fn is_cancelled(&self) -> bool {
        self.cancelled.load(Ordering::Relaxed)
    }
}
