//! The app's windows and dialogs: cautions, the file path prompt, errors, messages and
//! confirmations.

use super::commands::Command;
use super::edit::Edit;
use super::state::ShelfwindApp;
use eframe::egui::{self, Color32, RichText};

/// Every open window, drawn after the panels.
pub(super) fn windows_ui(app: &mut ShelfwindApp, ctx: &egui::Context, commands: &mut Vec<Command>) {
    cautions_window(app, ctx);
    path_prompt_window(app, ctx, commands);
    super::messages::messages_window(app, ctx);
    confirm_windows(app, ctx, commands);
    if app.season.open || app.season.pending_png_or_job() {
        super::season_view::season_window(app, ctx);
    }
    if app.check.open || app.check.busy() {
        super::check_view::check_window(app, ctx, commands);
    }
    if app.calibrate.open || app.calibrate.busy() {
        super::calibrate_view::calibrate_window(app, ctx, commands);
    }
    super::help::help_window(app, ctx);
    if app.view.boats.open {
        super::boats::boats_window(app, ctx, commands);
    }
    if app.dialogs.show_wind_files {
        super::wind_files::wind_files_window(app, ctx, commands);
    }
    if app.dialogs.show_settings {
        super::settings_window::settings_window(app, ctx, commands);
    }
}

/// The cautions, shown at first start and from Help.
fn cautions_window(app: &mut ShelfwindApp, ctx: &egui::Context) {
    if app.dialogs.show_cautions {
        egui::Window::new("Before you use Shelfwind").collapsible(false).resizable(false).anchor(egui::Align2::CENTER_CENTER, [0.0, 0.0]).show(ctx, |ui| {
            ui.set_max_width(520.0);
            ui.label(RichText::new("Shelfwind is not a navigation aid.").heading());
            ui.label("It estimates where wind-driven upwelling may make the water productive. It is no substitute for official marine forecasts and warnings.");
            ui.label("The skipper decides. Check the official forecast before you go, respect closures, protected areas and local regulations, and set your boat's limits yourself.");
            ui.label("Expected productivity is a planning estimate from a simple model, not a promise of fish.");
            if ui.button("I understand").clicked() {
                app.dialogs.show_cautions = false;
                app.remembered.cautions_accepted = true;
            }
        });
    }
}

/// The path field of every file action.
fn path_prompt_window(app: &mut ShelfwindApp, ctx: &egui::Context, commands: &mut Vec<Command>) {
    let typing_dir = app.typing_dir();
    if let Some(prompt) = &mut app.dialogs.path_prompt {
        let mut open = true;
        let mut go = None;
        egui::Window::new(prompt.action.title())
            .collapsible(false)
            .open(&mut open)
            .pivot(egui::Align2::CENTER_CENTER)
            .default_pos(ctx.content_rect().center())
            .show(ctx, |ui| {
                if let Some(note) = &prompt.note {
                    ui.colored_label(Color32::from_rgb(150, 60, 0), note);
                }
                let label = ui.label("File path");
                let r = ui
                    .add(egui::TextEdit::singleline(&mut prompt.text).desired_width(460.0))
                    .labelled_by(label.id);
                ui.label(
                    RichText::new(format!(
                        "({}; a name without a folder goes in {})",
                        prompt.action.extensions().join(", "),
                        typing_dir.display()
                    ))
                    .small()
                    .weak(),
                );
                let enter = r.lost_focus() && ui.input(|i| i.key_pressed(egui::Key::Enter));
                ui.horizontal(|ui| {
                    let ok = if prompt.action.writes() {
                        "Save here"
                    } else {
                        "Open"
                    };
                    if (ui.button(ok).clicked() || enter) && !prompt.text.trim().is_empty() {
                        go = Some(std::path::PathBuf::from(prompt.text.trim()));
                    }
                    if prompt.native.is_some() {
                        ui.spinner();
                        ui.label("or pick it in the system dialog");
                    }
                });
            });
        if let Some(path) = go {
            commands.push(Command::File(prompt.action, path));
        } else if !open {
            app.dialogs.path_prompt = None;
            app.dialogs.quit_after_save = false;
        }
    }
}

/// Questions before something is lost: deleting, closing, recovering.
fn confirm_windows(app: &mut ShelfwindApp, ctx: &egui::Context, commands: &mut Vec<Command>) {
    if let Some(id) = app.dialogs.confirm_delete.clone() {
        egui::Window::new("Delete segment?")
            .collapsible(false)
            .anchor(egui::Align2::CENTER_CENTER, [0.0, 0.0])
            .show(ctx, |ui| {
                ui.label(format!("Delete the segment \"{id}\"? You can undo this."));
                ui.horizontal(|ui| {
                    if ui.button("Delete").clicked() {
                        commands.push(Command::Edit(Edit::DeleteSegment(id.clone())));
                        app.dialogs.confirm_delete = None;
                    }
                    if ui.button("Keep it").clicked() {
                        app.dialogs.confirm_delete = None;
                    }
                });
            });
    }
    if app.dialogs.confirm_quit {
        egui::Window::new("Unsaved changes")
            .collapsible(false)
            .anchor(egui::Align2::CENTER_CENTER, [0.0, 0.0])
            .show(ctx, |ui| {
                ui.label("This scenario has changes that are not saved.");
                ui.horizontal(|ui| {
                    if ui.button("Save").clicked() {
                        app.dialogs.confirm_quit = false;
                        app.dialogs.quit_after_save = true;
                        commands.push(Command::Save);
                    }
                    if ui.button("Close without saving").clicked() {
                        app.dialogs.confirm_quit = false;
                        app.dialogs.quit_confirmed = true;
                        commands.push(Command::DiscardRecovery);
                        commands.push(Command::Quit);
                    }
                    if ui.button("Cancel").clicked() {
                        app.dialogs.confirm_quit = false;
                    }
                });
            });
    }
    if let Some(r) = app.dialogs.recovery.clone() {
        egui::Window::new("Unsaved changes from last time").collapsible(false).anchor(egui::Align2::CENTER_CENTER, [0.0, 0.0]).show(ctx, |ui| {
            ui.label(format!("Shelfwind did not close cleanly last time. Restore the unsaved changes to \"{}\"?", r.name));
            ui.horizontal(|ui| {
                if ui.button("Restore").clicked() {
                    commands.push(Command::Recover);
                }
                if ui.button("Discard them").clicked() {
                    commands.push(Command::DiscardRecovery);
                }
            });
        });
    }
}
