//! The grids of GRIB2 messages (section 3) and how a requested point is sampled on them.
//!
//! Read: regular latitude/longitude (template 3.0), rotated latitude/longitude (3.1),
//! Mercator (3.10), polar stereographic (3.20), Lambert conformal with one or two
//! standard parallels (3.30) and regular Gaussian (3.40), on the shape of the Earth the
//! template gives (Code Table 3.2). A requested point is placed in the grid by projecting
//! it forward (see `projection.rs`) to a fractional row and column; it is then sampled
//! bilinearly in grid space. Grid points' own positions are never computed.
//!
//! Flag table 3.4 gives the scan order: bit 1 (0x80) points scan in −i (westward, −x),
//! bit 2 (0x40) rows run in +j (south to north, +y), bit 3 (0x20) columns are
//! consecutive, bit 4 (0x10) every other row runs backward. Rows and columns here count
//! in scan order: row 0 and column 0 are at the first grid point.
//!
//! Flag table 3.3, bit 5 (0x08): u and v are given along the grid's x and y axes instead
//! of east and north; [`GribGrid::north_angle_rad`] gives the angle that turns them back.

use super::grib2::{signed_i32, u16_at, u32_at};
use super::projection::{Earth, Projection, RotatedPole, gaussian_latitudes_shared};
use crate::coast::LatLon;

/// Four data positions and their bilinear weights.
pub type Weights = [(usize, f64); 4];

/// Why a grid definition section cannot be used.
#[derive(Debug)]
pub(super) enum GridError {
    /// A grid template the tool does not read (the number is given).
    Unsupported(u16),
    /// A grid that is damaged, or uses an option the tool does not read.
    Bad(String),
}

/// The name of a grid definition template (Code Table 3.1) in messages.
pub(super) fn grid_template_name(t: u16) -> &'static str {
    match t {
        0 => "regular latitude/longitude",
        1 => "rotated latitude/longitude",
        10 => "Mercator",
        20 => "polar stereographic",
        30 => "Lambert conformal",
        40 => "regular Gaussian",
        50..=53 => "spectral",
        90 => "space view",
        101 => "unstructured",
        _ => "other",
    }
}

/// The largest grid read, points: a damaged or hostile size must not make the decoder
/// allocate gigabytes (a 0.1° global grid has 6.5 million points).
pub const MAX_GRID_POINTS: usize = 100_000_000;

/// The templates read, as a sentence for "not supported" messages.
pub(super) const TEMPLATES_READ: &str = "regular latitude/longitude (template 3.0), rotated latitude/longitude (3.1), Mercator (3.10), polar stereographic (3.20), Lambert conformal (3.30) and regular Gaussian (3.40)";

/// Where a point lies in the grid, before the scan order is applied.
#[derive(Debug, Clone, PartialEq)]
enum Placement {
    /// Columns along longitude, rows along latitude, evenly spaced (degrees, signed
    /// steps in scan order).
    LatLon {
        la1_deg: f64,
        lo1_deg: f64,
        dlat_deg: f64,
        dlon_deg: f64,
    },
    /// The same in a rotated frame.
    Rotated {
        pole: RotatedPole,
        la1_deg: f64,
        lo1_deg: f64,
        dlat_deg: f64,
        dlon_deg: f64,
    },
    /// Evenly spaced columns; rows on the Gaussian latitudes, in scan order.
    Gaussian {
        rows_deg: Vec<f64>,
        lo1_deg: f64,
        dlon_deg: f64,
    },
    /// A map projection: the first point at (`x1_m`, `y1_m`), signed steps in scan order.
    Projected {
        projection: Projection,
        x1_m: f64,
        y1_m: f64,
        dx_m: f64,
        dy_m: f64,
    },
}

/// A GRIB2 grid as the file scans it.
#[derive(Debug, Clone, PartialEq)]
pub struct GribGrid {
    /// Grid definition template number (Code Table 3.1).
    pub template: u16,
    /// Number of columns (points along the grid's x axis or a parallel).
    pub ni: usize,
    /// Number of rows.
    pub nj: usize,
    placement: Placement,
    /// The Earth the grid is defined on.
    pub earth: Earth,
    /// Flag table 3.3 bit 5: u and v are along the grid's axes.
    pub uv_relative_to_grid: bool,
    columns_consecutive: bool,
    alternate: bool,
}

/// Scaled value `value × 10^−factor` of a template, `None` when either is "missing".
fn scaled(factor: u8, value: u32) -> Option<f64> {
    (factor != 0xff && value != 0xffff_ffff)
        .then(|| f64::from(value) * 10f64.powi(-i32::from(factor)))
}

