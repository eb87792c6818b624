//! The map: base layer (bundled land, or cached online tiles), the coast coloured by the
//! chosen measure, transport and wind arrows, ports, the editor's handles, and clicks.

use super::commands::Command;
use super::edit::Edit;
use super::land_layer::LandLayer;
use super::state::{AppOptions, BaseLayer, Colouring, ShelfwindApp, Tool};
use crate::coast::{CoastSegment, LatLon, SeaSide, destination, initial_bearing_deg, midpoint};
use crate::export::colour::{self, Rgb};
use crate::physics::m_s_to_knots;
use crate::plan::{Plan, StretchInfo};
use eframe::egui::{self, Align2, Color32, FontId, Pos2, Shape, Stroke, Vec2};
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
    /// Ranked; with a full fishing day inside the safe window or not.
    Ranked { full_day: bool },
    /// Left out; for the wind or for another reason.
    Excluded { wind: bool },
}

/// The status of every stretch on a day, found in one pass over the day's lists.
fn day_statuses(plan: &Plan, day: usize) -> Vec<Option<DayStatus>> {
    let mut out = vec![None; plan.stretches.len()];
    if let Some(d) = plan.days.get(day) {
        for r in &d.ranked {
            out[r.stretch] = Some(DayStatus::Ranked {
                full_day: r.window_factor >= 1.0,
            });
        }
        for e in &d.excluded {
            out[e.stretch] = Some(DayStatus::Excluded {
                wind: e.exclusion.is_wind(),
            });
        }
    }
    out
}

