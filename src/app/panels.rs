//! The panels around the map: menus, the ranked list, the time bar, the segment editor,
//! settings, and the dialogs. Each `*_ui` draws and pushes commands; nothing here
//! changes the document directly.

use super::commands::{Command, FileAction};
use super::state::{BaseLayer, Colouring, ShelfwindApp, Tool};
use crate::export::units::Units;
use crate::export::{colour, plan_text};
use crate::plan::{DayPlan, Plan, PlanNote, RankedStretch};
use eframe::egui::{self, Color32, RichText};

/// Ranked stretches listed before "Show all".
const RANKED_SHOWN: usize = 30;

/// Text sizes a skipper can read at arm's length.
pub(super) fn style(ctx: &egui::Context) {
    ctx.global_style_mut(|style| {
        for (text_style, size) in [
            (egui::TextStyle::Body, 15.0),
            (egui::TextStyle::Button, 15.0),
            (egui::TextStyle::Small, 12.5),
            (egui::TextStyle::Heading, 20.0),
            (egui::TextStyle::Monospace, 14.0),
        ] {
            if let Some(font) = style.text_styles.get_mut(&text_style) {
                font.size = size;
            }
        }
        style.spacing.item_spacing = egui::vec2(8.0, 6.0);
        // Light, like the chart and the map: legible in daylight at the dock.
        style.visuals = egui::Visuals::light();
    });
}

/// Everything, in order: bars and side panels first, the map in what is left.
pub(super) fn all_ui(app: &mut ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    let now = ui.input(|i| i.time);
    if let Some(c) = app.poll_native_dialog(now) {
        commands.push(c);
    }
    egui::Panel::top("menu").show(ui, |ui| menu_ui(app, ui, commands));
    egui::Panel::bottom("status").show(ui, |ui| status_ui(app, ui, commands));
    fit_to_screen(app, ui.ctx());
    if app.view.show_plots && app.plan.is_some() {
        // A third of the window at most by default, so a small screen keeps its map.
        let height = ui.ctx().content_rect().height();
        egui::Panel::bottom("plots")
            .resizable(true)
            .default_size((height * 0.33).clamp(170.0, 400.0))
            .max_size(height * 0.6)
            .show(ui, |ui| {
                super::plots::plots_ui(app, ui, commands);
            });
    }
    egui::Panel::bottom("time").show(ui, |ui| time_ui(app, ui, commands));
    egui::Panel::left("ranked")
        .resizable(true)
        .default_size(400.0)
        .show(ui, |ui| ranked_ui(app, ui, commands));
    if app.view.editing.is_some() {
        egui::Panel::right("editor")
            .resizable(true)
            .default_size(300.0)
            .show(ui, |ui| super::editor::editor_ui(app, ui, commands));
    }
    egui::CentralPanel::default().show(ui, |ui| {
        map_toolbar_ui(app, ui, commands);
        super::map::map_ui(app, ui, commands);
    });
    super::dialogs::windows_ui(app, ui.ctx(), commands);
}

/// On a small screen (under 700 points tall) the map and the ranked list come first:
/// the plots and the legend start hidden, a click away in the map's toolbar.
fn fit_to_screen(app: &mut ShelfwindApp, ctx: &egui::Context) {
    if app.view.fitted_to_screen {
        return;
    }
    app.view.fitted_to_screen = true;
    if ctx.content_rect().height() < 700.0 {
        app.view.show_plots = false;
        app.view.show_legend = false;
    }
}

