//! A regular latitude/longitude grid and bilinear interpolation on it.

use crate::coast::LatLon;

/// The geometry of a regular lat/lon grid, in whatever scan order its values come.
///
/// Axes are ascending; `data_index[j * ni + i]` is the position in the file's value
/// order of the point at row `j` (latitude) and column `i` (longitude).
#[derive(Debug, Clone, PartialEq)]
pub struct RegularGrid {
    lat0_deg: f64,
    dlat_deg: f64,
    nj: usize,
    lon0_deg: f64,
    dlon_deg: f64,
    ni: usize,
    /// The grid goes all the way round: the last column neighbours the first.
    global: bool,
    data_index: Vec<usize>,
}

/// Four data positions and their bilinear weights.
pub type Weights = [(usize, f64); 4];

fn axis(values: impl Iterator<Item = f64>, n: usize, name: &str) -> Result<(f64, f64), String> {
    let mut v: Vec<f64> = values.collect();
    v.sort_by(f64::total_cmp);
    v.dedup_by(|a, b| (*a - *b).abs() < 1e-6);
    if v.len() != n {
        return Err(format!(
            "the grid has {} distinct {name}s where {n} were declared: expected a regular latitude/longitude grid",
            v.len()
        ));
    }
    if n < 2 {
        return Err(format!(
            "the grid has a single {name}: at least two are needed to interpolate"
        ));
    }
    let step = (v[n - 1] - v[0]) / (n - 1) as f64;
    if v.windows(2)
        .any(|w| ((w[1] - w[0]) - step).abs() > 1e-3 * step.abs().max(1e-6))
    {
        return Err(format!(
            "the {name}s are not evenly spaced: expected a regular latitude/longitude grid"
        ));
    }
    Ok((v[0], step))
}

impl RegularGrid {
    /// Builds the grid from the positions of the values in file order (latitude,
    /// longitude in degrees) and the declared numbers of columns `ni` and rows `nj`.
    pub fn from_points(points: &[(f64, f64)], ni: usize, nj: usize) -> Result<Self, String> {
        if points.len() != ni * nj {
            return Err(format!(
                "{} grid points where {ni} × {nj} were declared",
                points.len()
            ));
        }
        if points.iter().any(|p| !p.0.is_finite() || !p.1.is_finite()) {
            return Err("the grid has non-finite coordinates".into());
        }
        let (lat0_deg, dlat_deg) = axis(points.iter().map(|p| p.0), nj, "latitude")?;
        let (lon0_deg, dlon_deg) = axis(points.iter().map(|p| p.1), ni, "longitude")?;
        let mut data_index = vec![usize::MAX; ni * nj];
        for (k, &(lat, lon)) in points.iter().enumerate() {
            let j = ((lat - lat0_deg) / dlat_deg).round() as usize;
            let i = ((lon - lon0_deg) / dlon_deg).round() as usize;
            let slot = &mut data_index[j.min(nj - 1) * ni + i.min(ni - 1)];
            if *slot != usize::MAX {
                return Err("two grid points share one position: expected a regular latitude/longitude grid".into());
            }
            *slot = k;
        }
        let span = dlon_deg * ni as f64;
        let global = (span - 360.0).abs() < dlon_deg * 0.5;
        Ok(Self {
            lat0_deg,
            dlat_deg,
            nj,
            lon0_deg,
            dlon_deg,
            ni,
            global,
            data_index,
        })
    }

    /// Number of values the grid holds.
    #[must_use]
    pub fn len(&self) -> usize {
        self.data_index.len()
    }

