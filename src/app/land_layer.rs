//! The offline base layer: the bundled land polygons, triangulated once, drawn through
//! the map's projection at every zoom. Needs no network.

use crate::coast::{Land, LatLon};
use eframe::egui::{self, Color32, Mesh, Pos2, Shape, Stroke};
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

/// What the projected land depends on: the map rectangle, the zoom, and where a
/// reference point lands on screen.
#[derive(Debug, Clone, Copy, PartialEq)]
struct ViewKey {
    rect: egui::Rect,
    zoom: f64,
    origin: Pos2,
    paint_sea: bool,
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
    /// The sea, the land and the coast line for a view, as shapes.
    fn shapes(&self, rect: egui::Rect, projector: &Projector, paint_sea: bool) -> Vec<Shape> {
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
        for pass_holes in [false, true] {
            let mut mesh = Mesh::default();
            let mut outlines = Vec::new();
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
                let base = mesh.vertices.len() as u32;
                for p in &screen[range.clone()] {
                    mesh.colored_vertex(*p, colour);
                }
                mesh.indices
                    .extend(ring.triangles.iter().map(|&t| base + t - ring.first as u32));
                let mut line: Vec<Pos2> = screen[range].to_vec();
                line.push(screen[ring.first]);
                outlines.push(Shape::line(line, Stroke::new(0.8, COAST_LINE)));
            }
            out.push(Shape::mesh(mesh));
            out.extend(outlines);
        }
        out
    }
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
            rect,
            zoom: projector.zoom(),
            origin: projector.project(lat_lon(0.0, 0.0)).to_pos2(),
            paint_sea: self.paint_sea,
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
        let shapes = mesh.shapes(rect, projector, self.paint_sea);
        painter.extend(shapes.iter().cloned());
        *cache = Some((key, shapes));
    }
}