fn menu_ui(app: &mut ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    egui::MenuBar::new().ui(ui, |ui| {
        ui.menu_button("File", |ui| file_menu(ui, commands));
        ui.menu_button("Edit", |ui| edit_menu(app, ui, commands));
        ui.menu_button("Seasons", |ui| {
            if ui.button("Compare seasons of historical wind…").clicked() {
                app.season.open = true;
                ui.close();
            }
            if ui
                .button("Check against measured sea temperature…")
                .clicked()
            {
                app.open_check();
                ui.close();
            }
            if ui.button("Calibrate on a catch log…").clicked() {
                app.open_calibrate();
                ui.close();
            }
        });
        ui.menu_button("Help", |ui| {
            if ui.button("Guide").clicked() {
                app.view.help = super::help::HelpPage::Guide;
                ui.close();
            }
            if ui.button("Data and licences").clicked() {
                app.view.help = super::help::HelpPage::Sources;
                ui.close();
            }
            if ui.button("Cautions").clicked() {
                app.dialogs.show_cautions = true;
                ui.close();
            }
        });
        ui.separator();
        quick_buttons(app, ui, commands);
        ui.separator();
        boat_and_port_ui(app, ui, commands);
    });
}

/// The File menu: every file action, in groups split by separators.
fn file_menu(ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    use FileAction as F;
    let ask = Command::AskFile;
    let groups: [&[(&str, Command)]; 4] = [
        &[
            ("Open scenario…", ask(F::OpenScenario)),
            ("Open the demo", Command::OpenDemo),
            ("Save", Command::Save),
            ("Save as…", ask(F::SaveScenarioAs)),
        ],
        &[
            ("Add a wind file…", ask(F::ImportWind)),
            ("Wind files…", Command::ShowWindFiles),
            ("Import coast (GeoJSON)…", ask(F::ImportCoast)),
            ("Export coast (GeoJSON)…", ask(F::ExportCoast)),
            ("Add a map pack…", ask(F::AddMapPack)),
            ("Use a coast pack…", ask(F::UseCoastPack)),
            (
                "Use the bundled land only",
                Command::Edit(super::edit::Edit::SetCoastPack(None)),
            ),
        ],
        &[
            ("Export plan (CSV)…", ask(F::ExportPlanCsv)),
            ("Export plan (JSON)…", ask(F::ExportPlanJson)),
            ("Export stretches (GeoJSON)…", ask(F::ExportPlanGeoJson)),
            ("Export GPX: each day's best three…", ask(F::ExportGpx)),
            (
                "Export GPX: the selected stretches…",
                ask(F::ExportGpxSelected),
            ),
            ("Export trip sheet (HTML)…", ask(F::ExportTripSheet)),
        ],
        &[("Quit", Command::Quit)],
    ];
    for (k, group) in groups.iter().enumerate() {
        if k > 0 {
            ui.separator();
        }
        for (label, command) in *group {
            if ui.button(*label).clicked() {
                commands.push(command.clone());
                ui.close();
            }
        }
    }
}

/// The Edit menu: undo, redo, drawing and the model settings.
fn edit_menu(app: &mut ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    if ui
        .add_enabled(
            !app.undo.is_empty(),
            egui::Button::new("Undo").shortcut_text("Ctrl+Z"),
        )
        .clicked()
    {
        commands.push(Command::Undo);
        ui.close();
    }
    if ui
        .add_enabled(
            !app.redo.is_empty(),
            egui::Button::new("Redo").shortcut_text("Ctrl+Shift+Z"),
        )
        .clicked()
    {
        commands.push(Command::Redo);
        ui.close();
    }
    ui.separator();
    if ui.button("Draw a new segment").clicked() {
        commands.push(Command::SetTool(Tool::Draw { points: Vec::new() }));
        ui.close();
    }
    ui.menu_button("Units", |ui| units_menu(&mut app.view.units, ui));
    if ui.button("Model settings…").clicked() {
        app.dialogs.show_settings = true;
        ui.close();
    }
}

