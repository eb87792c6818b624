//! The boats and home ports window: add, edit and remove boats (cruise speed, fuel use,
//! wind limit, wave limit, range) and ports (a name and a position, typed or clicked on
//! the map). Every change is one undoable edit and ranks the stretches again.

use super::commands::Command;
use super::edit::Edit;
use super::fields::{Fields, parse_number};
use super::state::{ShelfwindApp, Tool};
use crate::coast::LatLon;
use crate::export::units::Units;
use crate::plan::{
    CRUISE_SPEED_RANGE_KT, FUEL_RANGE_L_PER_H, Port, RANGE_RANGE_NM, STEEPNESS_LIMIT_RANGE_M_S2,
    Vessel, WAVE_LIMIT_RANGE_M, WIND_LIMIT_RANGE_KT,
};
use eframe::egui::{self, RichText};

/// The window's state between frames.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct BoatsView {
    /// Window shown.
    pub open: bool,
    /// The boat shown in the form (index).
    pub boat: usize,
    /// The port shown in the form (index).
    pub port: usize,
    /// The form's fields as typed.
    pub fields: Fields,
}

/// A fresh id from a name: lowercase words joined by hyphens, numbered if taken.
fn fresh_id(name: &str, taken: &[&str]) -> String {
    let stem: String = name
        .to_lowercase()
        .split(|c: char| !c.is_alphanumeric())
        .filter(|w| !w.is_empty())
        .collect::<Vec<_>>()
        .join("-");
    let stem = if stem.is_empty() { "item".into() } else { stem };
    (1..=taken.len() + 1)
        .map(|n| {
            if n == 1 {
                stem.clone()
            } else {
                format!("{stem}-{n}")
            }
        })
        .find(|id| !taken.contains(&id.as_str()))
        .unwrap_or(stem)
}

/// A new boat, with cautious defaults for a small day boat.
fn new_vessel(vessels: &[Vessel]) -> Vessel {
    let taken: Vec<&str> = vessels.iter().map(|v| v.id.as_str()).collect();
    let name = format!("Boat {}", vessels.len() + 1);
    Vessel {
        id: fresh_id(&name, &taken),
        name,
        cruise_speed_kt: 15.0,
        fuel_l_per_h: 20.0,
        wind_limit_kt: 18.0,
        wave_limit_m: None,
        range_nm: 15.0,
        steepness_limit_m_s2: None,
    }
}

/// The boat form: every field, each committed as it loses focus.
fn vessel_form(
    fields: &mut Fields,
    ui: &mut egui::Ui,
    vessel: &Vessel,
    (index, units): (usize, Units),
) -> Option<Vessel> {
    let base = ui.scope_id().with(("boat-form", index));
    let id = |what: &str| base.with(what);
    let v = vessel;
    let mut out = v.clone();
    let mut changed = false;
    ui.horizontal(|ui| {
        if let Some(name) = fields.line(ui, "Boat name", id("name"), &v.name, 260.0) {
            out.name = name;
            changed = true;
        }
    });
    egui::Grid::new(("boat-grid", index))
        .num_columns(4)
        .show(ui, |ui| {
            // Each number in the units chosen for display, stored in the file's units.
            let mut number = |label: &str,
                              (factor, unit): (f64, &str),
                              value: &mut f64,
                              range: &std::ops::RangeInclusive<f64>| {
                let shown = (*range.start() * factor)..=(*range.end() * factor);
                if let Some(x) =
                    fields.number(ui, (label, unit), id(label), *value * factor, &shown)
                {
                    *value = x / factor;
                    changed = true;
                }
            };
            let (distance, nm, kt) = units.distance_scale();
            let (fuel_factor, fuel) = units.fuel_scale();
            let fuel_rate = format!("{fuel}/h");
            number(
                "Cruising speed",
                (distance, kt),
                &mut out.cruise_speed_kt,
                &CRUISE_SPEED_RANGE_KT,
            );
            number(
                "Fuel use",
                (fuel_factor, &fuel_rate),
                &mut out.fuel_l_per_h,
                &FUEL_RANGE_L_PER_H,
            );
            number(
                "Wind limit",
                units.wind_scale(),
                &mut out.wind_limit_kt,
                &WIND_LIMIT_RANGE_KT,
            );
            number(
                "Range (one way)",
                (distance, nm),
                &mut out.range_nm,
                &RANGE_RANGE_NM,
            );
            let optional = |fields: &mut Fields,
                            ui: &mut egui::Ui,
                            (label, key, unit): (&str, &str, &str),
                            stored: Option<f64>,
                            range: &std::ops::RangeInclusive<f64>| {
                let shown = stored.map(super::fields::number_text).unwrap_or_default();
                let typed = fields.line(ui, label, id(key), &shown, 70.0);
                ui.label(format!("{unit} (empty: none)"));
                let out = typed.and_then(|t| {
                    let parsed = if t.trim().is_empty() {
                        Ok(None)
                    } else {
                        parse_number(&t, range, unit).map(Some)
                    };
                    fields.set_error(id(key), parsed.as_ref().err().cloned());
                    parsed.ok()
                });
                fields.message(ui, id(key));
                out
            };
            if let Some(w) = optional(
                fields,
                ui,
                ("Wave limit", "wave", "m"),
                v.wave_limit_m,
                &WAVE_LIMIT_RANGE_M,
            ) {
                out.wave_limit_m = w;
                changed = true;
            }
            if let Some(x) = optional(
                fields,
                ui,
                ("Steepness limit", "steep", "m/s² (height / period²)"),
                v.steepness_limit_m_s2,
                &STEEPNESS_LIMIT_RANGE_M_S2,
            ) {
                out.steepness_limit_m_s2 = x;
                changed = true;
            }
        });
    changed.then_some(out)
}

