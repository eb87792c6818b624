//! The offline base layer: the bundled land polygons, triangulated once, drawn through
//! the map's projection at every zoom. Needs no network.

use crate::coast::{Land, LatLon};
use eframe::egui::{self, Color32, Mesh, Pos2, Rect, Shape, Stroke};
use walkers::{MapMemory, Plugin, Projector, lat_lon};

/// Sea colour of the offline map.
pub const SEA: Color32 = Color32::from_rgb(214, 228, 238);
/// Land colour of the offline map.
pub const LAND: Color32 = Color32::from_rgb(238, 234, 222);
const COAST_LINE: Color32 = Color32::from_rgb(150, 150, 140);

struct Ring {
    /// Range of the ring's vertices in [`LandMesh::vertices`].
    first: usize,
    len: usize,
    /// Triangles, as indices into the vertices (global).
    triangles: Vec<u32>,
    /// Bounding box: min lat, min lon, max lat, max lon.
    bbox: [f64; 4],
    /// A lake or inland sea inside land: drawn in the sea colour over the land.
    hole: bool,
}

/// The land, triangulated for drawing.
pub struct LandMesh {
    vertices: Vec<LatLon>,
    rings: Vec<Ring>,
    /// The shapes of the last frame and the view they were made for: while the map does
    /// not move (stepping through time), the land is not projected again.
    cache: std::sync::Mutex<Option<(ViewKey, Vec<Shape>)>>,
}

/// What the projected land depends on: the map's view, whether the sea is painted
/// and the pixel density its coast lines were tessellated for.
#[derive(Debug, Clone, Copy, PartialEq)]
struct ViewKey {
    view: super::stretch_paint::ViewKey,
    paint_sea: bool,
    pixels_per_point: f32,
}

impl LandMesh {
    /// Triangulates the land's rings (ear clipping, `earcutr`) and finds which rings are
    /// holes (a point inside them is not land by the even-odd rule).
    #[must_use]
    pub fn new(land: &Land) -> Self {
        let mut vertices = Vec::new();
        let mut rings = Vec::new();
        for ring in land.rings() {
            if ring.len() < 3 {
                continue;
            }
            let flat: Vec<f64> = ring.iter().flat_map(|p| [p.lon_deg, p.lat_deg]).collect();
            let Ok(tris) = earcutr::earcut(&flat, &[], 2) else {
                continue;
            };
            if tris.is_empty() {
                continue;
            }
            let first = vertices.len();
            let centroid = {
                let (a, b, c) = (ring[tris[0]], ring[tris[1]], ring[tris[2]]);
                LatLon::new(
                    (a.lat_deg + b.lat_deg + c.lat_deg) / 3.0,
                    (a.lon_deg + b.lon_deg + c.lon_deg) / 3.0,
                )
            };
            let mut bbox = [f64::MAX, f64::MAX, f64::MIN, f64::MIN];
            for p in ring {
                bbox = [
                    bbox[0].min(p.lat_deg),
                    bbox[1].min(p.lon_deg),
                    bbox[2].max(p.lat_deg),
                    bbox[3].max(p.lon_deg),
                ];
            }
            vertices.extend_from_slice(ring);
            rings.push(Ring {
                first,
                len: ring.len(),
                triangles: tris.iter().map(|&k| (first + k) as u32).collect(),
                bbox,
                hole: !land.is_land(centroid),
            });
        }
        Self {
            vertices,
            rings,
            cache: std::sync::Mutex::new(None),
        }
    }
}

impl LandMesh {
    /// The sea, the land and the coast line for a view, as shapes: meshes, the coast
    /// lines tessellated by `lines`, so a frame that reuses them copies handles only.
    fn shapes(
        &self,
        rect: egui::Rect,
        projector: &Projector,
        paint_sea: bool,
        lines: &mut egui::epaint::Tessellator,
    ) -> Vec<Shape> {
        let mut out = Vec::new();
        if paint_sea {
            out.push(Shape::rect_filled(rect, 0.0, SEA));
        }
        // The visible box in lat/lon, from the corners (Mercator keeps it a box).
        let corner = |p: Pos2| projector.unproject(p.to_vec2());
        let (nw, se) = (corner(rect.left_top()), corner(rect.right_bottom()));
        let (lat_min, lat_max) = (se.y().min(nw.y()), se.y().max(nw.y()));
        let (lon_min, lon_max) = (nw.x().min(se.x()), nw.x().max(se.x()));
        let wide = lon_max - lon_min >= 359.0;
        let mut screen: Vec<Pos2> = vec![Pos2::ZERO; self.vertices.len()];
        let project = |p: &LatLon| projector.project(lat_lon(p.lat_deg, p.lon_deg)).to_pos2();
        let visible = rect.expand(2.0);
        let mut slot = Vec::new();
        for pass_holes in [false, true] {
            let mut mesh = Mesh::default();
            let mut outlines = Mesh::default();
            for ring in self.rings.iter().filter(|r| r.hole == pass_holes) {
                let [a, b, c, d] = ring.bbox;
                if a > lat_max || c < lat_min || (!wide && (b > lon_max || d < lon_min)) {
                    continue;
                }
                let range = ring.first..ring.first + ring.len;
                for (s, v) in screen[range.clone()]
                    .iter_mut()
                    .zip(&self.vertices[range.clone()])
                {
                    *s = project(v);
                }
                let colour = if ring.hole { SEA } else { LAND };
                let on_screen = &screen[range];
                // Only the triangles that reach into the view, and the vertices they use:
                // a continent's ring has far more of both than a view of its coast shows.
                slot.clear();
                slot.resize(on_screen.len(), u32::MAX);
                for tri in ring.triangles.chunks_exact(3) {
                    let corners = [tri[0], tri[1], tri[2]].map(|t| t as usize - ring.first);
                    let tri_box = Rect::from_points(&corners.map(|v| on_screen[v]));
                    if !tri_box.intersects(visible) {
                        continue;
                    }
                    for v in corners {
                        if slot[v] == u32::MAX {
                            slot[v] = mesh.vertices.len() as u32;
                            mesh.colored_vertex(on_screen[v], colour);
                        }
                        mesh.indices.push(slot[v]);
                    }
                }
                for piece in pieces_in_view(on_screen, visible) {
                    lines.tessellate_shape(
                        Shape::line(piece, Stroke::new(0.8, COAST_LINE)),
                        &mut outlines,
                    );
                }
            }
            out.push(Shape::mesh(mesh));
            out.push(Shape::mesh(outlines));
        }
        out
    }
}