/// The units of what is shown (files keep theirs).
fn units_menu(units: &mut Units, ui: &mut egui::Ui) {
    use crate::export::units::{DistanceUnit, FuelUnit, WindUnit};
    ui.label(RichText::new("Wind").strong());
    ui.radio_value(&mut units.wind, WindUnit::Knots, "knots");
    ui.radio_value(&mut units.wind, WindUnit::MetresPerSecond, "m/s");
    ui.radio_value(&mut units.wind, WindUnit::Beaufort, "Beaufort force");
    ui.separator();
    ui.label(RichText::new("Distance and boat speed").strong());
    ui.radio_value(
        &mut units.distance,
        DistanceUnit::NauticalMiles,
        "nautical miles, knots",
    );
    ui.radio_value(
        &mut units.distance,
        DistanceUnit::Kilometres,
        "kilometres, km/h",
    );
    ui.separator();
    ui.label(RichText::new("Fuel").strong());
    ui.radio_value(&mut units.fuel, FuelUnit::Litres, "litres");
    ui.radio_value(&mut units.fuel, FuelUnit::UsGallons, "US gallons");
}

/// Undo, redo and drawing, one click away.
fn quick_buttons(app: &ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    // The undo and redo buttons, and drawing, one click away.
    if ui
        .add_enabled(!app.undo.is_empty(), egui::Button::new("Undo"))
        .on_hover_text("Undo (Ctrl+Z)")
        .clicked()
    {
        commands.push(Command::Undo);
    }
    if ui
        .add_enabled(!app.redo.is_empty(), egui::Button::new("Redo"))
        .on_hover_text("Redo (Ctrl+Shift+Z or Ctrl+Y)")
        .clicked()
    {
        commands.push(Command::Redo);
    }
    let drawing = matches!(app.view.tool, Tool::Draw { .. });
    if ui.selectable_label(drawing, "Draw segment").clicked() {
        commands.push(Command::SetTool(if drawing {
            Tool::Select
        } else {
            Tool::Draw { points: Vec::new() }
        }));
    }
    if drawing && ui.button("Finish segment").clicked() {
        commands.push(Command::FinishDraft);
    }
}

/// The boat and home port the plan is for.
fn boat_and_port_ui(app: &ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    let scenario = &app.doc.scenario;
    let vessel_name = |id: &Option<String>| {
        scenario
            .vessels
            .iter()
            .find(|v| Some(&v.id) == id.as_ref())
            .or(scenario.vessels.first())
            .map_or("(no boat)".to_string(), |v| v.name.clone())
    };
    let label = ui.label("Boat:");
    egui::ComboBox::from_id_salt("boat")
        .selected_text(vessel_name(&app.view.vessel_id))
        .show_ui(ui, |ui| {
            for v in &scenario.vessels {
                if ui
                    .selectable_label(app.view.vessel_id.as_ref() == Some(&v.id), &v.name)
                    .clicked()
                {
                    commands.push(Command::SetVessel(v.id.clone()));
                }
            }
        })
        .response
        .labelled_by(label.id);
    let port_name = scenario
        .ports
        .iter()
        .find(|p| Some(&p.id) == app.view.port_id.as_ref())
        .or(scenario.ports.first())
        .map_or("(no port)".to_string(), |p| p.name.clone());
    let label = ui.label("Home port:");
    egui::ComboBox::from_id_salt("home-port")
        .selected_text(port_name)
        .show_ui(ui, |ui| {
            for p in &scenario.ports {
                if ui
                    .selectable_label(app.view.port_id.as_ref() == Some(&p.id), &p.name)
                    .clicked()
                {
                    commands.push(Command::SetPort(p.id.clone()));
                }
            }
        })
        .response
        .labelled_by(label.id);
    if ui
        .button("Boats and ports…")
        .on_hover_text("Add your own boat and home port, and set the boat's limits")
        .clicked()
    {
        commands.push(Command::ShowBoats);
    }
}

