//! From upwelling to expected productivity: a lagged, dome-shaped response.
//!
//! What is published, and what is ours:
//! - Blooms follow upwelling by days: event-scale blooms appear some 3–7 days after
//!   nutrients are brought up and peak in the relaxation (Wilkerson et al. 2006, from
//!   memory); satellite pigment correlates best with wind lagged 10–20 days (Thomas &
//!   Strub 2001). Hence a lag kernel peaking at 5 days with a tail of about three weeks.
//! - Production peaks at moderate upwelling: the "optimal environmental window" (Cury &
//!   Roy 1989, recruitment highest near 5–6 m/s alongshore wind, from memory; Botsford et
//!   al. 2003 for shelf production). Hence a dome in the daily index: rising to an
//!   optimum, then falling as strong upwelling flushes production offshore.
//! - Wind events typically last 3–4 days (Taylor et al. 2008); longer events are
//!   penalised, and the relaxation after a sustained event gets a bonus.
//!
//! The shapes (gamma kernel, the dome's form), the bonus and every default number are a
//! planning heuristic of this tool, not a published model: tune them to local catch
//! records. Every parameter is in [`ResponseSettings`], kept in the scenario.

use serde::{Deserialize, Serialize};

/// Parameters of the response model.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ResponseSettings {
    /// Days from upwelling to the peak of the response (Wilkerson et al. 2006: 3–7 days).
    pub lag_peak_days: f64,
    /// Shape of the gamma lag kernel (> 1); larger is narrower. With 3 and a 5-day peak
    /// the response fades over about three weeks (Thomas & Strub 2001: 10–20 day lags).
    pub lag_shape: f64,
    /// Days of past upwelling the response remembers.
    pub lag_tail_days: usize,
    /// Daily mean index at which the response is greatest, m^3/s per 100 m. About
    /// 5–6 m/s of alongshore wind at 38–40° (Cury & Roy 1989's optimum; planning default).
    pub optimum_m3s_per_100m: f64,
    /// Above the optimum the response falls as `exp(−(u − optimum)/scale)`,
    /// m^3/s per 100 m (planning heuristic).
    pub flush_scale_m3s_per_100m: f64,
    /// Events longer than this (days) are penalised as `exp(−(L − this)/this)` on
    /// every day of the event, `L` being the event's length from onset to end. An event
    /// still going at the end of the forecast is taken to end there: its length is
    /// what the forecast shows, a lower bound.
    pub long_event_days: f64,
    /// Bonus to expected productivity just after a sustained event ends (0–1).
    pub relaxation_bonus: f64,
    /// Days over which the relaxation bonus fades.
    pub relaxation_window_days: f64,
    /// Shortest event whose relaxation earns the bonus, days.
    pub sustained_event_days: f64,
    /// Width of the offshore band over which Ekman pumping counts as upwelling at the
    /// coast, km (about the internal Rossby radius, Gill 1982 from memory: 5–10 km).
    pub pumping_width_km: f64,
}

impl Default for ResponseSettings {
    fn default() -> Self {
        Self {
            lag_peak_days: 5.0,
            lag_shape: 3.0,
            lag_tail_days: 21,
            optimum_m3s_per_100m: 70.0,
            flush_scale_m3s_per_100m: 300.0,
            long_event_days: 5.0,
            relaxation_bonus: 0.3,
            relaxation_window_days: 3.0,
            sustained_event_days: 2.0,
            pumping_width_km: 10.0,
        }
    }
}

/// What the response needs for one day.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct DayInput {
    /// Daily mean coastal upwelling index, m^3/s per 100 m.
    pub index_m3s_per_100m: f64,
    /// Daily mean Ekman pumping just offshore, m/s (0 where no grid gives it).
    pub pumping_m_s: f64,
    /// Length of the event this day is in, days (to the end of the record for an event
    /// still going there), if the day is in one.
    pub event_length_days: Option<f64>,
    /// Days since the last event ended, and that event's length in days, if one has.
    pub after_event: Option<(f64, f64)>,
}

/// The response of one day.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct DayResponse {
    /// The day's useful upwelling after the dome and the long-event penalty (0–1).
    pub useful: f64,
    /// The lagged response to the useful upwelling of the days before (0–1).
    pub lagged: f64,
    /// The relaxation bonus (0 to `relaxation_bonus`).
    pub relaxation: f64,
    /// Expected productivity: `(lagged + relaxation) / (1 + relaxation_bonus)`, 0–1.
    /// Without a bonus it reaches at most `1 / (1 + relaxation_bonus)` (0.77 with the
    /// default 0.3).
    pub productivity: f64,
}

impl ResponseSettings {
    /// The dome: `(u/u_opt) exp(1 − u/u_opt)` up to the optimum, `exp(−(u − u_opt)/s)`
    /// above it; 0 for downwelling.
    #[must_use]
    pub fn dome(&self, index_m3s_per_100m: f64) -> f64 {
        let u = index_m3s_per_100m;
        let opt = self.optimum_m3s_per_100m.max(1e-9);
        if u <= 0.0 {
            0.0
        } else if u <= opt {
            (u / opt) * (1.0 - u / opt).exp()
        } else {
            (-(u - opt) / self.flush_scale_m3s_per_100m.max(1e-9)).exp()
        }
    }

