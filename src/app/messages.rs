//! One place for what the app tells the user: a list, newest first. A message is about
//! a subject (the forecast, the scenario file, an export…); a new message, or a new
//! action, on the same subject replaces the old one, so nothing stale stays open.

use super::state::ShelfwindApp;
use eframe::egui::{self, Color32, RichText};

/// What a message is about.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Subject {
    /// The wind files and the plan made from them.
    Forecast,
    /// Opening, saving or recovering the scenario.
    Scenario,
    /// Importing or editing the coast.
    Coast,
    /// Exports of the plan or the coast.
    Export,
    /// Boats and ports.
    Boats,
    /// Map packs and the base map.
    MapPack,
    /// Anything else (a background task that could not start).
    App,
}

/// A message.
#[derive(Debug, Clone, PartialEq)]
pub struct Message {
    /// What it is about.
    pub subject: Subject,
    /// Something went wrong (shown in red), or something was done.
    pub is_error: bool,
    /// The words, naming the user's file where there is one.
    pub text: String,
}

impl ShelfwindApp {
    /// Tells the user something went wrong; it replaces older messages on the subject.
    pub(super) fn error(&mut self, subject: Subject, text: impl Into<String>) {
        self.say(subject, true, text.into());
    }

    /// Tells the user something was done; it replaces older messages on the subject.
    pub(super) fn info(&mut self, subject: Subject, text: impl Into<String>) {
        self.say(subject, false, text.into());
    }

    fn say(&mut self, subject: Subject, is_error: bool, text: String) {
        self.forget(subject);
        self.dialogs.messages.insert(
            0,
            Message {
                subject,
                is_error,
                text,
            },
        );
    }

    /// Dismisses the messages on a subject (a new action on it has started).
    pub(super) fn forget(&mut self, subject: Subject) {
        self.dialogs.messages.retain(|m| m.subject != subject);
    }

    /// The latest error on a subject, if any.
    #[must_use]
    pub fn error_about(&self, subject: Subject) -> Option<&str> {
        self.dialogs
            .messages
            .iter()
            .find(|m| m.subject == subject && m.is_error)
            .map(|m| m.text.as_str())
    }
}

/// The messages, newest first, each with a button to dismiss it.
pub(super) fn messages_window(app: &mut ShelfwindApp, ctx: &egui::Context) {
    if app.dialogs.messages.is_empty() {
        return;
    }
    let mut dismiss = None;
    egui::Window::new("Messages")
        .collapsible(false)
        .resizable(false)
        .anchor(egui::Align2::RIGHT_TOP, [-12.0, 64.0])
        .show(ctx, |ui| {
            ui.set_max_width(520.0);
            for (k, m) in app.dialogs.messages.iter().enumerate() {
                if k > 0 {
                    ui.separator();
                }
                let text = if m.is_error {
                    RichText::new(&m.text).color(Color32::from_rgb(150, 0, 0))
                } else {
                    RichText::new(&m.text)
                };
                ui.label(text);
                if ui.small_button("OK").clicked() {
                    dismiss = Some(k);
                }
            }
        });
    if let Some(k) = dismiss {
        app.dialogs.messages.remove(k);
    }
}