/// The row above the map: what the coast is coloured by, the base map, the plots.
fn map_toolbar_ui(app: &mut ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    ui.horizontal_wrapped(|ui| {
        ui.label("Colour by:");
        for (c, label) in [
            (Colouring::DayScore, "Score (chosen day)"),
            (Colouring::IndexNow, "Index now"),
            (Colouring::Productivity, "Expected productivity"),
            (Colouring::SafeForBoat, "Safe for this boat"),
            (Colouring::UpwellingOdds, "Chance of upwelling"),
            (Colouring::HitRate, "Sea check: hit rate"),
        ] {
            if ui
                .selectable_label(app.view.colouring == c, label)
                .clicked()
            {
                commands.push(Command::SetColouring(c));
            }
        }
        ui.separator();
        base_map_ui(app, ui, commands);
        ui.checkbox(&mut app.view.show_plots, "Plots");
        ui.checkbox(&mut app.view.show_legend, "Legend");
    });
}

/// The Base map list: the land outline, each map pack added, the online street map,
/// and adding a pack.
fn base_map_ui(app: &ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    const LAND: &str = "Land outline (offline)";
    const STREETS: &str = "Street map (online)";
    let packs = app.map_packs();
    let current = app.base_layer();
    let shown = match current {
        BaseLayer::BundledLand => LAND.to_string(),
        BaseLayer::OnlineTiles => STREETS.to_string(),
        BaseLayer::Pack(path) => packs
            .iter()
            .find(|p| &p.path == path)
            .map_or_else(|| path.display().to_string(), |p| p.name.clone()),
    };
    egui::ComboBox::from_label("Base map")
        .selected_text(shown)
        .show_ui(ui, |ui| {
            if ui
                .selectable_label(*current == BaseLayer::BundledLand, LAND)
                .clicked()
            {
                commands.push(Command::SetBaseLayer(BaseLayer::BundledLand));
            }
            for pack in packs {
                let layer = BaseLayer::Pack(pack.path.clone());
                if ui
                    .selectable_label(*current == layer, &pack.name)
                    .on_hover_text(format!("Offline map pack: {}", pack.path.display()))
                    .clicked()
                {
                    commands.push(Command::SetBaseLayer(layer));
                }
            }
            if ui
                .selectable_label(*current == BaseLayer::OnlineTiles, STREETS)
                .on_hover_text("OpenStreetMap tiles, fetched as you look and cached on disk; needs a network the first time.")
                .clicked()
            {
                commands.push(Command::SetBaseLayer(BaseLayer::OnlineTiles));
            }
            ui.separator();
            if ui.button("Add a map pack…").clicked() {
                commands.push(Command::AskFile(FileAction::AddMapPack));
            }
        });
    if app.pack_task.is_some() {
        ui.spinner();
        ui.label("opening the map pack…");
    }
}

fn status_ui(app: &mut ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    ui.horizontal(|ui| {
        if ui
            .link(RichText::new("CAUTION: not a navigation aid. Official forecasts and local rules come first; the skipper decides.").color(Color32::from_rgb(150, 60, 0)))
            .clicked()
        {
            app.dialogs.show_cautions = true;
        }
        ui.separator();
        let title = app.doc.path.as_ref().map_or("the bundled demo (not saved)".to_string(), |p| p.display().to_string());
        ui.label(format!("{}{}", title, if app.doc.dirty { " • unsaved changes" } else { "" }));
        if let Some(job) = &app.job {
            ui.separator();
            ui.spinner();
            ui.add(egui::ProgressBar::new(job.progress.fraction()).desired_width(160.0).text(job.label.clone()));
            if ui.button("Cancel").clicked() {
                commands.push(Command::CancelJob);
            }
        }
        if let Some((_, task)) = &app.file_task {
            ui.separator();
            ui.spinner();
            ui.label(format!("working: {}", task.name));
        }
        if let Some(problem) = &app.recovery_problem {
            ui.separator();
            ui.colored_label(Color32::from_rgb(170, 0, 0), problem);
        }
    });
}

fn local_and_utc(plan: &Plan, t: chrono::DateTime<chrono::Utc>) -> String {
    let local = t.with_timezone(&plan.time_zone);
    format!(
        "{} local  ({} UTC)",
        local.format("%a %-d %b %H:%M"),
        t.format("%H:%M")
    )
}