    /// The lag kernel, one weight per day back (day 0 = the same day), summing to 1:
    /// a gamma density with its mode at `lag_peak_days`.
    #[must_use]
    pub fn kernel(&self) -> Vec<f64> {
        let k = self.lag_shape.max(1.01);
        let theta = self.lag_peak_days.max(0.1) / (k - 1.0);
        let raw: Vec<f64> = (0..=self.lag_tail_days)
            .map(|d| {
                let t = d as f64;
                if d == 0 {
                    0.0
                } else {
                    t.powf(k - 1.0) * (-t / theta).exp()
                }
            })
            .collect();
        let total: f64 = raw.iter().sum();
        raw.iter()
            .map(|w| if total > 0.0 { w / total } else { 0.0 })
            .collect()
    }

    /// Ekman pumping (m/s) as an equivalent coastal index: upward velocity over an
    /// offshore band `pumping_width_km` wide, per 100 m of coast, m^3/s per 100 m.
    #[must_use]
    pub fn pumping_as_index(&self, pumping_m_s: f64) -> f64 {
        pumping_m_s * self.pumping_width_km * 1000.0 * 100.0
    }

    /// The response for consecutive days. Days before the first given are taken as
    /// giving no upwelling (a short forecast carries little history), as are days
    /// without wind.
    #[must_use]
    pub fn respond(&self, days: &[DayInput]) -> Vec<DayResponse> {
        let kernel = self.kernel();
        let useful: Vec<f64> = days
            .iter()
            .map(|d| {
                let u = d.index_m3s_per_100m + self.pumping_as_index(d.pumping_m_s);
                let long = self.long_event_days.max(0.1);
                let penalty = d
                    .event_length_days
                    .map_or(1.0, |length| (-(length - long).max(0.0) / long).exp());
                self.dome(u) * penalty
            })
            .collect();
        let max_total = 1.0 + self.relaxation_bonus.max(0.0);
        days.iter()
            .enumerate()
            .map(|(k, d)| {
                let lagged: f64 = kernel
                    .iter()
                    .enumerate()
                    .filter(|(back, _)| *back <= k)
                    .map(|(back, w)| w * useful[k - back])
                    .sum();
                let relaxation = match d.after_event {
                    Some((since, length)) if length >= self.sustained_event_days && since > 0.0 => {
                        self.relaxation_bonus
                            * (1.0 - since / self.relaxation_window_days.max(0.1)).max(0.0)
                    }
                    _ => 0.0,
                };
                DayResponse {
                    useful: useful[k],
                    lagged,
                    relaxation,
                    productivity: (lagged + relaxation) / max_total,
                }
            })
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    fn pulse(day: usize, value: f64, n: usize) -> Vec<DayInput> {
        (0..n)
            .map(|k| DayInput {
                index_m3s_per_100m: if k == day { value } else { 0.0 },
                ..DayInput::default()
            })
            .collect()
    }

    /// A unit pulse of upwelling (at the optimum) gives a response peaking at the
    /// configured lag, for several lags.
    #[test]
    fn pulse_response_peaks_at_the_lag() {
        for lag in [3.0, 5.0, 7.0] {
            let s = ResponseSettings {
                lag_peak_days: lag,
                ..ResponseSettings::default()
            };
            let r = s.respond(&pulse(2, s.optimum_m3s_per_100m, 30));
            let peak = r
                .iter()
                .enumerate()
                .max_by(|a, b| a.1.lagged.total_cmp(&b.1.lagged))
                .expect("days")
                .0;
            assert_eq!(peak, 2 + lag as usize, "lag {lag}");
            assert_abs_diff_eq!(r.iter().map(|d| d.lagged).sum::<f64>(), 1.0, epsilon = 1e-9);
            assert_abs_diff_eq!(r[2].lagged, 0.0);
        }
    }

    /// Doubling a weak event raises the useful upwelling more than doubling a moderate
    /// one; a strong event gives less than a moderate one (the optimal window).
    #[test]
    fn dome_shape() {
        let s = ResponseSettings::default();
        let weak = s.dome(30.0);
        let moderate = s.dome(60.0);
        assert!(s.dome(60.0) - weak > s.dome(120.0) - moderate);
        assert!(s.dome(400.0) < s.dome(70.0));
        assert_abs_diff_eq!(s.dome(70.0), 1.0);
        assert_abs_diff_eq!(s.dome(-100.0), 0.0);
    }

    #[test]
    fn long_events_are_penalised_and_relaxation_earns_a_bonus() {
        let s = ResponseSettings::default();
        let mut days = pulse(0, 70.0, 1);
        // A 10-day event: exp(−(10 − 5)/5) = exp(−1) on each of its days.
        days[0].event_length_days = Some(10.0);
        assert_abs_diff_eq!(s.respond(&days)[0].useful, (-1.0f64).exp(), epsilon = 1e-12);
        let after = DayInput {
            after_event: Some((1.0, 3.0)),
            ..DayInput::default()
        };
        let r = s.respond(&[after]);
        assert_abs_diff_eq!(r[0].relaxation, 0.2, epsilon = 1e-12);
        let short = DayInput {
            after_event: Some((1.0, 1.0)),
            ..DayInput::default()
        };
        assert_abs_diff_eq!(s.respond(&[short])[0].relaxation, 0.0);
    }

    /// 1e-5 m/s of pumping over 10 km is 10 m^3/s per 100 m.
    #[test]
    fn pumping_equivalent() {
        assert_abs_diff_eq!(
            ResponseSettings::default().pumping_as_index(1e-5),
            10.0,
            epsilon = 1e-12
        );
    }
}