/// The shape of the Earth (Code Table 3.2) from octets 15–30 of section 3.
fn earth_of(s3: &[u8]) -> Result<Earth, GridError> {
    let shape = s3[14];
    let radius = scaled(s3[15], u32_at(s3, 16));
    let major = scaled(s3[20], u32_at(s3, 21));
    let minor = scaled(s3[25], u32_at(s3, 26));
    let given = |what: &str, v: Option<f64>| {
        v.filter(|x| *x > 0.0).ok_or_else(|| {
            GridError::Bad(format!(
                "the shape of the Earth (code {shape} of Code Table 3.2) needs the {what}, which the grid does not give"
            ))
        })
    };
    Ok(match shape {
        0 => Earth::sphere(6_367_470.0),
        1 => Earth::sphere(given("radius", radius)?),
        2 => Earth::from_flattening(6_378_160.0, 297.0),
        3 => Earth::from_axes(
            given("major axis", major)? * 1000.0,
            given("minor axis", minor)? * 1000.0,
        ),
        4 => Earth::from_flattening(6_378_137.0, 298.257_222_101),
        5 | 10 => Earth::wgs84(),
        6 => Earth::sphere(6_371_229.0),
        7 => Earth::from_axes(given("major axis", major)?, given("minor axis", minor)?),
        8 => Earth::sphere(6_371_200.0),
        9 => Earth::from_axes(6_377_563.396, 6_356_256.909),
        code => {
            return Err(GridError::Bad(format!(
                "the shape of the Earth code {code} (Code Table 3.2) is not supported"
            )));
        }
    })
}

/// The octets each template needs.
fn template_len(template: u16) -> Option<usize> {
    match template {
        0 | 10 | 40 => Some(72),
        1 => Some(84),
        20 => Some(65),
        30 => Some(81),
        _ => None,
    }
}

impl GribGrid {
    /// Reads the grid from a grid definition section (section 3).
    pub(super) fn parse(s3: &[u8]) -> Result<Self, GridError> {
        let bad = |p: String| GridError::Bad(p);
        if s3.len() < 14 {
            return Err(bad("grid definition section is cut short".into()));
        }
        let template = u16_at(s3, 12);
        let need = template_len(template).ok_or(GridError::Unsupported(template))?;
        if s3.len() < need {
            return Err(bad(format!(
                "grid definition template 3.{template} is cut short ({} of {need} octets)",
                s3.len()
            )));
        }
        if s3[5] != 0 {
            return Err(bad(format!(
                "grid source {} (Code Table 3.0) is not a grid definition template",
                s3[5]
            )));
        }
        let (ni, nj) = (u32_at(s3, 30) as usize, u32_at(s3, 34) as usize);
        let declared = u32_at(s3, 6) as usize;
        if ni == 0 || nj == 0 || ni.checked_mul(nj) != Some(declared) || u32_at(s3, 30) == !0 {
            return Err(bad(format!(
                "grid of {ni} × {nj} points does not match its {declared} data points: quasi-regular (reduced) grids are not supported"
            )));
        }
        if declared > MAX_GRID_POINTS {
            return Err(bad(format!(
                "grid of {ni} × {nj} = {declared} points is larger than the tool reads (at most {MAX_GRID_POINTS}; the largest global forecasts have about 7 million)"
            )));
        }
        if ni < 2 || nj < 2 {
            return Err(bad(format!(
                "grid of {ni} × {nj} points: at least two rows and two columns are needed to interpolate"
            )));
        }
        let (flags, scan) = match template {
            0 | 1 | 40 => (s3[54], s3[71]),
            10 => (s3[46], s3[59]),
            _ => (s3[46], s3[64]),
        };
        let earth = earth_of(s3)?;
        let placement = match template {
            0 | 1 | 40 => latlon_placement(s3, template, ni, nj, scan)?,
            _ => projected_placement(s3, template, ni, scan, earth)?,
        };
        Ok(Self {
            template,
            ni,
            nj,
            placement,
            earth,
            uv_relative_to_grid: flags & 0x08 != 0,
            columns_consecutive: scan & 0x20 != 0,
            alternate: scan & 0x10 != 0,
        })
    }

    /// Number of grid points.
    #[must_use]
    pub fn len(&self) -> usize {
        self.ni * self.nj
    }