fn time_ui(app: &mut ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    let Some(plan) = app.plan.clone() else {
        ui.horizontal(|ui| {
            if let Some(e) = &app.plan_error {
                ui.colored_label(Color32::from_rgb(170, 0, 0), e);
            } else {
                ui.spinner();
                ui.label("Reading the forecast…");
            }
        });
        return;
    };
    ui.horizontal(|ui| {
        let n = app.view.timeline.len();
        if ui
            .button("< 1 h")
            .on_hover_text("Back one hour (←)")
            .clicked()
        {
            commands.push(Command::StepHour(-1));
        }
        if ui
            .button(if app.view.playing { "Pause" } else { "Play" })
            .clicked()
        {
            commands.push(Command::TogglePlay);
        }
        if ui
            .button("1 h >")
            .on_hover_text("Forward one hour (→)")
            .clicked()
        {
            commands.push(Command::StepHour(1));
        }
        let mut hour = app.view.hour;
        let label = app
            .view
            .timeline
            .get(hour)
            .map(|t| local_and_utc(&plan, *t))
            .unwrap_or_default();
        ui.spacing_mut().slider_width = (ui.available_width() - 330.0).max(200.0);
        let slider = egui::Slider::new(&mut hour, 0..=n.saturating_sub(1)).show_value(false);
        let r = ui.add(slider).on_hover_text("Forecast time");
        r.widget_info(|| egui::WidgetInfo::slider(true, hour as f64, "Forecast time"));
        if r.changed() {
            commands.push(Command::SetHour(hour));
        }
        ui.label(RichText::new(label).strong());
    });
    // The main selected stretch at the chosen time.
    let chosen = app
        .view
        .selected
        .first()
        .and_then(|id| plan.stretches.iter().find(|s| &s.id == id));
    let time = app.view.timeline.get(app.view.hour);
    if let (Some(s), Some(t)) = (chosen, time) {
        let text = match s.hour_at(*t) {
            Some(h) => {
                let wind = match h.wind.direction_from_deg() {
                    Some(d) => format!(
                        "wind {:.0} kt from {:03.0}° true",
                        crate::physics::m_s_to_knots(h.wind.speed_m_s()),
                        d
                    ),
                    None => "calm".to_string(),
                };
                format!(
                    "{} now: upwelling index {:.0} m³/s per 100 m, {wind}",
                    s.name, h.index_m3s_per_100m
                )
            }
            None => format!("{} now: no forecast at this time", s.name),
        };
        ui.label(text);
    }
}

fn bar(ui: &mut egui::Ui, share: f64) {
    let (rect, _) = ui.allocate_exact_size(egui::vec2(90.0, 12.0), egui::Sense::hover());
    ui.painter().rect_filled(rect, 2.0, Color32::from_gray(225));
    let mut filled = rect;
    filled.set_width(rect.width() * share.clamp(0.0, 1.0) as f32);
    let c = colour::productivity_colour(share);
    ui.painter()
        .rect_filled(filled, 2.0, Color32::from_rgb(c[0], c[1], c[2]));
}

