//! The fit of the response model to a catch log, and how far to trust it (README,
//! "Calibrating on a catch log").
//!
//! - Skill is Spearman's rank correlation ρ (Spearman 1904) between the log's CPUE and
//!   the model's expected productivity for the same stretch and day (ties get their mean
//!   rank): CPUE is skewed, and only its order is trusted.
//! - The search is a bounded grid over `lag_peak_days`, `optimum_m3s_per_100m`,
//!   `flush_scale_m3s_per_100m` and `relaxation_bonus` ([`LAG_GRID`] and the others):
//!   every point is scored, so the same search runs on the real log, on every fold and on
//!   every shuffle, and the best is never a local accident of a start point. No crate is
//!   needed for it.
//! - Cross-validation leaves one fold out (a season, or a month when the log covers one
//!   season), fits on the rest and scores the left-out fold; the cross-validated ρ is the
//!   mean of the folds' ρ weighted by their landings.
//! - The permutation test shuffles CPUE across days within each place, refits and
//!   cross-validates each shuffle the same way; the p-value is `(1 + k) / (1 + N)`, `k`
//!   shuffles scoring at least the real cross-validated ρ out of `N` (Davison & Hinkley
//!   1997; Phipson & Smyth 2010).
//! - Verdict: supported only when the cross-validated ρ beats the default settings' ρ on
//!   the same folds by at least [`MIN_GAIN`] and p < [`MAX_P`].
//!
//! The inputs of each landing are worked out once ([`Window`]): a grid point costs a dot
//! product per landing, never a re-read of the wind.

use crate::upwelling::{DayInput, ResponseSettings};
use rayon::prelude::*;

/// Lag peaks tried, days.
pub const LAG_GRID: [f64; 14] = [
    1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0, 9.0, 10.0, 11.0, 12.0, 13.0, 14.0,
];
/// Optima tried, m³/s per 100 m.
pub const OPTIMUM_GRID: [f64; 10] = [
    20.0, 30.0, 45.0, 60.0, 80.0, 100.0, 120.0, 150.0, 200.0, 280.0,
];
/// Flush scales tried, m³/s per 100 m.
pub const FLUSH_GRID: [f64; 6] = [50.0, 100.0, 200.0, 300.0, 500.0, 1000.0];
/// Relaxation bonuses tried.
pub const BONUS_GRID: [f64; 6] = [0.0, 0.1, 0.2, 0.3, 0.5, 1.0];

/// The least gain in cross-validated ρ over the default that supports a change.
pub const MIN_GAIN: f64 = 0.05;
/// The p-value below which a gain counts.
pub const MAX_P: f64 = 0.05;
/// Settings within this of the best ρ make a parameter's range.
pub const RANGE_RHO: f64 = 0.02;
/// A fold is used only with at least this many landings left out and kept.
pub const MIN_FOLD_ROWS: usize = 10;

/// The parameters fitted.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Params {
    /// Days from upwelling to the peak of the response.
    pub lag_peak_days: f64,
    /// Daily index of the greatest response, m³/s per 100 m.
    pub optimum_m3s_per_100m: f64,
    /// Fall-off above the optimum, m³/s per 100 m.
    pub flush_scale_m3s_per_100m: f64,
    /// Bonus after a sustained event.
    pub relaxation_bonus: f64,
}

impl Params {
    /// The fitted parameters of a response model.
    #[must_use]
    pub fn of(r: &ResponseSettings) -> Self {
        Self {
            lag_peak_days: r.lag_peak_days,
            optimum_m3s_per_100m: r.optimum_m3s_per_100m,
            flush_scale_m3s_per_100m: r.flush_scale_m3s_per_100m,
            relaxation_bonus: r.relaxation_bonus,
        }
    }

    /// `base` with these parameters.
    #[must_use]
    pub fn apply(self, base: &ResponseSettings) -> ResponseSettings {
        ResponseSettings {
            lag_peak_days: self.lag_peak_days,
            optimum_m3s_per_100m: self.optimum_m3s_per_100m,
            flush_scale_m3s_per_100m: self.flush_scale_m3s_per_100m,
            relaxation_bonus: self.relaxation_bonus,
            ..*base
        }
    }

