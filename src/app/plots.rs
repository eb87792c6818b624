//! Plots of the selected stretches (several overlay for comparison).

use super::commands::Command;
use super::state::ShelfwindApp;
use crate::physics::m_s_to_knots;
use crate::plan::{Plan, StretchHour, StretchInfo};
use eframe::egui::{self, Color32, RichText};
use egui_plot::{Bar, BarChart, HLine, Legend, Line, Plot, PlotPoints, Points, Span, VLine};

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

    /// One line per chosen stretch of an hourly value (hours without it are skipped).
    fn hourly_lines(&self, p: &mut egui_plot::PlotUi<'_>, f: &dyn Fn(&StretchHour) -> Option<f64>) {
        for (k, s) in self.chosen.iter().enumerate() {
            let pts: Vec<[f64; 2]> = s
                .hours
                .iter()
                .filter_map(|h| f(h).map(|v| [hours_since(self.t0, h.time), v]))
                .collect();
            p.line(Line::new(s.name.clone(), PlotPoints::from(pts)).color(PALETTE[k]));
        }
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
            self.hourly_lines(p, &|h| Some(m_s_to_knots(h.wind.speed_m_s()) * factor));
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
                self.hourly_lines(p, &|h| Some(h.alongshore_stress_pa));
            });
    }

    fn index(&self, ui: &mut egui::Ui) {
        self.plot(ui, "index", "Upwelling index (m³/s per 100 m)")
            .show(ui, |p| {
                self.decorate(p, true);
                p.hline(HLine::new("0", 0.0).color(Color32::from_gray(120)));
                self.hourly_lines(p, &|h| Some(h.index_m3s_per_100m));
            });
    }

    fn pumping(&self, ui: &mut egui::Ui) {
        self.plot(ui, "pumping", "Ekman pumping offshore (m/day, grids only)")
            .show(ui, |p| {
                self.decorate(p, false);
                p.hline(HLine::new("0", 0.0).color(Color32::from_gray(120)));
                self.hourly_lines(p, &|h| h.pumping_m_s.map(|w| w * 86_400.0));
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
        self.plot(ui, "productivity", "Expected productivity (%), by day")
            .include_y(0.0)
            .include_y(100.0)
            .show(ui, |p| {
                self.decorate(p, false);
                let width = 20.0 / self.chosen.len() as f64;
                for (k, s) in self.chosen.iter().enumerate() {
                    let bars: Vec<Bar> = s
                        .days
                        .iter()
                        .map(|d| {
                            Bar::new(
                                noon_x(self.plan, d.date, self.t0) - 10.0
                                    + width * (k as f64 + 0.5),
                                100.0 * d.response.productivity,
                            )
                            .width(width * 0.9)
                        })
                        .collect();
                    p.bar_chart(BarChart::new(s.name.clone(), bars).color(PALETTE[k]));
                }
            });
    }
}

/// The plots panel.
pub(super) fn plots_ui(app: &mut ShelfwindApp, ui: &mut egui::Ui, _commands: &mut Vec<Command>) {
    let Some(plan) = app.plan.clone() else { return };
    let Some(&t0) = app.view.timeline.first() else {
        return;
    };
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
    let frame = PlotFrame {
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
