//! Deterministic numbers for the invented demo data, tests and benchmarks: the same
//! sequence on every run and machine, with no dependency.

/// A linear congruential generator (Knuth's MMIX constants), giving numbers in [0, 1).
/// Consecutive draws are not independent enough for statistics: give each kind of
/// value (days, places, catches) a generator of its own.
#[derive(Debug, Clone)]
pub struct Lcg(pub u64);

impl Lcg {
    /// The next number, in [0, 1).
    pub fn next_unit(&mut self) -> f64 {
        self.0 = self
            .0
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }

    /// A standard normal number (Box & Muller 1958).
    pub fn normal(&mut self) -> f64 {
        let u = 1.0 - self.next_unit();
        (-2.0 * u.ln()).sqrt() * (std::f64::consts::TAU * self.next_unit()).cos()
    }
}
