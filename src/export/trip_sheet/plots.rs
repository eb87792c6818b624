//! The trip sheet's plots: the wind and the upwelling index hour by hour through the
//! local day at one stretch, as inline SVG.

use super::{
    day_bounds, esc, halo_text, local, nice_step, num, points_attr, rank_label, utc, utc_offset,
};
use crate::export::colour::{SAFE_ALL_DAY, SAFE_NOT, hex, index_colour};
use crate::physics::m_s_to_knots;
use crate::plan::{DayPlan, Plan, RankedStretch, StretchHour, StretchInfo};
use chrono::{DateTime, Duration, NaiveDate, Utc};
use chrono_tz::Tz;
use std::fmt::Write as _;

/// How many of the day's best stretches get wind and index plots.
const PLOTTED_STRETCHES: usize = 3;

/// Size and margins of one plot, SVG units.
const PLOT_W: f64 = 460.0;
const PLOT_H: f64 = 230.0;
const PLOT_LEFT: f64 = 50.0;
const PLOT_RIGHT: f64 = 12.0;
const PLOT_TOP: f64 = 36.0;
const PLOT_BOTTOM: f64 = 42.0;

/// One local day on the x axis, a value range on the y axis.
struct Chart {
    tz: Tz,
    t0: DateTime<Utc>,
    span_h: f64,
    lo: f64,
    hi: f64,
    step: f64,
}

impl Chart {
    fn x(&self, t: DateTime<Utc>) -> f64 {
        let h = (t - self.t0).num_seconds() as f64 / 3600.0;
        PLOT_LEFT + (PLOT_W - PLOT_LEFT - PLOT_RIGHT) * (h / self.span_h).clamp(0.0, 1.0)
    }

    fn y(&self, v: f64) -> f64 {
        let share = ((v - self.lo) / (self.hi - self.lo)).clamp(0.0, 1.0);
        PLOT_H - PLOT_BOTTOM - (PLOT_H - PLOT_TOP - PLOT_BOTTOM) * share
    }

    /// Grid, ticks and axis labels.
    fn axes(&self, o: &mut String, y_label: &str, x_label: &str) {
        let (left, right) = (PLOT_LEFT, PLOT_W - PLOT_RIGHT);
        let (top, bottom) = (PLOT_TOP, PLOT_H - PLOT_BOTTOM);
        let ticks = ((self.hi - self.lo) / self.step).round() as i64;
        for k in 0..=ticks {
            let v = self.lo + self.step * k as f64;
            let y = self.y(v);
            let _ = writeln!(
                o,
                "<line x1=\"{left:.1}\" y1=\"{y:.1}\" x2=\"{right:.1}\" y2=\"{y:.1}\" stroke=\"#c8c8c8\" stroke-width=\"0.8\"/>"
            );
            let _ = writeln!(
                o,
                "<text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"end\" font-size=\"13\">{}</text>",
                left - 5.0,
                y + 4.5,
                num(v)
            );
        }
        let mut h = 0;
        while f64::from(h) <= self.span_h + 1e-9 {
            let t = self.t0 + Duration::hours(i64::from(h));
            let x = self.x(t);
            let _ = writeln!(
                o,
                "<line x1=\"{x:.1}\" y1=\"{bottom:.1}\" x2=\"{x:.1}\" y2=\"{:.1}\" stroke=\"#000\" stroke-width=\"1\"/>",
                bottom + 4.0
            );
            // The day's end is "24", not a second "00".
            let label = if h > 0 && (f64::from(h) - self.span_h).abs() < 1e-9 {
                "24".to_string()
            } else {
                t.with_timezone(&self.tz).format("%H").to_string()
            };
            let _ = writeln!(
                o,
                "<text x=\"{x:.1}\" y=\"{:.1}\" text-anchor=\"middle\" font-size=\"13\">{label}</text>",
                bottom + 17.0
            );
            h += 3;
        }
        let _ = writeln!(
            o,
            "<rect x=\"{left:.1}\" y=\"{top:.1}\" width=\"{:.1}\" height=\"{:.1}\" fill=\"none\" stroke=\"#000\" stroke-width=\"1\"/>",
            right - left,
            bottom - top
        );
        let _ = writeln!(
            o,
            "<text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"middle\" font-size=\"13\">{}</text>",
            f64::midpoint(left, right),
            PLOT_H - 6.0,
            esc(x_label)
        );
        let (ly, lx) = (f64::midpoint(top, bottom), 13.0);
        let _ = writeln!(
            o,
            "<text x=\"{lx:.1}\" y=\"{ly:.1}\" text-anchor=\"middle\" font-size=\"13\" transform=\"rotate(-90 {lx:.1} {ly:.1})\">{}</text>",
            esc(y_label)
        );
    }
}