    /// A one-line description: template, size, Earth.
    #[must_use]
    pub fn describe(&self) -> String {
        let earth = if self.earth.is_sphere() {
            format!("sphere of radius {:.0} m", self.earth.a_m)
        } else {
            format!(
                "ellipsoid a = {:.3} m, e = {:.8}",
                self.earth.a_m, self.earth.e
            )
        };
        format!(
            "{} grid (template 3.{}), {} × {} points, {earth}{}",
            grid_template_name(self.template),
            self.template,
            self.ni,
            self.nj,
            if self.uv_relative_to_grid {
                ", u/v along the grid's axes"
            } else {
                ""
            }
        )
    }

    /// Row and column (scan order) of the `k`-th value.
    #[must_use]
    pub fn row_col(&self, k: usize) -> (usize, usize) {
        let (ni, nj) = (self.ni, self.nj);
        let (mut row, mut col) = if self.columns_consecutive {
            (k % nj, k / nj)
        } else {
            (k / ni, k % ni)
        };
        if self.alternate {
            if self.columns_consecutive && col % 2 == 1 {
                row = nj - 1 - row;
            } else if !self.columns_consecutive && row % 2 == 1 {
                col = ni - 1 - col;
            }
        }
        (row, col)
    }

    /// Position of the value at `row`, `col` (scan order) in the data.
    #[must_use]
    pub fn data_index(&self, row: usize, col: usize) -> usize {
        let (ni, nj) = (self.ni, self.nj);
        if self.columns_consecutive {
            let row = if self.alternate && col % 2 == 1 {
                nj - 1 - row
            } else {
                row
            };
            col * nj + row
        } else {
            let col = if self.alternate && row % 2 == 1 {
                ni - 1 - col
            } else {
                col
            };
            row * ni + col
        }
    }

    /// The step between columns of a grid whose columns follow longitude, degrees.
    fn lon_step(&self) -> Option<f64> {
        match &self.placement {
            Placement::LatLon { dlon_deg, .. }
            | Placement::Rotated { dlon_deg, .. }
            | Placement::Gaussian { dlon_deg, .. } => Some(*dlon_deg),
            Placement::Projected { .. } => None,
        }
    }

    /// Whether the grid has no points (never true for a parsed grid).
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Whether the columns go all the way round, so the last neighbours the first.
    #[must_use]
    pub fn is_global(&self) -> bool {
        self.lon_step().is_some_and(|d| {
            let step = d.abs();
            step > 0.0 && (step * self.ni as f64 - 360.0).abs() < step * 0.5
        })
    }

    /// Fractional row and column (scan order) of `p`, in grid steps from the first
    /// point; `None` where the grid's projection cannot place it. On grids whose columns
    /// follow longitude the column is taken modulo 360° and lies in
    /// `-1.5 .. 360°/step - 1.5`, so a point just before the first column (across the
    /// seam of a global grid) has a small negative column.
    #[must_use]
    pub fn fractional_row_col(&self, p: LatLon) -> Option<(f64, f64)> {
        let along = |lon: f64, lo1: f64, dlon: f64| {
            let step = dlon.abs();
            if step == 0.0 {
                return 0.0;
            }
            let d = if dlon > 0.0 { lon - lo1 } else { lo1 - lon };
            let turn = 360.0 / step;
            let col = d.rem_euclid(360.0) / step;
            if col > turn - 1.5 { col - turn } else { col }
        };
        let rc = match &self.placement {
            Placement::LatLon {
                la1_deg,
                lo1_deg,
                dlat_deg,
                dlon_deg,
            } => (
                (p.lat_deg - la1_deg) / dlat_deg,
                along(p.lon_deg, *lo1_deg, *dlon_deg),
            ),
            Placement::Rotated {
                pole,
                la1_deg,
                lo1_deg,
                dlat_deg,
                dlon_deg,
            } => {
                let (lat, lon) = pole.to_rotated(p.lat_deg, p.lon_deg);
                ((lat - la1_deg) / dlat_deg, along(lon, *lo1_deg, *dlon_deg))
            }
            Placement::Gaussian {
                rows_deg,
                lo1_deg,
                dlon_deg,
            } => (
                fractional_index(rows_deg, p.lat_deg),
                along(p.lon_deg, *lo1_deg, *dlon_deg),
            ),
            Placement::Projected {
                projection,
                x1_m,
                y1_m,
                dx_m,
                dy_m,
            } => {
                let (x, y) = projection.forward(p.lat_deg, p.lon_deg)?;
                ((y - y1_m) / dy_m, (x - x1_m) / dx_m)
            }
        };
        (rc.0.is_finite() && rc.1.is_finite()).then_some(rc)
    }

