//! Plots of the selected stretches (several overlay for comparison).

use super::commands::Command;
use super::state::ShelfwindApp;
use crate::physics::m_s_to_knots;
use crate::plan::{Plan, StretchForecast, StretchHour, StretchInfo};
use eframe::egui::{self, Color32, RichText};
use egui_plot::{
    Bar, BarChart, HLine, Legend, Line, Plot, PlotPoints, Points, Polygon, Span, VLine,
};
use std::collections::HashMap;
use std::sync::Arc;

const PALETTE: [Color32; 4] = [
    Color32::from_rgb(0, 90, 181),
    Color32::from_rgb(220, 50, 32),
    Color32::from_rgb(0, 150, 110),
    Color32::from_rgb(150, 80, 170),
];

fn hours_since(t0: chrono::DateTime<chrono::Utc>, t: chrono::DateTime<chrono::Utc>) -> f64 {
    (t - t0).num_seconds() as f64 / 3600.0
}

/// The x value of a time: hours since the start of the timeline.
fn x_label(t0: chrono::DateTime<chrono::Utc>, tz: chrono_tz::Tz, x: f64) -> String {
    let t = t0 + chrono::Duration::minutes((x * 60.0) as i64);
    let local = t.with_timezone(&tz);
    if chrono::Timelike::hour(&local) == 0 {
        local.format("%a %-d").to_string()
    } else {
        local.format("%H:%M").to_string()
    }
}

/// What every plot of the panel shares: the chosen stretches, the time axis, the
/// chosen time and the hours over the boat's limit.
struct PlotFrame<'a> {
    plan: &'a Plan,
    chosen: Vec<&'a StretchInfo>,
    t0: chrono::DateTime<chrono::Utc>,
    now_x: Option<f64>,
    unsafe_spans: Vec<(f64, f64)>,
    link: egui::Id,
    height: f64,
    /// The wind's factor from knots and its unit.
    wind_scale: (f64, &'static str),
    /// For an ensemble: per chosen stretch (by place in `chosen`) and hourly value, the
    /// runs' spread.
    bands: HashMap<(usize, Hourly), Arc<[Spread]>>,
}

/// An hourly value the plots draw, in the units it is kept in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub(super) enum Hourly {
    /// Wind speed, knots.
    WindKt,
    /// Alongshore wind stress, N/m².
    StressPa,
    /// Upwelling index, m³/s per 100 m.
    Index,
    /// Ekman pumping, m/day.
    PumpingMDay,
}

impl Hourly {
    const ALL: [Hourly; 4] = [
        Hourly::WindKt,
        Hourly::StressPa,
        Hourly::Index,
        Hourly::PumpingMDay,
    ];

    fn of(self, s: &StretchForecast, h: &StretchHour) -> Option<f64> {
        match self {
            Hourly::WindKt => Some(m_s_to_knots(h.wind.speed_m_s())),
            Hourly::StressPa => Some(s.alongshore_stress_pa(h)),
            Hourly::Index => Some(h.index_m3s_per_100m),
            Hourly::PumpingMDay => h.pumping_m_s().map(|w| w * 86_400.0),
        }
    }
}

/// One hour of the runs' spread: the hour, and the 10th, 50th and 90th percentiles.
pub(super) type Spread = (chrono::DateTime<chrono::Utc>, f64, f64, f64);

/// The runs' spread of the plotted stretches, kept while the plan is the same: worked
/// out once per stretch and value, not every frame.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct RunBands {
    /// The plan the bands are for (held, so it is never mistaken for a newer one).
    plan: Option<Arc<Plan>>,
    bands: HashMap<(usize, Hourly), Arc<[Spread]>>,
}

impl RunBands {
    /// The spread of stretch `k` of `plan` for `what`, made now if it is not kept.
    fn get(&mut self, plan: &Arc<Plan>, k: usize, what: Hourly) -> Arc<[Spread]> {
        if !self.plan.as_ref().is_some_and(|p| Arc::ptr_eq(p, plan)) {
            self.plan = Some(plan.clone());
            self.bands.clear();
        }
        self.bands
            .entry((k, what))
            .or_insert_with(|| run_spread(&plan.stretches[k], what).into())
            .clone()
    }
}

