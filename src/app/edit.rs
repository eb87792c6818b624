//! Changes to the scenario, with undo and redo as value snapshots: one step per edit,
//! and one per whole vertex drag.

use super::messages::Subject;
use super::state::{ShelfwindApp, Tool, VertexDrag};
use crate::coast::{Closure, CoastSegment, LatLon};
use crate::scenario::{ModelSettings, Scenario};

/// Most undo steps kept.
const UNDO_LIMIT: usize = 200;

/// One change to the scenario.
#[derive(Debug, Clone, PartialEq)]
pub enum Edit {
    /// Add a segment.
    AddSegment(CoastSegment),
    /// Add several segments (an import).
    AddSegments(Vec<CoastSegment>),
    /// Delete a segment.
    DeleteSegment(String),
    /// Rename.
    Rename(String, String),
    /// Replace the notes.
    SetNotes(String, String),
    /// Set or clear the closure.
    SetClosure(String, Option<Closure>),
    /// Flip the sea side (set it explicitly to the other side of what it is now).
    SetSea(String, Option<crate::coast::SeaSide>),
    /// Insert a vertex before `index`.
    InsertVertex(String, usize, LatLon),
    /// Delete a vertex (a segment keeps at least two).
    DeleteVertex(String, usize),
    /// Split a segment in two at a vertex.
    Split(String, usize),
    /// Replace the model settings.
    SetSettings(ModelSettings),
    /// Replace the wind files.
    SetWindFiles(Vec<std::path::PathBuf>),
    /// Take each wind file as one run of an ensemble, or not.
    SetFilesAreRuns(bool),
    /// Use a coast pack (or, with `None`, the bundled land only).
    SetCoastPack(Option<std::path::PathBuf>),
    /// Replace the boats.
    SetVessels(Vec<crate::plan::Vessel>),
    /// Replace the home ports.
    SetPorts(Vec<crate::plan::Port>),
}

/// A fresh segment id not used in the scenario.
pub(super) fn fresh_id(scenario: &Scenario, stem: &str) -> String {
    (1..=100_000)
        .map(|n| format!("{stem}-{n}"))
        .find(|id| scenario.segments.iter().all(|s| &s.id != id))
        .unwrap_or_else(|| stem.to_string())
}

fn apply_edit(s: &mut Scenario, edit: Edit) {
    let find = |s: &mut Scenario, id: &str| s.segments.iter().position(|x| x.id == id);
    match edit {
        Edit::AddSegment(seg) => s.segments.push(seg),
        Edit::AddSegments(segs) => {
            for mut seg in segs {
                if s.segments.iter().any(|x| x.id == seg.id) {
                    seg.id = fresh_id(s, &seg.id);
                }
                s.segments.push(seg);
            }
        }
        Edit::DeleteSegment(id) => s.segments.retain(|x| x.id != id),
        Edit::Rename(id, name) => {
            if let Some(k) = find(s, &id) {
                s.segments[k].name = name;
            }
        }
        Edit::SetNotes(id, notes) => {
            if let Some(k) = find(s, &id) {
                s.segments[k].notes = notes;
            }
        }
        Edit::SetClosure(id, closure) => {
            if let Some(k) = find(s, &id) {
                s.segments[k].closure = closure;
            }
        }
        Edit::SetSea(id, sea) => {
            if let Some(k) = find(s, &id) {
                s.segments[k].sea = sea;
            }
        }
        Edit::InsertVertex(id, index, p) => {
            if let Some(k) = find(s, &id) {
                let pts = &mut s.segments[k].points;
                pts.insert(index.min(pts.len()), p);
            }
        }
        Edit::DeleteVertex(id, index) => {
            if let Some(k) = find(s, &id)
                && s.segments[k].points.len() > 2
                && index < s.segments[k].points.len()
            {
                s.segments[k].points.remove(index);
            }
        }
        Edit::Split(id, index) => {
            if let Some(k) = find(s, &id) {
                let seg = s.segments[k].clone();
                if index > 0 && index + 1 < seg.points.len() {
                    let mut first = seg.clone();
                    first.points.truncate(index + 1);
                    let mut second = seg.clone();
                    second.points = seg.points[index..].to_vec();
                    second.id = fresh_id(s, &seg.id);
                    if !seg.name.is_empty() {
                        second.name = format!("{} (2)", seg.name);
                    }
                    s.segments[k] = first;
                    s.segments.insert(k + 1, second);
                }
            }
        }
        Edit::SetSettings(settings) => s.settings = settings,
        Edit::SetWindFiles(files) => s.wind_files = files,
        Edit::SetFilesAreRuns(on) => s.wind_files_are_runs = on,
        Edit::SetCoastPack(pack) => s.coast_pack = pack,
        Edit::SetVessels(vessels) => s.vessels = vessels,
        Edit::SetPorts(ports) => s.ports = ports,
    }
}

