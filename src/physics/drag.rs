//! Drag laws: the neutral 10 m drag coefficient `C_D` as a function of wind speed.
//!
//! Each law is a small type behind the [`DragLaw`] trait, so the model is chosen once
//! and the stress code does not care which.

use std::fmt;
use std::str::FromStr;

/// A drag law: `C_D(|U10|)`, dimensionless.
pub trait DragLaw {
    /// Drag coefficient for a 10 m wind speed in m/s (dimensionless, e.g. 1.3e-3).
    fn drag_coefficient(&self, wind_speed_m_s: f64) -> f64;
}

/// A constant drag coefficient.
///
/// 1.3e-3 is the value of the classic coastal upwelling index (Bakun 1973, from
/// memory: see REFERENCES.md).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ConstantDrag(pub f64);

impl DragLaw for ConstantDrag {
    fn drag_coefficient(&self, _wind_speed_m_s: f64) -> f64 {
        self.0
    }
}

/// Large & Pond 1981 (J. Phys. Oceanogr. 11:324–336): `C_D = 1.2e-3` for
/// 4 ≤ U < 11 m/s, `(0.49 + 0.065 U) 1e-3` for 11 ≤ U ≤ 25 m/s.
///
/// The paper gives nothing outside 4–25 m/s; here the end values are held (common
/// practice): 1.2e-3 below 4 m/s and 2.115e-3 above 25 m/s.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct LargePond1981;

impl DragLaw for LargePond1981 {
    fn drag_coefficient(&self, wind_speed_m_s: f64) -> f64 {
        let u = wind_speed_m_s.clamp(0.0, 25.0);
        if u < 11.0 {
            1.2e-3
        } else {
            (0.49 + 0.065 * u) * 1e-3
        }
    }
}

/// Trenberth, Large & Olson 1990 (J. Phys. Oceanogr. 20:1742–1760):
/// 2.18e-3 (U ≤ 1), `(0.62 + 1.56/U) 1e-3` (1 < U < 3), 1.14e-3 (3 ≤ U < 10),
/// `(0.49 + 0.065 U) 1e-3` (U ≥ 10).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Trenberth1990;

impl DragLaw for Trenberth1990 {
    fn drag_coefficient(&self, wind_speed_m_s: f64) -> f64 {
        let u = wind_speed_m_s.max(0.0);
        let cd = if u <= 1.0 {
            2.18
        } else if u < 3.0 {
            0.62 + 1.56 / u
        } else if u < 10.0 {
            1.14
        } else {
            0.49 + 0.065 * u
        };
        cd * 1e-3
    }
}

/// Large & Yeager 2009 (Clim. Dyn. 33:341–364), the form of Large & Yeager 2004 (NCAR
/// Tech. Note TN-460+STR) `(2.7/U + 0.142 + U/13.09) 1e-3` with the high-wind correction
/// `− 3.14807e-10 U^6` (×1e-3) below 33 m/s and 2.34e-3 from 33 m/s (correction term
/// from memory: REFERENCES.md).
///
/// The 2.7/U term grows without bound as U → 0; the speed is held at no less than
/// 0.5 m/s, the floor Large & Yeager use for their bulk formulae (from memory).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct LargeYeager2009;

/// Large & Yeager 2004 without the 2009 correction, used by [`LargeYeager2009`].
fn large_yeager_2004(u: f64) -> f64 {
    2.7 / u + 0.142 + u / 13.09
}

impl DragLaw for LargeYeager2009 {
    fn drag_coefficient(&self, wind_speed_m_s: f64) -> f64 {
        let u = wind_speed_m_s.max(0.5);
        let cd = if u < 33.0 {
            large_yeager_2004(u) - 3.148_07e-10 * u.powi(6)
        } else {
            2.34
        };
        cd * 1e-3
    }
}

/// The drag law chosen by the user, as named on the command line and in scenario files:
/// `constant:0.0013`, `large-pond-1981`, `trenberth-1990`, `large-yeager-2009`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum DragChoice {
    /// A constant coefficient.
    Constant(ConstantDrag),
    /// Large & Pond 1981.
    LargePond1981,
    /// Trenberth, Large & Olson 1990.
    Trenberth1990,
    /// Large & Yeager 2009.
    LargeYeager2009,
}

impl Default for DragChoice {
    /// The classic coastal upwelling index's constant 1.3e-3.
    fn default() -> Self {
        DragChoice::Constant(ConstantDrag(1.3e-3))
    }
}

impl DragLaw for DragChoice {
    fn drag_coefficient(&self, wind_speed_m_s: f64) -> f64 {
        match self {
            DragChoice::Constant(c) => c.drag_coefficient(wind_speed_m_s),
            DragChoice::LargePond1981 => LargePond1981.drag_coefficient(wind_speed_m_s),
            DragChoice::Trenberth1990 => Trenberth1990.drag_coefficient(wind_speed_m_s),
            DragChoice::LargeYeager2009 => LargeYeager2009.drag_coefficient(wind_speed_m_s),
        }
    }
}