impl PlotFrame<'_> {
    /// A plot with its title (with units) above it, rather than a vertical axis label
    /// that small plots clip.
    fn plot(&self, ui: &mut egui::Ui, id: &str, title: &str) -> Plot<'static> {
        ui.label(RichText::new(title).strong());
        let (t0, tz) = (self.t0, self.plan.time_zone);
        let p = Plot::new(id.to_string())
            .height(self.height as f32)
            .x_axis_formatter(move |mark, _| x_label(t0, tz, mark.value))
            .x_grid_spacer(egui_plot::uniform_grid_spacer(|_| [6.0, 24.0, 168.0]))
            .link_axis(self.link, [true, false])
            .link_cursor(self.link, [true, false])
            .allow_scroll(false);
        if self.chosen.len() > 1 {
            p.legend(Legend::default())
        } else {
            p
        }
    }

    /// The chosen time, and with `shade` the hours over the boat's limit.
    fn decorate(&self, p: &mut egui_plot::PlotUi<'_>, shade: bool) {
        if shade {
            for (a, b) in &self.unsafe_spans {
                p.span(
                    Span::new("", *a..=*b).fill(Color32::from_rgba_unmultiplied(197, 27, 125, 40)),
                );
            }
        }
        if let Some(x) = self.now_x {
            p.vline(VLine::new("chosen time", x).color(Color32::from_gray(60)));
        }
    }

    /// One line per chosen stretch of an hourly value times `scale` (hours without it
    /// are skipped); for an ensemble, the runs' median and their 10–90 % band instead.
    fn hourly_lines(&self, p: &mut egui_plot::PlotUi<'_>, what: Hourly, scale: f64) {
        for (k, s) in self.chosen.iter().enumerate() {
            if let Some(spread) = self.bands.get(&(k, what)) {
                self.band(p, k, s, spread, scale);
                continue;
            }
            let pts: Vec<[f64; 2]> = s
                .hours
                .iter()
                .filter_map(|h| {
                    what.of(s, h)
                        .map(|v| [hours_since(self.t0, h.time), v * scale])
                })
                .collect();
            p.line(Line::new(s.name.clone(), PlotPoints::from(pts)).color(PALETTE[k]));
        }
    }

    /// The 10–90 % band of the runs (a shaded quadrilateral per hour: each is convex,
    /// which a filled plot polygon must be) and the runs' median line.
    fn band(
        &self,
        p: &mut egui_plot::PlotUi<'_>,
        k: usize,
        s: &StretchInfo,
        spread: &[Spread],
        scale: f64,
    ) {
        // Quantiles commute with a positive factor: the band is scaled as it is drawn.
        let spread: Vec<[f64; 4]> = spread
            .iter()
            .map(|&(t, lo, mid, hi)| [hours_since(self.t0, t), lo * scale, mid * scale, hi * scale])
            .collect();
        let band_name = format!("{}: 10–90 % of {} runs", s.name, s.runs.len());
        let fill = PALETTE[k].gamma_multiply(0.25);
        for w in spread.windows(2) {
            let ([x0, lo0, _, hi0], [x1, lo1, _, hi1]) = (w[0], w[1]);
            if x1 - x0 > 1.5 {
                continue;
            }
            p.polygon(
                Polygon::new(
                    band_name.clone(),
                    vec![[x0, lo0], [x1, lo1], [x1, hi1], [x0, hi0]],
                )
                .fill_color(fill)
                .stroke(egui::Stroke::NONE)
                .allow_hover(false),
            );
        }
        let median: Vec<[f64; 2]> = spread.iter().map(|&[x, _, m, _]| [x, m]).collect();
        p.line(
            Line::new(
                format!("{}: median of runs", s.name),
                PlotPoints::from(median),
            )
            .color(PALETTE[k]),
        );
    }

    fn wind(&self, ui: &mut egui::Ui) {
        let (factor, unit) = self.wind_scale;
        let limit = self.plan.vessel.wind_limit_kt * factor;
        let title = format!("Wind speed ({unit}); shaded: over the boat's limit");
        self.plot(ui, "wind", &title).show(ui, |p| {
            self.decorate(p, true);
            p.hline(
                HLine::new(format!("boat's limit {limit:.0} {unit}"), limit)
                    .color(Color32::from_rgb(197, 27, 125)),
            );
            self.hourly_lines(p, Hourly::WindKt, factor);
        });
    }

    fn waves(&self, ui: &mut egui::Ui) {
        let s = self.chosen[0];
        let title = match s.wave_source {
            crate::plan::WaveSource::Forecast => "Waves on the way (m); shaded: over a limit",
            crate::plan::WaveSource::Estimate => {
                "Waves on the way (m): estimate of the wind sea only"
            }
            crate::plan::WaveSource::None => "Waves on the way (m): no data",
        };
        self.plot(ui, "waves", title).include_y(0.0).show(ui, |p| {
            self.decorate(p, true);
            if let Some(limit) = self.plan.vessel.wave_limit_m {
                p.hline(
                    HLine::new(format!("boat's limit {limit:.1} m"), limit)
                        .color(Color32::from_rgb(197, 27, 125)),
                );
            }
            for (k, s) in self.chosen.iter().enumerate() {
                let pts: Vec<[f64; 2]> = s
                    .hours
                    .iter()
                    .filter_map(|h| {
                        s.route_wave_m(h.time)
                            .map(|m| [hours_since(self.t0, h.time), m])
                    })
                    .collect();
                p.line(Line::new(s.name.clone(), PlotPoints::from(pts)).color(PALETTE[k]));
            }
        });
    }

    fn direction(&self, ui: &mut egui::Ui) {
        self.plot(ui, "direction", "Wind from (degrees true)")
            .include_y(0.0)
            .include_y(360.0)
            .show(ui, |p| {
                self.decorate(p, false);
                for (k, s) in self.chosen.iter().enumerate() {
                    let pts: Vec<[f64; 2]> = s
                        .hours
                        .iter()
                        .filter_map(|h| {
                            h.wind
                                .direction_from_deg()
                                .map(|d| [hours_since(self.t0, h.time), d])
                        })
                        .collect();
                    p.points(
                        Points::new(s.name.clone(), PlotPoints::from(pts))
                            .color(PALETTE[k])
                            .radius(1.5),
                    );
                }
            });
    }

    fn stress(&self, ui: &mut egui::Ui) {
        self.plot(ui, "stress", "Alongshore wind stress (N/m²)")
            .show(ui, |p| {
                self.decorate(p, false);
                self.hourly_lines(p, Hourly::StressPa, 1.0);
            });
    }

    fn index(&self, ui: &mut egui::Ui) {
        self.plot(ui, "index", "Upwelling index (m³/s per 100 m)")
            .show(ui, |p| {
                self.decorate(p, true);
                p.hline(HLine::new("0", 0.0).color(Color32::from_gray(120)));
                self.hourly_lines(p, Hourly::Index, 1.0);
            });
    }

    fn pumping(&self, ui: &mut egui::Ui) {
        self.plot(ui, "pumping", "Ekman pumping offshore (m/day, grids only)")
            .show(ui, |p| {
                self.decorate(p, false);
                p.hline(HLine::new("0", 0.0).color(Color32::from_gray(120)));
                self.hourly_lines(p, Hourly::PumpingMDay, 1.0);
            });
    }

    fn cumulative(&self, ui: &mut egui::Ui) {
        self.plot(ui, "cumulative", "Cumulative index (m³/s per 100 m × days)")
            .show(ui, |p| {
                self.decorate(p, false);
                for (k, s) in self.chosen.iter().enumerate() {
                    let pts: Vec<[f64; 2]> = s
                        .days
                        .iter()
                        .map(|d| {
                            [
                                noon_x(self.plan, d.date, self.t0),
                                d.cumulative_m3s_per_100m_days,
                            ]
                        })
                        .collect();
                    p.line(Line::new(s.name.clone(), PlotPoints::from(pts)).color(PALETTE[k]));
                }
            });
    }

    fn productivity(&self, ui: &mut egui::Ui) {
        let title = if self.chosen.iter().any(|s| !s.runs.is_empty()) {
            "Expected productivity (%), by day: mean of runs, 10–90 % bar"
        } else {
            "Expected productivity (%), by day"
        };
        self.plot(ui, "productivity", title)
            .include_y(0.0)
            .include_y(100.0)
            .show(ui, |p| {
                self.decorate(p, false);
                let width = 20.0 / self.chosen.len() as f64;
                for (k, s) in self.chosen.iter().enumerate() {
                    let x = |d: chrono::NaiveDate| {
                        noon_x(self.plan, d, self.t0) - 10.0 + width * (k as f64 + 0.5)
                    };
                    let bars: Vec<Bar> = s
                        .days
                        .iter()
                        .map(|d| {
                            let value = run_productivity(s, d.date)
                                .map_or(d.response.productivity, |(mean, _, _)| mean);
                            Bar::new(x(d.date), 100.0 * value).width(width * 0.9)
                        })
                        .collect();
                    p.bar_chart(BarChart::new(s.name.clone(), bars).color(PALETTE[k]));
                    // The runs' 10th to 90th percentile, a dark bar over each day's.
                    for d in &s.days {
                        if let Some((_, lo, hi)) = run_productivity(s, d.date) {
                            p.line(
                                Line::new(
                                    format!("{}: 10–90 % of runs", s.name),
                                    PlotPoints::from(vec![
                                        [x(d.date), 100.0 * lo],
                                        [x(d.date), 100.0 * hi],
                                    ]),
                                )
                                .color(Color32::from_gray(30))
                                .width(2.5),
                            );
                        }
                    }
                }
            });
    }
}

