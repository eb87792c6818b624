//! The map: base layer (bundled land, cached online tiles, or an offline map pack over
//! the land), the coast coloured by the chosen measure, transport and wind arrows,
//! ports, the editor's handles, and clicks; over it, zoom buttons, a scale bar in
//! nautical miles, the pointer's position, the name of the stretch under the pointer,
//! the length of a segment being drawn and the credit of the tiles shown.

use super::commands::Command;
use super::edit::Edit;
use super::land_layer::LandLayer;
use super::pack_layer::PackLayer;
use super::state::{AppOptions, BaseLayer, Colouring, ShelfwindApp, Tool};
use super::stretch_paint::{ScreenLine, StretchPaint, ViewKey, screen_dir};
use crate::coast::{
    CoastSegment, LatLon, SeaSide, destination, distance_m, initial_bearing_deg, midpoint,
};
use crate::export::colour::{self, Rgb};
use crate::physics::{NAUTICAL_MILE_M, m_s_to_knots};
use crate::plan::{Odds, Plan, StretchInfo};
use eframe::egui::{self, Align2, Color32, FontId, Pos2, Rect, Shape, Stroke, Vec2};
use std::sync::Arc;
use walkers::{MapMemory, Plugin, Projector, lat_lon};

fn c32(c: Rgb) -> Color32 {
    Color32::from_rgb(c[0], c[1], c[2])
}

/// Online tiles with an identifying User-Agent and a disk cache in the app's folder.
/// Tiles are fetched only as they are shown: no bulk download.
pub(super) fn online_tiles(ctx: &egui::Context, options: &AppOptions) -> walkers::HttpTiles {
    let http = walkers::HttpOptions {
        cache: options.storage_dir.as_ref().map(|d| d.join("tile-cache")),
        user_agent: walkers::HeaderValue::from_str(concat!(
            "Shelfwind/",
            env!("CARGO_PKG_VERSION"),
            " (offline fishing planner)"
        ))
        .ok(),
        ..Default::default()
    };
    walkers::HttpTiles::with_options(walkers::sources::OpenStreetMap, http, ctx.clone())
}

/// How a stretch stands on the chosen day for the chosen boat.
#[derive(Debug, Clone, Copy, PartialEq)]
enum DayStatus {
    /// Ranked, with its score; with a full fishing day inside the safe window or not.
    Ranked { full_day: bool, score: f64 },
    /// Left out: closed to fishing, for the wind, or for another reason (range, no
    /// forecast, the equator).
    Excluded { wind: bool, closed: bool },
}

/// The status of every stretch on a day, found in one pass over the day's lists.
fn day_statuses(plan: &Plan, day: usize) -> Vec<Option<DayStatus>> {
    let mut out = vec![None; plan.stretches.len()];
    if let Some(d) = plan.days.get(day) {
        for r in &d.ranked {
            out[r.stretch] = Some(DayStatus::Ranked {
                full_day: r.window_factor >= 1.0,
                score: r.score,
            });
        }
        for e in &d.excluded {
            out[e.stretch] = Some(DayStatus::Excluded {
                wind: e.exclusion.is_wind(),
                closed: matches!(e.exclusion, crate::plan::Exclusion::Closed(_)),
            });
        }
    }
    out
}

/// The colour of a stretch under the chosen colouring; `odds` is what an ensemble's
/// runs say of it on the chosen day, `hit` its segment's hit rate in the sea check.
fn stretch_colour(
    s: &StretchInfo,
    colouring: Colouring,
    (date, status, odds, hit): (
        Option<chrono::NaiveDate>,
        Option<DayStatus>,
        Option<Odds>,
        Option<f64>,
    ),
    time: Option<chrono::DateTime<chrono::Utc>>,
) -> Option<Color32> {
    let rgb = match colouring {
        Colouring::HitRate => colour::productivity_colour(hit?),
        Colouring::UpwellingOdds => colour::productivity_colour(odds?.p_upwelling()),
        Colouring::IndexNow => colour::index_colour(s.hour_at(time?)?.index_m3s_per_100m),
        Colouring::Productivity => colour::productivity_colour(s.day(date?)?.response.productivity),
        Colouring::DayScore => match status? {
            DayStatus::Ranked { score, .. } => colour::productivity_colour(score / 100.0),
            DayStatus::Excluded { closed: true, .. } => colour::SAFE_CLOSED,
            DayStatus::Excluded { .. } => colour::SAFE_EXCLUDED,
        },
        Colouring::SafeForBoat => match status? {
            DayStatus::Ranked { full_day: true, .. } => colour::SAFE_ALL_DAY,
            DayStatus::Ranked {
                full_day: false, ..
            } => colour::SAFE_PART_DAY,
            DayStatus::Excluded { closed: true, .. } => colour::SAFE_CLOSED,
            DayStatus::Excluded { wind: true, .. } => colour::SAFE_NOT,
            DayStatus::Excluded { .. } => colour::SAFE_EXCLUDED,
        },
    };
    Some(c32(rgb))
}

fn arrow(painter: &egui::Painter, from: Pos2, vec: Vec2, stroke: Stroke) {
    if vec.length() < 2.0 {
        return;
    }
    let tip = from + vec;
    painter.line_segment([from, tip], stroke);
    let dir = vec.normalized();
    let side = Vec2::new(-dir.y, dir.x);
    let head = (vec.length() * 0.3).clamp(4.0, 8.0);
    painter.add(Shape::convex_polygon(
        vec![
            tip,
            tip - dir * head + side * head * 0.5,
            tip - dir * head - side * head * 0.5,
        ],
        stroke.color,
        Stroke::NONE,
    ));
}

fn distance_to_polyline(p: Pos2, line: &[Pos2]) -> f32 {
    line.windows(2)
        .map(|w| {
            let (a, b) = (w[0], w[1]);
            let ab = b - a;
            let t = if ab.length_sq() > 0.0 {
                ((p - a).dot(ab) / ab.length_sq()).clamp(0.0, 1.0)
            } else {
                0.0
            };
            (a + ab * t).distance(p)
        })
        .fold(f32::INFINITY, f32::min)
}

/// How near the pointer must come to a stretch to name it or pick it, pixels.
const STRETCH_PICK_PX: f32 = 12.0;

/// The stretch whose line passes nearest `p`, if within `max_px`. Lines whose box is
/// farther than that are passed over unmeasured, so only stretches near the pointer
/// cost anything.
fn nearest_stretch(p: Pos2, lines: &[ScreenLine], max_px: f32) -> Option<usize> {
    lines
        .iter()
        .filter(|l| l.bounds.expand(max_px).contains(p))
        .map(|l| (l.stretch, distance_to_polyline(p, &l.points)))
        .filter(|(_, d)| *d < max_px)
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .map(|(k, _)| k)
}

/// Outer rim and fill of the halo around a selected stretch.
const SELECTED_RIM: Color32 = Color32::from_rgb(20, 20, 20);
const SELECTED_FILL: Color32 = Color32::from_rgb(255, 222, 0);

