//! The segment editor: name, notes, sea side, closure, split and delete.
//!
//! Text typed into a field lives in a draft kept between frames (keyed by the segment
//! being edited) and becomes one undoable edit when the field loses focus (Enter, Tab
//! or a click elsewhere). A value changed elsewhere (undo, redo) replaces the draft of
//! every field not being typed in.

use super::commands::Command;
use super::edit::Edit;
use super::fields::Fields;
use super::state::ShelfwindApp;
use crate::coast::{Closure, CoastSegment, Land, LatLon, SeaSide, SideFinding, find_sea_side};
use chrono::NaiveDate;
use eframe::egui::{self, Color32, RichText};

/// The editor's text fields as typed, for the segment being edited.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct SegmentDraft {
    /// The segment edited.
    pub id: String,
    /// The fields as typed.
    fields: Fields,
    /// The sea side the land gives for these points (found once per geometry).
    /// The sea side last found: for these points, on this land (its address).
    side: Option<(Vec<LatLon>, usize, SideFinding)>,
}

fn date_text(d: Option<NaiveDate>) -> String {
    d.map(|d| d.to_string()).unwrap_or_default()
}

/// The ids of the editor's fields.
#[derive(Debug, Clone, Copy)]
struct FieldIds {
    name: egui::Id,
    notes: egui::Id,
    reason: egui::Id,
    from: egui::Id,
    to: egui::Id,
}

impl FieldIds {
    fn of(ui: &egui::Ui, id: &str) -> Self {
        let f = |what: &str| ui.make_persistent_id(("segment-editor", what, id.to_string()));
        Self {
            name: f("name"),
            notes: f("notes"),
            reason: f("reason"),
            from: f("from"),
            to: f("to"),
        }
    }
}

impl SegmentDraft {
    /// The sea side the land gives for these points, when the land can tell.
    pub(super) fn sea_from_land(&mut self, points: &[LatLon], land: &Land) -> Option<SeaSide> {
        match self.side_from_land(points, land) {
            SideFinding::Sea(s) => Some(s),
            _ => None,
        }
    }

    /// The sea side found from the land, computed again only when the points move.
    fn side_from_land(&mut self, points: &[LatLon], land: &Land) -> SideFinding {
        let key = std::ptr::from_ref(land) as usize;
        match &self.side {
            Some((p, k, finding)) if p == points && *k == key => *finding,
            _ => {
                let finding = find_sea_side(land, points);
                self.side = Some((points.to_vec(), key, finding));
                finding
            }
        }
    }
}

/// The editor panel for the segment open in it.
pub(super) fn editor_ui(app: &mut ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    let Some(id) = app.view.editing.clone() else {
        return;
    };
    let Some(seg) = app
        .doc
        .scenario
        .segments
        .iter()
        .find(|s| s.id == id)
        .cloned()
    else {
        commands.push(Command::EditSegment(None));
        return;
    };
    let ids = FieldIds::of(ui, &id);
    let draft = &mut app.view.segment_draft;
    if draft.id != seg.id {
        draft.fields.clear();
        draft.id.clone_from(&seg.id);
    }
    ui.horizontal(|ui| {
        ui.heading("Segment");
        if ui.button("Close").clicked() {
            commands.push(Command::EditSegment(None));
        }
    });
    ui.label(RichText::new(format!("id: {}", seg.id)).small());
    ui.label(RichText::new(wind_from_text(app, &seg.id)).small());
    let land_model = app.land_model();
    let land = land_model.as_deref().unwrap_or_else(|| Land::bundled());
    let draft = &mut app.view.segment_draft;
    text_fields_ui(draft, &seg, ids, ui, commands);
    ui.separator();
    sea_side_ui(draft, &seg, land, ui, commands);
    ui.separator();
    closure_ui(draft, &seg, ids, ui, commands);
    ui.separator();
    points_ui(&seg, ui, commands);
    ui.separator();
    if ui
        .button(RichText::new("Delete segment…").color(Color32::from_rgb(170, 0, 0)))
        .clicked()
    {
        app.dialogs.confirm_delete = Some(id);
    }
}

/// Which wind file the segment takes its wind from, in words.
fn wind_from_text(app: &ShelfwindApp, id: &str) -> String {
    let Some(cache) = &app.stage_cache else {
        return "Wind: not read yet".into();
    };
    let forecast = cache.forecast();
    let mut sources: Vec<usize> = forecast
        .stretches
        .iter()
        .filter(|s| s.segment_id == id)
        .filter_map(|s| s.wind_source)
        .collect();
    sources.sort_unstable();
    sources.dedup();
    let files = &app.doc.scenario.wind_files;
    let name = |k: usize| {
        files.get(k).and_then(|f| f.file_name()).map_or_else(
            || format!("file {}", k + 1),
            |n| n.to_string_lossy().to_string(),
        )
    };
    if sources.is_empty() {
        "Wind: no wind file covers this segment".into()
    } else {
        let names: Vec<String> = sources.into_iter().map(name).collect();
        format!("Wind from: {}", names.join(", "))
    }
}

/// Name and notes.
fn text_fields_ui(
    draft: &mut SegmentDraft,
    seg: &CoastSegment,
    ids: FieldIds,
    ui: &mut egui::Ui,
    commands: &mut Vec<Command>,
) {
    let fields = &mut draft.fields;
    if let Some(name) = fields.line(ui, "Segment name", ids.name, &seg.name, f32::INFINITY) {
        commands.push(Command::Edit(Edit::Rename(seg.id.clone(), name)));
    }
    if let Some(notes) = fields.lines(ui, "Notes", ids.notes, &seg.notes, 3) {
        commands.push(Command::Edit(Edit::SetNotes(seg.id.clone(), notes)));
    }
}