/// The plots panel.
pub(super) fn plots_ui(app: &mut ShelfwindApp, ui: &mut egui::Ui, _commands: &mut Vec<Command>) {
    let Some(plan) = app.plan.clone() else { return };
    let Some(&first) = app.view.timeline.first() else {
        return;
    };
    // The x axis counts hours from the local midnight before the first hour, so that
    // its day lines fall on local midnights and its 6-hour lines on 06:00, 12:00, 18:00.
    let tz = plan.time_zone;
    let t0 = crate::localtime::local_time(tz, crate::localtime::local_day(tz, first), 0);
    let chosen: Vec<&StretchInfo> = app
        .view
        .selected
        .iter()
        .filter_map(|id| plan.stretches.iter().find(|s| &s.id == id))
        .take(PALETTE.len())
        .collect();
    if chosen.is_empty() {
        ui.label("Select a stretch in the list or on the map to see its plots.");
        return;
    }
    let names: Vec<String> = chosen.iter().map(|s| s.name.clone()).collect();
    ui.label(RichText::new(format!("Plots: {}", names.join(", "))).strong());
    let indices: Vec<usize> = chosen
        .iter()
        .filter_map(|c| plan.stretches.iter().position(|s| s.id == c.id))
        .collect();
    let mut bands = HashMap::new();
    for (place, &k) in indices.iter().enumerate() {
        if !plan.stretches[k].runs.is_empty() {
            for what in Hourly::ALL {
                bands.insert((place, what), app.view.run_bands.get(&plan, k, what));
            }
        }
    }
    let frame = PlotFrame {
        bands,
        plan: &plan,
        unsafe_spans: unsafe_runs(&plan, chosen[0], t0),
        chosen,
        t0,
        now_x: app
            .view
            .timeline
            .get(app.view.hour)
            .map(|t| hours_since(t0, *t)),
        link: egui::Id::unique("shelfwind-plots-x"),
        wind_scale: app.view.units.wind_scale(),
        height: f64::from(((ui.available_height() - 80.0) / 2.0).max(50.0)),
    };
    let plots = |ui: &mut egui::Ui| {
        ui.columns(4, |cols| {
            frame.wind(&mut cols[0]);
            frame.waves(&mut cols[1]);
            frame.direction(&mut cols[2]);
            frame.stress(&mut cols[3]);
        });
        ui.columns(4, |cols| {
            frame.index(&mut cols[0]);
            frame.pumping(&mut cols[1]);
            frame.cumulative(&mut cols[2]);
            frame.productivity(&mut cols[3]);
        });
    };
    if indices.len() > 1 {
        // Two or more chosen: their numbers side by side, next to their plots.
        ui.horizontal_top(|ui| {
            ui.vertical(|ui| {
                super::compare::compare_ui(&plan, (app.view.day, app.view.units), &indices, ui);
            });
            ui.separator();
            ui.vertical(plots);
        });
    } else {
        plots(ui);
    }
}