    fn at(g: usize) -> Self {
        let (nb, nf, no) = (BONUS_GRID.len(), FLUSH_GRID.len(), OPTIMUM_GRID.len());
        Self {
            lag_peak_days: LAG_GRID[g / (nb * nf * no)],
            optimum_m3s_per_100m: OPTIMUM_GRID[(g / (nb * nf)) % no],
            flush_scale_m3s_per_100m: FLUSH_GRID[(g / nb) % nf],
            relaxation_bonus: BONUS_GRID[g % nb],
        }
    }

    fn as_array(self) -> [f64; 4] {
        [
            self.lag_peak_days,
            self.optimum_m3s_per_100m,
            self.flush_scale_m3s_per_100m,
            self.relaxation_bonus,
        ]
    }
}

/// Grid points in all.
const GRID_POINTS: usize =
    LAG_GRID.len() * OPTIMUM_GRID.len() * FLUSH_GRID.len() * BONUS_GRID.len();

/// What the response takes from the days up to one landing at one stretch.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Window {
    /// From the landing's day back (0 = that day), as far as the lag kernel reaches and
    /// the record goes: the index as the dome takes it (pumping added), and the
    /// long-event penalty.
    pub back: Vec<(f64, f64)>,
    /// The share of the relaxation bonus the day earns (0–1).
    pub relax: f64,
}

impl Window {
    /// The window of the last day of `days` (consecutive days from the record's start).
    #[must_use]
    pub fn of(days: &[DayInput], base: &ResponseSettings) -> Self {
        let long = base.long_event_days.max(0.1);
        let back = days
            .iter()
            .rev()
            .take(base.lag_tail_days + 1)
            .map(|d| {
                let penalty = d
                    .event_length_days
                    .map_or(1.0, |length| (-(length - long).max(0.0) / long).exp());
                (
                    d.index_m3s_per_100m + base.pumping_as_index(d.pumping_m_s),
                    penalty,
                )
            })
            .collect();
        let relax = match days.last().and_then(|d| d.after_event) {
            Some((since, length)) if length >= base.sustained_event_days && since > 0.0 => {
                (1.0 - since / base.relaxation_window_days.max(0.1)).max(0.0)
            }
            _ => 0.0,
        };
        Self { back, relax }
    }

    /// The lagged response without the bonus.
    fn lagged(&self, kernel: &[f64], dome: &ResponseSettings) -> f64 {
        self.back
            .iter()
            .zip(kernel)
            .map(|(&(u, penalty), w)| w * dome.dome(u) * penalty)
            .sum()
    }
}

/// One landing as the fit sees it.
#[derive(Debug, Clone, PartialEq)]
pub struct Sample {
    /// Its windows, one per stretch it stands for (its prediction is their mean).
    pub windows: Vec<Window>,
    /// Catch per unit effort.
    pub cpue: f64,
    /// Its place (shuffles stay within a place).
    pub place: usize,
    /// Its fold (season or month).
    pub fold: usize,
}

/// Expected productivity of a sample (0–1), as [`ResponseSettings::respond`] gives it.
#[must_use]
pub fn predict(sample: &Sample, settings: &ResponseSettings) -> f64 {
    let kernel = settings.kernel();
    predict_with(sample, &kernel, settings)
}

fn predict_with(sample: &Sample, kernel: &[f64], settings: &ResponseSettings) -> f64 {
    let bonus = settings.relaxation_bonus.max(0.0);
    let n = sample.windows.len().max(1) as f64;
    sample
        .windows
        .iter()
        .map(|w| (w.lagged(kernel, settings) + bonus * w.relax) / (1.0 + bonus))
        .sum::<f64>()
        / n
}

/// Ranks with ties given their mean rank, centred and scaled to unit length (all zero
/// when every value is the same): the dot product of two such vectors is Spearman's ρ.
fn unit_ranks(values: &[f64]) -> Vec<f32> {
    let n = values.len();
    let mut order: Vec<usize> = (0..n).collect();
    order.sort_by(|&a, &b| values[a].total_cmp(&values[b]));
    let mut ranks = vec![0.0f64; n];
    let mut i = 0;
    while i < n {
        let mut j = i + 1;
        while j < n && values[order[j]].total_cmp(&values[order[i]]).is_eq() {
            j += 1;
        }
        let mean = (i + j - 1) as f64 / 2.0;
        for &k in &order[i..j] {
            ranks[k] = mean;
        }
        i = j;
    }
    let centre = (n as f64 - 1.0) / 2.0;
    let norm = ranks
        .iter()
        .map(|r| (r - centre).powi(2))
        .sum::<f64>()
        .sqrt();
    ranks
        .iter()
        .map(|r| {
            if norm > 0.0 {
                ((r - centre) / norm) as f32
            } else {
                0.0
            }
        })
        .collect()
}