fn ranked_ui(app: &mut ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    ui.heading("Where to go");
    let Some(plan) = app.plan.clone() else {
        ui.label("The ranked stretches appear when the forecast has been read.");
        return;
    };
    if let Some(e) = &app.plan_error {
        ui.colored_label(
            Color32::from_rgb(170, 0, 0),
            format!("The plan below is out of date: {e}"),
        );
    }
    ui.label(format!("{} from {}", plan.vessel.name, plan.port.name));
    ui.label(RichText::new(forecast_kind(&plan)).strong());
    day_switcher_ui(&plan, app.view.day, ui, commands);
    let words = app
        .view
        .plan_words
        .for_day(&plan, app.view.day, app.view.units)
        .clone();
    // When the forecast was issued and what must not be missed stay in sight; the rest
    // of how the plan was made folds away, leaving room for the list.
    let notes = || plan.notes.iter().zip(&words.notes);
    for (note, n) in notes() {
        if note.is_warning() {
            ui.label(
                RichText::new(n)
                    .small()
                    .color(Color32::from_rgb(150, 60, 0)),
            );
        } else if matches!(note, PlanNote::Issued { .. }) {
            ui.label(RichText::new(n).small());
        }
    }
    let quiet: Vec<&String> = notes()
        .filter(|(note, _)| !note.is_warning() && !matches!(note, PlanNote::Issued { .. }))
        .map(|(_, n)| n)
        .collect();
    if !quiet.is_empty() {
        egui::CollapsingHeader::new(RichText::new("How this plan was made").small())
            .id_salt("plan notes")
            .show(ui, |ui| {
                for n in quiet {
                    ui.label(RichText::new(n).small().weak());
                }
            });
    }
    ui.separator();
    let Some(day) = plan.days.get(app.view.day) else {
        return;
    };
    egui::ScrollArea::vertical()
        .auto_shrink([false, false])
        .show(ui, |ui| {
            if day.ranked.is_empty() {
                ui.label(RichText::new(plan_text::no_stretch_text(day)).strong());
                ui.label("Open \"Not ranked\" below for each stretch's reason.");
            }
            // A long coast can rank hundreds of stretches: the first ones are what a
            // skipper reads, and laying them all out every frame would slow the app.
            let shown = if app.view.show_all_ranked {
                day.ranked.len()
            } else {
                day.ranked.len().min(RANKED_SHOWN)
            };
            for (r, lines) in day.ranked[..shown].iter().zip(words.ranked.iter()) {
                let selected = app.view.selected.contains(&plan.stretches[r.stretch].id);
                ranked_entry_ui(&plan, r, lines, selected, ui, commands);
                ui.add_space(4.0);
            }
            if shown < day.ranked.len()
                && ui
                    .button(format!("Show all {} ranked stretches", day.ranked.len()))
                    .clicked()
            {
                app.view.show_all_ranked = true;
            }
            excluded_ui(&plan, day, app.view.units, ui);
            ui.add_space(8.0);
            ui.label(
                RichText::new("Ctrl-click stretches to compare them in the plots.")
                    .small()
                    .weak(),
            );
        });
}

/// What kind of forecast the plan rests on, in a few words.
pub(super) fn forecast_kind(plan: &Plan) -> String {
    match plan.runs.len() {
        0 => "Single forecast: no odds".to_string(),
        n => format!("Ensemble of {n} runs: odds shown per stretch"),
    }
}

/// The day shown, with the previous and next day.
fn day_switcher_ui(plan: &Plan, day: usize, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    ui.horizontal(|ui| {
        if ui
            .add_enabled(day > 0, egui::Button::new("< Previous day"))
            .clicked()
        {
            commands.push(Command::SetDay(day.saturating_sub(1)));
        }
        let date = plan
            .days
            .get(day)
            .map(|d| d.date.format("%A %-d %B").to_string())
            .unwrap_or_default();
        ui.label(RichText::new(date).heading());
        if ui
            .add_enabled(day + 1 < plan.days.len(), egui::Button::new("Next day >"))
            .clicked()
        {
            commands.push(Command::SetDay(day + 1));
        }
    });
}