/// Per hour that some run has, the hour and the 10th, 50th and 90th percentiles of
/// `what` over the runs of an ensemble.
fn run_spread(s: &StretchInfo, what: Hourly) -> Vec<Spread> {
    let mut by_time: std::collections::BTreeMap<chrono::DateTime<chrono::Utc>, Vec<f64>> =
        std::collections::BTreeMap::new();
    for run in &s.runs {
        for h in &run.hours {
            if let Some(v) = what.of(run, h) {
                by_time.entry(h.time).or_default().push(v);
            }
        }
    }
    by_time
        .iter()
        .filter_map(|(t, v)| {
            let q = |p: f64| crate::plan::quantile(v, p);
            Some((*t, q(0.1)?, q(0.5)?, q(0.9)?))
        })
        .collect()
}

/// The runs' mean expected productivity on a day, and its 10th and 90th percentiles;
/// `None` for a single forecast or a day no run has.
fn run_productivity(s: &StretchInfo, date: chrono::NaiveDate) -> Option<(f64, f64, f64)> {
    let values: Vec<f64> = s
        .runs
        .iter()
        .filter_map(|r| r.day(date))
        .filter(|d| d.mean_index_m3s_per_100m.is_some())
        .map(|d| d.response.productivity.clamp(0.0, 1.0))
        .collect();
    let mean = values.iter().sum::<f64>() / values.len().max(1) as f64;
    Some((
        mean,
        crate::plan::quantile(&values, 0.1)?,
        crate::plan::quantile(&values, 0.9)?,
    ))
}

