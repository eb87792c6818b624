//! The sea state along the way to each stretch: from a wave forecast where one is given,
//! else an estimate of the local wind sea from the wind and the fetch (Shore Protection
//! Manual, CERC 1984), never presented as a forecast.

use crate::coast::{FETCH_CAP_M, FETCH_DIRECTIONS, Land, LatLon, fetch_m};
use crate::physics::{Wind, wind_sea};
use std::collections::HashMap;
use std::sync::Mutex;

/// Points closer than this share a fetch table, degrees of latitude and longitude
/// (about 5 km): the fetch changes little over that, and the land is probed once.
const FETCH_CELL_DEG: f64 = 0.05;

/// The longest a wind is counted as having blown (a sea this old is well developed
/// for the fetches and winds a small boat works in), hours.
const MAX_DURATION_H: usize = 72;

/// A wind that turns by more than this starts a new sea, degrees.
const SAME_WIND_DEG: f64 = 45.0;

/// Fetches by cell and direction, each measured on first use (a cell sees few wind
/// directions in a forecast).
/// Wave height (m) and, where known, period (s) at one hour.
pub(super) type SeaAt = (f64, Option<f64>);

pub(super) struct FetchCache<'a> {
    land: &'a Land,
    /// Shared by the threads that estimate the sea at many points at once: cells are
    /// spread over a few locks; a fetch two threads both miss is measured twice, to
    /// the same value.
    shards: Vec<Mutex<FetchTables>>,
}

type FetchTables = HashMap<(i64, i64), [Option<f64>; FETCH_DIRECTIONS]>;

/// How many locks the fetch tables are spread over.
const FETCH_SHARDS: i64 = 64;

impl<'a> FetchCache<'a> {
    pub(super) fn new(land: &'a Land) -> Self {
        Self {
            land,
            shards: (0..FETCH_SHARDS)
                .map(|_| Mutex::new(HashMap::new()))
                .collect(),
        }
    }

    /// The cell of a point, and the lock its fetches are kept under.
    fn cell(&self, p: LatLon) -> ((i64, i64), &Mutex<FetchTables>) {
        let key = (
            (p.lat_deg / FETCH_CELL_DEG).round() as i64,
            (p.lon_deg / FETCH_CELL_DEG).round() as i64,
        );
        let shard = usize::try_from(
            key.0
                .wrapping_mul(7919)
                .wrapping_add(key.1)
                .rem_euclid(FETCH_SHARDS),
        )
        .unwrap_or(0);
        (key, &self.shards[shard])
    }

    /// The fetch in a cell for a wind from `from_deg`, to the nearest of the sixteen
    /// directions, m: from `row` (the cell's fetches known so far, filled in here).
    fn fetch_m(
        &self,
        (key, tables): ((i64, i64), &Mutex<FetchTables>),
        row: &mut [Option<f64>; FETCH_DIRECTIONS],
        from_deg: f64,
    ) -> f64 {
        let step = 360.0 / FETCH_DIRECTIONS as f64;
        let k = (from_deg.rem_euclid(360.0) / step).round() as usize % FETCH_DIRECTIONS;
        if let Some(fetch) = row[k] {
            return fetch;
        }
        let centre = LatLon::new(key.0 as f64 * FETCH_CELL_DEG, key.1 as f64 * FETCH_CELL_DEG);
        let fetch = fetch_m(self.land, centre, k as f64 * step, FETCH_CAP_M);
        row[k] = Some(fetch);
        if let Ok(mut t) = tables.lock() {
            t.entry(key).or_insert([None; FETCH_DIRECTIONS])[k] = Some(fetch);
        }
        fetch
    }

    /// The estimated wind sea at a point for each hour of an hourly wind series (`None`
    /// where the wind is missing): height, m, and peak period, s. The duration is how
    /// long the wind has blown from within 45° of its present direction, up to 72 hours.
    pub(super) fn wind_sea_m(&self, p: LatLon, winds: &[Option<Wind>]) -> Vec<Option<SeaAt>> {
        let mut out = Vec::with_capacity(winds.len());
        // The point's cell's fetches, looked up once for all its hours.
        let cell = self.cell(p);
        let mut row = cell
            .1
            .lock()
            .ok()
            .and_then(|t| t.get(&cell.0).copied())
            .unwrap_or([None; FETCH_DIRECTIONS]);
        let mut run = 0usize;
        let mut last_dir: Option<f64> = None;
        for w in winds {
            let Some(w) = w else {
                run = 0;
                last_dir = None;
                out.push(None);
                continue;
            };
            let dir = w.direction_from_deg();
            let turned = match (dir, last_dir) {
                (Some(d), Some(l)) => {
                    let diff = (d - l).rem_euclid(360.0);
                    diff.min(360.0 - diff) > SAME_WIND_DEG
                }
                _ => true,
            };
            run = if turned {
                1
            } else {
                (run + 1).min(MAX_DURATION_H)
            };
            if turned {
                last_dir = dir;
            }
            let sea = dir.map(|d| {
                wind_sea(
                    w.speed_m_s(),
                    self.fetch_m(cell, &mut row, d),
                    run as f64 * 3600.0,
                )
            });
            out.push(Some(sea.map_or((0.0, None), |s| {
                (s.height_m, (s.period_s > 0.0).then_some(s.period_s))
            })));
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// An onshore 10 m/s westerly off the demo coast (38.4°N 123.2°W): the whole ocean
    /// upwind, counted as the 200 km cap, so after 72 hours the sea is fetch-limited at
    /// 1.6e-3 (g F / U_A^2)^(1/2) U_A^2 / g = 2.75 m with U_A = 0.71 × 10^1.23 = 12.06
    /// m/s (SPM 1984, by hand); in the first hour it is duration-limited and far lower.
    /// An offshore easterly has a few kilometres of fetch: a small sea.
    #[test]
    fn onshore_sea_builds_offshore_sea_stays_small() {
        let cache = FetchCache::new(Land::bundled());
        let at = LatLon::new(38.4, -123.2);
        let west = vec![Some(Wind::from_speed_direction(10.0, 270.0)); 80];
        let sea = cache.wind_sea_m(at, &west);
        let first = sea[0].expect("wind").0;
        let last = sea[79].expect("wind").0;
        assert!(first < 1.0, "{first}");
        assert!((last - 2.75).abs() < 0.02, "{last}");
        let east = vec![Some(Wind::from_speed_direction(10.0, 90.0)); 80];
        let small = cache.wind_sea_m(at, &east)[79].expect("wind").0;
        assert!(small < 0.8, "{small}");
    }
}
