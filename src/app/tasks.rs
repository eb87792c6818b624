//! Named background tasks: reading, decoding, encoding and writing files run off the
//! UI thread, so a frame only draws; the UI polls each task for its result.

use eframe::egui;
use std::sync::mpsc::{Receiver, TryRecvError, channel};

/// A task running in its own thread.
pub struct Task<T> {
    /// What it does, for the status line.
    pub name: String,
    rx: Receiver<T>,
}

impl<T> std::fmt::Debug for Task<T> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Task")
            .field("name", &self.name)
            .finish_non_exhaustive()
    }
}

impl<T: Send + 'static> Task<T> {
    /// Starts `work` in a thread named after the task; the UI is woken when it ends.
    pub fn spawn(
        name: &str,
        ctx: &egui::Context,
        work: impl FnOnce() -> T + Send + 'static,
    ) -> Result<Self, String> {
        let (tx, rx) = channel();
        let repaint = ctx.clone();
        std::thread::Builder::new()
            .name(format!("shelfwind-{name}"))
            .spawn(move || {
                let _ = tx.send(work());
                repaint.request_repaint();
            })
            .map_err(|e| format!("cannot start the background task ({name}): {e}"))?;
        Ok(Self {
            name: name.to_string(),
            rx,
        })
    }

    /// The result once the task has ended; an error if it stopped without one.
    pub fn poll(&self) -> Option<Result<T, String>> {
        match self.rx.try_recv() {
            Ok(v) => Some(Ok(v)),
            Err(TryRecvError::Empty) => None,
            Err(TryRecvError::Disconnected) => Some(Err(format!(
                "the background task ({}) stopped unexpectedly",
                self.name
            ))),
        }
    }
}

/// Colour of messages that say something went wrong.
pub(super) const PROBLEM_COLOUR: egui::Color32 = egui::Color32::from_rgb(150, 40, 0);

/// The paths in a field of file paths, one per line (blank lines skipped).
pub(super) fn paths_in(text: &str) -> Vec<std::path::PathBuf> {
    text.lines()
        .map(str::trim)
        .filter(|l| !l.is_empty())
        .map(std::path::PathBuf::from)
        .collect()
}

/// A labelled field of file paths, one per line.
pub(super) fn paths_field(ui: &mut egui::Ui, label: &str, text: &mut String, rows: usize) {
    let label = ui.label(label);
    ui.add(
        egui::TextEdit::multiline(text)
            .desired_rows(rows)
            .desired_width(f32::INFINITY),
    )
    .labelled_by(label.id);
}

/// The button that starts background work, or, while `running` goes, its progress
/// (`working` says what it does) and Cancel; under them, why the last start failed.
/// True when the button is clicked.
pub(super) fn start_row(
    ui: &mut egui::Ui,
    button: &str,
    (running, working): (Option<&crate::progress::Progress>, &str),
    message: Option<&str>,
) -> bool {
    let mut start = false;
    ui.horizontal(|ui| match running {
        None => start = ui.button(button).clicked(),
        Some(p) => {
            ui.spinner();
            ui.add(
                egui::ProgressBar::new(p.fraction())
                    .desired_width(200.0)
                    .text(working),
            );
            if ui.button("Cancel").clicked() {
                p.cancel();
            }
        }
    });
    if let Some(m) = message {
        ui.label(egui::RichText::new(m).color(PROBLEM_COLOUR));
    }
    start
}

/// Background work with its progress, for a bar and Cancel.
pub(super) type ProgressJob<T> = (
    std::sync::Arc<crate::progress::Progress>,
    Task<Result<T, String>>,
);

/// Starts `work` in the background with a progress of its own, into `job`; why it could
/// not start goes to `message`, which is cleared otherwise.
pub(super) fn start_job<T: Send + 'static>(
    (job, message): (&mut Option<ProgressJob<T>>, &mut Option<String>),
    (name, ctx): (&str, &egui::Context),
    work: impl FnOnce(&crate::progress::Progress) -> Result<T, String> + Send + 'static,
) {
    let progress = std::sync::Arc::new(crate::progress::Progress::new());
    let worker = progress.clone();
    match Task::spawn(name, ctx, move || work(&worker)) {
        Ok(task) => {
            *message = None;
            *job = Some((progress, task));
        }
        Err(e) => *message = Some(e),
    }
}

/// The outcome of `job` once it has ended (the job is then gone).
pub(super) fn finished<T: Send + 'static>(
    job: &mut Option<ProgressJob<T>>,
) -> Option<Result<T, String>> {
    let outcome = job.as_ref().and_then(|(_, task)| task.poll())?;
    *job = None;
    Some(outcome.and_then(|r| r))
}

/// The default size of a tool window: most of a small screen, room for the map beside
/// it on a large one.
pub(super) fn tool_window_size(ctx: &egui::Context, widest: f32) -> [f32; 2] {
    let screen = ctx.content_rect().size();
    [
        (screen.x * 0.7).min(widest),
        (screen.y - 140.0).clamp(300.0, 700.0),
    ]
}