/// A y range from `lo` to `hi` on round ticks, about five of them.
fn nice_range(lo: f64, hi: f64) -> (f64, f64, f64) {
    let step = nice_step((hi - lo) / 5.0);
    ((lo / step).floor() * step, (hi / step).ceil() * step, step)
}

fn svg_open(o: &mut String, label: &str) {
    let _ = writeln!(
        o,
        "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {PLOT_W:.0} {PLOT_H:.0}\" role=\"img\" aria-label=\"{}\" font-family=\"DejaVu Sans, Liberation Sans, Arial, sans-serif\">",
        esc(label)
    );
}

fn day_hours(s: &StretchInfo, t0: DateTime<Utc>, t1: DateTime<Utc>) -> Vec<&StretchHour> {
    s.hours
        .iter()
        .filter(|h| h.time >= t0 && h.time < t1)
        .collect()
}

fn no_data(o: &mut String) {
    let _ = writeln!(
        o,
        "<text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"middle\" font-size=\"14\">no forecast for this day</text>",
        f64::midpoint(PLOT_LEFT, PLOT_W - PLOT_RIGHT),
        f64::midpoint(PLOT_TOP, PLOT_H - PLOT_BOTTOM)
    );
}

/// The wind that decides the safe window: the strongest on the way and at the stretch,
/// knots (the wind at the stretch where part of the way has no forecast).
fn deciding_wind_kt(s: &StretchInfo, h: &StretchHour) -> f64 {
    s.route_wind_kt(h.time)
        .unwrap_or_else(|| m_s_to_knots(h.wind.speed_m_s()))
}