fn dot(a: &[f32], b: &[f32]) -> f64 {
    f64::from(a.iter().zip(b).map(|(x, y)| x * y).sum::<f32>())
}

/// Spearman's ρ of two series (0 when either has no spread).
#[must_use]
pub fn spearman(a: &[f64], b: &[f64]) -> f64 {
    dot(&unit_ranks(a), &unit_ranks(b))
}

/// A fold: the landings kept to fit and those left out to score.
#[derive(Debug, Clone)]
struct Fold {
    train: Vec<usize>,
    test: Vec<usize>,
}

/// What the log says of the response model.
#[derive(Debug, Clone, PartialEq)]
pub struct Fit {
    /// The best settings on the whole log.
    pub best: Params,
    /// Their ρ on the whole log.
    pub best_rho: f64,
    /// For each parameter (in [`Params`] order), the lowest and highest value among the
    /// settings within [`RANGE_RHO`] of the best.
    pub ranges: [(f64, f64); 4],
    /// For each lag peak tried, the best ρ on the whole log with that lag.
    pub lag_profile: Vec<(f64, f64)>,
    /// The default settings' ρ on the whole log.
    pub default_rho: f64,
    /// The default settings' ρ on the left-out folds (weighted mean), `None` without
    /// folds.
    pub default_rho_folds: Option<f64>,
    /// Cross-validated ρ of the fit, `None` without folds.
    pub cv_rho: Option<f64>,
    /// Folds used.
    pub folds: usize,
    /// Shuffles made.
    pub permutations: usize,
    /// Share of shuffles (with the real log counted once) scoring at least the real
    /// cross-validated ρ, `None` without folds.
    pub p_value: Option<f64>,
    /// Expected productivity of every sample with the default settings.
    pub predicted_default: Vec<f64>,
    /// … and with the best settings.
    pub predicted_best: Vec<f64>,
}

impl Fit {
    /// Whether the log supports a change (see the module documentation).
    #[must_use]
    pub fn supported(&self) -> bool {
        match (self.cv_rho, self.default_rho_folds, self.p_value) {
            (Some(cv), Some(default), Some(p)) => cv >= default + MIN_GAIN && p < MAX_P,
            _ => false,
        }
    }
}

/// A small generator for the shuffles (SplitMix64, Steele et al. 2014): the same
/// shuffles on every run.
struct SplitMix(u64);

impl SplitMix {
    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    fn below(&mut self, n: usize) -> usize {
        (self.next() % n as u64) as usize
    }
}

/// CPUE shuffled within each place (Fisher–Yates).
fn shuffled(samples: &[Sample], rng: &mut SplitMix) -> Vec<f64> {
    let mut out: Vec<f64> = samples.iter().map(|s| s.cpue).collect();
    let places = samples.iter().map(|s| s.place).max().map_or(0, |m| m + 1);
    let mut members: Vec<Vec<usize>> = vec![Vec::new(); places];
    for (k, s) in samples.iter().enumerate() {
        members[s.place].push(k);
    }
    for m in members.iter().filter(|m| m.len() > 1) {
        for i in (1..m.len()).rev() {
            let j = rng.below(i + 1);
            out.swap(m[i], m[j]);
        }
    }
    out
}

fn folds_of(samples: &[Sample]) -> Vec<Fold> {
    let count = samples.iter().map(|s| s.fold).max().map_or(0, |m| m + 1);
    (0..count)
        .map(|f| {
            let (test, train): (Vec<usize>, Vec<usize>) =
                (0..samples.len()).partition(|&k| samples[k].fold == f);
            Fold { train, test }
        })
        .filter(|f| f.train.len() >= MIN_FOLD_ROWS && f.test.len() >= MIN_FOLD_ROWS)
        .collect()
}

fn pick<T: Copy>(values: &[T], at: &[usize]) -> Vec<T> {
    at.iter().map(|&k| values[k]).collect()
}

