//! Ekman pumping: vertical velocity at the base of the Ekman layer from the curl of
//! the wind stress on a regular latitude/longitude grid.

use super::coriolis_parameter;

/// Mean Earth radius used for grid spacing, metres (IUGG mean radius, rounded).
pub const EARTH_RADIUS_M: f64 = 6.371e6;

/// Wind stress on a regular latitude/longitude grid.
///
/// Values are stored row by row: `index = j * lons_deg.len() + i`, with latitudes
/// ascending (south to north) and longitudes ascending (west to east).
#[derive(Debug, Clone, PartialEq)]
pub struct StressGrid {
    /// Latitudes of the rows, degrees north, ascending.
    pub lats_deg: Vec<f64>,
    /// Longitudes of the columns, degrees east, ascending.
    pub lons_deg: Vec<f64>,
    /// Eastward stress, N/m^2.
    pub x_pa: Vec<f64>,
    /// Northward stress, N/m^2.
    pub y_pa: Vec<f64>,
}

/// Ekman pumping velocity `w_E = (1/rho_w) [d(tau_y/f)/dx − d(tau_x/f)/dy]`, which
/// equals `curl(tau)/(rho_w f) + beta tau_x/(rho_w f^2)` (e.g. Gill 1982, from memory).
/// Derivatives are centred differences on the sphere, `dx = R cos(lat) dlon`,
/// `dy = R dlat`; one-sided at the edges.
///
/// Positive is upward (upwelling) in both hemispheres. Grid points where |f| is too
/// small (|lat| < 5°), and grids with fewer than two rows or columns, give `None`.
///
/// # Units
/// stress N/m^2, `rho_water_kg_m3` kg/m^3; result m/s (multiply by 86 400 for m/day).
#[must_use]
pub fn ekman_pumping_m_s(grid: &StressGrid, rho_water_kg_m3: f64) -> Vec<Option<f64>> {
    let ni = grid.lons_deg.len();
    let nj = grid.lats_deg.len();
    let mut out = vec![None; ni * nj];
    if ni < 2 || nj < 2 || grid.x_pa.len() != ni * nj || grid.y_pa.len() != ni * nj {
        return out;
    }
    let f: Vec<f64> = grid
        .lats_deg
        .iter()
        .map(|&lat| coriolis_parameter(lat))
        .collect();
    let usable = |j: usize| grid.lats_deg[j].abs() >= super::REFUSE_BELOW_LAT_DEG;
    let neighbours = |k: usize, n: usize| (k.saturating_sub(1), (k + 1).min(n - 1));
    for j in 0..nj {
        if !usable(j) {
            continue;
        }
        let (js, jn) = neighbours(j, nj);
        if !usable(js) || !usable(jn) {
            continue;
        }
        let dy_m = EARTH_RADIUS_M * (grid.lats_deg[jn] - grid.lats_deg[js]).to_radians();
        let dx_per_deg_m = EARTH_RADIUS_M * grid.lats_deg[j].to_radians().cos();
        for i in 0..ni {
            let (iw, ie) = neighbours(i, ni);
            let dx_m = dx_per_deg_m * (grid.lons_deg[ie] - grid.lons_deg[iw]).to_radians();
            let d_tauy_f_dx = (grid.y_pa[j * ni + ie] - grid.y_pa[j * ni + iw]) / f[j] / dx_m;
            let d_taux_f_dy =
                (grid.x_pa[jn * ni + i] / f[jn] - grid.x_pa[js * ni + i] / f[js]) / dy_m;
            out[j * ni + i] = Some((d_tauy_f_dx - d_taux_f_dy) / rho_water_kg_m3);
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::physics::EARTH_ROTATION_RAD_S;
    use approx::assert_relative_eq;

    fn grid(lat0: f64, f_tau: impl Fn(f64, f64) -> (f64, f64)) -> StressGrid {
        let lats_deg: Vec<f64> = (0..5).map(|j| lat0 + 0.25 * f64::from(j)).collect();
        let lons_deg: Vec<f64> = (0..5).map(|i| -125.0 + 0.25 * f64::from(i)).collect();
        let (mut x_pa, mut y_pa) = (vec![], vec![]);
        for &lat in &lats_deg {
            for &lon in &lons_deg {
                let x_m = EARTH_RADIUS_M * lat.to_radians().cos() * (lon + 125.0).to_radians();
                let y_m = EARTH_RADIUS_M * (lat - lat0).to_radians();
                let (tx, ty) = f_tau(x_m, y_m);
                x_pa.push(tx);
                y_pa.push(ty);
            }
        }
        StressGrid {
            lats_deg,
            lons_deg,
            x_pa,
            y_pa,
        }
    }

    /// REFERENCES.md "Ekman pumping": curl(tau) = 1e-6 N/m^3 at f = 1e-4 1/s gives
    /// 9.76e-6 m/s = 0.84 m/day.
    #[test]
    fn curl_check_value() {
        // Latitude where f = 1e-4: tau_y = 1e-6 x has curl 1e-6 and no beta term.
        let lat = (1e-4 / (2.0 * EARTH_ROTATION_RAD_S)).asin().to_degrees() - 0.5;
        let g = grid(lat, |x, _| (0.0, 1e-6 * x));
        let w = ekman_pumping_m_s(&g, 1025.0);
        let centre = w[2 * 5 + 2].expect("inside the grid");
        assert_relative_eq!(centre, 9.76e-6, max_relative = 2e-3);
        assert_relative_eq!(centre * 86_400.0, 0.84, max_relative = 5e-3);
    }

    /// A uniform eastward stress has no curl but a beta term `beta tau_x/(rho_w f^2)`
    /// with `beta = 2 Omega cos(lat)/R` (REFERENCES.md).
    #[test]
    fn beta_term_for_uniform_stress() {
        let g = grid(40.0, |_, _| (0.1, 0.0));
        let w = ekman_pumping_m_s(&g, 1025.0);
        let lat = 40.5_f64;
        let f = coriolis_parameter(lat);
        let beta = 2.0 * EARTH_ROTATION_RAD_S * lat.to_radians().cos() / EARTH_RADIUS_M;
        let expected = beta * 0.1 / (1025.0 * f * f);
        assert_relative_eq!(w[2 * 5 + 2].expect("inside"), expected, max_relative = 1e-3);
    }

    #[test]
    fn equatorial_rows_are_skipped() {
        let g = grid(-0.5, |_, _| (0.1, 0.0));
        assert!(ekman_pumping_m_s(&g, 1025.0).iter().all(Option::is_none));
    }
}
