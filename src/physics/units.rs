//! Units and the direction conventions of wind.
//!
//! Meteorological convention (WMO): a wind direction says where the wind blows FROM,
//! in degrees clockwise from true north. Components are the other way round: `u` is
//! the speed toward the east and `v` toward the north, in m/s.

/// One knot in m/s: 1852 m per 3600 s (exact, by definition of the nautical mile).
pub const KNOT_IN_M_S: f64 = 1852.0 / 3600.0;
/// One km/h in m/s (exact).
pub const KMH_IN_M_S: f64 = 1000.0 / 3600.0;
/// One international nautical mile in metres (exact).
pub const NAUTICAL_MILE_M: f64 = 1852.0;

/// Knots to m/s.
#[must_use]
pub fn knots_to_m_s(knots: f64) -> f64 {
    knots * KNOT_IN_M_S
}

/// m/s to knots.
#[must_use]
pub fn m_s_to_knots(m_s: f64) -> f64 {
    m_s / KNOT_IN_M_S
}

/// km/h to m/s.
#[must_use]
pub fn km_h_to_m_s(km_h: f64) -> f64 {
    km_h * KMH_IN_M_S
}

/// Normalises an angle in degrees to `[0, 360)`.
#[must_use]
pub fn bearing_deg(angle_deg: f64) -> f64 {
    let a = angle_deg.rem_euclid(360.0);
    // rem_euclid can return 360.0 for tiny negative inputs through rounding.
    if a >= 360.0 { 0.0 } else { a }
}

/// `sqrt(x² + y²)` with the C library's correction step (Borges 2019, "An Improved
/// Algorithm for hypot(a,b)", arXiv:1904.09481, the variant without fused multiply-add,
/// which glibc's `hypot` uses on x86-64), worked out inline where neither magnitude
/// needs scaling (the larger at most 2^511, the smaller at least 2^-459); elsewhere,
/// and for zero, infinity or NaN, the library's own `hypot`. The same bits as glibc's
/// (see the test), at a fraction of the cost of the call: it is taken for every wind
/// and stress on a long coast.
#[must_use]
#[inline]
pub fn hypot(x: f64, y: f64) -> f64 {
    let (x, y) = (x.abs(), y.abs());
    let (ax, ay) = if x < y { (y, x) } else { (x, y) };
    let large = f64::from_bits(0x5FE0_0000_0000_0000); // 2^511
    let tiny = f64::from_bits(0x2340_0000_0000_0000); // 2^-459
    if !(ax <= large && ay >= tiny) {
        return x.hypot(y);
    }
    let h = (ax * ax + ay * ay).sqrt();
    let (t1, t2) = if h <= 2.0 * ay {
        let delta = h - ay;
        (ax * (2.0 * delta - ax), (delta - 2.0 * (ax - ay)) * delta)
    } else {
        let delta = h - ax;
        (
            2.0 * delta * (ax - 2.0 * ay),
            (4.0 * delta - ay) * ay + delta * delta,
        )
    };
    h - (t1 + t2) / (2.0 * h)
}

/// A wind vector at 10 m, as components.
///
/// # Units
/// `u_m_s` toward the east, `v_m_s` toward the north, both m/s.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Wind {
    /// Eastward component, m/s.
    pub u_m_s: f64,
    /// Northward component, m/s.
    pub v_m_s: f64,
}

impl Wind {
    /// A wind from its components in m/s.
    #[must_use]
    pub fn new(u_m_s: f64, v_m_s: f64) -> Self {
        Self { u_m_s, v_m_s }
    }

    /// A wind from a speed and the direction it blows FROM.
    ///
    /// `u = -S sin(theta)`, `v = -S cos(theta)` (WMO meteorological convention).
    ///
    /// # Units
    /// `speed_m_s` in m/s, `from_deg` in degrees clockwise from true north.
    ///
    /// ```
    /// # use shelfwind::physics::Wind;
    /// // A north wind blows toward the south.
    /// let w = Wind::from_speed_direction(10.0, 0.0);
    /// assert!((w.v_m_s + 10.0).abs() < 1e-12 && w.u_m_s.abs() < 1e-12);
    /// ```
    #[must_use]
    pub fn from_speed_direction(speed_m_s: f64, from_deg: f64) -> Self {
        let theta = from_deg.to_radians();
        Self {
            u_m_s: -speed_m_s * theta.sin(),
            v_m_s: -speed_m_s * theta.cos(),
        }
    }

    /// Wind speed, m/s.
    #[must_use]
    pub fn speed_m_s(self) -> f64 {
        hypot(self.u_m_s, self.v_m_s)
    }