impl ShelfwindApp {
    fn push_undo(&mut self, before: Scenario) {
        self.undo.push(before);
        if self.undo.len() > UNDO_LIMIT {
            self.undo.remove(0);
        }
        self.redo.clear();
    }

    fn changed(&mut self) {
        self.doc.dirty = true;
        self.plan_stale = true;
    }

    /// Applies an edit as one undo step; an edit that leaves the scenario invalid (a value
    /// out of range) is refused with the reason, and nothing changes.
    pub(super) fn edit(&mut self, edit: Edit) {
        let before = self.doc.scenario.clone();
        let mut after = before.clone();
        apply_edit(&mut after, edit);
        if after == before {
            return;
        }
        if let Err(e) = after.validate() {
            self.error(Subject::Coast, format!("That change was not made: {e}"));
            return;
        }
        self.forget(Subject::Coast);
        if self
            .view
            .editing
            .as_ref()
            .is_some_and(|id| after.segments.iter().all(|s| &s.id != id))
        {
            self.view.editing = None;
        }
        self.doc.scenario = after;
        self.push_undo(before);
        self.changed();
    }

    /// Moves a vertex during a drag: the first move records the undo step.
    pub(super) fn drag_vertex(&mut self, segment: &str, index: usize, to: LatLon) {
        if self.drag_start.is_none() {
            self.drag_start = Some(self.doc.scenario.clone());
        }
        self.view.vertex_drag = Some(VertexDrag {
            segment: segment.to_string(),
            index,
        });
        if let Some(seg) = self
            .doc
            .scenario
            .segments
            .iter_mut()
            .find(|s| s.id == segment)
            && let Some(p) = seg.points.get_mut(index)
        {
            *p = to;
        }
    }

    /// Ends a drag: the whole drag is one undo step.
    pub(super) fn end_drag(&mut self) {
        self.view.vertex_drag = None;
        if let Some(before) = self.drag_start.take()
            && before != self.doc.scenario
        {
            self.push_undo(before);
            self.changed();
        }
    }

    pub(super) fn undo(&mut self) {
        if let Some(before) = self.undo.pop() {
            let now = std::mem::replace(&mut self.doc.scenario, before);
            self.redo.push(now);
            self.changed();
        }
    }

    pub(super) fn redo(&mut self) {
        if let Some(after) = self.redo.pop() {
            let now = std::mem::replace(&mut self.doc.scenario, after);
            self.undo.push(now);
            self.changed();
        }
    }

    /// Turns the points drawn into a new segment (at least two distinct points).
    pub(super) fn finish_draft(&mut self) {
        let Tool::Draw { points } = std::mem::take(&mut self.view.tool) else {
            return;
        };
        let mut distinct = points.clone();
        distinct.dedup();
        if distinct.len() < 2 {
            self.info(
                Subject::Coast,
                "A segment needs at least two points: click on the map to add them.",
            );
            return;
        }
        let id = fresh_id(&self.doc.scenario, "segment");
        let seg = CoastSegment {
            id: id.clone(),
            name: String::new(),
            points: distinct,
            sea: None,
            notes: String::new(),
            closure: None,
        };
        self.edit(Edit::AddSegment(seg));
        self.view.editing = Some(id);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scenario::demo_scenario;

    #[test]
    fn split_keeps_the_shared_vertex_in_both_halves() {
        let mut s = demo_scenario().expect("demo");
        let id = "driftwood-shore".to_string();
        let points = s
            .segments
            .iter()
            .find(|x| x.id == id)
            .expect("segment")
            .points
            .clone();
        assert_eq!(points.len(), 3);
        apply_edit(&mut s, Edit::Split(id.clone(), 1));
        let k = s
            .segments
            .iter()
            .position(|x| x.id == id)
            .expect("first half");
        assert_eq!(s.segments[k].points, points[..2].to_vec());
        assert_eq!(s.segments[k + 1].points, points[1..].to_vec());
        assert_eq!(s.segments[k + 1].id, "driftwood-shore-1");
        assert_eq!(s.segments[k + 1].name, "Driftwood Shore (2)");
    }

    #[test]
    fn a_segment_keeps_two_vertices() {
        let mut s = demo_scenario().expect("demo");
        let before = s.clone();
        apply_edit(&mut s, Edit::DeleteVertex("gannet-reach".into(), 0));
        assert_eq!(s, before);
    }
}