    /// Whether the grid holds no values (never true for a built grid).
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.data_index.is_empty()
    }

    /// Bilinear weights (in longitude and latitude) of the four grid values around
    /// `p`, or `None` when `p` is outside the grid. Longitudes are matched modulo 360,
    /// so a grid in 0–360 serves points given in ±180 and the other way round.
    #[must_use]
    pub fn weights(&self, p: LatLon) -> Option<Weights> {
        const EDGE: f64 = 1e-9;
        let y = (p.lat_deg - self.lat0_deg) / self.dlat_deg;
        if !(-EDGE..=(self.nj - 1) as f64 + EDGE).contains(&y) {
            return None;
        }
        let x = (p.lon_deg - self.lon0_deg).rem_euclid(360.0) / self.dlon_deg;
        let last = (self.ni - 1) as f64;
        let (i0, i1, tx) = if x <= last + EDGE {
            let i0 = (x.floor() as usize).min(self.ni - 2);
            (i0, i0 + 1, (x - i0 as f64).clamp(0.0, 1.0))
        } else if self.global && x < self.ni as f64 {
            (self.ni - 1, 0, x - last)
        } else if x > 360.0 / self.dlon_deg - EDGE {
            // Just below a whole turn: the first column, seen from the west.
            (0, 1, 0.0)
        } else {
            return None;
        };
        let j0 = (y.max(0.0).floor() as usize).min(self.nj - 2);
        let ty = (y - j0 as f64).clamp(0.0, 1.0);
        let at = |j: usize, i: usize| self.data_index[j * self.ni + i];
        Some([
            (at(j0, i0), (1.0 - tx) * (1.0 - ty)),
            (at(j0, i1), tx * (1.0 - ty)),
            (at(j0 + 1, i0), (1.0 - tx) * ty),
            (at(j0 + 1, i1), tx * ty),
        ])
    }
}

/// Applies bilinear weights to values in file order; NaN where any needed value is
/// missing.
#[must_use]
pub fn interpolate(weights: &Weights, values: &[f32]) -> f64 {
    weights
        .iter()
        .map(|&(k, w)| {
            let v = f64::from(values.get(k).copied().unwrap_or(f32::NAN));
            // A zero weight must not let a missing neighbour spoil the sum.
            if w == 0.0 { 0.0 } else { v * w }
        })
        .sum()
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    /// North-to-south rows, longitudes 0–360: the usual global-model layout.
    fn n_to_s() -> (RegularGrid, Vec<f32>) {
        let mut pts = vec![];
        let mut vals = vec![];
        for j in 0..3 {
            let lat = 40.0 - f64::from(j);
            for i in 0..4 {
                let lon = 235.0 + f64::from(i);
                pts.push((lat, lon));
                vals.push((lat * 10.0 + lon) as f32);
            }
        }
        (RegularGrid::from_points(&pts, 4, 3).expect("regular"), vals)
    }

    #[test]
    fn bilinear_reproduces_a_plane_in_either_longitude_convention() {
        let (g, vals) = n_to_s();
        for lon in [-123.25, 236.75] {
            let w = g.weights(LatLon::new(38.5, lon)).expect("inside");
            assert_abs_diff_eq!(interpolate(&w, &vals), 385.0 + 236.75, epsilon = 1e-3);
        }
        let corner = g.weights(LatLon::new(40.0, -122.0)).expect("on the edge");
        assert_abs_diff_eq!(interpolate(&corner, &vals), 400.0 + 238.0, epsilon = 1e-3);
        assert!(g.weights(LatLon::new(41.0, -123.0)).is_none());
        assert!(g.weights(LatLon::new(39.0, -121.5)).is_none());
    }

    #[test]
    fn global_grid_wraps_across_the_seam() {
        let mut pts = vec![];
        for j in 0..2 {
            for i in 0..4 {
                pts.push((f64::from(j), f64::from(i) * 90.0));
            }
        }
        let g = RegularGrid::from_points(&pts, 4, 2).expect("regular");
        let vals: Vec<f32> = pts
            .iter()
            .map(|p| if (p.1 - 270.0).abs() < 1e-9 { 1.0 } else { 0.0 })
            .collect();
        let w = g.weights(LatLon::new(0.5, -45.0)).expect("wraps");
        assert_abs_diff_eq!(interpolate(&w, &vals), 0.5, epsilon = 1e-9);
    }

    #[test]
    fn irregular_grids_are_refused() {
        let pts = [
            (0.0, 0.0),
            (0.0, 1.0),
            (0.0, 3.0),
            (1.0, 0.0),
            (1.0, 1.0),
            (1.0, 3.0),
        ];
        assert_eq!(
            RegularGrid::from_points(&pts, 3, 2).unwrap_err(),
            "the longitudes are not evenly spaced: expected a regular latitude/longitude grid"
        );
    }
}