/// The port form: name and position.
fn port_form(fields: &mut Fields, ui: &mut egui::Ui, p: &Port, k: usize) -> Option<Port> {
    let base = ui.scope_id().with(("port-form", k));
    let id = |what: &str| base.with(what);
    let mut out = p.clone();
    let mut changed = false;
    ui.horizontal(|ui| {
        if let Some(name) = fields.line(ui, "Port name", id("name"), &p.name, 260.0) {
            out.name = name;
            changed = true;
        }
    });
    egui::Grid::new(("port-grid", k))
        .num_columns(4)
        .show(ui, |ui| {
            let lat = fields.number(
                ui,
                ("Latitude", "° (north +)"),
                id("lat"),
                p.position.lat_deg,
                &(-90.0..=90.0),
            );
            let lon = fields.number(
                ui,
                ("Longitude", "° (east +)"),
                id("lon"),
                p.position.lon_deg,
                &(-180.0..=180.0),
            );
            if lat.is_some() || lon.is_some() {
                out.position = LatLon::new(
                    lat.unwrap_or(p.position.lat_deg),
                    lon.unwrap_or(p.position.lon_deg),
                );
                changed = true;
            }
        });
    changed.then_some(out)
}

/// The boats half of the window.
fn boats_ui(app: &mut ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    let vessels = app.doc.scenario.vessels.clone();
    let units = app.view.units;
    let view = &mut app.view.boats;
    ui.heading("Boats");
    ui.horizontal_wrapped(|ui| {
        for (k, v) in vessels.iter().enumerate() {
            if ui.selectable_label(view.boat == k, &v.name).clicked() {
                view.boat = k;
                view.fields.clear();
            }
        }
        if ui.button("Add a boat").clicked() {
            let mut list = vessels.clone();
            let boat = new_vessel(&vessels);
            // A boat being set up is the one to plan for.
            commands.push(Command::SetVessel(boat.id.clone()));
            list.push(boat);
            view.boat = list.len() - 1;
            view.fields.clear();
            commands.insert(0, Command::Edit(Edit::SetVessels(list)));
        }
    });
    let Some(v) = vessels.get(view.boat) else {
        ui.label("No boat yet: add one to plan trips.");
        return;
    };
    if let Some(changed) = vessel_form(&mut view.fields, ui, v, (view.boat, units)) {
        let mut list = vessels.clone();
        list[view.boat] = changed;
        commands.push(Command::Edit(Edit::SetVessels(list)));
    }
    if ui.button("Remove this boat").clicked() {
        let mut list = vessels.clone();
        list.remove(view.boat);
        view.boat = view.boat.saturating_sub(1);
        view.fields.clear();
        commands.push(Command::Edit(Edit::SetVessels(list)));
    }
}

/// The ports half of the window.
fn ports_ui(app: &mut ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    let ports = app.doc.scenario.ports.clone();
    let centre = app.coast_centre().unwrap_or(LatLon::new(0.0, 0.0));
    let view = &mut app.view.boats;
    ui.heading("Home ports");
    ui.horizontal_wrapped(|ui| {
        for (k, p) in ports.iter().enumerate() {
            if ui.selectable_label(view.port == k, &p.name).clicked() {
                view.port = k;
                view.fields.clear();
            }
        }
        if ui.button("Add a port").clicked() {
            let taken: Vec<&str> = ports.iter().map(|p| p.id.as_str()).collect();
            let name = format!("Port {}", ports.len() + 1);
            let mut list = ports.clone();
            list.push(Port {
                id: fresh_id(&name, &taken),
                name,
                position: centre,
            });
            view.port = list.len() - 1;
            view.fields.clear();
            commands.push(Command::Edit(Edit::SetPorts(list)));
        }
    });
    let Some(p) = ports.get(view.port) else {
        ui.label("No home port yet: add one to plan trips.");
        return;
    };
    if let Some(changed) = port_form(&mut view.fields, ui, p, view.port) {
        let mut list = ports.clone();
        list[view.port] = changed;
        commands.push(Command::Edit(Edit::SetPorts(list)));
    }
    ui.horizontal(|ui| {
        if ui.button("Place it on the map").clicked() {
            commands.push(Command::SetTool(Tool::PlacePort(view.port)));
        }
        if ui.button("Remove this port").clicked() {
            let mut list = ports.clone();
            list.remove(view.port);
            view.port = view.port.saturating_sub(1);
            view.fields.clear();
            commands.push(Command::Edit(Edit::SetPorts(list)));
        }
    });
}

/// The boats and home ports window.
pub(super) fn boats_window(
    app: &mut ShelfwindApp,
    ctx: &egui::Context,
    commands: &mut Vec<Command>,
) {
    let mut open = true;
    egui::Window::new("Boats and home ports")
        .open(&mut open)
        .default_width(560.0)
        .vscroll(true)
        .show(ctx, |ui| {
            ui.label(
                RichText::new("Your boat's limits are yours to set: the plan keeps to them.")
                    .small()
                    .weak(),
            );
            boats_ui(app, ui, commands);
            ui.separator();
            ports_ui(app, ui, commands);
        });
    if !open {
        app.view.boats.open = false;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ids_come_from_names_and_stay_unique() {
        assert_eq!(fresh_id("Sea Swallow (7 m)", &[]), "sea-swallow-7-m");
        assert_eq!(fresh_id("Boat 2", &["boat-2"]), "boat-2-2");
        assert_eq!(fresh_id("!!", &[]), "item");
    }
}