    /// Latitude and longitude of a (fractional) row and column in scan order: used to
    /// tell the area a grid covers, never to sample it.
    #[must_use]
    pub fn position(&self, row: f64, col: f64) -> Option<LatLon> {
        let (lat, lon) = match &self.placement {
            Placement::LatLon {
                la1_deg,
                lo1_deg,
                dlat_deg,
                dlon_deg,
            } => (la1_deg + row * dlat_deg, lo1_deg + col * dlon_deg),
            Placement::Rotated {
                pole,
                la1_deg,
                lo1_deg,
                dlat_deg,
                dlon_deg,
            } => pole.to_geographic(la1_deg + row * dlat_deg, lo1_deg + col * dlon_deg),
            Placement::Gaussian {
                rows_deg,
                lo1_deg,
                dlon_deg,
            } => {
                let j = row.floor().clamp(0.0, (rows_deg.len() - 1) as f64) as usize;
                let next = rows_deg.get(j + 1).copied().unwrap_or(rows_deg[j]);
                (
                    rows_deg[j] + (row - j as f64) * (next - rows_deg[j]),
                    lo1_deg + col * dlon_deg,
                )
            }
            Placement::Projected {
                projection,
                x1_m,
                y1_m,
                dx_m,
                dy_m,
            } => projection.inverse(x1_m + col * dx_m, y1_m + row * dy_m)?,
        };
        Some(LatLon::new(lat, (lon + 180.0).rem_euclid(360.0) - 180.0))
    }

    /// The area the grid covers: the smallest and largest latitude and longitude (±180°,
    /// west to east; a west edge east of the east edge means the area spans 180°) of
    /// points along its edges, walked once round so that longitudes unwrap.
    #[must_use]
    pub fn area(&self) -> Option<(LatLon, LatLon)> {
        let (ni, nj) = ((self.ni - 1) as f64, (self.nj - 1) as f64);
        let steps = 256;
        let f = |k: usize| k as f64 / steps as f64;
        let ring: Vec<LatLon> = (0..steps)
            .map(|k| (0.0, f(k) * ni))
            .chain((0..steps).map(|k| (f(k) * nj, ni)))
            .chain((0..steps).map(|k| (nj, (1.0 - f(k)) * ni)))
            .chain((0..steps).map(|k| ((1.0 - f(k)) * nj, 0.0)))
            .filter_map(|(row, col)| self.position(row, col))
            .collect();
        let first = ring.first()?;
        let (mut south, mut north) = (first.lat_deg, first.lat_deg);
        let (mut lon, mut west, mut east) = (first.lon_deg, first.lon_deg, first.lon_deg);
        for w in ring.windows(2) {
            south = south.min(w[1].lat_deg);
            north = north.max(w[1].lat_deg);
            lon += (w[1].lon_deg - w[0].lon_deg + 180.0).rem_euclid(360.0) - 180.0;
            west = west.min(lon);
            east = east.max(lon);
        }
        if self.is_global() || east - west >= 359.0 {
            return Some((LatLon::new(south, -180.0), LatLon::new(north, 180.0)));
        }
        let wrap = |x: f64| (x + 180.0).rem_euclid(360.0) - 180.0;
        Some((
            LatLon::new(south, wrap(west)),
            LatLon::new(north, wrap(east)),
        ))
    }

    /// Bilinear weights (in grid space) of the four grid values around `p`, or `None`
    /// when `p` is outside the grid. A global grid wraps across its seam.
    #[must_use]
    pub fn weights(&self, p: LatLon) -> Option<Weights> {
        const EDGE: f64 = 1e-9;
        let (row, col) = self.fractional_row_col(p)?;
        let (ni, nj) = (self.ni, self.nj);
        if !(-EDGE..=(nj - 1) as f64 + EDGE).contains(&row) {
            return None;
        }
        let last = (ni - 1) as f64;
        let (i0, i1, tx) = if (-EDGE..=last + EDGE).contains(&col) {
            let i0 = (col.max(0.0).floor() as usize).min(ni - 2);
            (i0, i0 + 1, (col - i0 as f64).clamp(0.0, 1.0))
        } else if self.is_global() && col > last && col < ni as f64 {
            (ni - 1, 0, col - last)
        } else if self.is_global() && col < 0.0 && col > -1.0 {
            (ni - 1, 0, col + 1.0)
        } else {
            return None;
        };
        let j0 = (row.max(0.0).floor() as usize).min(nj - 2);
        let ty = (row - j0 as f64).clamp(0.0, 1.0);
        let at = |j: usize, i: usize| self.data_index(j, i);
        Some([
            (at(j0, i0), (1.0 - tx) * (1.0 - ty)),
            (at(j0, i1), tx * (1.0 - ty)),
            (at(j0 + 1, i0), (1.0 - tx) * ty),
            (at(j0 + 1, i1), tx * ty),
        ])
    }