/// The colour of a stretch under the chosen colouring.
fn stretch_colour(
    s: &StretchInfo,
    colouring: Colouring,
    date: Option<chrono::NaiveDate>,
    status: Option<DayStatus>,
    time: Option<chrono::DateTime<chrono::Utc>>,
) -> Option<Color32> {
    let rgb = match colouring {
        Colouring::IndexNow => colour::index_colour(s.hour_at(time?)?.index_m3s_per_100m),
        Colouring::Productivity => colour::productivity_colour(s.day(date?)?.response.productivity),
        Colouring::SafeForBoat => match status? {
            DayStatus::Ranked { full_day: true } => colour::SAFE_ALL_DAY,
            DayStatus::Ranked { full_day: false } => colour::SAFE_PART_DAY,
            DayStatus::Excluded { wind: true } => colour::SAFE_NOT,
            DayStatus::Excluded { wind: false } => colour::SAFE_EXCLUDED,
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

/// Screen direction of a bearing (degrees true) at a position: east is +x, north −y.
fn screen_dir(bearing_deg: f64) -> Vec2 {
    let b = bearing_deg.to_radians();
    Vec2::new(b.sin() as f32, -(b.cos() as f32))
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
    plan: Option<&'a Plan>,
    segments: &'a [CoastSegment],
    colouring: Colouring,
    day: usize,
    time: Option<chrono::DateTime<chrono::Utc>>,
    selected: &'a [String],
    editing: Option<(&'a CoastSegment, Option<SeaSide>)>,
    tool: &'a Tool,
    dragging: Option<(String, usize)>,
    commands: &'a mut Vec<Command>,
    handles: &'a mut Vec<Handle>,
    ports: &'a [crate::scenario::Port],
}

/// Draws an arrow from a point a little offshore of a stretch, one per 30-pixel cell so
/// a crowded coast stays readable: wind (downwind) in dark grey, Ekman transport in
/// purple.
fn hour_arrows(
    painter: &egui::Painter,
    c: Pos2,
    h: &crate::plan::StretchHour,
    cells: &mut std::collections::HashSet<(i32, i32)>,
) {
    if !cells.insert(((c.x / 30.0).floor() as i32, (c.y / 30.0).floor() as i32)) {
        return;
    }
    let kt = m_s_to_knots(h.wind.speed_m_s()) as f32;
    if let Some(from) = h.wind.direction_from_deg() {
        arrow(
            painter,
            c,
            screen_dir(from + 180.0) * (6.0 + kt * 0.8).min(32.0),
            Stroke::new(2.0, Color32::from_rgb(60, 60, 60)),
        );
    }
    let (mx, my) = h.transport_m2_s;
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
    /// Segments as drawn (thin), so new ones show before they are planned.
    fn draw_segments(&self, painter: &egui::Painter, project: &dyn Fn(&LatLon) -> Pos2) {
        for seg in self.segments {
            let line: Vec<Pos2> = seg.points.iter().map(project).collect();
            painter.add(Shape::line(
                line,
                Stroke::new(2.0, Color32::from_rgb(90, 90, 90)),
            ));
        }
    }

    /// The stretches, coloured, with their arrows at the chosen hour; returns their
    /// screen lines for clicks.
    fn draw_stretches(
        &self,
        painter: &egui::Painter,
        view: egui::Rect,
        project: &dyn Fn(&LatLon) -> Pos2,
    ) -> Vec<(usize, Vec<Pos2>)> {
        let Some(plan) = self.plan else {
            return Vec::new();
        };
        let statuses = day_statuses(plan, self.day);
        let date = plan.days.get(self.day).map(|d| d.date);
        let mut screen_lines = Vec::new();
        let mut arrow_cells = std::collections::HashSet::new();
        for (k, s) in plan.stretches.iter().enumerate() {
            let line: Vec<Pos2> = s.points.iter().map(project).collect();
            // Off screen: nothing to draw or click.
            if !line.iter().any(|p| view.contains(*p))
                && !egui::Rect::from_points(&line).intersects(view)
            {
                continue;
            }
            if self.selected.contains(&s.id) {
                painter.add(Shape::line(
                    line.clone(),
                    Stroke::new(13.0, Color32::from_rgb(20, 20, 20)),
                ));
            }
            let colour = stretch_colour(s, self.colouring, date, statuses[k], self.time)
                .unwrap_or(Color32::from_gray(160));
            // A dark edge keeps near-zero (light) stretches visible on the land.
            painter.add(Shape::line(
                line.clone(),
                Stroke::new(10.0, Color32::from_gray(70)),
            ));
            painter.add(Shape::line(line.clone(), Stroke::new(7.0, colour)));
            if s.closure.is_some() {
                painter.extend(Shape::dashed_line(
                    &line,
                    Stroke::new(3.0, Color32::from_rgb(180, 0, 0)),
                    6.0,
                    6.0,
                ));
            }
            screen_lines.push((k, line));
            if let Some(h) = self.time.and_then(|t| s.hour_at(t)) {
                let c = project(&s.centre) + screen_dir(s.offshore_bearing_deg) * 14.0;
                hour_arrows(painter, c, h, &mut arrow_cells);
            }
        }
        screen_lines
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
        screen_lines: &[(usize, Vec<Pos2>)],
        project: &dyn Fn(&LatLon) -> Pos2,
        unproject: &dyn Fn(Pos2) -> LatLon,
    ) {
        if let Tool::Draw { .. } = self.tool {
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
        let nearest = screen_lines
            .iter()
            .map(|(k, line)| (*k, distance_to_polyline(p, line)))
            .min_by(|a, b| a.1.total_cmp(&b.1))
            .filter(|(_, d)| *d < 12.0);
        if let (Some((k, _)), Some(plan)) = (nearest, self.plan) {
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
        self.draw_segments(&painter, &project);
        let screen_lines = self.draw_stretches(&painter, ui.max_rect().expand(20.0), &project);
        self.draw_ports(&painter, &project);
        self.draw_editing(&painter, &project);
        self.draw_draft(&painter, response, &project);
        if self.interact_pointer(ui, response, &unproject) {
            return;
        }
        if response.clicked()
            && let Some(p) = response
                .interact_pointer_pos()
                .or_else(|| response.hover_pos())
        {
            self.interact_click(ui, p, &screen_lines, &project, &unproject);
        }
    }
}

/// The map panel.
pub(super) fn map_ui(app: &mut ShelfwindApp, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
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
        if let Some((centre, zoom)) = fit(points, ui.available_size()) {
            app.map_memory
                .center_at(lat_lon(centre.lat_deg, centre.lon_deg));
            let _ = app.map_memory.set_zoom(zoom);
        }
    }
    let centre = app.coast_centre().unwrap_or(LatLon::new(0.0, 0.0));
    let time = app.view.timeline.get(app.view.hour).copied();
    let editing = app
        .view
        .editing
        .as_ref()
        .and_then(|id| app.doc.scenario.segments.iter().find(|s| &s.id == id))
        .map(|seg| {
            (
                seg,
                seg.sea
                    .or(app.view.segment_draft.sea_from_land(&seg.points)),
            )
        });
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
    let mut handles = Vec::new();
    let plan = app.plan.clone();
    let ports = app.doc.scenario.ports.clone();
    let map = walkers::Map::new(
        tiles,
        &mut app.map_memory,
        lat_lon(centre.lat_deg, centre.lon_deg),
    )
    .panning(panning)
    .double_click_to_zoom(!matches!(app.view.tool, Tool::Draw { .. }))
    .with_plugin(LandLayer {
        mesh: app.land.as_deref(),
        paint_sea: !online,
    })
    .with_plugin(CoastLayer {
        plan: plan.as_deref(),
        segments: &app.doc.scenario.segments,
        colouring: app.view.colouring,
        day: app.view.day,
        time,
        selected: &app.view.selected,
        editing,
        tool: &app.view.tool,
        dragging,
        commands,
        handles: &mut handles,
        ports: &ports,
    });
    let response = map.show(ui, |_, _, _, _| ()).response;
    response.widget_info(|| egui::WidgetInfo::labeled(egui::Role::Canvas, true, "Map"));
    app.view.handles = handles;
    let rect = response.rect;
    legend_ui(ui, rect, app.view.colouring);
    if online {
        let painter = ui.painter_at(rect);
        let text = "© OpenStreetMap contributors";
        let pos = rect.right_bottom() - Vec2::new(6.0, 6.0);
        let galley =
            painter.layout_no_wrap(text.into(), FontId::proportional(12.0), Color32::BLACK);
        painter.rect_filled(
            egui::Rect::from_min_size(
                pos - galley.size() - Vec2::splat(3.0),
                galley.size() + Vec2::splat(6.0),
            ),
            3.0,
            Color32::from_white_alpha(220),
        );
        painter.galley(pos - galley.size(), galley, Color32::BLACK);
    }
    if let Tool::Draw { points } = &app.view.tool {
        let painter = ui.painter_at(rect);
        let text = format!(
            "Drawing a segment: click to add points ({} so far); double-click or Enter to finish; Esc to stop.",
            points.len()
        );
        painter.text(
            rect.center_bottom() - Vec2::new(0.0, 14.0),
            Align2::CENTER_BOTTOM,
            text,
            FontId::proportional(15.0),
            Color32::from_rgb(160, 60, 0),
        );
    }
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

fn legend_ui(ui: &egui::Ui, rect: egui::Rect, colouring: Colouring) {
    let painter = ui.painter_at(rect);
    let row = 18.0;
    let rows = match colouring {
        Colouring::IndexNow => 7,
        Colouring::Productivity => 5,
        Colouring::SafeForBoat => 4,
    } + 3;
    let height = 28.0 + row * rows as f32 + 4.0;
    // Bottom left, out of the way of the coast, which usually runs through the middle.
    let origin = rect.left_bottom() + Vec2::new(10.0, -10.0 - height);
    let (title, stops): (&str, Vec<(String, Color32)>) = match colouring {
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
        Colouring::SafeForBoat => (
            "This boat, chosen day",
            vec![
                ("safe all day".into(), c32(colour::SAFE_ALL_DAY)),
                ("part of the day".into(), c32(colour::SAFE_PART_DAY)),
                ("over its wind limit".into(), c32(colour::SAFE_NOT)),
                ("closed or out of range".into(), c32(colour::SAFE_EXCLUDED)),
            ],
        ),
    };
    let size = Vec2::new(240.0, height);
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
