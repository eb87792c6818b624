//! Waves raised by the local wind where no wave forecast is given: the fetch- and
//! duration-limited deep-water formulas of the Shore Protection Manual (CERC 1984).
//! An estimate of the local wind sea only: it knows nothing of swell from afar, and it
//! is never presented as a forecast.

/// Gravity, m/s^2.
const G_M_S2: f64 = 9.81;

/// What limits the waves of a wind sea.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SeaLimit {
    /// The distance over water upwind.
    Fetch,
    /// How long the wind has blown.
    Duration,
    /// Neither: the sea is fully developed.
    FullyDeveloped,
}

/// An estimated wind sea.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct WindSea {
    /// Significant wave height, m.
    pub height_m: f64,
    /// Peak period, s.
    pub period_s: f64,
    /// What limits it.
    pub limit: SeaLimit,
}

/// The wind-stress factor `U_A = 0.71 U10^1.23` (SPM 1984, eq. 3-28a), m/s.
#[must_use]
pub fn wind_stress_factor_m_s(u10_m_s: f64) -> f64 {
    0.71 * u10_m_s.max(0.0).powf(1.23)
}

/// The wind sea of a wind of `u10_m_s` blowing over `fetch_m` of water for
/// `duration_s` (deep water; SPM 1984, eqs. 3-33 to 3-36):
/// - fetch-limited: `g H / U_A^2 = 1.6e-3 (g F / U_A^2)^(1/2)`,
///   `g T / U_A = 0.2857 (g F / U_A^2)^(1/3)`;
/// - duration-limited: the fetch that the wind crosses in that time,
///   `g t / U_A = 68.8 (g F / U_A^2)^(2/3)`, then as fetch-limited;
/// - fully developed: `g H / U_A^2 = 0.2433`, `g T / U_A = 8.134`.
///
/// The smallest of the three holds. Calm or no fetch gives no waves.
///
/// # Units
/// m/s, m and s in; m and s out.
///
/// ```
/// # use shelfwind::physics::wind_sea;
/// // REFERENCES.md (SPM 1984): 10 m/s over 10 km → 0.62 m; over 50 km → 1.38 m.
/// assert!((wind_sea(10.0, 10_000.0, 1e9).height_m - 0.62).abs() < 0.005);
/// assert!((wind_sea(10.0, 50_000.0, 1e9).height_m - 1.38).abs() < 0.005);
/// ```
#[must_use]
pub fn wind_sea(u10_m_s: f64, fetch_m: f64, duration_s: f64) -> WindSea {
    let ua = wind_stress_factor_m_s(u10_m_s);
    let calm = WindSea {
        height_m: 0.0,
        period_s: 0.0,
        limit: SeaLimit::Fetch,
    };
    if !(ua > 0.0 && fetch_m > 0.0 && duration_s > 0.0) {
        return calm;
    }
    // The fetch a sea growing for `duration_s` behaves as (SPM eq. 3-35 inverted).
    let duration_fetch_m = ua * ua / G_M_S2 * (G_M_S2 * duration_s / (68.8 * ua)).powf(1.5);
    let (f, limit) = if duration_fetch_m < fetch_m {
        (duration_fetch_m, SeaLimit::Duration)
    } else {
        (fetch_m, SeaLimit::Fetch)
    };
    let x = G_M_S2 * f / (ua * ua);
    let height_m = 1.6e-3 * x.sqrt() * ua * ua / G_M_S2;
    let period_s = 0.2857 * x.cbrt() * ua / G_M_S2;
    let full_h = 0.2433 * ua * ua / G_M_S2;
    if height_m >= full_h {
        return WindSea {
            height_m: full_h,
            period_s: 8.134 * ua / G_M_S2,
            limit: SeaLimit::FullyDeveloped,
        };
    }
    WindSea {
        height_m,
        period_s,
        limit,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;
    use proptest::prelude::*;

    /// REFERENCES.md "Sea state" (Shore Protection Manual, CERC 1984): 10 m/s over
    /// 10 km → 0.62 m, over 50 km → 1.38 m, fully developed 3.61 m.
    #[test]
    fn spm_worked_numbers() {
        assert_abs_diff_eq!(
            wind_sea(10.0, 10_000.0, 1e9).height_m,
            0.62,
            epsilon = 0.005
        );
        assert_abs_diff_eq!(
            wind_sea(10.0, 50_000.0, 1e9).height_m,
            1.38,
            epsilon = 0.005
        );
        let full = wind_sea(10.0, 1e9, 1e9);
        assert_abs_diff_eq!(full.height_m, 3.61, epsilon = 0.005);
        assert_eq!(full.limit, SeaLimit::FullyDeveloped);
        assert_eq!(wind_sea(10.0, 10_000.0, 1e9).limit, SeaLimit::Fetch);
        assert_eq!(wind_sea(10.0, 1e9, 3600.0).limit, SeaLimit::Duration);
        assert_abs_diff_eq!(wind_sea(0.0, 10_000.0, 1e9).height_m, 0.0);
    }

    proptest! {
        /// Waves grow with fetch, duration and wind speed, and never pass the fully
        /// developed height.
        #[test]
        fn grows_but_never_past_fully_developed(
            u in 1.0f64..40.0, f in 100.0f64..500_000.0, t in 600.0f64..200_000.0,
            more in 1.0f64..3.0,
        ) {
            let h = wind_sea(u, f, t).height_m;
            prop_assert!(wind_sea(u, f * more, t).height_m >= h - 1e-12);
            prop_assert!(wind_sea(u, f, t * more).height_m >= h - 1e-12);
            prop_assert!(wind_sea(u * more, f, t).height_m >= h - 1e-12);
            let ua = wind_stress_factor_m_s(u);
            prop_assert!(h <= 0.2433 * ua * ua / G_M_S2 + 1e-12);
        }
    }
}