    /// The angle from the grid's y axis clockwise to true north at `p`, radians: what
    /// turns u and v given along the grid's axes into east and north (see
    /// [`super::projection::grid_to_earth`]). Zero on grids whose axes are east and north.
    #[must_use]
    pub fn north_angle_rad(&self, p: LatLon) -> f64 {
        match &self.placement {
            Placement::LatLon { .. } | Placement::Gaussian { .. } => 0.0,
            Placement::Rotated { pole, .. } => pole.north_angle_rad(p.lat_deg, p.lon_deg),
            Placement::Projected { projection, .. } => projection.north_angle_rad(p.lon_deg),
        }
    }
}

/// Fractional position of `x` in `values` (monotonic, either direction), linear between
/// neighbours and extrapolated linearly beyond the ends.
fn fractional_index(values: &[f64], wanted: f64) -> f64 {
    let count = values.len();
    if count < 2 {
        return f64::NAN;
    }
    let ascending = values[count - 1] > values[0];
    let after = values
        .partition_point(|&v| if ascending { v < wanted } else { v > wanted })
        .clamp(1, count - 1);
    let (below, above) = (values[after - 1], values[after]);
    (after - 1) as f64 + (wanted - below) / (above - below)
}

/// Columns along longitude: templates 3.0, 3.1 and 3.40.
fn latlon_placement(
    s3: &[u8],
    template: u16,
    ni: usize,
    nj: usize,
    scan: u8,
) -> Result<Placement, GridError> {
    let (basic, subdivisions) = (u32_at(s3, 38), u32_at(s3, 42));
    let unit_deg = if basic == 0 || basic == !0 || subdivisions == 0 || subdivisions == !0 {
        1e-6
    } else {
        f64::from(basic) / f64::from(subdivisions)
    };
    let angle = |at: usize| signed_i32(u32_at(s3, at)) as f64 * unit_deg;
    let (la1, lo1, la2, lo2) = (angle(46), angle(50), angle(55), angle(59));
    let (west, north_up) = (scan & 0x80 != 0, scan & 0x40 != 0);
    if (la2 > la1) != north_up {
        return Err(GridError::Bad(format!(
            "first and last latitudes ({la1}, {la2}) disagree with the scanning mode {scan:#04x}"
        )));
    }
    let span = if west {
        (lo1 - lo2).rem_euclid(360.0)
    } else {
        (lo2 - lo1).rem_euclid(360.0)
    };
    let dlon = span / (ni - 1) as f64 * if west { -1.0 } else { 1.0 };
    let dlat = (la2 - la1) / (nj - 1) as f64;
    Ok(match template {
        1 => {
            let pole = RotatedPole {
                south_pole_lat_deg: angle(72),
                south_pole_lon_deg: angle(76),
            };
            let rotation = f32::from_bits(u32_at(s3, 80));
            if rotation != 0.0 && rotation.is_finite() {
                return Err(GridError::Bad(format!(
                    "a rotated grid with an angle of rotation of {rotation}° is not supported (only 0°)"
                )));
            }
            Placement::Rotated {
                pole,
                la1_deg: la1,
                lo1_deg: lo1,
                dlat_deg: dlat,
                dlon_deg: dlon,
            }
        }
        40 => Placement::Gaussian {
            rows_deg: gaussian_rows(u32_at(s3, 67) as usize, la1, nj, north_up)?,
            lo1_deg: lo1,
            dlon_deg: dlon,
        },
        _ => Placement::LatLon {
            la1_deg: la1,
            lo1_deg: lo1,
            dlat_deg: dlat,
            dlon_deg: dlon,
        },
    })
}

/// The finest Gaussian grid read (template 3.40's N, parallels between a pole and the
/// equator).
pub const MAX_GAUSSIAN_N: usize = 4000;