fn wind_plot(
    o: &mut String,
    plan: &Plan,
    s: &StretchInfo,
    r: &RankedStretch,
    plot_no: usize,
    date: NaiveDate,
) {
    let tz = plan.time_zone;
    let (t0, t1) = day_bounds(tz, date);
    let hours = day_hours(s, t0, t1);
    let limit = plan.vessel.wind_limit_kt;
    let strongest = hours
        .iter()
        .map(|h| deciding_wind_kt(s, h))
        .fold(0.0, f64::max);
    let (_, hi, step) = nice_range(0.0, strongest.max(limit * 1.2).max(5.0));
    let chart = Chart {
        tz,
        t0,
        span_h: (t1 - t0).num_seconds() as f64 / 3600.0,
        lo: 0.0,
        hi,
        step,
    };
    svg_open(o, &format!("Wind through the day at {}", s.name));
    let over = hex(SAFE_NOT);
    let _ = writeln!(
        o,
        "<defs><pattern id=\"over-{plot_no}\" width=\"7\" height=\"7\" patternUnits=\"userSpaceOnUse\" patternTransform=\"rotate(45)\"><rect width=\"7\" height=\"7\" fill=\"{over}\" fill-opacity=\"0.12\"/><line x1=\"0\" y1=\"0\" x2=\"0\" y2=\"7\" stroke=\"{over}\" stroke-width=\"2.2\"/></pattern></defs>"
    );
    let _ = writeln!(
        o,
        "<text x=\"{PLOT_LEFT:.1}\" y=\"14\" font-size=\"14\" font-weight=\"bold\">Wind, kt<tspan font-weight=\"normal\" font-size=\"12.5\"> · safe {}–{} ({}–{})</tspan></text>",
        local(tz, r.safe_window.0),
        local(tz, r.safe_window.1),
        utc(r.safe_window.0),
        utc(r.safe_window.1)
    );
    // The safe window as a bar along the top of the plot.
    let (sx0, sx1) = (chart.x(r.safe_window.0), chart.x(r.safe_window.1));
    let _ = writeln!(
        o,
        "<rect x=\"{sx0:.1}\" y=\"{:.1}\" width=\"{:.1}\" height=\"7\" fill=\"{}\" stroke=\"#000\" stroke-width=\"0.8\"/>",
        PLOT_TOP - 11.0,
        (sx1 - sx0).max(1.0),
        hex(SAFE_ALL_DAY)
    );
    let top = chart.y(hi);
    let bottom = chart.y(0.0);
    for h in hours.iter().filter(|h| deciding_wind_kt(s, h) > limit) {
        let x0 = chart.x(h.time);
        let x1 = chart.x(h.time + Duration::hours(1));
        let _ = writeln!(
            o,
            "<rect class=\"over\" x=\"{x0:.1}\" y=\"{top:.1}\" width=\"{:.1}\" height=\"{:.1}\" fill=\"url(#over-{plot_no})\"/>",
            x1 - x0,
            bottom - top
        );
    }
    chart.axes(
        o,
        "wind, kt",
        &format!("local time ({})", utc_offset(tz, date)),
    );
    let ly = chart.y(limit);
    let _ = writeln!(
        o,
        "<line class=\"limit\" x1=\"{PLOT_LEFT:.1}\" y1=\"{ly:.1}\" x2=\"{:.1}\" y2=\"{ly:.1}\" stroke=\"#000\" stroke-width=\"1.6\" stroke-dasharray=\"8 5\"/>",
        PLOT_W - PLOT_RIGHT
    );
    halo_text(
        o,
        PLOT_W - PLOT_RIGHT - 4.0,
        ly - 5.0,
        "end",
        12.5,
        false,
        &format!("limit {} kt", num(limit)),
    );
    if hours.is_empty() {
        no_data(o);
    } else {
        let xy: Vec<(f64, f64)> = hours
            .iter()
            .map(|h| {
                (
                    chart.x(h.time + Duration::minutes(30)),
                    chart.y(deciding_wind_kt(s, h)),
                )
            })
            .collect();
        let _ = writeln!(
            o,
            "<polyline class=\"wind\" points=\"{}\" fill=\"none\" stroke=\"#000\" stroke-width=\"2.4\" stroke-linejoin=\"round\"/>",
            points_attr(&xy)
        );
    }
    let _ = writeln!(o, "</svg>");
}