/// One ranked stretch: rank, name, score bar, safe window and reasons.
fn ranked_entry_ui(
    plan: &Plan,
    r: &RankedStretch,
    reasons: &[String],
    selected: bool,
    ui: &mut egui::Ui,
    commands: &mut Vec<Command>,
) {
    let s = &plan.stretches[r.stretch];
    ui.horizontal(|ui| {
        let rank = if r.tied_with_above {
            format!("={}", r.rank)
        } else {
            format!("{}", r.rank)
        };
        let resp = ui.selectable_label(
            selected,
            RichText::new(format!("{rank}. {}", s.name)).strong(),
        );
        resp.widget_info(|| {
            egui::WidgetInfo::selected(
                egui::Role::ListBoxOption,
                true,
                selected,
                format!("Stretch {}", s.name),
            )
        });
        if resp.clicked() {
            let add = ui.input(|i| i.modifiers.command || i.modifiers.shift);
            commands.push(Command::SelectStretch {
                id: s.id.clone(),
                add,
            });
        }
        bar(ui, r.score / 100.0);
        ui.label(format!("{:.0}", r.score)).on_hover_text(format!(
            "score = 100 × productivity {:.2} × window {:.2} × distance {:.2}",
            r.productivity, r.window_factor, r.distance_factor
        ));
        if ui
            .small_button("Show")
            .on_hover_text("Centre the map here")
            .clicked()
        {
            commands.push(Command::CentreOn(s.centre));
        }
        if ui
            .small_button("Segment…")
            .on_hover_text("Edit this stretch's segment: name, notes, closures")
            .clicked()
        {
            // The stretch is chosen and shown too: the editor's points are on the map.
            commands.push(Command::SelectStretch {
                id: s.id.clone(),
                add: false,
            });
            commands.push(Command::CentreOn(s.centre));
            commands.push(Command::EditSegment(Some(s.segment_id.clone())));
        }
    });
    ui.indent(&s.id, |ui| {
        let (from, to) = r.safe_window;
        ui.label(
            RichText::new(format!(
                "safe {}–{} local ({}–{} UTC), {:.1} h fishing",
                from.with_timezone(&plan.time_zone).format("%H:%M"),
                to.with_timezone(&plan.time_zone).format("%H:%M"),
                from.format("%H:%M"),
                to.format("%H:%M"),
                r.fishing_hours
            ))
            .small(),
        );
        for reason in reasons {
            ui.label(RichText::new(format!("• {reason}")).small());
        }
    });
}

/// The words of a plan's day, made once per plan and day rather than every frame.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct PlanWords {
    /// The plan and day the words are for (the plan is held, so it is never mistaken
    /// for a newer one).
    key: Option<(std::sync::Arc<Plan>, usize, Units)>,
    /// The plan's notes.
    pub notes: Vec<String>,
    /// The reasons of each ranked stretch, in rank order (shared, so a frame copies
    /// a handle, not the words of 10,000 stretches).
    pub ranked: std::sync::Arc<[Vec<String>]>,
}

impl PlanWords {
    /// The words of `day` of `plan`, made now if they are not those kept.
    pub fn for_day(&mut self, plan: &std::sync::Arc<Plan>, day: usize, units: Units) -> &Self {
        let fresh = self
            .key
            .as_ref()
            .is_some_and(|(p, d, u)| std::sync::Arc::ptr_eq(p, plan) && *d == day && *u == units);
        if !fresh {
            let ranked: Vec<Vec<String>> = plan.days.get(day).map_or_else(Vec::new, |d| {
                d.ranked
                    .iter()
                    .map(|r| plan_text::ranked_lines(plan, d.date, r, units))
                    .collect()
            });
            *self = Self {
                key: Some((plan.clone(), day, units)),
                notes: plan_text::notes(plan),
                ranked: ranked.into(),
            };
        }
        self
    }
}

/// The stretches left out of the day, each with why.
fn excluded_ui(plan: &Plan, day: &DayPlan, units: Units, ui: &mut egui::Ui) {
    if day.excluded.is_empty() {
        return;
    }
    egui::CollapsingHeader::new(format!("Not ranked ({})", day.excluded.len())).show(ui, |ui| {
        for e in &day.excluded {
            ui.label(
                RichText::new(format!(
                    "{}: {}",
                    plan.stretches[e.stretch].name,
                    plan_text::excluded_text(plan, e, units)
                ))
                .small(),
            );
        }
    });
}
