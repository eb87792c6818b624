//! Great-circle geometry on a spherical Earth (haversine distance, bearings, midpoints).
//!
//! A sphere is accurate to about 0.5 % against the WGS84 ellipsoid: plenty for coast
//! pieces of a few kilometres and for trip distances.

use serde::{Deserialize, Serialize};

/// Mean Earth radius for great-circle distances, metres (IUGG mean radius R1).
pub const EARTH_MEAN_RADIUS_M: f64 = 6_371_008.8;

/// A position: latitude then longitude, both in degrees (north and east positive).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct LatLon {
    /// Degrees north, −90..90.
    pub lat_deg: f64,
    /// Degrees east, −180..180 (other values are accepted and wrapped where used).
    pub lon_deg: f64,
}

/// Decimal degrees with the hemisphere's letter, latitude first: `38.378°N 123.083°W`
/// (3 decimals unless a precision is given, `{:.1}`); the longitude is brought into
/// −180°..180° first.
impl std::fmt::Display for LatLon {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let places = f.precision().unwrap_or(3);
        let lon = (self.lon_deg + 180.0).rem_euclid(360.0) - 180.0;
        let (ns, ew) = (
            if self.lat_deg < 0.0 { 'S' } else { 'N' },
            if lon < 0.0 { 'W' } else { 'E' },
        );
        write!(
            f,
            "{:.places$}°{ns} {:.places$}°{ew}",
            self.lat_deg.abs(),
            lon.abs()
        )
    }
}

impl LatLon {
    /// A position from latitude and longitude in degrees.
    #[must_use]
    pub fn new(lat_deg: f64, lon_deg: f64) -> Self {
        Self { lat_deg, lon_deg }
    }

    /// The exact bits of latitude and longitude: a key for the very same position
    /// (in maps and hashes, which `f64` is not).
    #[must_use]
    pub fn bits(self) -> (u64, u64) {
        (self.lat_deg.to_bits(), self.lon_deg.to_bits())
    }

    fn to_unit_vector(self) -> [f64; 3] {
        let (lat, lon) = (self.lat_deg.to_radians(), self.lon_deg.to_radians());
        [lat.cos() * lon.cos(), lat.cos() * lon.sin(), lat.sin()]
    }

    fn from_vector(v: [f64; 3]) -> Self {
        let lat = v[2].atan2(v[0].hypot(v[1]));
        let lon = v[1].atan2(v[0]);
        Self::new(lat.to_degrees(), lon.to_degrees())
    }

    /// The weighted mean position of several points (mean of unit vectors on the
    /// sphere, projected back); `None` when the weights sum to zero.
    #[must_use]
    pub fn weighted_mean(points: impl IntoIterator<Item = (LatLon, f64)>) -> Option<LatLon> {
        let mut acc = [0.0; 3];
        let mut total = 0.0;
        for (p, w) in points {
            let v = p.to_unit_vector();
            for k in 0..3 {
                acc[k] += v[k] * w;
            }
            total += w;
        }
        (total > 0.0).then(|| Self::from_vector(acc))
    }
}

/// Whether a polyline has at least two different points (is a line, not a point).
#[must_use]
pub fn is_a_line(points: &[LatLon]) -> bool {
    points.windows(2).any(|w| w[0] != w[1])
}

/// Great-circle distance by the haversine formula (Sinnott 1984).
///
/// # Units
/// metres, on a sphere of radius [`EARTH_MEAN_RADIUS_M`].
#[must_use]
pub fn distance_m(a: LatLon, b: LatLon) -> f64 {
    distance_with_cos_m(
        (a, a.lat_deg.to_radians().cos()),
        (b, b.lat_deg.to_radians().cos()),
    )
}

/// [`distance_m`] from points whose latitudes' cosines are known (for one point's
/// distance to many): the same number.
#[must_use]
pub fn distance_with_cos_m((a, cos_a): (LatLon, f64), (b, cos_b): (LatLon, f64)) -> f64 {
    let (phi1, phi2) = (a.lat_deg.to_radians(), b.lat_deg.to_radians());
    let dphi = phi2 - phi1;
    let dlambda = (b.lon_deg - a.lon_deg).to_radians();
    let h = (dphi / 2.0).sin().powi(2) + cos_a * cos_b * (dlambda / 2.0).sin().powi(2);
    2.0 * EARTH_MEAN_RADIUS_M * h.sqrt().min(1.0).asin()
}