    /// The direction the wind blows FROM, degrees clockwise from true north, in
    /// `[0, 360)`: `theta = atan2(-u, -v) mod 360`. A calm (speed below 1e-9 m/s) has no
    /// direction and gives `None`, never NaN.
    #[must_use]
    pub fn direction_from_deg(self) -> Option<f64> {
        if self.speed_m_s() < 1e-9 {
            None
        } else {
            Some(bearing_deg((-self.u_m_s).atan2(-self.v_m_s).to_degrees()))
        }
    }

    /// Linear mix `self * (1 - t) + other * t` of the components.
    #[must_use]
    pub fn lerp(self, other: Wind, t: f64) -> Wind {
        Wind {
            u_m_s: self.u_m_s + (other.u_m_s - self.u_m_s) * t,
            v_m_s: self.v_m_s + (other.v_m_s - self.v_m_s) * t,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    /// Pythagorean triples come out exact.
    #[test]
    fn hypot_of_triples_is_exact() {
        for (a, b, c) in [
            (3.0, 4.0, 5.0),
            (-5.0, 12.0, 13.0),
            (8.0, -15.0, 17.0),
            (0.0, -2.5, 2.5),
        ] {
            assert_eq!(hypot(a, b).to_bits(), f64::to_bits(c));
            assert_eq!(hypot(b, a).to_bits(), f64::to_bits(c));
        }
        assert!(hypot(f64::NAN, 1.0).is_nan());
        assert_eq!(
            hypot(f64::NEG_INFINITY, f64::NAN).to_bits(),
            f64::INFINITY.to_bits()
        );
        assert!((hypot(1e300, 1e300) / (1e300 * std::f64::consts::SQRT_2) - 1.0).abs() < 1e-15);
    }

    /// The inline `hypot` gives the very bits of the C library's (checked against glibc,
    /// so only where the library is glibc on x86-64): 600,000 pairs of single-precision
    /// wind components (as grids give them), of double-precision components and of
    /// arbitrary bit patterns (huge, tiny, subnormal, infinite, NaN), from a fixed
    /// xorshift sequence.
    #[cfg(all(target_os = "linux", target_env = "gnu", target_arch = "x86_64"))]
    #[test]
    fn hypot_gives_the_c_library_bits() {
        let mut state: u64 = 0x9E37_79B9_7F4A_7C15;
        let mut next = || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            state
        };
        let unit = |r: u64| (r >> 11) as f64 / (1_u64 << 53) as f64;
        for k in 0..600_000 {
            let (x, y) = match k % 3 {
                0 => (
                    f64::from((unit(next()) * 80.0 - 40.0) as f32),
                    f64::from((unit(next()) * 80.0 - 40.0) as f32),
                ),
                1 => (unit(next()) * 50.0 - 25.0, unit(next()) * 3.0 - 1.5),
                _ => (f64::from_bits(next()), f64::from_bits(next())),
            };
            let (ours, library) = (hypot(x, y), x.hypot(y));
            assert!(
                ours.to_bits() == library.to_bits() || (ours.is_nan() && library.is_nan()),
                "hypot({x:e}, {y:e}): {ours:e}, the library {library:e}"
            );
        }
    }

    /// Checks from REFERENCES.md, "Wind direction (meteorological convention)" (WMO).
    #[test]
    fn from_direction_components_match_wmo_convention() {
        let cases = [
            (0.0, 0.0, -10.0),
            (90.0, -10.0, 0.0),
            (225.0, 7.071, 7.071),
            (270.0, 10.0, 0.0),
        ];
        for (from, u, v) in cases {
            let w = Wind::from_speed_direction(10.0, from);
            assert_abs_diff_eq!(w.u_m_s, u, epsilon = 1e-3);
            assert_abs_diff_eq!(w.v_m_s, v, epsilon = 1e-3);
            let back = w.direction_from_deg().expect("not calm");
            assert_abs_diff_eq!(back, from, epsilon = 1e-9);
        }
    }

    #[test]
    fn calm_has_no_direction() {
        assert_eq!(Wind::new(0.0, 0.0).direction_from_deg(), None);
    }

    /// 1 kt = 1852/3600 m/s exactly (definition of the international nautical mile).
    #[test]
    fn knots_and_km_h() {
        assert_abs_diff_eq!(knots_to_m_s(1.0), 0.514_444, epsilon = 1e-6);
        assert_abs_diff_eq!(m_s_to_knots(10.0), 19.438_445, epsilon = 1e-6);
        assert_abs_diff_eq!(km_h_to_m_s(36.0), 10.0, epsilon = 1e-12);
    }
}