impl DragChoice {
    /// The law's name for people (the command line and files use the `Display` form).
    #[must_use]
    pub fn name(&self) -> String {
        match self {
            DragChoice::Constant(c) if (c.0 - 1.3e-3).abs() < 1e-12 => {
                "Constant 1.3e-3 (the classic upwelling index)".into()
            }
            DragChoice::Constant(c) => format!("Constant {}", c.0),
            DragChoice::LargePond1981 => "Large & Pond 1981".into(),
            DragChoice::Trenberth1990 => "Trenberth, Large & Olson 1990".into(),
            DragChoice::LargeYeager2009 => "Large & Yeager 2009".into(),
        }
    }
}

impl fmt::Display for DragChoice {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            DragChoice::Constant(c) => write!(f, "constant:{}", c.0),
            DragChoice::LargePond1981 => f.write_str("large-pond-1981"),
            DragChoice::Trenberth1990 => f.write_str("trenberth-1990"),
            DragChoice::LargeYeager2009 => f.write_str("large-yeager-2009"),
        }
    }
}

impl FromStr for DragChoice {
    type Err = String;

    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s {
            "large-pond-1981" => Ok(DragChoice::LargePond1981),
            "trenberth-1990" => Ok(DragChoice::Trenberth1990),
            "large-yeager-2009" => Ok(DragChoice::LargeYeager2009),
            _ => {
                let value = s.strip_prefix("constant:").ok_or_else(|| {
                    format!(
                        "unknown drag law {s:?}: expected constant:<C_D>, large-pond-1981, \
                         trenberth-1990 or large-yeager-2009"
                    )
                })?;
                let cd: f64 = value
                    .parse()
                    .map_err(|_| format!("drag coefficient {value:?} is not a number"))?;
                if cd.is_finite() && cd > 0.0 && cd < 0.01 {
                    Ok(DragChoice::Constant(ConstantDrag(cd)))
                } else {
                    Err(format!(
                        "drag coefficient {value} is out of range: expected a value between 0 and 0.01 (e.g. 0.0013)"
                    ))
                }
            }
        }
    }
}

impl serde::Serialize for DragChoice {
    fn serialize<S: serde::Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        serializer.collect_str(self)
    }
}

impl<'de> serde::Deserialize<'de> for DragChoice {
    fn deserialize<D: serde::Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let s = String::deserialize(deserializer)?;
        s.parse().map_err(serde::de::Error::custom)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    /// The C_D table of REFERENCES.md (×1e-3), computed from the published formulas:
    /// Large & Pond 1981, Trenberth et al. 1990, Large & Yeager 2004/2009.
    #[test]
    fn drag_table_matches_published_formulas() {
        let rows = [
            (5.0, 1.20, 1.14, 1.064),
            (10.0, 1.20, 1.14, 1.176),
            (15.0, 1.465, 1.465, 1.464),
            (20.0, 1.79, 1.79, 1.785),
        ];
        for (u, lp, t90, ly09) in rows {
            assert_abs_diff_eq!(ConstantDrag(1.3e-3).drag_coefficient(u), 1.3e-3);
            assert_abs_diff_eq!(LargePond1981.drag_coefficient(u) * 1e3, lp, epsilon = 5e-4);
            assert_abs_diff_eq!(Trenberth1990.drag_coefficient(u) * 1e3, t90, epsilon = 5e-4);
            assert_abs_diff_eq!(
                LargeYeager2009.drag_coefficient(u) * 1e3,
                ly09,
                epsilon = 5e-4
            );
        }
        // Large & Yeager 2004 without the correction: 1.468 at 15 m/s, 1.805 at 20 m/s.
        assert_abs_diff_eq!(large_yeager_2004(15.0), 1.468, epsilon = 5e-4);
        assert_abs_diff_eq!(large_yeager_2004(20.0), 1.805, epsilon = 5e-4);
    }

    #[test]
    fn large_pond_holds_end_values_outside_its_range() {
        assert_abs_diff_eq!(LargePond1981.drag_coefficient(1.0), 1.2e-3);
        assert_abs_diff_eq!(
            LargePond1981.drag_coefficient(40.0),
            2.115e-3,
            epsilon = 1e-12
        );
    }

    #[test]
    fn large_yeager_is_finite_in_a_calm() {
        let cd = LargeYeager2009.drag_coefficient(0.0);
        assert!(cd.is_finite());
        assert_abs_diff_eq!(LargeYeager2009.drag_coefficient(40.0), 2.34e-3);
    }

    #[test]
    fn choice_parses_and_prints() {
        for s in [
            "constant:0.0013",
            "large-pond-1981",
            "trenberth-1990",
            "large-yeager-2009",
        ] {
            let c: DragChoice = s.parse().expect("valid");
            assert_eq!(c.to_string(), s);
        }
        assert_eq!(
            "constant:abc".parse::<DragChoice>().unwrap_err(),
            "drag coefficient \"abc\" is not a number"
        );
        assert!("constant:-1".parse::<DragChoice>().is_err());
        assert!(
            "large-pond"
                .parse::<DragChoice>()
                .unwrap_err()
                .starts_with("unknown drag law")
        );
    }
}
