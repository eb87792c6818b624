//! The plan's stretches on the map, kept from frame to frame: their lines on screen
//! (drawn, hovered and clicked), the cells their hour arrows go in, and their coloured
//! lines tessellated into one mesh. Only a new plan or a moved map projects them again,
//! only new colours tessellate them again: stepping through the hours redraws the
//! arrows alone, so a coast of 10,000 stretches costs little per frame.

use super::state::Colouring;
use crate::coast::{CoastSegment, LatLon};
use crate::plan::Plan;
use chrono::{DateTime, Utc};
use eframe::egui::{self, Color32, Mesh, Pos2, Rect, Shape, Stroke, Vec2};
use std::collections::HashMap;
use std::sync::{Arc, Weak};
use walkers::{Projector, lat_lon};

/// Side of the cells the hour arrows are thinned to (one arrow per cell), pixels.
const ARROW_CELL_PX: f32 = 30.0;
/// How far offshore of a stretch's centre its arrows start, pixels.
const ARROW_OFFSET_PX: f32 = 14.0;

/// A stretch's line in screen coordinates, for drawing, hovering and clicking.
pub(super) struct ScreenLine {
    /// Index into [`Plan::stretches`].
    pub(super) stretch: usize,
    pub(super) bounds: Rect,
    pub(super) points: Vec<Pos2>,
}

/// What a stretch's place on screen depends on: the map's rectangle, the zoom and where
/// a reference point lands (the projection is a scale and a shift).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct ViewKey {
    rect: Rect,
    zoom: f64,
    origin: Pos2,
}

impl ViewKey {
    pub(super) fn of(rect: Rect, projector: &Projector) -> Self {
        Self {
            rect,
            zoom: projector.zoom(),
            origin: projector.project(lat_lon(0.0, 0.0)).to_pos2(),
        }
    }
}

/// A tessellator for lines, with the context's quality and pixel density: the map's
/// layers tessellate what they keep once, not every frame.
pub(super) fn line_tessellator(ctx: &egui::Context) -> egui::epaint::Tessellator {
    let options = ctx.tessellation_options(|o| *o);
    egui::epaint::Tessellator::new(ctx.pixels_per_point(), options, [1, 1], Vec::new())
}

/// Screen direction (y down) of a bearing in degrees true.
pub(super) fn screen_dir(bearing_deg: f64) -> Vec2 {
    let r = bearing_deg.to_radians();
    Vec2::new(r.sin() as f32, -(r.cos() as f32))
}

/// What the stretches' colours depend on besides the plan: the day, the colouring and,
/// when the colouring changes by the hour, the hour.
pub(super) type LookKey = (usize, Colouring, Option<DateTime<Utc>>);

/// What a mesh was painted for.
struct Look {
    /// `None` when the colours could not be told apart by a key (read every frame).
    key: Option<LookKey>,
    /// The colour of each line.
    colours: Vec<Color32>,
    pixels_per_point: f32,
}

/// One line through lines that follow on from each other (each starts where the one
/// before ends).
fn through(run: &[(&ScreenLine, Color32)]) -> Vec<Pos2> {
    let mut points = Vec::new();
    for (line, _) in run {
        let skip = usize::from(!points.is_empty());
        points.extend(line.points.iter().skip(skip));
    }
    points
}

/// The stretches as last placed and painted, and what for.
#[derive(Default)]
pub struct StretchPaint {
    /// The plan placed (a weak handle: it keeps no old plan alive, and while it lives
    /// no new plan can take the old one's address).
    plan: Weak<Plan>,
    view: Option<ViewKey>,
    lines: Vec<ScreenLine>,
    /// Per cell, the stretches whose arrows start in it (indices into `lines`, in plan
    /// order) with that start.
    arrow_cells: Vec<Vec<(usize, Pos2)>>,
    /// What the mesh was painted for.
    look: Option<Look>,
    mesh: Arc<Mesh>,
    /// The drawn segments' lines, and the view, pixel density and points they were
    /// made for.
    segments: Option<(ViewKey, f32, Vec<Vec<LatLon>>)>,
    segments_mesh: Arc<Mesh>,
}

