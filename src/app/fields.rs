//! Text fields that keep what is typed between frames: each shows the stored value
//! unless it is being typed in, and hands back what was typed when it loses focus
//! (Enter, Tab, a click elsewhere). Numbers are checked there and then, with the
//! message beside the field.

use eframe::egui::{self, Color32, RichText};
use std::collections::HashMap;
use std::ops::RangeInclusive;

/// The text of fields being typed in, and their messages, by field id.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Fields {
    text: HashMap<egui::Id, String>,
    error: HashMap<egui::Id, String>,
    /// Fields that had the keyboard last frame: focus can leave a field before it is
    /// drawn (a click, or a screen reader moving focus), and what was typed in it must
    /// still be handed back then.
    focused: std::collections::HashSet<egui::Id>,
}

/// A number as a skipper types it: no trailing zeros.
pub fn number_text(x: f64) -> String {
    let s = format!("{x:.4}");
    s.trim_end_matches('0').trim_end_matches('.').to_string()
}

impl Fields {
    /// A labelled single-line field; returns the new text when the field loses focus
    /// with a change.
    pub fn line(
        &mut self,
        ui: &mut egui::Ui,
        label: &str,
        id: egui::Id,
        stored: &str,
        width: f32,
    ) -> Option<String> {
        let label = ui.label(label);
        let (r, typed) = self.edit(ui, id, stored, |buffer| {
            egui::TextEdit::singleline(buffer)
                .id(id)
                .desired_width(width)
        });
        r.labelled_by(label.id);
        typed
    }

    /// A labelled multi-line field, like [`Fields::line`].
    pub fn lines(
        &mut self,
        ui: &mut egui::Ui,
        label: &str,
        id: egui::Id,
        stored: &str,
        rows: usize,
    ) -> Option<String> {
        let label = ui.label(label);
        let (r, typed) = self.edit(ui, id, stored, |buffer| {
            egui::TextEdit::multiline(buffer).id(id).desired_rows(rows)
        });
        r.labelled_by(label.id);
        typed
    }

    /// Shows a text edit over the field's buffer; with the text typed when the field
    /// has just lost focus with a change.
    fn edit(
        &mut self,
        ui: &mut egui::Ui,
        id: egui::Id,
        stored: &str,
        widget: impl FnOnce(&mut String) -> egui::TextEdit<'_>,
    ) -> (egui::Response, Option<String>) {
        let had_focus = self.focused.contains(&id) || ui.ctx().memory(|m| m.has_focus(id));
        let keep = had_focus || self.error.contains_key(&id);
        let mut buffer = self.text.remove(&id).unwrap_or_else(|| stored.to_string());
        // A field not being typed in shows what is stored (an undo shows at once); one
        // with a message keeps what was typed, so it can be corrected.
        if !keep {
            stored.clone_into(&mut buffer);
        }
        let r = ui.add(widget(&mut buffer));
        let left = r.lost_focus() || (had_focus && !r.has_focus());
        let typed = (left && buffer != stored).then(|| buffer.clone());
        self.text.insert(id, buffer);
        if r.has_focus() {
            self.focused.insert(id);
        } else {
            self.focused.remove(&id);
        }
        (r, typed)
    }

    /// A labelled number field with its unit; returns the number when the field loses
    /// focus with a valid change, and shows why when the text is not one.
    pub fn number(
        &mut self,
        ui: &mut egui::Ui,
        (label, unit): (&str, &str),
        id: egui::Id,
        stored: f64,
        range: &RangeInclusive<f64>,
    ) -> Option<f64> {
        let typed = self.line(ui, label, id, &number_text(stored), 70.0);
        ui.label(unit);
        let out = typed.and_then(|t| match parse_number(&t, range, unit) {
            Ok(v) => {
                self.error.remove(&id);
                Some(v)
            }
            Err(e) => {
                self.error.insert(id, e);
                None
            }
        });
        self.message(ui, id);
        out
    }

    /// The message of a field, or an empty cell, closing its grid row.
    pub fn message(&self, ui: &mut egui::Ui, id: egui::Id) {
        match self.error.get(&id) {
            Some(e) => ui.label(RichText::new(e).color(Color32::from_rgb(170, 0, 0))),
            None => ui.label(""),
        };
        ui.end_row();
    }

    /// The message of a field, if it has one.
    pub fn error_of(&self, id: egui::Id) -> Option<&String> {
        self.error.get(&id)
    }

    /// Sets a message on a field (a check made elsewhere).
    pub fn set_error(&mut self, id: egui::Id, message: Option<String>) {
        match message {
            Some(m) => self.error.insert(id, m),
            None => self.error.remove(&id),
        };
    }

    /// Forgets every typed text and message (another item is shown).
    pub fn clear(&mut self) {
        self.text.clear();
        self.error.clear();
        self.focused.clear();
    }
}

/// A number typed by the user, checked against its range.
pub fn parse_number(text: &str, range: &RangeInclusive<f64>, unit: &str) -> Result<f64, String> {
    let t = text.trim().replace(',', ".");
    let expected = format!(
        "expected a number from {} to {} {unit}",
        number_text(*range.start()),
        number_text(*range.end())
    );
    match t.parse::<f64>() {
        Ok(v) if v.is_finite() && range.contains(&v) => Ok(v),
        Ok(_) => Err(format!("{} is out of range: {expected}", text.trim())),
        Err(_) => Err(format!("{:?} is not a number: {expected}", text.trim())),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_are_checked_where_they_are_typed() {
        let r = 1.0..=60.0;
        assert_eq!(parse_number(" 22,5 ", &r, "kt"), Ok(22.5));
        assert_eq!(
            parse_number("fast", &r, "kt").unwrap_err(),
            "\"fast\" is not a number: expected a number from 1 to 60 kt"
        );
        assert_eq!(
            parse_number("75", &r, "kt").unwrap_err(),
            "75 is out of range: expected a number from 1 to 60 kt"
        );
        assert_eq!(number_text(18.0), "18");
        assert_eq!(number_text(1.25), "1.25");
    }
}