/// Initial great-circle bearing from `a` toward `b`, degrees clockwise from true north
/// in `[0, 360)`.
#[must_use]
pub fn initial_bearing_deg(a: LatLon, b: LatLon) -> f64 {
    let (phi1, phi2) = (a.lat_deg.to_radians(), b.lat_deg.to_radians());
    let dlambda = (b.lon_deg - a.lon_deg).to_radians();
    let y = dlambda.sin() * phi2.cos();
    let x = phi1.cos() * phi2.sin() - phi1.sin() * phi2.cos() * dlambda.cos();
    crate::physics::bearing_deg(y.atan2(x).to_degrees())
}

/// Midpoint of the great-circle arc from `a` to `b`.
#[must_use]
pub fn midpoint(a: LatLon, b: LatLon) -> LatLon {
    LatLon::weighted_mean([(a, 1.0), (b, 1.0)]).unwrap_or(a)
}

/// The point reached from `start` after `distance_m` metres on the initial bearing
/// `bearing_deg` (degrees true), along a great circle.
#[must_use]
pub fn destination(start: LatLon, bearing_deg: f64, distance_m: f64) -> LatLon {
    let delta = distance_m / EARTH_MEAN_RADIUS_M;
    let theta = bearing_deg.to_radians();
    let phi1 = start.lat_deg.to_radians();
    let lambda1 = start.lon_deg.to_radians();
    let phi2 = (phi1.sin() * delta.cos() + phi1.cos() * delta.sin() * theta.cos()).asin();
    let lambda2 = lambda1
        + (theta.sin() * delta.sin() * phi1.cos()).atan2(delta.cos() - phi1.sin() * phi2.sin());
    let lon = (lambda2.to_degrees() + 540.0).rem_euclid(360.0) - 180.0;
    LatLon::new(phi2.to_degrees(), lon)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    /// Positions in messages carry the hemisphere's letter, never a signed "°E" (common
    /// practice on charts and in forecasts).
    #[test]
    fn positions_print_with_their_hemispheres() {
        assert_eq!(
            LatLon::new(38.3776, -123.0831).to_string(),
            "38.378°N 123.083°W"
        );
        assert_eq!(LatLon::new(-33.9, 18.42).to_string(), "33.900°S 18.420°E");
        assert_eq!(format!("{:.1}", LatLon::new(10.0, 190.0)), "10.0°N 170.0°W");
    }

    /// geographiclib `Geodesic.WGS84.Inverse(45, -125, 44, -124.5)` gives 118 021.934 m
    /// and an initial azimuth of 160.134783° (REFERENCES.md). The sphere agrees within
    /// 0.5 % in distance and 0.2° in bearing.
    #[test]
    fn distance_and_bearing_against_geographiclib() {
        let a = LatLon::new(45.0, -125.0);
        let b = LatLon::new(44.0, -124.5);
        let d = distance_m(a, b);
        assert!(
            (d - 118_021.934).abs() / 118_021.934 < 0.005,
            "distance {d}"
        );
        assert_abs_diff_eq!(initial_bearing_deg(a, b), 160.134_783, epsilon = 0.2);
    }

    #[test]
    fn one_minute_of_latitude_is_about_one_nautical_mile() {
        let d = distance_m(LatLon::new(45.0, 0.0), LatLon::new(45.0 + 1.0 / 60.0, 0.0));
        assert_abs_diff_eq!(d, 1853.2, epsilon = 1.0);
    }

    #[test]
    fn destination_inverts_distance_and_bearing() {
        let a = LatLon::new(36.5, -122.0);
        let b = destination(a, 250.0, 20_000.0);
        assert_abs_diff_eq!(distance_m(a, b), 20_000.0, epsilon = 1e-6);
        assert_abs_diff_eq!(initial_bearing_deg(a, b), 250.0, epsilon = 1e-9);
    }

    #[test]
    fn midpoint_on_a_meridian() {
        let m = midpoint(LatLon::new(30.0, 10.0), LatLon::new(40.0, 10.0));
        assert_abs_diff_eq!(m.lat_deg, 35.0, epsilon = 1e-9);
        assert_abs_diff_eq!(m.lon_deg, 10.0, epsilon = 1e-9);
    }
}