/// Every grid point's predictions, (lag, optimum, flush) computed once for all bonuses;
/// `visit(g, predictions)` is called for each point, in parallel.
fn over_grid<T: Send>(
    samples: &[Sample],
    base: &ResponseSettings,
    visit: impl Fn(usize, &[f64]) -> T + Sync,
) -> Vec<T> {
    let nb = BONUS_GRID.len();
    (0..GRID_POINTS / nb)
        .into_par_iter()
        .flat_map_iter(|shape| {
            let p = Params::at(shape * nb);
            let settings = p.apply(base);
            let kernel = settings.kernel();
            let lagged: Vec<Vec<(f64, f64)>> = samples
                .iter()
                .map(|s| {
                    s.windows
                        .iter()
                        .map(|w| (w.lagged(&kernel, &settings), w.relax))
                        .collect()
                })
                .collect();
            let visit = &visit;
            BONUS_GRID.iter().enumerate().map(move |(b, &bonus)| {
                let pred: Vec<f64> = lagged
                    .iter()
                    .map(|ws| {
                        let n = ws.len().max(1) as f64;
                        ws.iter()
                            .map(|(l, r)| (l + bonus * r) / (1.0 + bonus))
                            .sum::<f64>()
                            / n
                    })
                    .collect();
                visit(shape * nb + b, &pred)
            })
        })
        .collect()
}

