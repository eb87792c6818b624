//! Ekman pumping: vertical velocity at the base of the Ekman layer from the curl of
//! the wind stress, by centred differences between four probes around a point.

use super::{REFUSE_BELOW_LAT_DEG, WindStress, coriolis_parameter};

/// The wind stress at one probe, and the probe's latitude.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ProbeStress {
    /// Wind stress there, N/m^2.
    pub stress: WindStress,
    /// Latitude of the probe, degrees north.
    pub lat_deg: f64,
}

/// Four probes around a point: east and west of it `dx_m` apart, north and south of it
/// `dy_m` apart.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PumpingProbes {
    /// East of the point.
    pub east: ProbeStress,
    /// West of the point.
    pub west: ProbeStress,
    /// North of the point.
    pub north: ProbeStress,
    /// South of the point.
    pub south: ProbeStress,
    /// Distance from the west probe to the east probe, m.
    pub dx_m: f64,
    /// Distance from the south probe to the north probe, m.
    pub dy_m: f64,
}

/// Ekman pumping velocity `w_E = (1/rho_w) [d(tau_y/f)/dx − d(tau_x/f)/dy]`, which
/// equals `curl(tau)/(rho_w f) + beta tau_x/(rho_w f^2)` (e.g. Gill 1982, from memory;
/// REFERENCES.md "Ekman pumping"), by centred differences between the probes.
///
/// Positive is upward (upwelling) in both hemispheres. `None` where a probe lies within
/// 5° of the equator (f → 0), or the probes coincide.
///
/// # Units
/// stress N/m^2, distances m, `rho_water_kg_m3` kg/m^3; result m/s (× 86 400 for m/day).
#[must_use]
pub fn ekman_pumping_m_s(probes: &PumpingProbes, rho_water_kg_m3: f64) -> Option<f64> {
    let p = probes;
    let f = [p.east, p.west, p.north, p.south].map(|q| coriolis_parameter(q.lat_deg));
    ekman_pumping_with_f_m_s(probes, f, rho_water_kg_m3)
}

/// [`ekman_pumping_m_s`] with the Coriolis parameter at each probe (east, west, north,
/// south, 1/s) worked out beforehand, for many hours at the same probes.
#[must_use]
pub fn ekman_pumping_with_f_m_s(
    probes: &PumpingProbes,
    f: [f64; 4],
    rho_water_kg_m3: f64,
) -> Option<f64> {
    let p = probes;
    let all = [p.east, p.west, p.north, p.south];
    if all.iter().any(|q| q.lat_deg.abs() < REFUSE_BELOW_LAT_DEG) || p.dx_m <= 0.0 || p.dy_m <= 0.0
    {
        return None;
    }
    let over_f = |q: ProbeStress, f: f64| (q.stress.x_pa / f, q.stress.y_pa / f);
    let d_tauy_f_dx = (over_f(p.east, f[0]).1 - over_f(p.west, f[1]).1) / p.dx_m;
    let d_taux_f_dy = (over_f(p.north, f[2]).0 - over_f(p.south, f[3]).0) / p.dy_m;
    Some((d_tauy_f_dx - d_taux_f_dy) / rho_water_kg_m3)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::physics::EARTH_ROTATION_RAD_S;
    use approx::assert_relative_eq;

    /// Mean Earth radius, m (IUGG), the one the geometry uses.
    const R_M: f64 = crate::coast::EARTH_MEAN_RADIUS_M;

    fn probe(lat_deg: f64, x_pa: f64, y_pa: f64) -> ProbeStress {
        ProbeStress {
            stress: WindStress { x_pa, y_pa },
            lat_deg,
        }
    }

    /// REFERENCES.md "Ekman pumping": curl(tau) = 1e-6 N/m^3 at f = 1e-4 1/s gives
    /// 9.76e-6 m/s = 0.84 m/day.
    #[test]
    fn curl_check_value() {
        // Latitude where f = 1e-4: tau_y = 1e-6 x has curl 1e-6 and no beta term.
        let lat = (1e-4 / (2.0 * EARTH_ROTATION_RAD_S)).asin().to_degrees();
        let probes = PumpingProbes {
            east: probe(lat, 0.0, 1e-6 * 5000.0),
            west: probe(lat, 0.0, -1e-6 * 5000.0),
            north: probe(lat + 0.045, 0.0, 0.0),
            south: probe(lat - 0.045, 0.0, 0.0),
            dx_m: 10_000.0,
            dy_m: 10_000.0,
        };
        let w = ekman_pumping_m_s(&probes, 1025.0).expect("mid-latitude");
        assert_relative_eq!(w, 9.76e-6, max_relative = 2e-3);
        assert_relative_eq!(w * 86_400.0, 0.84, max_relative = 5e-3);
    }

    /// A uniform eastward stress has no curl but a beta term `beta tau_x/(rho_w f^2)`
    /// with `beta = 2 Omega cos(lat)/R` (REFERENCES.md).
    #[test]
    fn beta_term_for_uniform_stress() {
        let lat = 40.5_f64;
        let dlat = 0.05;
        let probes = PumpingProbes {
            east: probe(lat, 0.1, 0.0),
            west: probe(lat, 0.1, 0.0),
            north: probe(lat + dlat, 0.1, 0.0),
            south: probe(lat - dlat, 0.1, 0.0),
            dx_m: 10_000.0,
            dy_m: R_M * (2.0 * dlat).to_radians(),
        };
        let f = coriolis_parameter(lat);
        let beta = 2.0 * EARTH_ROTATION_RAD_S * lat.to_radians().cos() / R_M;
        let expected = beta * 0.1 / (1025.0 * f * f);
        let w = ekman_pumping_m_s(&probes, 1025.0).expect("mid-latitude");
        assert_relative_eq!(w, expected, max_relative = 1e-3);
    }

    #[test]
    fn equatorial_probes_give_nothing() {
        let p = probe(-0.5, 0.1, 0.0);
        let probes = PumpingProbes {
            east: p,
            west: p,
            north: p,
            south: p,
            dx_m: 1.0,
            dy_m: 1.0,
        };
        assert!(ekman_pumping_m_s(&probes, 1025.0).is_none());
    }
}