impl StretchPaint {
    /// Places the plan's stretches within `view.rect` (grown by `margin` pixels) on
    /// screen, unless they already are for this plan and view.
    pub(super) fn place(
        &mut self,
        plan: &Arc<Plan>,
        view: ViewKey,
        margin: f32,
        project: &dyn Fn(&LatLon) -> Pos2,
    ) {
        if self.view == Some(view) && std::ptr::eq(self.plan.as_ptr(), Arc::as_ptr(plan)) {
            return;
        }
        let visible = view.rect.expand(margin);
        self.lines.clear();
        self.arrow_cells.clear();
        let mut cell_index = HashMap::new();
        for (k, s) in plan.stretches.iter().enumerate() {
            let points: Vec<Pos2> = s.points.iter().map(project).collect();
            let bounds = Rect::from_points(&points);
            // Off screen: nothing to draw or click.
            if !bounds.intersects(visible) {
                continue;
            }
            let start = project(&s.centre) + screen_dir(s.offshore_bearing_deg) * ARROW_OFFSET_PX;
            let cell = (
                (start.x / ARROW_CELL_PX).floor() as i32,
                (start.y / ARROW_CELL_PX).floor() as i32,
            );
            let c = *cell_index.entry(cell).or_insert_with(|| {
                self.arrow_cells.push(Vec::new());
                self.arrow_cells.len() - 1
            });
            self.arrow_cells[c].push((self.lines.len(), start));
            self.lines.push(ScreenLine {
                stretch: k,
                bounds,
                points,
            });
        }
        self.plan = Arc::downgrade(plan);
        self.view = Some(view);
        self.look = None;
    }

    /// The lines placed, in plan order.
    pub(super) fn lines(&self) -> &[ScreenLine] {
        &self.lines
    }

    /// Per cell, the lines (indices into [`Self::lines`]) whose arrows start in it, in
    /// plan order, with that start.
    pub(super) fn arrow_cells(&self) -> &[Vec<(usize, Pos2)>] {
        &self.arrow_cells
    }

    /// The placed lines painted in their colours (worked out by `colours`, one per
    /// line, unless `key` is that of the last mesh), each over a dark edge that keeps
    /// near-white stretches visible on the land, closed ones dashed in red over that;
    /// tessellated again only when the colours or the pixel density change.
    pub(super) fn mesh(
        &mut self,
        plan: &Plan,
        key: Option<LookKey>,
        colours: impl FnOnce(&[ScreenLine]) -> Vec<Color32>,
        ctx: &egui::Context,
    ) -> Shape {
        let pixels_per_point = ctx.pixels_per_point();
        let kept = |look: &Look| look.pixels_per_point.total_cmp(&pixels_per_point).is_eq();
        if key.is_none() || !self.look.as_ref().is_some_and(|l| kept(l) && l.key == key) {
            let colours = colours(&self.lines);
            if !self
                .look
                .as_ref()
                .is_some_and(|l| kept(l) && l.colours == colours)
            {
                self.mesh = Arc::new(self.tessellate(plan, &colours, ctx));
            }
            self.look = Some(Look {
                key,
                colours,
                pixels_per_point,
            });
        }
        Shape::Mesh(Arc::clone(&self.mesh))
    }

