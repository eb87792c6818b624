//! An offline map pack as the map's base: tiles read and decoded in a thread of their
//! own, kept in a small cache, drawn over the bundled land (which shows where the pack
//! has no tile), with the pack's credit and a note when it has no tile for the view.

use crate::tilepack::{PackInfo, TileStore, tile_at, tile_lat_deg, tile_lon_deg};
use eframe::egui::{self, Align2, Color32, Mesh, Pos2, Rect, Shape, Stroke, pos2};
use std::collections::{HashMap, HashSet};
use std::path::PathBuf;
use std::sync::mpsc::{Receiver, Sender, channel};
use walkers::{MapMemory, Plugin, Projector, Tile, TileId, TilePiece, Tiles, lat_lon};

/// Pixels of a tile: the size every raster pack here is made for.
const TILE_PX: u32 = 256;
/// Tiles kept decoded; the cache is emptied when it holds more (a screen needs ~40).
const CACHE_TILES: usize = 256;

/// What the reading thread gives back for a tile: the picture, none, or why not.
type Loaded = (TileId, Result<Option<Tile>, String>);

/// An open map pack: its description and its tiles as walkers draws them.
pub struct PackTiles {
    /// The pack's file or folder.
    pub path: PathBuf,
    /// What the pack says of itself.
    pub info: PackInfo,
    requests: Sender<TileId>,
    loaded: Receiver<Loaded>,
    cache: HashMap<TileId, Option<Tile>>,
    pending: HashSet<TileId>,
    /// The last tile that could not be read, and why.
    pub problem: Option<String>,
}

impl PackTiles {
    /// Starts the pack's reading thread.
    pub fn new(path: PathBuf, store: Box<dyn TileStore>, ctx: &egui::Context) -> Self {
        let info = store.info().clone();
        let (requests, work) = channel::<TileId>();
        let (done, loaded) = channel();
        let ctx = ctx.clone();
        let mut store = store;
        // If the thread cannot start, no tile comes and the map says the pack has none.
        let _ = std::thread::Builder::new()
            .name("shelfwind-map-pack".into())
            .spawn(move || {
                for id in work {
                    let tile = store
                        .tile(id.zoom, id.x, id.y)
                        .map_err(|e| e.to_string())
                        .and_then(|bytes| {
                            bytes
                                .map(|b| Tile::new(&b, &walkers::Style, id.zoom, TILE_PX, &ctx))
                                .transpose()
                                .map_err(|e| format!("a tile cannot be decoded: {e}"))
                        });
                    if done.send((id, tile)).is_err() {
                        return;
                    }
                    ctx.request_repaint();
                }
            });
        Self {
            path,
            info,
            requests,
            loaded,
            cache: HashMap::new(),
            pending: HashSet::new(),
            problem: None,
        }
    }

    /// Takes the tiles read since the last frame.
    fn receive(&mut self) {
        while let Ok((id, tile)) = self.loaded.try_recv() {
            self.pending.remove(&id);
            if self.cache.len() >= CACHE_TILES {
                self.cache.clear();
            }
            match tile {
                Ok(t) => {
                    self.cache.insert(id, t);
                }
                Err(e) => {
                    self.cache.insert(id, None);
                    self.problem = Some(e);
                }
            }
        }
    }

    /// Whether tiles are still being read.
    fn loading(&self) -> bool {
        !self.pending.is_empty()
    }
}

/// The tile of `zoom` that holds `id`, and the part of it `id` covers (for drawing a
/// deeper tile from a shallower one).
fn ancestor(id: TileId, zoom: u8) -> (TileId, Rect) {
    let steps = id.zoom.saturating_sub(zoom);
    let n = 1u32 << steps;
    let parent = TileId {
        x: id.x >> steps,
        y: id.y >> steps,
        zoom: id.zoom - steps,
    };
    let part = 1.0 / n as f32;
    let (u, v) = ((id.x % n) as f32 * part, (id.y % n) as f32 * part);
    (
        parent,
        Rect::from_min_max(pos2(u, v), pos2(u + part, v + part)),
    )
}

impl Tiles for PackTiles {
    /// The tile, or past the pack's deepest zoom the part of its deepest tile that covers
    /// the same ground; `None` while it is read, or where the pack has none.
    fn at(&mut self, tile_id: TileId) -> Option<TilePiece> {
        self.receive();
        if tile_id.zoom < self.info.min_zoom {
            return None;
        }
        let (id, uv) = ancestor(tile_id, self.info.max_zoom);
        match self.cache.get(&id) {
            Some(tile) => tile.clone().map(|t| TilePiece::new(t, uv)),
            None => {
                if self.pending.insert(id) && self.requests.send(id).is_err() {
                    self.pending.remove(&id);
                    self.cache.insert(id, None);
                }
                None
            }
        }
    }