/// The pieces of a closed ring (on screen) that cross `view`, each a line through its
/// points, leaving out a point within a pixel of the one before it: a long coast has
/// many points off screen, and zoomed out many to a pixel, and neither changes what is
/// drawn.
fn pieces_in_view(ring: &[Pos2], view: Rect) -> Vec<Vec<Pos2>> {
    let mut pieces = Vec::new();
    let mut piece: Vec<Pos2> = Vec::new();
    let closing = ring.first().copied();
    for (&a, b) in ring.iter().zip(ring.iter().skip(1).copied().chain(closing)) {
        if Rect::from_two_pos(a, b).intersects(view) {
            if piece.is_empty() {
                piece.push(a);
            }
            if piece.last().is_some_and(|q| q.distance_sq(b) >= 1.0) {
                piece.push(b);
            }
        } else if !piece.is_empty() {
            pieces.push(std::mem::take(&mut piece));
        }
    }
    if !piece.is_empty() {
        pieces.push(piece);
    }
    pieces.retain(|p| p.len() >= 2);
    pieces
}

/// The walkers plugin that paints the sea and the land.
pub struct LandLayer<'a> {
    /// The triangulated land (`None` while it is being prepared: only the sea is drawn).
    pub mesh: Option<&'a LandMesh>,
    /// Paint the sea colour first (off when online tiles are underneath).
    pub paint_sea: bool,
}

impl Plugin for LandLayer<'_> {
    fn run(
        self: Box<Self>,
        ui: &mut egui::Ui,
        _response: &egui::Response,
        projector: &Projector,
        _memory: &MapMemory,
    ) {
        let rect = ui.max_rect();
        let painter = ui.painter_at(rect);
        let Some(mesh) = self.mesh else {
            if self.paint_sea {
                painter.rect_filled(rect, 0.0, SEA);
            }
            return;
        };
        let key = ViewKey {
            view: super::stretch_paint::ViewKey::of(rect, projector),
            paint_sea: self.paint_sea,
            pixels_per_point: ui.ctx().pixels_per_point(),
        };
        let Ok(mut cache) = mesh.cache.lock() else {
            return;
        };
        if let Some((k, shapes)) = cache.as_ref()
            && *k == key
        {
            painter.extend(shapes.iter().cloned());
            return;
        }
        let mut lines = super::stretch_paint::line_tessellator(ui.ctx());
        let shapes = mesh.shapes(rect, projector, self.paint_sea, &mut lines);
        painter.extend(shapes.iter().cloned());
        *cache = Some((key, shapes));
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn only_the_pieces_of_a_ring_that_cross_the_view_are_drawn() {
        let view = Rect::from_min_max(Pos2::new(0.0, 0.0), Pos2::new(100.0, 100.0));
        // A square ring from inside the view out to the right and back: the two sides
        // far to the right never cross the view.
        let ring = [
            Pos2::new(50.0, 20.0),
            Pos2::new(500.0, 20.0),
            Pos2::new(500.0, 80.0),
            Pos2::new(50.0, 80.0),
        ];
        let pieces = pieces_in_view(&ring, view);
        assert_eq!(
            pieces,
            vec![
                vec![Pos2::new(50.0, 20.0), Pos2::new(500.0, 20.0)],
                vec![
                    Pos2::new(500.0, 80.0),
                    Pos2::new(50.0, 80.0),
                    Pos2::new(50.0, 20.0)
                ],
            ]
        );
        // A ring wholly outside gives nothing.
        let away: Vec<Pos2> = ring
            .iter()
            .map(|p| *p + egui::Vec2::new(1000.0, 0.0))
            .collect();
        assert!(pieces_in_view(&away, view).is_empty());
    }

    #[test]
    fn points_within_a_pixel_of_the_last_kept_are_left_out() {
        let view = Rect::from_min_max(Pos2::new(0.0, 0.0), Pos2::new(100.0, 100.0));
        let ring = [
            Pos2::new(10.0, 10.0),
            Pos2::new(10.4, 10.3),
            Pos2::new(10.8, 10.6),
            Pos2::new(40.0, 10.0),
            Pos2::new(40.0, 40.0),
        ];
        // 10.4,10.3 is 0.5 px from the first point; 10.8,10.6 is 1.0 px from it.
        assert_eq!(
            pieces_in_view(&ring, view),
            vec![vec![
                Pos2::new(10.0, 10.0),
                Pos2::new(10.8, 10.6),
                Pos2::new(40.0, 10.0),
                Pos2::new(40.0, 40.0),
                Pos2::new(10.0, 10.0),
            ]]
        );
    }
}