/// Paints `text` on a light box whose `align` corner is at `anchor`, wrapped at
/// `wrap_px`; returns the box.
pub(super) fn text_box(
    painter: &egui::Painter,
    anchor: Pos2,
    align: Align2,
    text: &str,
    wrap_px: f32,
    border: Stroke,
) -> Rect {
    const PAD_PX: f32 = 4.0;
    let colour = Color32::from_rgb(20, 20, 20);
    let galley = painter.layout(text.to_owned(), FontId::proportional(13.5), colour, wrap_px);
    let rect = align.anchor_size(anchor, galley.size() + Vec2::splat(2.0 * PAD_PX));
    painter.rect(
        rect,
        3.0,
        Color32::from_white_alpha(230),
        border,
        egui::StrokeKind::Inside,
    );
    painter.galley(rect.min + Vec2::splat(PAD_PX), galley, colour);
    rect
}

/// Names something painted on the map for screen readers (and tests): a widget over
/// `rect` that only senses hovering, so clicks and drags still reach the map.
pub(super) fn name_painted(ui: &egui::Ui, rect: Rect, salt: impl egui::AsIdSalt, name: &str) {
    ui.interact(rect, ui.scope_id().with(salt), egui::Sense::hover())
        .widget_info(|| egui::WidgetInfo::labeled(egui::Role::Label, true, name));
}

/// What the pointer shows over a stretch: its name and, if it is ranked on the day, its
/// rank and score, else why it is left out.
fn stretch_hover_text(
    plan: &Plan,
    day: usize,
    stretch: usize,
    units: crate::export::units::Units,
) -> String {
    let odds = plan
        .days
        .get(day)
        .and_then(|d| d.odds.get(stretch).copied().flatten())
        .map(|o| {
            format!(
                "\nupwelling in {} of {} runs; window in {} of {}",
                o.upwelling, o.runs, o.window, o.runs
            )
        })
        .unwrap_or_default();
    let name = &format!("{}{odds}", plan.stretches[stretch].name);
    let ranked = plan.days.get(day).and_then(|d| {
        d.ranked
            .iter()
            .find(|r| r.stretch == stretch)
            .map(|r| (r, d.ranked.len()))
    });
    match ranked {
        Some((r, of)) => format!(
            "{name}\nrank {}{} of {of}, score {:.0}",
            if r.tied_with_above { "=" } else { "" },
            r.rank,
            r.score
        ),
        None => {
            // Left out on the day: say why, as the list does.
            let why = plan
                .days
                .get(day)
                .and_then(|d| d.excluded.iter().find(|e| e.stretch == stretch))
                .map(|e| crate::export::plan_text::excluded_text(plan, e, units));
            why.map_or_else(
                || name.clone(),
                |w| {
                    format!(
                        "{name}
left out: {w}"
                    )
                },
            )
        }
    }
}

/// A handle of the segment in the editor, as drawn on screen.
#[derive(Debug, Clone, PartialEq)]
pub struct Handle {
    /// The segment.
    pub segment: String,
    /// What the handle does.
    pub kind: HandleKind,
    /// Where it is on screen.
    pub pos: Pos2,
}

/// What a handle does.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum HandleKind {
    /// A vertex, by index: drag to move, right-click to remove.
    Vertex(usize),
    /// Between two vertices: click to insert a vertex at this index.
    Insert(usize),
}

/// How near a pointer must be to a handle to take it, pixels.
const HANDLE_RADIUS_PX: f32 = 9.0;

/// The vertex handle at a screen position, if any.
pub(super) fn vertex_at(handles: &[Handle], p: Pos2) -> Option<(String, usize)> {
    handles.iter().find_map(|h| match h.kind {
        HandleKind::Vertex(i) if h.pos.distance(p) < HANDLE_RADIUS_PX => {
            Some((h.segment.clone(), i))
        }
        _ => None,
    })
}

/// The coast, arrows, ports, draft and handles; turns clicks and drags into commands.
struct CoastLayer<'a> {
    plan: Option<&'a Arc<Plan>>,
    /// The stretches as placed and painted last frame.
    paint: &'a mut StretchPaint,
    segments: &'a [CoastSegment],
    colouring: Colouring,
    /// Per segment id, the share of its events the sea check confirmed.
    hit_rates: Option<&'a std::collections::HashMap<String, f64>>,
    day: usize,
    /// The units words are given in.
    units: crate::export::units::Units,
    time: Option<chrono::DateTime<chrono::Utc>>,
    selected: &'a [String],
    editing: Option<(&'a CoastSegment, Option<SeaSide>)>,
    tool: &'a Tool,
    dragging: Option<(String, usize)>,
    commands: &'a mut Vec<Command>,
    handles: &'a mut Vec<Handle>,
    ports: &'a [crate::scenario::Port],
}

/// Draws an hour's arrows from a point a little offshore of a stretch (one stretch per
/// 30-pixel cell, so a crowded coast stays readable): wind (downwind) in dark grey,
/// Ekman transport in purple.
fn hour_arrows(
    painter: &egui::Painter,
    c: Pos2,
    (s, h): (&crate::plan::StretchForecast, &crate::plan::StretchHour),
) {
    let kt = m_s_to_knots(h.wind.speed_m_s()) as f32;
    if let Some(from) = h.wind.direction_from_deg() {
        arrow(
            painter,
            c,
            screen_dir(from + 180.0) * (6.0 + kt * 0.8).min(32.0),
            Stroke::new(2.0, Color32::from_rgb(60, 60, 60)),
        );
    }
    let (mx, my) = s.transport_m2_s(h);
    let m = (mx.hypot(my) as f32).min(6.0);
    if m > 0.05 {
        let dir = Vec2::new(mx as f32, -(my as f32)).normalized();
        arrow(
            painter,
            c,
            dir * (8.0 + m * 5.0).min(30.0),
            Stroke::new(2.5, Color32::from_rgb(118, 42, 131)),
        );
    }
}