    /// The segments as drawn, thin and grey (so new ones show before they are planned),
    /// tessellated again only when they, the view or the pixel density change.
    pub(super) fn segments(
        &mut self,
        segments: &[CoastSegment],
        view: ViewKey,
        project: &dyn Fn(&LatLon) -> Pos2,
        ctx: &egui::Context,
    ) -> Shape {
        let pixels_per_point = ctx.pixels_per_point();
        let same = self.segments.as_ref().is_some_and(|(v, ppp, points)| {
            *v == view
                && ppp.total_cmp(&pixels_per_point).is_eq()
                && points.len() == segments.len()
                && points.iter().zip(segments).all(|(p, s)| *p == s.points)
        });
        if !same {
            let mut tessellator = line_tessellator(ctx);
            let mut mesh = Mesh::default();
            for seg in segments {
                let line: Vec<Pos2> = seg.points.iter().map(project).collect();
                let stroke = Stroke::new(2.0, Color32::from_rgb(90, 90, 90));
                tessellator.tessellate_shape(Shape::line(line, stroke), &mut mesh);
            }
            self.segments_mesh = Arc::new(mesh);
            let points = segments.iter().map(|s| s.points.clone()).collect();
            self.segments = Some((view, pixels_per_point, points));
        }
        Shape::Mesh(Arc::clone(&self.segments_mesh))
    }

    fn tessellate(&self, plan: &Plan, colours: &[Color32], ctx: &egui::Context) -> Mesh {
        let mut tessellator = line_tessellator(ctx);
        let mut mesh = Mesh::default();
        // Stretches that follow on from each other (one ends where the next starts)
        // get one dark edge, and neighbours of one colour one coloured line: the same
        // picture in fewer triangles, without seams where stretches meet.
        let joined = |a: &ScreenLine, b: &ScreenLine| a.points.last() == b.points.first();
        let lines: Vec<(&ScreenLine, Color32)> =
            self.lines.iter().zip(colours.iter().copied()).collect();
        for run in lines.chunk_by(|a, b| joined(a.0, b.0)) {
            let edge = Stroke::new(10.0, Color32::from_gray(70));
            tessellator.tessellate_shape(Shape::line(through(run), edge), &mut mesh);
            for same in run.chunk_by(|a, b| a.1 == b.1) {
                let fill = Stroke::new(7.0, same[0].1);
                tessellator.tessellate_shape(Shape::line(through(same), fill), &mut mesh);
            }
            for (line, _) in run {
                if plan.stretches[line.stretch].closure.is_some() {
                    let dashes = Shape::dashed_line(
                        &line.points,
                        Stroke::new(3.0, Color32::from_rgb(180, 0, 0)),
                        6.0,
                        6.0,
                    );
                    for dash in dashes {
                        tessellator.tessellate_shape(dash, &mut mesh);
                    }
                }
            }
        }
        mesh
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn line(stretch: usize, points: &[(f32, f32)]) -> ScreenLine {
        let points: Vec<Pos2> = points.iter().map(|&(x, y)| Pos2::new(x, y)).collect();
        ScreenLine {
            stretch,
            bounds: Rect::from_points(&points),
            points,
        }
    }

    #[test]
    fn stretches_that_follow_on_are_drawn_as_one_line() {
        let a = line(0, &[(0.0, 0.0), (5.0, 0.0)]);
        let b = line(1, &[(5.0, 0.0), (9.0, 2.0), (12.0, 2.0)]);
        let run = [(&a, Color32::RED), (&b, Color32::RED)];
        assert_eq!(
            through(&run),
            vec![
                Pos2::new(0.0, 0.0),
                Pos2::new(5.0, 0.0),
                Pos2::new(9.0, 2.0),
                Pos2::new(12.0, 2.0)
            ]
        );
    }

    #[test]
    fn bearings_point_the_way_on_screen() {
        // North is up (−y) and east is right (+x) on the map.
        assert!((screen_dir(0.0) - Vec2::new(0.0, -1.0)).length() < 1e-6);
        assert!((screen_dir(90.0) - Vec2::new(1.0, 0.0)).length() < 1e-6);
        assert!((screen_dir(225.0) - Vec2::new(-0.5f32.sqrt(), 0.5f32.sqrt())).length() < 1e-6);
    }
}