/// The latitudes of the `nj` rows of a Gaussian grid with `n` parallels per hemisphere
/// whose first row is at `la1`, in scan order.
fn gaussian_rows(n: usize, la1: f64, nj: usize, north_up: bool) -> Result<Vec<f64>, GridError> {
    // The finest Gaussian grids in operational use have N of one or two thousand
    // (from memory); their latitudes cost O(N²) to find, 0.1 s at the limit.
    if n > MAX_GAUSSIAN_N {
        return Err(GridError::Bad(format!(
            "a Gaussian grid with N = {n} parallels between a pole and the equator is finer than the {MAX_GAUSSIAN_N} Shelfwind reads"
        )));
    }
    if n == 0 || nj > 2 * n {
        return Err(GridError::Bad(format!(
            "a Gaussian grid of {nj} rows with N = {n} parallels between a pole and the equator is not possible"
        )));
    }
    let all = gaussian_latitudes_shared(n);
    let (first, _) = all
        .iter()
        .enumerate()
        .map(|(k, l)| (k, (l - la1).abs()))
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .unwrap_or((0, f64::INFINITY));
    // Latitudes are stored to 10⁻⁶°, often rounded to 10⁻³°.
    if (all[first] - la1).abs() > 2e-3 {
        return Err(GridError::Bad(format!(
            "the first latitude {la1}° is not a latitude of the N = {n} Gaussian grid"
        )));
    }
    let rows: Vec<f64> = if north_up {
        (0..nj)
            .filter_map(|k| first.checked_sub(k).map(|i| all[i]))
            .collect()
    } else {
        all.iter().skip(first).take(nj).copied().collect()
    };
    if rows.len() != nj {
        return Err(GridError::Bad(format!(
            "{nj} rows from {la1}° run past the pole of the N = {n} Gaussian grid"
        )));
    }
    Ok(rows)
}

/// Grids on a map projection: templates 3.10, 3.20 and 3.30. Lengths are stored in
/// millimetres, angles in micro-degrees.
fn projected_placement(
    s3: &[u8],
    template: u16,
    ni: usize,
    scan: u8,
    earth: Earth,
) -> Result<Placement, GridError> {
    let deg = |at: usize| signed_i32(u32_at(s3, at)) as f64 * 1e-6;
    let mm = |at: usize| f64::from(u32_at(s3, at)) * 1e-3;
    let (la1, lo1, lad) = (deg(38), deg(42), deg(47));
    let (projection, dx, dy) = match template {
        10 => {
            let orientation = deg(60);
            if orientation != 0.0 {
                return Err(GridError::Bad(format!(
                    "a Mercator grid turned by {orientation}° is not supported (only 0°)"
                )));
            }
            // Centre the projection on the middle of the grid so that the longitudes of
            // a wide grid never wrap inside it.
            let (di, dj) = (mm(64), mm(68));
            // Map metres per radian of longitude, as `Projection::mercator` takes them.
            let scale_m = earth.a_m * earth.m(lad.to_radians());
            let half = (di * (ni - 1) as f64 / 2.0 / scale_m).to_degrees();
            let centre = if scan & 0x80 != 0 {
                lo1 - half
            } else {
                lo1 + half
            };
            (Projection::mercator(earth, lad, centre), di, dj)
        }
        20 => {
            let south = s3[63] & 0x80 != 0;
            (
                Projection::polar_stereographic(earth, south, lad, deg(51)),
                mm(55),
                mm(59),
            )
        }
        _ => {
            if s3[63] & 0x40 != 0 {
                return Err(GridError::Bad(
                    "a bipolar Lambert conformal grid (projection centre flag bit 2) is not supported".into(),
                ));
            }
            let projection =
                Projection::lambert(earth, deg(65), deg(69), deg(51)).map_err(GridError::Bad)?;
            (projection, mm(55), mm(59))
        }
    };
    if !(dx > 0.0 && dy > 0.0) {
        return Err(GridError::Bad(format!(
            "grid lengths Dx = {dx} m, Dy = {dy} m: expected positive lengths"
        )));
    }
    let (x1, y1) = projection.forward(la1, lo1).ok_or_else(|| {
        GridError::Bad(format!(
            "the first grid point {la1}°, {lo1}° cannot be placed on the grid's projection"
        ))
    })?;
    Ok(Placement::Projected {
        projection,
        x1_m: x1,
        y1_m: y1,
        dx_m: if scan & 0x80 != 0 { -dx } else { dx },
        dy_m: if scan & 0x40 != 0 { dy } else { -dy },
    })
}

/// How one requested point is sampled on one grid.
#[derive(Debug, Clone, PartialEq)]
pub(super) struct PointRule {
    /// Bilinear weights, `None` outside the grid.
    pub(super) bilinear: Option<Weights>,
    /// Distances (grid steps) and data positions of the grid points within
    /// [`NEAREST_CELLS`] of the point, nearest first: where the value is taken from when
    /// a bilinear corner is missing.
    pub(super) nearby: Vec<(f64, usize)>,
}

/// Grid points whose distances differ by less than this (grid steps) are equally near.
const TIE_CELLS: f64 = 1e-6;

/// How far (in grid steps) a point looks for the nearest valued grid point when a
/// bilinear corner is missing (land in a wave field, a masked point in any field).
pub const NEAREST_CELLS: f64 = 1.5;

/// How far (in grid steps) a sea-temperature probe that falls on masked land looks for
/// the nearest sea value, in every gridded reader (README, "Checking against the sea
/// temperature").
pub const SEA_PROBE_CELLS: f64 = 1.0;