impl CoastLayer<'_> {
    /// The stretches, coloured, with their arrows at the chosen hour and the selected
    /// ones ringed and named; their screen lines are left in `self.paint` for clicks
    /// and hovering.
    fn draw_stretches(
        &mut self,
        ui: &egui::Ui,
        painter: &egui::Painter,
        view: ViewKey,
        project: &dyn Fn(&LatLon) -> Pos2,
    ) {
        let Some(plan) = self.plan else {
            return;
        };
        self.paint.place(plan, view, 20.0, project);
        let mut names = Vec::new();
        for line in self
            .paint
            .lines()
            .iter()
            .filter(|_| !self.selected.is_empty())
        {
            let k = line.stretch;
            let s = &plan.stretches[k];
            if self.selected.contains(&s.id) {
                // A bright band with a dark rim, wider than the stretch: it shows on
                // land, sea and tiles whatever the stretch's own colour.
                let band = &line.points;
                painter.add(Shape::line(band.clone(), Stroke::new(21.0, SELECTED_RIM)));
                painter.add(Shape::line(band.clone(), Stroke::new(17.0, SELECTED_FILL)));
                names.push((k, project(&s.centre), s.offshore_bearing_deg));
                // The way there by sea from the home port.
                if let Some(route) = &s.route {
                    let way: Vec<Pos2> = route.points.iter().map(project).collect();
                    painter.extend(Shape::dashed_line(
                        &way,
                        Stroke::new(2.5, Color32::from_rgb(20, 60, 160)),
                        8.0,
                        5.0,
                    ));
                }
            }
        }
        // The colours change with the day and the colouring, and with the hour only
        // for the index now; the sea check's hit rates are read every frame.
        let key = match self.colouring {
            Colouring::HitRate => None,
            Colouring::IndexNow => Some((self.day, self.colouring, self.time)),
            _ => Some((self.day, self.colouring, None)),
        };
        let colours = |lines: &[ScreenLine]| {
            let statuses = day_statuses(plan, self.day);
            let date = plan.days.get(self.day).map(|d| d.date);
            let odds = plan
                .days
                .get(self.day)
                .map(|d| d.odds.as_slice())
                .unwrap_or_default();
            lines
                .iter()
                .map(|line| {
                    let k = line.stretch;
                    let s = &plan.stretches[k];
                    let these = odds.get(k).copied().flatten();
                    let hit = self.hit_rates.and_then(|h| h.get(&s.segment_id)).copied();
                    stretch_colour(
                        s,
                        self.colouring,
                        (date, statuses[k], these, hit),
                        self.time,
                    )
                    .unwrap_or(Color32::from_gray(160))
                })
                .collect()
        };
        let mesh = self.paint.mesh(plan, key, colours, ui.ctx());
        painter.add(mesh);
        // One stretch's arrows per cell: the first in plan order with wind at the hour.
        if let Some(t) = self.time {
            for cell in self.paint.arrow_cells() {
                let first = cell.iter().find_map(|&(l, start)| {
                    let s = &plan.stretches[self.paint.lines()[l].stretch];
                    s.hour_at(t).map(|h| (start, (&**s, h)))
                });
                if let Some((start, hour)) = first {
                    hour_arrows(painter, start, hour);
                }
            }
        }
        // Names last, on the landward side, clear of the offshore arrows.
        for (k, centre, offshore_deg) in names {
            let landward = screen_dir(offshore_deg + 180.0);
            let align = if landward.x >= 0.0 {
                Align2::LEFT_CENTER
            } else {
                Align2::RIGHT_CENTER
            };
            let name = &plan.stretches[k].name;
            let rect = text_box(
                painter,
                centre + landward * 18.0,
                align,
                name,
                240.0,
                Stroke::new(2.0, SELECTED_FILL),
            );
            name_painted(
                ui,
                rect,
                ("selected stretch", k),
                &format!("Selected: {name}"),
            );
        }
    }

    /// The name (and rank) of the stretch under the pointer, in a box beside it.
    fn hover_label(&self, ui: &egui::Ui, response: &egui::Response, lines: &[ScreenLine]) {
        let (Some(plan), Some(p)) = (self.plan, response.hover_pos()) else {
            return;
        };
        let map = ui.max_rect();
        if response.dragged() || self.dragging.is_some() || zoom_buttons_rect(map).contains(p) {
            return;
        }
        let Some(k) = nearest_stretch(p, lines, STRETCH_PICK_PX) else {
            return;
        };
        let mut text = stretch_hover_text(plan, self.day, k, self.units);
        if self.colouring == Colouring::HitRate {
            let segment = &plan.stretches[k].segment_id;
            let line = match self.hit_rates.and_then(|h| h.get(segment)) {
                Some(rate) => format!(
                    "Sea check: {:.0} % of its upwelling events were followed by cooling",
                    rate * 100.0
                ),
                None => "Sea check: no result (Seasons > Check against measured sea temperature…)"
                    .to_string(),
            };
            text = format!("{text}\n{line}");
        }
        // Towards the middle of the map, so the box is not cut off at an edge.
        let (left, up) = (p.x > map.center().x, p.y > map.center().y);
        let end = |far: bool| {
            if far {
                egui::Align::Max
            } else {
                egui::Align::Min
            }
        };
        let align = Align2([end(left), end(up)]);
        let offset = Vec2::new(
            if left { -16.0 } else { 16.0 },
            if up { -12.0 } else { 18.0 },
        );
        let painter = ui.painter_at(map);
        let rect = text_box(&painter, p + offset, align, &text, 280.0, Stroke::NONE);
        name_painted(ui, rect, "stretch under pointer", &text);
    }

    fn draw_ports(&self, painter: &egui::Painter, project: &dyn Fn(&LatLon) -> Pos2) {
        for port in self.ports {
            let p = project(&port.position);
            painter.circle(
                p,
                6.0,
                Color32::WHITE,
                Stroke::new(2.5, Color32::from_rgb(20, 40, 90)),
            );
            painter.text(
                p + Vec2::new(9.0, 0.0),
                Align2::LEFT_CENTER,
                &port.name,
                FontId::proportional(14.0),
                Color32::from_rgb(20, 40, 90),
            );
        }
    }

    /// The segment in the editor: sea-side arrows, vertex and insert handles.
    fn draw_editing(&mut self, painter: &egui::Painter, project: &dyn Fn(&LatLon) -> Pos2) {
        self.handles.clear();
        let Some((seg, side)) = self.editing else {
            return;
        };
        let blue = Color32::from_rgb(0, 110, 160);
        for (i, w) in seg.points.windows(2).enumerate() {
            let mid = midpoint(w[0], w[1]);
            let along = initial_bearing_deg(mid, w[1]);
            let m = project(&mid);
            if let Some(side) = side {
                let offshore = if side == SeaSide::Right {
                    along + 90.0
                } else {
                    along - 90.0
                };
                let dir = (project(&destination(mid, offshore, 1.0)) - m).normalized();
                arrow(painter, m, dir * 26.0, Stroke::new(3.0, blue));
            }
            painter.circle(m, 5.0, Color32::WHITE, Stroke::new(1.5, blue));
            painter.text(
                m,
                Align2::CENTER_CENTER,
                "+",
                FontId::proportional(11.0),
                blue,
            );
            self.handles.push(Handle {
                segment: seg.id.clone(),
                kind: HandleKind::Insert(i + 1),
                pos: m,
            });
        }
        for (i, p) in seg.points.iter().enumerate() {
            let s = project(p);
            painter.circle(
                s,
                7.0,
                Color32::from_rgb(255, 200, 0),
                Stroke::new(2.0, Color32::BLACK),
            );
            self.handles.push(Handle {
                segment: seg.id.clone(),
                kind: HandleKind::Vertex(i),
                pos: s,
            });
        }
    }

    /// The segment being drawn, up to the pointer.
    fn draw_draft(
        &self,
        painter: &egui::Painter,
        response: &egui::Response,
        project: &dyn Fn(&LatLon) -> Pos2,
    ) {
        let Tool::Draw { points } = self.tool else {
            return;
        };
        let mut line: Vec<Pos2> = points.iter().map(project).collect();
        if let Some(h) = response.hover_pos() {
            line.push(h);
        }
        let orange = Color32::from_rgb(220, 90, 0);
        painter.add(Shape::line(line.clone(), Stroke::new(3.0, orange)));
        for p in &line[..points.len()] {
            painter.circle_filled(*p, 5.0, orange);
        }
    }

    /// Drags, right-clicks and double-clicks on the map.
    fn interact_pointer(
        &mut self,
        ui: &egui::Ui,
        response: &egui::Response,
        unproject: &dyn Fn(Pos2) -> LatLon,
    ) -> bool {
        let pointer = response
            .interact_pointer_pos()
            .or_else(|| response.hover_pos());
        if let Some((segment, index)) = &self.dragging {
            if response.dragged() || ui.input(|i| i.pointer.primary_down()) {
                if let Some(p) = pointer {
                    self.commands.push(Command::DragVertex {
                        segment: segment.clone(),
                        index: *index,
                        to: unproject(p),
                    });
                }
            } else {
                self.commands.push(Command::EndDrag);
            }
            return true;
        }
        if response.drag_started()
            && let Some(p) = ui.input(|i| i.pointer.press_origin())
            && let Some((segment, index)) = vertex_at(self.handles, p)
        {
            self.commands.push(Command::DragVertex {
                segment,
                index,
                to: unproject(p),
            });
            return true;
        }
        if response.secondary_clicked()
            && let Some((id, index)) = pointer.and_then(|p| vertex_at(self.handles, p))
        {
            self.commands
                .push(Command::Edit(Edit::DeleteVertex(id, index)));
            return true;
        }
        if response.double_clicked() && matches!(self.tool, Tool::Draw { .. }) {
            self.commands.push(Command::FinishDraft);
            return true;
        }
        false
    }

    /// A click: a draft point, an inserted vertex, a stretch or a segment to edit.
    fn interact_click(
        &mut self,
        ui: &egui::Ui,
        p: Pos2,
        project: &dyn Fn(&LatLon) -> Pos2,
        unproject: &dyn Fn(Pos2) -> LatLon,
    ) {
        // Drawing adds a point; placing a port puts it here.
        if matches!(self.tool, Tool::Draw { .. } | Tool::PlacePort(_)) {
            self.commands.push(Command::AddDraftPoint(unproject(p)));
            return;
        }
        if let Some(h) = self
            .handles
            .iter()
            .find(|h| h.pos.distance(p) < HANDLE_RADIUS_PX)
        {
            if let HandleKind::Insert(index) = h.kind {
                self.commands.push(Command::Edit(Edit::InsertVertex(
                    h.segment.clone(),
                    index,
                    unproject(h.pos),
                )));
            }
            return;
        }
        let add = ui.input(|i| i.modifiers.command || i.modifiers.shift);
        let nearest = nearest_stretch(p, self.paint.lines(), STRETCH_PICK_PX);
        if let (Some(k), Some(plan)) = (nearest, self.plan) {
            self.commands.push(Command::SelectStretch {
                id: plan.stretches[k].id.clone(),
                add,
            });
            return;
        }
        let on_segment = self.segments.iter().find(|s| {
            let line: Vec<Pos2> = s.points.iter().map(project).collect();
            distance_to_polyline(p, &line) < 10.0
        });
        if let Some(s) = on_segment {
            self.commands.push(Command::EditSegment(Some(s.id.clone())));
        }
    }
}