    /// The app draws the pack's own credit (walkers' attribution text must be static).
    fn attribution(&self) -> walkers::sources::Attribution {
        walkers::sources::Attribution {
            text: "map pack",
            url: "",
            logo_light: None,
            logo_dark: None,
        }
    }

    fn tile_size(&self) -> u32 {
        TILE_PX
    }
}

/// Draws the pack's tiles over the land and under the coast; a plugin rather than
/// walkers' tile layer, which would be painted under the land.
pub struct PackLayer<'a> {
    /// The open pack.
    pub pack: &'a mut PackTiles,
}

impl Plugin for PackLayer<'_> {
    fn run(
        self: Box<Self>,
        ui: &mut egui::Ui,
        _response: &egui::Response,
        projector: &Projector,
        _memory: &MapMemory,
    ) {
        let map = ui.max_rect();
        let painter = ui.painter_at(map);
        let drawn = draw_tiles(&painter, projector, map, self.pack);
        if drawn == 0 && !self.pack.loading() {
            let text = match &self.pack.problem {
                Some(problem) => format!("This map pack's tiles cannot be shown: {problem}"),
                None => no_tiles_text(&self.pack.info),
            };
            let at = map.center_top() + egui::vec2(0.0, 40.0);
            let rect = super::map::text_box(
                &painter,
                at,
                Align2::CENTER_TOP,
                &text,
                420.0,
                Stroke::new(1.5, Color32::from_rgb(160, 60, 0)),
            );
            super::map::name_painted(ui, rect, "map pack has no tiles", &text);
        }
    }
}

/// Draws the tiles covering the view; returns how many were drawn.
fn draw_tiles(
    painter: &egui::Painter,
    projector: &Projector,
    map: Rect,
    pack: &mut PackTiles,
) -> usize {
    let z = projector.zoom().round().clamp(0.0, 24.0) as u8;
    let corner = |p: Pos2| {
        let at = projector.unproject(p.to_vec2());
        tile_at(z, at.y(), at.x())
    };
    let (x0, y0) = corner(map.left_top());
    let (x1, y1) = corner(map.right_bottom());
    let n = 1i64 << z;
    let rows = (y0.floor() as i64).max(0)..=(y1.floor() as i64).min(n - 1);
    let mut drawn = 0;
    for y in rows {
        for x in (x0.floor() as i64)..=(x1.floor() as i64) {
            // Columns past ±180° show the same tiles again.
            let id = TileId {
                x: x.rem_euclid(n) as u32,
                y: y as u32,
                zoom: z,
            };
            let Some(piece) = pack.at(id) else { continue };
            let Tile::Raster(texture) = &piece.tile;
            let screen = |tx: i64, ty: i64| {
                let (lat, lon) = (tile_lat_deg(z, ty as f64), tile_lon_deg(z, tx as f64));
                projector.project(lat_lon(lat, lon)).to_pos2()
            };
            let rect = Rect::from_min_max(screen(x, y), screen(x + 1, y + 1));
            let mut mesh = Mesh::with_texture(texture.id());
            mesh.add_rect_with_uv(rect, piece.uv, Color32::WHITE);
            painter.add(Shape::mesh(mesh));
            drawn += 1;
        }
    }
    drawn
}

/// What the map says where the pack has no tile.
pub fn no_tiles_text(info: &PackInfo) -> String {
    let zoom = if info.min_zoom == info.max_zoom {
        format!("zoom {}", info.min_zoom)
    } else {
        format!("zoom {}–{}", info.min_zoom, info.max_zoom)
    };
    let area = info.bounds.map_or(String::new(), |b| {
        let lat = |v: f64| format!("{:.1}°{}", v.abs(), if v < 0.0 { 'S' } else { 'N' });
        let lon = |v: f64| format!("{:.1}°{}", v.abs(), if v < 0.0 { 'W' } else { 'E' });
        format!(
            "{} to {}, {} to {}, ",
            lat(b.south_deg),
            lat(b.north_deg),
            lon(b.west_deg),
            lon(b.east_deg)
        )
    });
    format!("This map pack has no tiles here (it covers {area}{zoom}).")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_deeper_tile_is_a_part_of_its_ancestor() {
        let id = TileId {
            x: 5,
            y: 2,
            zoom: 4,
        };
        let (parent, uv) = ancestor(id, 2);
        assert_eq!(
            parent,
            TileId {
                x: 1,
                y: 0,
                zoom: 2
            }
        );
        assert_eq!(uv, Rect::from_min_max(pos2(0.25, 0.5), pos2(0.5, 0.75)));
        assert_eq!(
            ancestor(id, 6),
            (id, Rect::from_min_max(pos2(0.0, 0.0), pos2(1.0, 1.0)))
        );
    }
}