/// The grid points within [`NEAREST_CELLS`] of `p`, as distances in grid steps and data
/// positions, nearest first.
pub(super) fn nearby_points(grid: &GribGrid, p: LatLon) -> Vec<(f64, usize)> {
    let Some((row, col)) = grid.fractional_row_col(p) else {
        return Vec::new();
    };
    // Grid sizes come from 32-bit fields, so they fit.
    let nj = i64::try_from(grid.nj).unwrap_or(i64::MAX);
    let ni = i64::try_from(grid.ni).unwrap_or(i64::MAX);
    let mut found: Vec<(f64, usize)> = Vec::new();
    let span = |x: f64| (x - NEAREST_CELLS).ceil() as i64..=(x + NEAREST_CELLS).floor() as i64;
    for j in span(row).filter(|j| (0..nj).contains(j)) {
        for i in span(col) {
            let distance = (row - j as f64).hypot(col - i as f64);
            let column = if grid.is_global() {
                i.rem_euclid(ni)
            } else if (0..ni).contains(&i) {
                i
            } else {
                continue;
            };
            if distance <= NEAREST_CELLS + 1e-9 {
                found.push((distance, grid.data_index(j as usize, column as usize)));
            }
        }
    }
    found.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
    // A global grid narrower than four columns could list a point twice.
    let mut seen = std::collections::HashSet::new();
    found.retain(|f| seen.insert(f.1));
    found
}

impl PointRule {
    /// The rule for `p` on `grid`.
    pub(super) fn new(grid: &GribGrid, p: LatLon) -> Self {
        let bilinear = grid.weights(p);
        Self {
            bilinear,
            nearby: if bilinear.is_some() {
                nearby_points(grid, p)
            } else {
                Vec::new()
            },
        }
    }

    /// The value at the point from grid values in data order (NaN = missing): bilinear
    /// where every weighted corner has a value, else the nearest value nearby (the mean
    /// of those equally near, so that the answer does not depend on the scan order);
    /// NaN when there is none.
    pub(super) fn sample(&self, values: &[f32]) -> f32 {
        self.sample_within(values, NEAREST_CELLS)
    }