impl Plugin for CoastLayer<'_> {
    fn run(
        mut self: Box<Self>,
        ui: &mut egui::Ui,
        response: &egui::Response,
        projector: &Projector,
        _memory: &MapMemory,
    ) {
        let painter = ui.painter_at(ui.max_rect());
        let project = |p: &LatLon| projector.project(lat_lon(p.lat_deg, p.lon_deg)).to_pos2();
        let unproject = |p: Pos2| {
            let pos = projector.unproject(p.to_vec2());
            LatLon::new(pos.y(), pos.x())
        };
        let view = ViewKey::of(ui.max_rect(), projector);
        let segments = self.paint.segments(self.segments, view, &project, ui.ctx());
        painter.add(segments);
        self.draw_stretches(ui, &painter, view, &project);
        self.draw_ports(&painter, &project);
        self.draw_editing(&painter, &project);
        self.draw_draft(&painter, response, &project);
        self.hover_label(ui, response, self.paint.lines());
        if self.interact_pointer(ui, response, &unproject) {
            return;
        }
        if response.clicked()
            && let Some(p) = response
                .interact_pointer_pos()
                .or_else(|| response.hover_pos())
        {
            self.interact_click(ui, p, &project, &unproject);
        }
    }
}

/// A step of the zoom buttons, applied to the map's memory after the map is drawn.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum ZoomStep {
    In,
    Out,
}

/// Side of a zoom button, pixels.
const ZOOM_BUTTON_PX: f32 = 32.0;
/// Gap between the overlays and the map's edge, pixels.
const EDGE_PX: f32 = 10.0;
/// Height kept free at the bottom right for the tile credit when tiles are shown, pixels.
const CREDIT_PX: f32 = 26.0;
/// Width of the legend (bottom left), pixels.
const LEGEND_WIDTH_PX: f32 = 240.0;
/// Longest the scale bar may be, pixels.
const SCALE_BAR_MAX_PX: f32 = 140.0;
/// Height of the scale bar's box, pixels.
const SCALE_BOX_PX: f32 = 40.0;

/// Where the zoom buttons sit: the top right corner of the map, one above the other.
pub(super) fn zoom_buttons_rect(map: Rect) -> Rect {
    Rect::from_min_size(
        map.right_top() + Vec2::new(-EDGE_PX - ZOOM_BUTTON_PX, EDGE_PX),
        Vec2::new(ZOOM_BUTTON_PX, 2.0 * ZOOM_BUTTON_PX + 4.0),
    )
}

/// The bottom right corner of the scale bar and the pointer's position, above the tile
/// credit when there is one.
fn readout_corner(map: Rect, credit: bool) -> Pos2 {
    let credit_px = if credit { CREDIT_PX } else { 0.0 };
    map.right_bottom() - Vec2::new(EDGE_PX, EDGE_PX + credit_px)
}

/// The "+" and "−" buttons; a click is left in `step` for the caller to apply.
struct ZoomButtons<'a> {
    step: &'a mut Option<ZoomStep>,
}