fn noon_x(plan: &Plan, date: chrono::NaiveDate, t0: chrono::DateTime<chrono::Utc>) -> f64 {
    hours_since(t0, crate::localtime::local_noon(plan.time_zone, date))
}

/// Runs of hours over the boat's wind or wave limit (at the stretch or on the way), as
/// x ranges.
fn unsafe_runs(plan: &Plan, s: &StretchInfo, t0: chrono::DateTime<chrono::Utc>) -> Vec<(f64, f64)> {
    let limits = crate::plan::Limits {
        wind_kt: plan.vessel.wind_limit_kt,
        wave_m: plan.vessel.wave_limit_m,
        steepness_m_s2: plan.vessel.steepness_limit_m_s2,
    };
    let mut runs: Vec<(f64, f64)> = Vec::new();
    for h in &s.hours {
        let hour = crate::plan::WorkingHour {
            time: h.time,
            wind_kt: s.route_wind_kt(h.time),
            wave_m: s.route_wave_m(h.time),
            steepness_m_s2: s.route_steepness_m_s2(h.time),
        };
        if hour.unsafe_for(&limits).is_some() {
            let x = hours_since(t0, h.time);
            match runs.last_mut() {
                Some(last) if (x - last.1) <= 1.01 => last.1 = x + 1.0,
                _ => runs.push((x, x + 1.0)),
            }
        }
    }
    runs
}
