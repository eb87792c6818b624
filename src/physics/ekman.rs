//! Ekman transport, the coastal upwelling index, and Ekman layer depth.

use super::WindStress;

/// Ekman volume transport per unit width of coast.
///
/// # Units
/// m^2/s (m^3/s per metre), components toward east (`x_m2_s`) and north (`y_m2_s`).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EkmanTransport {
    /// Eastward transport, m^2/s.
    pub x_m2_s: f64,
    /// Northward transport, m^2/s.
    pub y_m2_s: f64,
}

/// Ekman transport `M = (tau_y, -tau_x) / (rho_w f)` (Ekman 1905).
///
/// With the signed Coriolis parameter `f` this points 90° to the right of the stress in
/// the northern hemisphere and 90° to the left in the southern. The caller must keep
/// `f` away from zero (see [`super::check_latitude`]).
///
/// # Units
/// stress N/m^2, `coriolis_per_s` 1/s, `rho_water_kg_m3` kg/m^3; result m^2/s.
#[must_use]
pub fn ekman_transport(
    stress: WindStress,
    coriolis_per_s: f64,
    rho_water_kg_m3: f64,
) -> EkmanTransport {
    let k = rho_water_kg_m3 * coriolis_per_s;
    EkmanTransport {
        x_m2_s: stress.y_pa / k,
        y_m2_s: -stress.x_pa / k,
    }
}

/// Coastal upwelling index (Bakun 1973): the offshore component of the Ekman
/// transport, per 100 m of coastline,
/// `UI = 100 (M_x sin(beta) + M_y cos(beta))`, where `beta` is the bearing of the
/// offshore normal (from land toward the sea, clockwise from true north).
///
/// Positive means offshore transport (upwelling), negative onshore (downwelling).
///
/// # Units
/// transport m^2/s, `offshore_bearing_deg` degrees true; result m^3/s per 100 m.
///
/// ```
/// # use shelfwind::physics::*;
/// // REFERENCES.md: 36°N, sea to the west (beta = 270°), 10 m/s from the north → +180.5.
/// let tau = wind_stress(Wind::from_speed_direction(10.0, 0.0), &ConstantDrag(1.3e-3), 1.22);
/// let m = ekman_transport(tau, coriolis_parameter(36.0), 1025.0);
/// assert!((upwelling_index_m3s_per_100m(m, 270.0) - 180.5).abs() < 0.1);
/// ```
#[must_use]
pub fn upwelling_index_m3s_per_100m(transport: EkmanTransport, offshore_bearing_deg: f64) -> f64 {
    OffshoreNormal::new(offshore_bearing_deg).upwelling_index_m3s_per_100m(transport)
}

/// A coast's offshore normal, its sine and cosine worked out once for a long series
/// (the same numbers as [`upwelling_index_m3s_per_100m`], bit for bit).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct OffshoreNormal {
    sin: f64,
    cos: f64,
}

impl OffshoreNormal {
    /// The normal of bearing `offshore_bearing_deg`, degrees true.
    #[must_use]
    pub fn new(offshore_bearing_deg: f64) -> Self {
        let beta = offshore_bearing_deg.to_radians();
        Self {
            sin: beta.sin(),
            cos: beta.cos(),
        }
    }

    /// The upwelling index of `transport` across this normal (Bakun 1973), m^3/s per
    /// 100 m.
    #[must_use]
    pub fn upwelling_index_m3s_per_100m(self, transport: EkmanTransport) -> f64 {
        100.0 * (transport.x_m2_s * self.sin + transport.y_m2_s * self.cos)
    }
}

/// Empirical Ekman layer depth `D_E = 7.6 U10 / sqrt(sin|lat|)` (Ekman 1905, as given
/// in common physical-oceanography texts; from memory, REFERENCES.md), valid for
/// |lat| ≥ 10°: a hint of how deep the water that comes up starts.
///
/// # Units
/// `wind_speed_m_s` m/s, `lat_deg` degrees; result metres.
#[must_use]
pub fn ekman_depth_empirical_m(wind_speed_m_s: f64, lat_deg: f64) -> f64 {
    7.6 * wind_speed_m_s / lat_deg.abs().to_radians().sin().sqrt()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::physics::{
        ConstantDrag, RHO_AIR_KG_M3, RHO_WATER_KG_M3, Wind, coriolis_parameter, wind_stress,
    };
    use approx::assert_abs_diff_eq;

    fn index(lat: f64, beta: f64, speed: f64, from: f64) -> f64 {
        let tau = wind_stress(
            Wind::from_speed_direction(speed, from),
            &ConstantDrag(1.3e-3),
            RHO_AIR_KG_M3,
        );
        let m = ekman_transport(tau, coriolis_parameter(lat), RHO_WATER_KG_M3);
        upwelling_index_m3s_per_100m(m, beta)
    }

    /// Worked checks of REFERENCES.md "Ekman transport and the coastal upwelling index"
    /// (Bakun 1973 index; rho_air 1.22, C_D 1.3e-3, rho_w 1025).
    #[test]
    fn worked_index_examples_both_hemispheres() {
        let tau = wind_stress(
            Wind::from_speed_direction(10.0, 0.0),
            &ConstantDrag(1.3e-3),
            1.22,
        );
        let m = ekman_transport(tau, coriolis_parameter(36.0), 1025.0);
        assert_abs_diff_eq!(m.x_m2_s, -1.805, epsilon = 1e-3);
        assert_abs_diff_eq!(m.y_m2_s, 0.0, epsilon = 1e-12);
        assert_abs_diff_eq!(index(36.0, 270.0, 10.0, 0.0), 180.5, epsilon = 0.1);
        assert_abs_diff_eq!(index(36.0, 270.0, 10.0, 315.0), 127.6, epsilon = 0.1);
        assert_abs_diff_eq!(index(36.0, 270.0, 10.0, 180.0), -180.5, epsilon = 0.1);
        assert_abs_diff_eq!(index(40.0, 225.0, 10.0, 315.0), 165.1, epsilon = 0.1);
        assert_abs_diff_eq!(index(-15.0, 270.0, 8.0, 180.0), 262.3, epsilon = 0.1);
    }

    /// Near the equator the index grows like 1/f: ≈ 611 at 10° and ≈ 1217 at 5°
    /// for 10 m/s alongshore (REFERENCES.md).
    #[test]
    fn index_grows_toward_equator() {
        assert_abs_diff_eq!(index(10.0, 270.0, 10.0, 0.0), 611.0, epsilon = 1.0);
        assert_abs_diff_eq!(index(5.0, 270.0, 10.0, 0.0), 1217.0, epsilon = 1.5);
    }

    /// REFERENCES.md "Ekman layer depth": 10 m/s at 45° → D_E = 90.4 m (either
    /// hemisphere).
    #[test]
    fn empirical_depth() {
        assert_abs_diff_eq!(ekman_depth_empirical_m(10.0, 45.0), 90.4, epsilon = 0.05);
        assert_abs_diff_eq!(ekman_depth_empirical_m(10.0, -45.0), 90.4, epsilon = 0.05);
    }
}