    /// As [`Self::sample`], looking no further than `max_cells` grid steps for the
    /// nearest value.
    pub(super) fn sample_within(&self, values: &[f32], max_cells: f64) -> f32 {
        let Some(weights) = &self.bilinear else {
            return f32::NAN;
        };
        let value = |k: usize| values.get(k).copied().unwrap_or(f32::NAN);
        // The weighted corners summed in order in one pass (from −0, as a float `sum`
        // starts), until a corner with weight lacks a value.
        let mut sum = -0.0;
        let whole = weights.iter().all(|&(k, w)| {
            if w == 0.0 {
                return true;
            }
            let v = value(k);
            sum += f64::from(v) * w;
            v.is_finite()
        });
        if whole {
            return sum as f32;
        }
        let mut valued = self
            .nearby
            .iter()
            .take_while(|&&(d, _)| d <= max_cells + 1e-9)
            .map(|&(d, k)| (d, value(k)))
            .filter(|(_, v)| v.is_finite());
        let Some((nearest, first)) = valued.next() else {
            return f32::NAN;
        };
        let (mut sum, mut count) = (f64::from(first), 1.0);
        for (_, v) in valued.take_while(|(d, _)| *d - nearest < TIE_CELLS) {
            sum += f64::from(v);
            count += 1.0;
        }
        (sum / count) as f32
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A grid definition section, template 3.0, for the scan-order tests.
    pub(crate) fn section3(
        ni: u32,
        nj: u32,
        la1: i32,
        lo1: i32,
        la2: i32,
        lo2: i32,
        scan: u8,
    ) -> Vec<u8> {
        let mut s = vec![0u8; 72];
        s[0..4].copy_from_slice(&72u32.to_be_bytes());
        s[4] = 3;
        s[6..10].copy_from_slice(&(ni * nj).to_be_bytes());
        s[14] = 6;
        s[30..34].copy_from_slice(&ni.to_be_bytes());
        s[34..38].copy_from_slice(&nj.to_be_bytes());
        let signed = |x: i32| {
            let m = x.unsigned_abs();
            if x < 0 { m | 0x8000_0000 } else { m }
        };
        s[46..50].copy_from_slice(&signed(la1).to_be_bytes());
        s[50..54].copy_from_slice(&signed(lo1).to_be_bytes());
        s[55..59].copy_from_slice(&signed(la2).to_be_bytes());
        s[59..63].copy_from_slice(&signed(lo2).to_be_bytes());
        s[71] = scan;
        s
    }

    fn grid(s3: &[u8]) -> GribGrid {
        GribGrid::parse(s3).expect("a valid grid")
    }

    /// `data_index` inverts the scan order for every scanning mode.
    #[test]
    fn data_index_inverts_every_scan_order() {
        for scan in [0x00, 0x40, 0x80, 0xc0, 0x20, 0x60, 0x10, 0x50, 0x30] {
            let (la1, la2) = if scan & 0x40 == 0 {
                (40_000_000, 38_000_000)
            } else {
                (38_000_000, 40_000_000)
            };
            let g = grid(&section3(4, 3, la1, 0, la2, 3_000_000, scan));
            for k in 0..g.len() {
                let (row, col) = g.row_col(k);
                assert_eq!(g.data_index(row, col), k, "scan {scan:#04x}");
            }
        }
    }

    /// Nearest first, within 1.5 steps, across the seam of a global grid.
    #[test]
    fn nearby_points_wrap_on_a_global_grid() {
        // 8 columns of 45°: global; 3 rows 10°N, 0°, 10°S (north to south).
        let g = grid(&section3(8, 3, 10_000_000, 0, -10_000_000, 315_000_000, 0));
        assert!(g.is_global());
        let near = nearby_points(&g, LatLon::new(0.0, -10.0));
        // Nearest: the 0° column on the equator (row 1, col 0), then 315° (col 7).
        let near: Vec<usize> = near.iter().map(|n| n.1).collect();
        assert_eq!(near[0], g.data_index(1, 0));
        assert_eq!(near[1], g.data_index(1, 7));
        assert!(near.contains(&g.data_index(0, 7)));
        assert!(!near.contains(&g.data_index(1, 6)));
        // The bilinear stencil wraps too: 10° W lies between columns 7 (315°) and 0.
        let w = g.weights(LatLon::new(0.0, -10.0)).expect("wraps");
        assert_eq!(w[0].0, g.data_index(1, 7));
        assert!((w[0].1 - 10.0 / 45.0).abs() < 1e-9);
    }

    #[test]
    fn sampling_falls_back_to_the_nearest_valued_point() {
        // 2 × 2 cell, one corner missing: the nearest valued corner wins.
        let rule = PointRule {
            bilinear: Some([(0, 0.25), (1, 0.25), (2, 0.25), (3, 0.25)]),
            nearby: vec![(0.3, 3), (0.6, 1), (0.6, 2), (0.9, 0)],
        };
        assert!((rule.sample(&[1.0, 2.0, 3.0, 4.0]) - 2.5).abs() < 1e-6);
        // The nearest valued points (1 and 2) are equally near: their mean.
        assert!((rule.sample(&[1.0, 2.0, 3.0, f32::NAN]) - 2.5).abs() < 1e-6);
        assert!((rule.sample(&[1.0, f32::NAN, 3.0, f32::NAN]) - 3.0).abs() < 1e-6);
        assert!(rule.sample(&[f32::NAN; 4]).is_nan());
        // A missing corner with zero weight does not stop the interpolation.
        let edge = PointRule {
            bilinear: Some([(0, 0.5), (1, 0.5), (2, 0.0), (3, 0.0)]),
            nearby: vec![(0.0, 0), (1.0, 1)],
        };
        assert!((edge.sample(&[1.0, 3.0, f32::NAN, f32::NAN]) - 2.0).abs() < 1e-6);
    }

    /// Other templates are named in the refusal; a reduced grid (Ni missing) is refused.
    #[test]
    fn unsupported_templates_are_named() {
        let mut s = section3(4, 3, 40_000_000, 0, 38_000_000, 3_000_000, 0);
        s[12..14].copy_from_slice(&90u16.to_be_bytes());
        assert!(matches!(
            GribGrid::parse(&s),
            Err(GridError::Unsupported(90))
        ));
        let mut s = section3(4, 3, 40_000_000, 0, 38_000_000, 3_000_000, 0);
        s[30..34].copy_from_slice(&u32::MAX.to_be_bytes());
        assert!(matches!(GribGrid::parse(&s), Err(GridError::Bad(_))));
    }

    #[test]
    fn fractional_index_reads_either_direction() {
        assert!((fractional_index(&[10.0, 8.0, 5.0], 6.5) - 1.5).abs() < 1e-12);
        assert!((fractional_index(&[5.0, 8.0, 10.0], 9.0) - 1.5).abs() < 1e-12);
        assert!(fractional_index(&[5.0, 8.0, 10.0], 11.0) > 2.0);
    }
}