fn index_plot(o: &mut String, plan: &Plan, s: &StretchInfo, date: NaiveDate) {
    let tz = plan.time_zone;
    let (t0, t1) = day_bounds(tz, date);
    let hours = day_hours(s, t0, t1);
    let (lo, hi) = hours.iter().fold((0.0_f64, 0.0_f64), |(lo, hi), h| {
        (lo.min(h.index_m3s_per_100m), hi.max(h.index_m3s_per_100m))
    });
    // Never a range so small that noise looks like an event.
    let (lo, hi) = if hi - lo < 20.0 {
        (lo.min(-10.0), hi.max(10.0))
    } else {
        (lo, hi)
    };
    let (lo, hi, step) = nice_range(lo, hi);
    let chart = Chart {
        tz,
        t0,
        span_h: (t1 - t0).num_seconds() as f64 / 3600.0,
        lo,
        hi,
        step,
    };
    svg_open(o, &format!("Upwelling index through the day at {}", s.name));
    let _ = writeln!(
        o,
        "<text x=\"{PLOT_LEFT:.1}\" y=\"14\" font-size=\"14\" font-weight=\"bold\">Upwelling index<tspan font-weight=\"normal\" font-size=\"12.5\"> · above 0: upwelling</tspan></text>"
    );
    chart.axes(
        o,
        "m³/s per 100 m",
        &format!("local time ({})", utc_offset(tz, date)),
    );
    let zero = chart.y(0.0);
    for h in &hours {
        let x0 = chart.x(h.time) + 0.6;
        let x1 = chart.x(h.time + Duration::hours(1)) - 0.6;
        let y = chart.y(h.index_m3s_per_100m);
        let _ = writeln!(
            o,
            "<rect class=\"index\" x=\"{x0:.1}\" y=\"{:.1}\" width=\"{:.1}\" height=\"{:.1}\" fill=\"{}\" stroke=\"#333\" stroke-width=\"0.5\"/>",
            y.min(zero),
            (x1 - x0).max(0.5),
            (y - zero).abs(),
            hex(index_colour(h.index_m3s_per_100m))
        );
    }
    let _ = writeln!(
        o,
        "<line class=\"zero\" x1=\"{PLOT_LEFT:.1}\" y1=\"{zero:.1}\" x2=\"{:.1}\" y2=\"{zero:.1}\" stroke=\"#000\" stroke-width=\"1.4\"/>",
        PLOT_W - PLOT_RIGHT
    );
    if hours.is_empty() {
        no_data(o);
    }
    let _ = writeln!(o, "</svg>");
}

pub(super) fn plots_section(o: &mut String, plan: &Plan, day: &DayPlan) {
    if day.ranked.is_empty() {
        return;
    }
    let shown = day.ranked.len().min(PLOTTED_STRETCHES);
    let _ = writeln!(
        o,
        "<h2>Through the day at the best {}</h2>",
        if shown == 1 {
            "stretch".to_string()
        } else {
            format!("{shown} stretches")
        }
    );
    for (n, r) in day.ranked.iter().take(PLOTTED_STRETCHES).enumerate() {
        let s = &plan.stretches[r.stretch];
        let _ = writeln!(o, "<div class=\"plotblock\">");
        let _ = writeln!(
            o,
            "<h3>{} · {} · score {:.0}</h3>",
            esc(&rank_label(r)),
            esc(&s.name),
            r.score
        );
        let _ = writeln!(o, "<div class=\"plots\">");
        wind_plot(o, plan, s, r, n + 1, day.date);
        index_plot(o, plan, s, day.date);
        let _ = writeln!(o, "</div>");
        let _ = writeln!(o, "</div>");
    }
    let _ = writeln!(
        o,
        "<p class=\"caption\">Wind: hour by hour, the strongest on the way from {} and at the stretch, which is what the safe window is measured by; dashed line: this boat's {} kt limit; hatched: hours over it; bar along the top: the safe window. Upwelling index: the offshore Ekman transport at the stretch, m³/s per 100 m of coast; bars above the line (blue) are upwelling, below it (orange) downwelling.</p>",
        esc(&plan.port.name),
        num(plan.vessel.wind_limit_kt)
    );
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn round_steps_for_scale_bars_and_ticks() {
        for (target, step) in [
            (2.4, 2.0),
            (4.0, 5.0),
            (0.9, 1.0),
            (0.0, 1.0),
            (130.0, 100.0),
        ] {
            assert!((nice_step(target) - step).abs() < 1e-9, "{target}");
        }
        let (lo, hi, step) = nice_range(-10.0, 240.0);
        assert!(
            (lo + 50.0).abs() < 1e-9 && (hi - 250.0).abs() < 1e-9 && (step - 50.0).abs() < 1e-9
        );
    }
}
