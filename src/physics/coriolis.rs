//! The Coriolis parameter and the equatorial band where Ekman theory fails.

/// Earth's rotation rate, rad/s (IERS value, common practice).
pub const EARTH_ROTATION_RAD_S: f64 = 7.292_115e-5;
/// Below this |latitude| (degrees) the index is refused: f → 0 and the Ekman transport
/// grows without bound. A design choice of this tool, not a published threshold.
pub const REFUSE_BELOW_LAT_DEG: f64 = 5.0;
/// Below this |latitude| (degrees) the index is computed but flagged as unreliable.
/// A design choice of this tool, not a published threshold.
pub const WARN_BELOW_LAT_DEG: f64 = 10.0;

/// Coriolis parameter `f = 2 Omega sin(lat)`, signed (negative in the south).
///
/// # Units
/// `lat_deg` in degrees north; result in 1/s.
///
/// ```
/// # use shelfwind::physics::coriolis_parameter;
/// // REFERENCES.md: f(45°) = 1.03126e-4 1/s (gsw.f gives 1.0312607931e-4).
/// assert!((coriolis_parameter(45.0) - 1.031_26e-4).abs() < 1e-9);
/// ```
#[must_use]
pub fn coriolis_parameter(lat_deg: f64) -> f64 {
    2.0 * EARTH_ROTATION_RAD_S * lat_deg.to_radians().sin()
}

/// Latitude too close to the equator for Ekman theory.
#[derive(Debug, Clone, Copy, PartialEq, thiserror::Error)]
#[error(
    "latitude {lat_deg:.2}° is within {REFUSE_BELOW_LAT_DEG}° of the equator, where Ekman theory breaks down (f → 0): no upwelling index is computed there"
)]
pub struct EquatorError {
    /// The latitude that was refused, degrees north.
    pub lat_deg: f64,
}

/// What [`check_latitude`] found.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LatitudeCheck {
    /// Far enough from the equator.
    Ok,
    /// Between 5° and 10° from the equator: computed, but large and unreliable.
    NearEquator,
}

/// Refuses |lat| < 5° and flags |lat| < 10° (REFERENCES.md: near the equator the index
/// grows like 1/f; the thresholds are this tool's design choice).
pub fn check_latitude(lat_deg: f64) -> Result<LatitudeCheck, EquatorError> {
    let a = lat_deg.abs();
    if a < REFUSE_BELOW_LAT_DEG || lat_deg.is_nan() {
        Err(EquatorError { lat_deg })
    } else if a < WARN_BELOW_LAT_DEG {
        Ok(LatitudeCheck::NearEquator)
    } else {
        Ok(LatitudeCheck::Ok)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    /// REFERENCES.md "Coriolis parameter": f(30°), f(36°), f(45°), f(60°).
    #[test]
    fn coriolis_check_values() {
        assert_relative_eq!(coriolis_parameter(30.0), 7.2921e-5, max_relative = 1e-4);
        assert_relative_eq!(coriolis_parameter(36.0), 8.5724e-5, max_relative = 1e-4);
        assert_relative_eq!(coriolis_parameter(45.0), 1.031_26e-4, max_relative = 1e-5);
        assert_relative_eq!(coriolis_parameter(60.0), 1.263_03e-4, max_relative = 1e-5);
        // gsw.f(45) = 1.0312607931e-4 (PyPI gsw, REFERENCES.md).
        assert_relative_eq!(
            coriolis_parameter(45.0),
            1.031_260_793_1e-4,
            max_relative = 1e-8
        );
        assert_relative_eq!(coriolis_parameter(-45.0), -1.031_26e-4, max_relative = 1e-5);
    }

    #[test]
    fn equatorial_band() {
        assert_eq!(check_latitude(36.0), Ok(LatitudeCheck::Ok));
        assert_eq!(check_latitude(-7.0), Ok(LatitudeCheck::NearEquator));
        assert_eq!(check_latitude(10.0), Ok(LatitudeCheck::Ok));
        let e = check_latitude(4.99).unwrap_err();
        assert_eq!(
            e.to_string(),
            "latitude 4.99° is within 5° of the equator, where Ekman theory breaks down (f → 0): no upwelling index is computed there"
        );
        assert!(check_latitude(f64::NAN).is_err());
    }
}