impl Plugin for ZoomButtons<'_> {
    fn run(
        self: Box<Self>,
        ui: &mut egui::Ui,
        _response: &egui::Response,
        _projector: &Projector,
        _memory: &MapMemory,
    ) {
        let area = zoom_buttons_rect(ui.max_rect());
        let buttons = [
            (ZoomStep::In, "+", "Zoom in", 0.0),
            (ZoomStep::Out, "−", "Zoom out", 1.0),
        ];
        for (step, glyph, name, row) in buttons {
            let at = Rect::from_min_size(
                area.min + Vec2::new(0.0, row * (ZOOM_BUTTON_PX + 4.0)),
                Vec2::splat(ZOOM_BUTTON_PX),
            );
            let button = egui::Button::new(egui::RichText::new(glyph).size(20.0).strong())
                .min_size(Vec2::splat(ZOOM_BUTTON_PX));
            let response = ui.put(at, button).on_hover_text(name);
            response.widget_info(|| egui::WidgetInfo::labeled(egui::Role::Button, true, name));
            if response.clicked() {
                *self.step = Some(step);
            }
        }
    }
}

/// The longest round length not over `max_nm`: 1, 2 or 5 times a power of ten.
///
/// # Units
/// any one unit (nautical miles or kilometres), in and out.
fn round_scale_length(max_nm: f64) -> Option<f64> {
    if !(max_nm.is_finite() && max_nm > 0.0) {
        return None;
    }
    let decade = 10f64.powf(max_nm.log10().floor());
    [5.0, 2.0, 1.0]
        .into_iter()
        .map(|m| m * decade)
        .find(|v| *v <= max_nm * (1.0 + 1e-9))
}

/// A length in nautical miles as a scale shows it: no trailing zeros (`0.5 nm`, `20 nm`).
fn scale_text(length: f64, unit: &str) -> String {
    let digits = format!("{length:.3}");
    format!(
        "{} {unit}",
        digits.trim_end_matches('0').trim_end_matches('.')
    )
}

/// The length of a path through the points, nautical miles (great circles between them).
fn path_length_nm(points: &[LatLon]) -> f64 {
    points
        .windows(2)
        .map(|w| distance_m(w[0], w[1]))
        .sum::<f64>()
        / NAUTICAL_MILE_M
}

/// One coordinate in degrees and decimal minutes, e.g. `38°26.4'N`; `positive` and
/// `negative` name the hemispheres. Minutes are marked with an apostrophe: the bundled
/// font has no prime sign.
fn degrees_minutes(deg: f64, positive: char, negative: char) -> String {
    // Rounded once, in tenths of a minute, so 59.96' carries into the degree.
    let tenths = (deg.abs() * 600.0).round() as u64;
    let (whole, minutes) = (tenths / 600, tenths % 600);
    let hemisphere = if deg < 0.0 && tenths > 0 {
        negative
    } else {
        positive
    };
    format!("{whole}°{:02}.{}'{hemisphere}", minutes / 10, minutes % 10)
}

/// A position in degrees and decimal minutes, latitude first, e.g.
/// `38°26.4'N 123°08.4'W`; the longitude is brought into −180°..180° first (the map can
/// be panned round the world).
fn position_text(p: LatLon) -> String {
    let lon_deg = (p.lon_deg + 180.0).rem_euclid(360.0) - 180.0;
    format!(
        "{} {}",
        degrees_minutes(p.lat_deg, 'N', 'S'),
        degrees_minutes(lon_deg, 'E', 'W')
    )
}

/// Metres per screen pixel across the middle of the map (Mercator's scale changes with
/// latitude, so the middle stands for the view).
fn metres_per_px(projector: &Projector, map: Rect) -> f64 {
    let half_span_px = 50.0;
    let at = |dx: f32| {
        let p = projector.unproject((map.center() + Vec2::new(dx, 0.0)).to_vec2());
        LatLon::new(p.y(), p.x())
    };
    distance_m(at(-half_span_px), at(half_span_px)) / f64::from(2.0 * half_span_px)
}

/// The scale bar in nautical miles, bottom right.
struct ScaleBar {
    /// The tile credit takes the bottom right corner.
    credit: bool,
    /// The unit of the bar: metres in one, and its name (nautical miles or km).
    unit: (f64, &'static str),
}

impl Plugin for ScaleBar {
    fn run(
        self: Box<Self>,
        ui: &mut egui::Ui,
        _response: &egui::Response,
        projector: &Projector,
        _memory: &MapMemory,
    ) {
        let map = ui.max_rect();
        let m_per_px = metres_per_px(projector, map);
        let (unit_m, unit) = self.unit;
        let max_units = f64::from(SCALE_BAR_MAX_PX) * m_per_px / unit_m;
        let Some(length) = round_scale_length(max_units) else {
            return;
        };
        let bar_px = (length * unit_m / m_per_px) as f32;
        let text = scale_text(length, unit);
        let corner = readout_corner(map, self.credit);
        let rect = Align2::RIGHT_BOTTOM
            .anchor_size(corner, Vec2::new(bar_px.max(40.0) + 20.0, SCALE_BOX_PX));
        let painter = ui.painter_at(map);
        painter.rect_filled(rect, 3.0, Color32::from_white_alpha(230));
        let ink = Color32::from_rgb(20, 20, 20);
        let y = rect.bottom() - 10.0;
        let (x0, x1) = (rect.right() - 10.0 - bar_px, rect.right() - 10.0);
        let stroke = Stroke::new(2.0, ink);
        painter.line_segment([Pos2::new(x0, y), Pos2::new(x1, y)], stroke);
        for x in [x0, x1] {
            painter.line_segment([Pos2::new(x, y - 7.0), Pos2::new(x, y + 3.0)], stroke);
        }
        painter.text(
            Pos2::new(f32::midpoint(x0, x1), y - 6.0),
            Align2::CENTER_BOTTOM,
            &text,
            FontId::proportional(13.5),
            ink,
        );
        name_painted(ui, rect, "scale bar", &format!("Scale bar: {text}"));
    }
}

/// The position under the pointer, above the scale bar.
struct PointerPosition {
    /// The tile credit takes the bottom right corner.
    credit: bool,
}

impl Plugin for PointerPosition {
    fn run(
        self: Box<Self>,
        ui: &mut egui::Ui,
        response: &egui::Response,
        projector: &Projector,
        _memory: &MapMemory,
    ) {
        let map = ui.max_rect();
        let Some(p) = response
            .hover_pos()
            .filter(|p| !zoom_buttons_rect(map).contains(*p))
        else {
            return;
        };
        let at = projector.unproject(p.to_vec2());
        let text = position_text(LatLon::new(at.y(), at.x()));
        let anchor = readout_corner(map, self.credit) - Vec2::new(0.0, SCALE_BOX_PX + 4.0);
        let painter = ui.painter_at(map);
        let rect = text_box(
            &painter,
            anchor,
            Align2::RIGHT_BOTTOM,
            &text,
            f32::INFINITY,
            Stroke::NONE,
        );
        name_painted(ui, rect, "pointer position", &format!("Pointer at {text}"));
    }
}

/// How to draw a segment, and the length so far (the points and the pointer), at the
/// bottom of the map between the legend and the scale bar.
struct DraftHint<'a> {
    points: &'a [LatLon],
}

