//! Wind stress at the sea surface from the 10 m wind: the bulk formula.

use super::{DragLaw, Wind};

/// Default air density, kg/m^3 (the coastal upwelling index's customary value).
pub const RHO_AIR_KG_M3: f64 = 1.22;
/// Default sea-water density, kg/m^3.
pub const RHO_WATER_KG_M3: f64 = 1025.0;

/// Air densities accepted anywhere a user sets one, kg/m^3 (near-surface air is about
/// 1.1–1.4; the range leaves room without letting a typo through).
pub const RHO_AIR_RANGE_KG_M3: std::ops::RangeInclusive<f64> = 0.5..=2.0;

/// Sea-water densities accepted anywhere a user sets one, kg/m^3 (fresh water 1000,
/// open ocean about 1020–1030).
pub const RHO_WATER_RANGE_KG_M3: std::ops::RangeInclusive<f64> = 950.0..=1100.0;

/// Wind stress on the sea surface.
///
/// # Units
/// N/m^2 (Pa), components toward east (`x_pa`) and north (`y_pa`).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct WindStress {
    /// Eastward stress, N/m^2.
    pub x_pa: f64,
    /// Northward stress, N/m^2.
    pub y_pa: f64,
}

impl WindStress {
    /// Stress magnitude, N/m^2.
    #[must_use]
    pub fn magnitude_pa(self) -> f64 {
        super::units::hypot(self.x_pa, self.y_pa)
    }
}

/// The bulk formula `tau = rho_air C_D(|U10|) |U10| U10`.
///
/// # Units
/// `rho_air_kg_m3` in kg/m^3; wind in m/s; result in N/m^2.
///
/// With `rho_air` = 1.22 kg/m^3 and `C_D` = 1.3e-3, 10 m/s gives 0.1586 N/m^2
/// (REFERENCES.md, computed from the formula):
/// ```
/// # use shelfwind::physics::*;
/// let tau = wind_stress(Wind::new(10.0, 0.0), &ConstantDrag(1.3e-3), RHO_AIR_KG_M3);
/// assert!((tau.x_pa - 0.1586).abs() < 1e-4);
/// ```
#[must_use]
pub fn wind_stress(wind: Wind, drag: &impl DragLaw, rho_air_kg_m3: f64) -> WindStress {
    let speed = wind.speed_m_s();
    let k = rho_air_kg_m3 * drag.drag_coefficient(speed) * speed;
    WindStress {
        x_pa: k * wind.u_m_s,
        y_pa: k * wind.v_m_s,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::physics::ConstantDrag;
    use approx::assert_abs_diff_eq;

    /// REFERENCES.md: rho_air 1.22, C_D 1.3e-3 → 0.0397, 0.1586, 0.3569, 0.6344 N/m^2.
    #[test]
    fn stress_check_values() {
        for (u, tau) in [
            (5.0, 0.0397),
            (10.0, 0.1586),
            (15.0, 0.3569),
            (20.0, 0.6344),
        ] {
            let s = wind_stress(Wind::new(0.0, -u), &ConstantDrag(1.3e-3), RHO_AIR_KG_M3);
            // The published figures are rounded to 4 decimals (0.03965 prints as 0.0397).
            assert_abs_diff_eq!(s.magnitude_pa(), tau, epsilon = 5.1e-5);
            assert_abs_diff_eq!(s.y_pa, -tau, epsilon = 5.1e-5);
            assert_abs_diff_eq!(s.x_pa, 0.0);
        }
    }
}
