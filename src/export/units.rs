//! The units a skipper reads: wind in knots, metres per second or Beaufort force;
//! distances in nautical miles or kilometres; fuel in litres or US gallons. Files keep
//! SI and the command line's contract units; only words shown to people use these.

use serde::{Deserialize, Serialize};

/// Units of wind speed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
pub enum WindUnit {
    /// Knots.
    #[default]
    Knots,
    /// Metres per second.
    MetresPerSecond,
    /// Beaufort force (WMO).
    Beaufort,
}

/// Units of distance (and so of boat speed: knots or km/h).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
pub enum DistanceUnit {
    /// Nautical miles (and knots).
    #[default]
    NauticalMiles,
    /// Kilometres (and km/h).
    Kilometres,
}

/// Units of fuel.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
pub enum FuelUnit {
    /// Litres.
    #[default]
    Litres,
    /// US gallons.
    UsGallons,
}

/// The units chosen for what is shown.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(default)]
pub struct Units {
    /// Wind speeds.
    pub wind: WindUnit,
    /// Distances and boat speeds.
    pub distance: DistanceUnit,
    /// Fuel.
    pub fuel: FuelUnit,
}

/// 1 nautical mile in kilometres (exact: 1852 m).
const KM_PER_NM: f64 = 1.852;
/// 1 knot in m/s (exact: 1852 m / 3600 s).
const M_S_PER_KT: f64 = 1852.0 / 3600.0;
/// 1 US gallon in litres (exact: 231 cubic inches).
const L_PER_US_GAL: f64 = 3.785_411_784;

/// Beaufort force of a wind speed in knots (WMO scale, whole knots: 0 under 1 kt;
/// 1: 1–3; 2: 4–6; 3: 7–10; 4: 11–16; 5: 17–21; 6: 22–27; 7: 28–33; 8: 34–40; 9: 41–47;
/// 10: 48–55; 11: 56–63; 12: 64 and more).
#[must_use]
pub fn beaufort(kt: f64) -> u8 {
    const UPPER_KT: [f64; 12] = [
        0.0, 3.0, 6.0, 10.0, 16.0, 21.0, 27.0, 33.0, 40.0, 47.0, 55.0, 63.0,
    ];
    let r = kt.round();
    UPPER_KT
        .iter()
        .position(|upper| r <= *upper)
        .map_or(12, |f| f as u8)
}

impl Units {
    /// A wind speed given in knots.
    #[must_use]
    pub fn wind(&self, kt: f64) -> String {
        match self.wind {
            WindUnit::Knots => format!("{kt:.0} kt"),
            WindUnit::MetresPerSecond => format!("{:.0} m/s", kt * M_S_PER_KT),
            WindUnit::Beaufort => format!("force {}", beaufort(kt)),
        }
    }

    /// A wind speed against a limit: one decimal when whole units would hide which
    /// side of the limit it is on.
    #[must_use]
    pub fn wind_vs(&self, kt: f64, limit_kt: f64) -> String {
        let (x, limit, unit) = match self.wind {
            WindUnit::Knots => (kt, limit_kt, "kt"),
            WindUnit::MetresPerSecond => (kt * M_S_PER_KT, limit_kt * M_S_PER_KT, "m/s"),
            WindUnit::Beaufort => return self.wind(kt),
        };
        if (x.round() - limit.round()).abs() < 1.0 {
            format!("{x:.1} {unit}")
        } else {
            format!("{x:.0} {unit}")
        }
    }

    /// A distance given in nautical miles.
    #[must_use]
    pub fn distance(&self, nm: f64) -> String {
        match self.distance {
            DistanceUnit::NauticalMiles => format!("{nm:.0} nm"),
            DistanceUnit::Kilometres => format!("{:.0} km", nm * KM_PER_NM),
        }
    }

    /// A boat speed given in knots.
    #[must_use]
    pub fn speed(&self, kt: f64) -> String {
        match self.distance {
            DistanceUnit::NauticalMiles => format!("{kt:.0} kt"),
            DistanceUnit::Kilometres => format!("{:.0} km/h", kt * KM_PER_NM),
        }
    }

    /// Fuel given in litres.
    #[must_use]
    pub fn fuel(&self, l: f64) -> String {
        match self.fuel {
            FuelUnit::Litres => format!("{l:.0} l"),
            FuelUnit::UsGallons => format!("{:.0} US gal", l / L_PER_US_GAL),
        }
    }

    /// How a wind speed in knots is shown as a number: the factor and the unit
    /// (Beaufort is not linear: numbers are then in knots).
    #[must_use]
    pub fn wind_scale(&self) -> (f64, &'static str) {
        match self.wind {
            WindUnit::MetresPerSecond => (M_S_PER_KT, "m/s"),
            WindUnit::Knots | WindUnit::Beaufort => (1.0, "kt"),
        }
    }

    /// How a distance in nautical miles is shown as a number, and a boat speed in
    /// knots: the factor, the distance unit and the speed unit.
    #[must_use]
    pub fn distance_scale(&self) -> (f64, &'static str, &'static str) {
        match self.distance {
            DistanceUnit::NauticalMiles => (1.0, "nm", "kt"),
            DistanceUnit::Kilometres => (KM_PER_NM, "km", "km/h"),
        }
    }

    /// How fuel in litres is shown as a number: the factor and the unit.
    #[must_use]
    pub fn fuel_scale(&self) -> (f64, &'static str) {
        match self.fuel {
            FuelUnit::Litres => (1.0, "l"),
            FuelUnit::UsGallons => (1.0 / L_PER_US_GAL, "US gal"),
        }
    }

    /// Fuel use given in litres per hour.
    #[must_use]
    pub fn fuel_rate(&self, l_per_h: f64) -> String {
        match self.fuel {
            FuelUnit::Litres => format!("{l_per_h:.0} l/h"),
            FuelUnit::UsGallons => format!("{:.1} US gal/h", l_per_h / L_PER_US_GAL),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The WMO Beaufort table in knots (REFERENCES.md, "Sea state"): each class's ends.
    #[test]
    fn beaufort_classes() {
        for (kt, force) in [
            (0.4, 0),
            (1.0, 1),
            (3.0, 1),
            (4.0, 2),
            (10.0, 3),
            (11.0, 4),
            (16.0, 4),
            (17.0, 5),
            (21.0, 5),
            (22.0, 6),
            (27.0, 6),
            (28.0, 7),
            (33.0, 7),
            (34.0, 8),
            (40.0, 8),
            (41.0, 9),
            (47.0, 9),
            (70.0, 12),
        ] {
            assert_eq!(beaufort(kt), force, "{kt} kt");
        }
    }

    /// Exact conversions: 1 nm = 1.852 km; 1 kt = 0.514444 m/s; 1 US gal = 3.785411784 l.
    #[test]
    fn conversions() {
        let metric = Units {
            wind: WindUnit::MetresPerSecond,
            distance: DistanceUnit::Kilometres,
            fuel: FuelUnit::UsGallons,
        };
        assert_eq!(metric.wind(20.0), "10 m/s");
        assert_eq!(metric.distance(10.0), "19 km");
        assert_eq!(metric.speed(10.0), "19 km/h");
        assert_eq!(metric.fuel(378.5), "100 US gal");
        assert_eq!(Units::default().wind_vs(17.96, 18.0), "18.0 kt");
        assert_eq!(metric.wind_vs(35.0, 18.0), "18 m/s");
    }
}