/// The sea side: set by hand or found from the land, with flip and reset.
fn sea_side_ui(
    draft: &mut SegmentDraft,
    seg: &CoastSegment,
    land: &Land,
    ui: &mut egui::Ui,
    commands: &mut Vec<Command>,
) {
    let from_land = draft.side_from_land(&seg.points, land);
    let side_name = |s: SeaSide| if s == SeaSide::Left { "left" } else { "right" };
    let side_text = match (seg.sea, from_land) {
        (Some(s), _) => format!(
            "Sea on the {}, walking from the first point (set by hand)",
            side_name(s)
        ),
        (None, SideFinding::Sea(s)) => format!(
            "Sea on the {}, walking from the first point; found from the land (blue arrows on the map point offshore)",
            side_name(s)
        ),
        (None, SideFinding::BothSea) => "The land cannot tell the sea side here (both sides look like sea): use Flip sea side to set it.".to_string(),
        (None, SideFinding::BothLand) => "The land cannot tell the sea side here (both sides look like land): use Flip sea side to set it.".to_string(),
    };
    let colour = if seg.sea.is_none() && !matches!(from_land, SideFinding::Sea(_)) {
        Color32::from_rgb(170, 0, 0)
    } else {
        ui.visuals().text_color()
    };
    ui.colored_label(colour, side_text);
    ui.horizontal(|ui| {
        if ui.button("Flip sea side").clicked() {
            let current = seg.sea.or(match from_land {
                SideFinding::Sea(s) => Some(s),
                _ => None,
            });
            let next = current.map_or(SeaSide::Left, SeaSide::flipped);
            commands.push(Command::Edit(Edit::SetSea(seg.id.clone(), Some(next))));
        }
        if seg.sea.is_some() && ui.button("Find from land").clicked() {
            commands.push(Command::Edit(Edit::SetSea(seg.id.clone(), None)));
        }
    });
}

/// A date field's text as a date: empty is none.
fn parse_date(s: &str) -> Result<Option<NaiveDate>, String> {
    let s = s.trim();
    if s.is_empty() {
        return Ok(None);
    }
    NaiveDate::parse_from_str(s, "%Y-%m-%d")
        .map(Some)
        .map_err(|_| format!("{s:?} is not a date: expected YYYY-MM-DD, e.g. 2027-05-31"))
}

/// Closed to fishing, with the reason and the dates.
fn closure_ui(
    draft: &mut SegmentDraft,
    seg: &CoastSegment,
    ids: FieldIds,
    ui: &mut egui::Ui,
    commands: &mut Vec<Command>,
) {
    let mut closed = seg.closure.is_some();
    if ui.checkbox(&mut closed, "Closed to fishing").changed() {
        let closure = closed.then(|| Closure {
            reason: "closed".into(),
            from: None,
            to: None,
        });
        commands.push(Command::Edit(Edit::SetClosure(seg.id.clone(), closure)));
    }
    let Some(c) = &seg.closure else { return };
    let fields = &mut draft.fields;
    let set = |closure: Closure| Command::Edit(Edit::SetClosure(seg.id.clone(), Some(closure)));
    if let Some(reason) = fields.line(
        ui,
        "Reason for the closure",
        ids.reason,
        &c.reason,
        f32::INFINITY,
    ) {
        commands.push(set(Closure {
            reason,
            ..c.clone()
        }));
    }
    let (from_text, to_text) = (date_text(c.from), date_text(c.to));
    let (from, to) = ui
        .horizontal(|ui| {
            (
                fields.line(ui, "Closed from", ids.from, &from_text, 100.0),
                fields.line(ui, "to", ids.to, &to_text, 100.0),
            )
        })
        .inner;
    if from.is_some() || to.is_some() {
        let from = parse_date(&from.unwrap_or(from_text));
        let to = parse_date(&to.unwrap_or(to_text));
        fields.set_error(ids.from, from.as_ref().err().cloned());
        fields.set_error(ids.to, to.as_ref().err().cloned());
        if let (Ok(from), Ok(to)) = (from, to) {
            if from.zip(to).is_some_and(|(f, t)| f > t) {
                fields.set_error(ids.to, Some("the closure ends before it starts".into()));
            } else if from != c.from || to != c.to {
                commands.push(set(Closure {
                    from,
                    to,
                    ..c.clone()
                }));
            }
        }
    }
    match fields.error_of(ids.from).or(fields.error_of(ids.to)) {
        Some(e) => ui.colored_label(Color32::from_rgb(170, 0, 0), e),
        None => ui.label(
            RichText::new("Empty dates: closed every day.")
                .small()
                .weak(),
        ),
    };
}

/// The points: how to move them, and splitting.
fn points_ui(seg: &CoastSegment, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    ui.label(RichText::new("On the map: drag the yellow points to move them; click a + to add a point; right-click a point to remove it.").small());
    ui.label(format!("{} points", seg.points.len()));
    if seg.points.len() > 2 {
        ui.horizontal(|ui| {
            ui.label("Split at point");
            for k in 1..seg.points.len() - 1 {
                if ui.small_button(format!("{}", k + 1)).clicked() {
                    commands.push(Command::Edit(Edit::Split(seg.id.clone(), k)));
                }
            }
        });
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn dates_are_checked_where_they_are_typed() {
        assert_eq!(parse_date(" "), Ok(None));
        assert_eq!(
            parse_date("2027-05-31"),
            Ok(NaiveDate::from_ymd_opt(2027, 5, 31))
        );
        assert_eq!(
            parse_date("31/05/2027").unwrap_err(),
            "\"31/05/2027\" is not a date: expected YYYY-MM-DD, e.g. 2027-05-31"
        );
    }
}