impl Plugin for DraftHint<'_> {
    fn run(
        self: Box<Self>,
        ui: &mut egui::Ui,
        response: &egui::Response,
        projector: &Projector,
        _memory: &MapMemory,
    ) {
        let mut path = self.points.to_vec();
        if let Some(p) = response.hover_pos() {
            let at = projector.unproject(p.to_vec2());
            path.push(LatLon::new(at.y(), at.x()));
        }
        let length = match path_length_nm(&path) {
            _ if path.len() < 2 => String::new(),
            nm if nm < 1.0 => format!(", {nm:.2} nm long"),
            nm => format!(", {nm:.1} nm long"),
        };
        let text = format!(
            "Drawing a segment: click to add points ({} so far{length}); double-click or Enter to finish; Esc to stop.",
            self.points.len()
        );
        let map = ui.max_rect();
        let left = map.left() + 2.0 * EDGE_PX + LEGEND_WIDTH_PX;
        let right = map.right() - 2.0 * EDGE_PX - SCALE_BAR_MAX_PX - 20.0;
        let wrap_px = (right - left).max(200.0);
        let anchor = Pos2::new(f32::midpoint(left, right), map.bottom() - EDGE_PX);
        let painter = ui.painter_at(map);
        let border = Stroke::new(1.5, Color32::from_rgb(160, 60, 0));
        let rect = text_box(
            &painter,
            anchor,
            Align2::CENTER_BOTTOM,
            &text,
            wrap_px,
            border,
        );
        name_painted(ui, rect, "drawing hint", &text);
    }
}

/// What the map panel remembers between frames besides walkers' memory. Kept in egui's
/// memory, so the app's state needs no field for it.
#[derive(Debug, Clone, Copy, PartialEq)]
struct MapPanelMemory {
    /// Where the map was last drawn.
    rect: Rect,
}

/// Keeps every place where it was on screen when the map's rectangle changes (a side
/// panel opens or is resized, the window changes size): walkers keeps its centre in the
/// middle of the rectangle, so without this the coast would jump by half the change.
fn keep_view_steady(
    ctx: &egui::Context,
    memory: &mut MapMemory,
    my_position: walkers::Position,
    rect: Rect,
) {
    let id = egui::Id::unique("shelfwind map panel");
    let last: Option<MapPanelMemory> = ctx.data(|d| d.get_temp(id));
    ctx.data_mut(|d| d.insert_temp(id, MapPanelMemory { rect }));
    let Some(last) = last else {
        return;
    };
    if last.rect.center() == rect.center() || !last.rect.is_positive() || !rect.is_positive() {
        return;
    }
    let before = Projector::new(last.rect, &walkers::MercatorProjection, memory, my_position);
    memory.center_at(before.unproject(rect.center().to_vec2()));
}

/// Centres the map where asked (a "Show" button), or frames the whole coast.
fn place_view(app: &mut ShelfwindApp, size: Vec2) {
    if let Some(p) = app.view.centre_on.take() {
        app.map_memory.center_at(lat_lon(p.lat_deg, p.lon_deg));
    }
    if std::mem::take(&mut app.view.fit_coast) {
        let points = app
            .doc
            .scenario
            .segments
            .iter()
            .flat_map(|s| s.points.iter().copied())
            .chain(app.doc.scenario.ports.iter().map(|p| p.position));
        if let Some((centre, zoom)) = fit(points, size) {
            app.map_memory
                .center_at(lat_lon(centre.lat_deg, centre.lon_deg));
            let _ = app.map_memory.set_zoom(zoom);
        }
    }
}

/// The map panel.
pub(super) fn map_ui(app: &mut ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
    let rect = ui.available_rect_before_wrap();
    let centre = app.coast_centre().unwrap_or(LatLon::new(0.0, 0.0));
    let my_position = lat_lon(centre.lat_deg, centre.lon_deg);
    keep_view_steady(ui.ctx(), &mut app.map_memory, my_position, rect);
    place_view(app, rect.size());
    let time = app.view.timeline.get(app.view.hour).copied();
    let land_model = app.land_model();
    let editing = editing_segment(
        &app.doc.scenario.segments,
        app.view.editing.as_ref(),
        &mut app.view.segment_draft,
        land_model.as_deref(),
    );
    // Start a vertex drag before the map pans: a press on a handle drawn last frame.
    let pressed_on_handle = ui.input(|i| {
        i.pointer.primary_pressed()
            && i.pointer
                .press_origin()
                .is_some_and(|p| vertex_at(&app.view.handles, p).is_some())
    });
    let dragging = app
        .view
        .vertex_drag
        .as_ref()
        .map(|d| (d.segment.clone(), d.index));
    let panning = dragging.is_none() && !pressed_on_handle;
    let online = app.view.base_layer == BaseLayer::OnlineTiles;
    let tiles: Option<&mut dyn walkers::Tiles> = if online {
        app.tiles.as_mut().map(|t| t as &mut dyn walkers::Tiles)
    } else {
        None
    };
    let pack = match &app.view.base_layer {
        BaseLayer::Pack(path) => app.pack.as_mut().filter(|p| &p.path == path),
        _ => None,
    };
    let credit = if online {
        Some("© OpenStreetMap contributors".to_string())
    } else {
        pack.as_ref().map(|p| p.info.attribution.clone())
    };
    let mut handles = Vec::new();
    let mut zoom_step = None;
    let plan = app.plan.clone();
    let ports = app.doc.scenario.ports.clone();
    let draft = if let Tool::Draw { points } = &app.view.tool {
        Some(points.as_slice())
    } else {
        None
    };
    let mut map = walkers::Map::new(tiles, &mut app.map_memory, my_position)
        .panning(panning)
        // The wheel zooms about the pointer, with no key held: the map is what the
        // wheel is for here (walkers' default pans with it and zooms with Ctrl).
        .zoom_with_ctrl(false)
        .double_click_to_zoom(draft.is_none())
        .with_plugin(LandLayer {
            mesh: app.land.as_deref(),
            paint_sea: !online,
        });
    if let Some(pack) = pack {
        map = map.with_plugin(PackLayer { pack });
    }
    map = map
        .with_plugin(super::graticule::Graticule)
        .with_plugin(CoastLayer {
            plan: plan.as_ref(),
            paint: &mut app.stretch_paint,
            segments: &app.doc.scenario.segments,
            colouring: app.view.colouring,
            hit_rates: app.check.hit_rates(),
            day: app.view.day,
            units: app.view.units,
            time,
            selected: &app.view.selected,
            editing,
            tool: &app.view.tool,
            dragging,
            commands,
            handles: &mut handles,
            ports: &ports,
        })
        .with_plugin(ScaleBar {
            credit: credit.is_some(),
            unit: match app.view.units.distance {
                crate::export::units::DistanceUnit::NauticalMiles => (NAUTICAL_MILE_M, "nm"),
                crate::export::units::DistanceUnit::Kilometres => (1000.0, "km"),
            },
        })
        .with_plugin(PointerPosition {
            credit: credit.is_some(),
        })
        .with_plugin(ZoomButtons {
            step: &mut zoom_step,
        });
    if let Some(points) = draft {
        map = map.with_plugin(DraftHint { points });
    }
    // The map in a Ui of its own: walkers zooms with the wheel while the pointer is in
    // the Ui it is given, which must be the map and not the toolbar above it.
    let mut map_area = ui.new_child(egui::UiBuilder::new().max_rect(rect));
    let response = map.show(&mut map_area, |_, _, _, _| ()).response;
    ui.advance_cursor_after_rect(rect);
    response.widget_info(|| egui::WidgetInfo::labeled(egui::Role::Canvas, true, "Map"));
    app.view.handles = handles;
    let zoomed = match zoom_step {
        Some(ZoomStep::In) => app.map_memory.zoom_in().is_ok(),
        Some(ZoomStep::Out) => app.map_memory.zoom_out().is_ok(),
        None => false,
    };
    if zoomed {
        ui.ctx().request_repaint();
    }
    if app.view.show_legend {
        legend_ui(ui, response.rect, app.view.colouring);
    }
    if let Some(text) = credit {
        credit_ui(ui, response.rect, &text);
    }
    if let Tool::PlacePort(k) = app.view.tool {
        place_port_hint(app, ui, response.rect, k);
    }
}