/// Fits the grid to the samples and tests the fit (see the module documentation);
/// `cancelled` is asked between stages.
#[must_use]
pub fn fit(samples: &[Sample], base: &ResponseSettings, permutations: usize) -> Fit {
    let folds = folds_of(samples);
    let mut rng = SplitMix(2027);
    // Target 0 is the real log; the others are shuffles.
    let targets: Vec<Vec<f64>> = std::iter::once(samples.iter().map(|s| s.cpue).collect())
        .chain((0..permutations).map(|_| shuffled(samples, &mut rng)))
        .collect();
    let whole = unit_ranks(&targets[0]);
    // Per fold, every target's ranks over the kept landings.
    let kept: Vec<Vec<Vec<f32>>> = folds
        .iter()
        .map(|f| {
            targets
                .iter()
                .map(|t| unit_ranks(&pick(t, &f.train)))
                .collect()
        })
        .collect();
    // Per grid point: ρ on the whole log, and per fold and target, ρ on the kept part.
    let scores: Vec<(f64, Vec<f64>)> = over_grid(samples, base, |_, pred| {
        let on_whole = dot(&unit_ranks(pred), &whole);
        let per_fold = folds
            .iter()
            .zip(&kept)
            .flat_map(|(f, targets)| {
                let a = unit_ranks(&pick(pred, &f.train));
                targets.iter().map(move |t| dot(&a, t)).collect::<Vec<_>>()
            })
            .collect();
        (on_whole, per_fold)
    });
    let argmax = |score: &dyn Fn(usize) -> f64| {
        (0..GRID_POINTS).fold(0, |best, g| if score(g) > score(best) { g } else { best })
    };
    let best_g = argmax(&|g| scores[g].0);
    let best_rho = scores[best_g].0;
    // Cross-validated ρ of each target: fit on the kept landings, score the left out.
    let cv: Vec<Option<f64>> = (0..targets.len())
        .into_par_iter()
        .map(|t| {
            let mut sum = 0.0;
            let mut weight = 0usize;
            for (k, f) in folds.iter().enumerate() {
                let g = argmax(&|g| scores[g].1[k * targets.len() + t]);
                let settings = Params::at(g).apply(base);
                let pred: Vec<f64> = f
                    .test
                    .iter()
                    .map(|&i| predict(&samples[i], &settings))
                    .collect();
                sum += spearman(&pred, &pick(&targets[t], &f.test)) * f.test.len() as f64;
                weight += f.test.len();
            }
            (weight > 0).then(|| sum / weight as f64)
        })
        .collect();
    let predicted_default: Vec<f64> = samples.iter().map(|s| predict(s, base)).collect();
    let default_rho_folds = (!folds.is_empty()).then(|| {
        let (sum, weight) = folds.iter().fold((0.0, 0usize), |(s, w), f| {
            let rho = spearman(
                &pick(&predicted_default, &f.test),
                &pick(&targets[0], &f.test),
            );
            (s + rho * f.test.len() as f64, w + f.test.len())
        });
        sum / weight as f64
    });
    let p_value = cv[0].map(|real| {
        let beaten = cv[1..].iter().flatten().filter(|c| **c >= real).count();
        (1 + beaten) as f64 / (1 + permutations) as f64
    });
    let near: Vec<[f64; 4]> = (0..GRID_POINTS)
        .filter(|&g| scores[g].0 >= best_rho - RANGE_RHO)
        .map(|g| Params::at(g).as_array())
        .collect();
    let ranges = std::array::from_fn(|i| {
        near.iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), p| {
                (lo.min(p[i]), hi.max(p[i]))
            })
    });
    // The grid runs through every other parameter within each lag.
    let per_lag = GRID_POINTS / LAG_GRID.len();
    let lag_profile = LAG_GRID
        .iter()
        .enumerate()
        .map(|(k, &lag)| {
            let best = scores[k * per_lag..(k + 1) * per_lag]
                .iter()
                .map(|s| s.0)
                .fold(f64::NEG_INFINITY, f64::max);
            (lag, best)
        })
        .collect();
    let best = Params::at(best_g);
    let best_settings = best.apply(base);
    Fit {
        best,
        best_rho,
        ranges,
        lag_profile,
        default_rho: spearman(&predicted_default, &targets[0]),
        default_rho_folds,
        cv_rho: cv[0],
        folds: folds.len(),
        permutations,
        p_value,
        predicted_best: samples.iter().map(|s| predict(s, &best_settings)).collect(),
        predicted_default,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Spearman's ρ worked by hand: ranks (1, 2, 3, 4, 5) against (2, 1, 4, 3, 5) differ
    /// by 1 four times, Σd² = 4, ρ = 1 − 6·4 / (5·24) = 0.8. With ties, ranks are
    /// averaged: (1, 2, 2, 3) has ranks (1, 2.5, 2.5, 4), and against (1, 2, 3, 4)
    /// Pearson's r of the ranks is 4.5 / sqrt(4.5 · 5) = 0.9487.
    #[test]
    fn spearman_by_hand() {
        let rho = spearman(&[1.0, 2.0, 3.0, 4.0, 5.0], &[2.0, 1.0, 4.0, 3.0, 5.0]);
        assert!((rho - 0.8).abs() < 1e-6, "{rho}");
        let tied = spearman(&[1.0, 2.0, 2.0, 3.0], &[1.0, 2.0, 3.0, 4.0]);
        assert!((tied - 0.948_683).abs() < 1e-5, "{tied}");
        assert!(spearman(&[1.0, 1.0, 1.0], &[1.0, 2.0, 3.0]).abs() < 1e-12);
    }

    /// The window gives what the response model gives for the same days.
    #[test]
    fn a_window_predicts_what_the_model_responds() {
        let base = ResponseSettings::default();
        let days: Vec<DayInput> = (0..30)
            .map(|k| DayInput {
                index_m3s_per_100m: f64::from((k * 37) % 11) * 20.0,
                pumping_m_s: if k % 3 == 0 { 1e-5 } else { 0.0 },
                event_length_days: (k % 7 < 3).then_some(6.5),
                after_event: (k % 7 >= 3).then_some((f64::from(k % 7) - 2.5, 3.0)),
            })
            .collect();
        for settings in [
            base,
            Params {
                lag_peak_days: 9.0,
                optimum_m3s_per_100m: 150.0,
                flush_scale_m3s_per_100m: 100.0,
                relaxation_bonus: 0.5,
            }
            .apply(&base),
        ] {
            let model = settings.respond(&days);
            for k in [0, 4, 12, 29] {
                let sample = Sample {
                    windows: vec![Window::of(&days[..=k], &base)],
                    cpue: 1.0,
                    place: 0,
                    fold: 0,
                };
                let got = predict(&sample, &settings);
                assert!(
                    (got - model[k].productivity).abs() < 1e-12,
                    "day {k}: {got} vs {}",
                    model[k].productivity
                );
            }
        }
    }

    /// Every grid point is a distinct setting, inside the stated bounds.
    #[test]
    fn the_grid_is_walked_once() {
        let mut seen: Vec<[f64; 4]> = (0..GRID_POINTS).map(|g| Params::at(g).as_array()).collect();
        seen.sort_by(|a, b| a.partial_cmp(b).expect("numbers"));
        seen.dedup();
        assert_eq!(seen.len(), GRID_POINTS);
        assert!(
            seen.iter()
                .all(|p| (1.0..=14.0).contains(&p[0]) && (20.0..=280.0).contains(&p[1]))
        );
    }
}
