//! The stretches chosen for comparison, side by side: rank and score with its parts,
//! the safe window, distance, and the day's upwelling.

use crate::export::units::Units;
use crate::plan::Plan;
use eframe::egui::{self, RichText};

/// One row of the comparison: a label and a value per stretch.
type Row = (&'static str, Vec<String>);

/// The comparison's rows for stretches `chosen` (indices into the plan) on `day`.
fn rows(plan: &Plan, day: usize, chosen: &[usize], units: Units) -> Vec<Row> {
    let tz = plan.time_zone;
    let day_plan = plan.days.get(day);
    let date = day_plan.map(|d| d.date);
    let ranked = |k: usize| day_plan.and_then(|d| d.ranked.iter().find(|r| r.stretch == k));
    let per = |f: &dyn Fn(usize) -> String| chosen.iter().map(|&k| f(k)).collect();
    let part = |f: &dyn Fn(&crate::plan::RankedStretch) -> String| {
        per(&|k| ranked(k).map_or_else(|| "left out".to_string(), f))
    };
    let upwelling = |k: usize| date.and_then(|d| plan.stretches[k].day(d));
    vec![
        (
            "Rank",
            part(&|r| {
                if r.tied_with_above {
                    format!("={}", r.rank)
                } else {
                    r.rank.to_string()
                }
            }),
        ),
        ("Score", part(&|r| format!("{:.0}", r.score))),
        (
            "Productivity",
            part(&|r| format!("{:.0} %", 100.0 * r.productivity)),
        ),
        (
            "Window factor",
            part(&|r| format!("{:.2}", r.window_factor)),
        ),
        (
            "Distance factor",
            part(&|r| format!("{:.2}", r.distance_factor)),
        ),
        (
            "Safe window (local)",
            part(&|r| {
                format!(
                    "{}–{}",
                    r.safe_window.0.with_timezone(&tz).format("%H:%M"),
                    r.safe_window.1.with_timezone(&tz).format("%H:%M")
                )
            }),
        ),
        (
            "Fishing hours",
            part(&|r| format!("{:.1} h", r.fishing_hours)),
        ),
        (
            "Distance",
            per(&|k| units.distance(plan.stretches[k].distance_nm)),
        ),
        (
            "Mean index",
            per(&|k| {
                upwelling(k)
                    .and_then(|d| d.mean_index_m3s_per_100m)
                    .map_or("no wind".into(), |m| format!("{m:.0} m³/s per 100 m"))
            }),
        ),
        (
            "Ekman pumping",
            per(&|k| {
                upwelling(k)
                    .and_then(|d| d.mean_pumping_m_s)
                    .map_or("none (no grid)".into(), |w| {
                        format!("{:.2} m/day", w * 86_400.0)
                    })
            }),
        ),
    ]
}

/// The comparison table of the chosen stretches.
pub(super) fn compare_ui(
    plan: &Plan,
    (day, units): (usize, Units),
    chosen: &[usize],
    ui: &mut egui::Ui,
) {
    ui.label(RichText::new("Side by side, on the chosen day").strong());
    egui::Grid::new("compare")
        .striped(true)
        .num_columns(chosen.len() + 1)
        .show(ui, |ui| {
            ui.label("");
            for &k in chosen {
                ui.label(RichText::new(&plan.stretches[k].name).strong());
            }
            ui.end_row();
            for (label, values) in rows(plan, day, chosen, units) {
                ui.label(label);
                for v in values {
                    ui.label(v);
                }
                ui.end_row();
            }
        });
}