/// The segment open in the editor, with its sea side (set, or found from the land).
fn editing_segment<'a>(
    segments: &'a [CoastSegment],
    editing: Option<&String>,
    draft: &mut super::editor::SegmentDraft,
    land_model: Option<&crate::coast::Land>,
) -> Option<(&'a CoastSegment, Option<SeaSide>)> {
    let seg = segments.iter().find(|s| Some(&s.id) == editing)?;
    // The bundled land is asked for only here: until it has been read in the
    // background, asking would hold the frame (the map opens without waiting for it).
    let sea = seg.sea.or_else(|| {
        let land = land_model.unwrap_or_else(|| crate::coast::Land::bundled());
        draft.sea_from_land(&seg.points, land)
    });
    Some((seg, sea))
}

/// What to do while placing port `k`, at the top of the map.
fn place_port_hint(app: &ShelfwindApp, ui: &egui::Ui, rect: Rect, k: usize) {
    let name = app
        .doc
        .scenario
        .ports
        .get(k)
        .map_or("the port", |p| p.name.as_str());
    ui.painter_at(rect).text(
        rect.center_top() + Vec2::new(0.0, 14.0),
        Align2::CENTER_TOP,
        format!("Placing {name}: click on the map where the harbour mouth is; Esc to stop."),
        FontId::proportional(15.0),
        Color32::from_rgb(160, 60, 0),
    );
}

/// The credit of the tiles shown (online tiles or a map pack), bottom right.
fn credit_ui(ui: &egui::Ui, rect: Rect, text: &str) {
    let painter = ui.painter_at(rect);
    let pos = rect.right_bottom() - Vec2::new(6.0, 6.0);
    let galley = painter.layout_no_wrap(text.into(), FontId::proportional(12.0), Color32::BLACK);
    let credit = Rect::from_min_size(
        pos - galley.size() - Vec2::splat(3.0),
        galley.size() + Vec2::splat(6.0),
    );
    painter.rect_filled(credit, 3.0, Color32::from_white_alpha(220));
    painter.galley(pos - galley.size(), galley, Color32::BLACK);
    name_painted(ui, credit, "map credit", &format!("Map credit: {text}"));
}

/// The centre and Web Mercator zoom that frame the points in a view of `size` pixels,
/// with a margin.
fn fit(points: impl Iterator<Item = LatLon>, size: Vec2) -> Option<(LatLon, f64)> {
    let merc = |lat: f64| {
        (std::f64::consts::FRAC_PI_4 + lat.to_radians() / 2.0)
            .tan()
            .ln()
    };
    let (mut lat0, mut lat1, mut lon0, mut lon1) = (f64::MAX, f64::MIN, f64::MAX, f64::MIN);
    for p in points {
        lat0 = lat0.min(p.lat_deg);
        lat1 = lat1.max(p.lat_deg);
        lon0 = lon0.min(p.lon_deg);
        lon1 = lon1.max(p.lon_deg);
    }
    if lat0 > lat1 {
        return None;
    }
    let margin = 1.25;
    let dlon = ((lon1 - lon0) * margin).max(0.01);
    let dy = ((merc(lat1) - merc(lat0)) * margin).max(0.0002);
    let z_lon = (f64::from(size.x) * 360.0 / (256.0 * dlon)).log2();
    let z_lat = (f64::from(size.y) * std::f64::consts::TAU / (256.0 * dy)).log2();
    let centre_y = f64::midpoint(merc(lat0), merc(lat1));
    let centre_lat = (2.0 * centre_y.exp().atan() - std::f64::consts::FRAC_PI_2).to_degrees();
    Some((
        LatLon::new(centre_lat, f64::midpoint(lon0, lon1)),
        z_lon.min(z_lat).clamp(2.0, 16.0),
    ))
}

/// The legend's title and its colour stops for a colouring.
fn legend_stops(colouring: Colouring) -> (&'static str, Vec<(String, Color32)>) {
    match colouring {
        Colouring::IndexNow => (
            "Upwelling index (m³/s per 100 m)",
            [300.0, 150.0, 50.0, 0.0, -50.0, -150.0, -300.0]
                .iter()
                .map(|v: &f64| {
                    let label = match *v {
                        v if v > 0.0 => format!("+{v:.0} upwelling"),
                        v if v < 0.0 => format!("{v:.0} downwelling"),
                        _ => "0".to_string(),
                    };
                    (label, c32(colour::index_colour(*v)))
                })
                .collect(),
        ),
        Colouring::Productivity => (
            "Expected productivity",
            [1.0, 0.75, 0.5, 0.25, 0.0]
                .iter()
                .map(|v: &f64| {
                    (
                        format!("{:.0} %", v * 100.0),
                        c32(colour::productivity_colour(*v)),
                    )
                })
                .collect(),
        ),
        Colouring::DayScore => (
            "Score on the chosen day",
            [100.0, 75.0, 50.0, 25.0, 0.0]
                .iter()
                .map(|v: &f64| {
                    (
                        format!("{v:.0}"),
                        c32(colour::productivity_colour(*v / 100.0)),
                    )
                })
                .chain([
                    ("closed to fishing".into(), c32(colour::SAFE_CLOSED)),
                    ("left out (see the list)".into(), c32(colour::SAFE_EXCLUDED)),
                ])
                .collect(),
        ),
        Colouring::UpwellingOdds => (
            "Chance of upwelling (share of runs)",
            [1.0, 0.75, 0.5, 0.25, 0.0]
                .iter()
                .map(|v: &f64| {
                    (
                        format!("{:.0} % of runs", v * 100.0),
                        c32(colour::productivity_colour(*v)),
                    )
                })
                .chain([("single forecast: no odds".into(), Color32::from_gray(160))])
                .collect(),
        ),
        Colouring::HitRate => (
            "Sea check: events followed by cooling",
            [1.0, 0.75, 0.5, 0.25, 0.0]
                .iter()
                .map(|v: &f64| {
                    (
                        format!("{:.0} % of events", v * 100.0),
                        c32(colour::productivity_colour(*v)),
                    )
                })
                .chain([(
                    "no check run, or no event to tell".into(),
                    Color32::from_gray(160),
                )])
                .collect(),
        ),
        Colouring::SafeForBoat => (
            "This boat, chosen day",
            vec![
                ("safe all day".into(), c32(colour::SAFE_ALL_DAY)),
                ("part of the day".into(), c32(colour::SAFE_PART_DAY)),
                ("over its wind limit".into(), c32(colour::SAFE_NOT)),
                ("closed to fishing".into(), c32(colour::SAFE_CLOSED)),
                (
                    "out of range or no forecast".into(),
                    c32(colour::SAFE_EXCLUDED),
                ),
            ],
        ),
    }
}

fn legend_ui(ui: &egui::Ui, rect: egui::Rect, colouring: Colouring) {
    let painter = ui.painter_at(rect);
    let row = 18.0;
    let (title, stops) = legend_stops(colouring);
    // The colours, then a line each for closures, wind and transport.
    let rows = stops.len() + 3;
    let height = 28.0 + row * rows as f32 + 4.0;
    // Bottom left, out of the way of the coast, which usually runs through the middle.
    let origin = rect.left_bottom() + Vec2::new(10.0, -10.0 - height);
    let size = Vec2::new(LEGEND_WIDTH_PX, height);
    painter.rect_filled(
        egui::Rect::from_min_size(origin, size),
        4.0,
        Color32::from_white_alpha(225),
    );
    painter.text(
        origin + Vec2::new(8.0, 6.0),
        Align2::LEFT_TOP,
        title,
        FontId::proportional(13.0),
        Color32::BLACK,
    );
    for (i, (label, c)) in stops.iter().enumerate() {
        let y = origin.y + 28.0 + row * i as f32;
        painter.rect_filled(
            egui::Rect::from_min_size(Pos2::new(origin.x + 8.0, y), Vec2::new(28.0, 12.0)),
            2.0,
            *c,
        );
        painter.text(
            Pos2::new(origin.x + 44.0, y + 6.0),
            Align2::LEFT_CENTER,
            label,
            FontId::proportional(12.5),
            Color32::BLACK,
        );
    }
    // The marks below the colours: what each line and arrow on the map means.
    let text_at = |y: f32, label: &str| {
        painter.text(
            Pos2::new(origin.x + 44.0, y + 8.0),
            Align2::LEFT_CENTER,
            label,
            FontId::proportional(12.5),
            Color32::BLACK,
        );
    };
    let y = origin.y + 28.0 + row * stops.len() as f32 + 2.0;
    painter.line_segment(
        [
            Pos2::new(origin.x + 8.0, y + 8.0),
            Pos2::new(origin.x + 36.0, y + 8.0),
        ],
        Stroke::new(3.0, Color32::from_rgb(180, 0, 0)),
    );
    text_at(y, "dashed red: closed to fishing");
    for (k, (stroke, label)) in [
        (
            Stroke::new(2.0, Color32::from_rgb(60, 60, 60)),
            "wind (downwind)",
        ),
        (
            Stroke::new(2.5, Color32::from_rgb(118, 42, 131)),
            "Ekman transport",
        ),
    ]
    .into_iter()
    .enumerate()
    {
        let y = y + row * (k + 1) as f32;
        arrow(
            &painter,
            Pos2::new(origin.x + 8.0, y + 8.0),
            Vec2::new(26.0, 0.0),
            stroke,
        );
        text_at(y, label);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn scale_lengths_are_round_and_never_longer_than_allowed() {
        for (max_nm, want) in [
            (0.74, 0.5),
            (1.0, 1.0),
            (1.99, 1.0),
            (4.2, 2.0),
            (9.9, 5.0),
            (14.0, 10.0),
            (47.0, 20.0),
            (50.0, 50.0),
            (0.013, 0.01),
        ] {
            let got = round_scale_length(max_nm).expect("a length");
            assert_relative_eq!(got, want, max_relative = 1e-12);
        }
        assert_eq!(round_scale_length(0.0), None);
        assert_eq!(round_scale_length(f64::NAN), None);
    }

    #[test]
    fn scale_text_has_no_trailing_zeros() {
        assert_eq!(scale_text(0.5, "nm"), "0.5 nm");
        assert_eq!(scale_text(0.05, "nm"), "0.05 nm");
        assert_eq!(scale_text(2.0, "nm"), "2 nm");
        assert_eq!(scale_text(20.0, "km"), "20 km");
        assert_eq!(scale_text(100.0, "nm"), "100 nm");
    }

    #[test]
    fn positions_read_in_degrees_and_minutes() {
        // 38°26.4' = 38.44°, 123°08.4' = 123.14°.
        assert_eq!(
            position_text(LatLon::new(38.44, -123.14)),
            "38°26.4'N 123°08.4'W"
        );
        assert_eq!(
            position_text(LatLon::new(-33.9, 18.4)),
            "33°54.0'S 18°24.0'E"
        );
        // 59.97' rounds to a whole degree, not to 60.0'.
        assert_eq!(degrees_minutes(44.9995, 'N', 'S'), "45°00.0'N");
        // A hair south of the equator reads as 0°00.0'N, not S.
        assert_eq!(degrees_minutes(-0.00001, 'N', 'S'), "0°00.0'N");
        // A map panned once round the world still reads in −180°..180°.
        assert_eq!(
            position_text(LatLon::new(10.0, 360.0 - 123.14)),
            "10°00.0'N 123°08.4'W"
        );
    }

    #[test]
    fn one_minute_of_latitude_is_about_a_nautical_mile() {
        let a = LatLon::new(38.0, -123.0);
        let b = LatLon::new(38.0 + 1.0 / 60.0, -123.0);
        let c = LatLon::new(38.0 + 2.0 / 60.0, -123.0);
        // On the mean-radius sphere a minute of arc is 1853.2 m: 0.07 % over 1852 m.
        assert_relative_eq!(path_length_nm(&[a, b, c]), 2.0, max_relative = 1e-3);
        assert_relative_eq!(path_length_nm(&[a]), 0.0);
    }

    #[test]
    fn the_nearest_stretch_is_picked_only_near_its_line() {
        let line = |k, y: f32| {
            let points = vec![Pos2::new(0.0, y), Pos2::new(100.0, y)];
            ScreenLine {
                stretch: k,
                bounds: Rect::from_points(&points),
                points,
            }
        };
        let lines = [line(0, 0.0), line(1, 20.0)];
        assert_eq!(nearest_stretch(Pos2::new(50.0, 4.0), &lines, 12.0), Some(0));
        assert_eq!(
            nearest_stretch(Pos2::new(50.0, 14.0), &lines, 12.0),
            Some(1)
        );
        assert_eq!(nearest_stretch(Pos2::new(50.0, 40.0), &lines, 12.0), None);
        assert_eq!(nearest_stretch(Pos2::new(130.0, 0.0), &lines, 12.0), None);
    }
}
