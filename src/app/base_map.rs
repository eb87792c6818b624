//! Choosing the map's base: the bundled land, online tiles, or an offline map pack
//! opened in the background; packs added are remembered by name and path.

use super::messages::Subject;
use super::pack_layer::PackTiles;
use super::state::{BaseLayer, SavedPack, ShelfwindApp};
use super::tasks::Task;
use eframe::egui;
use std::path::{Path, PathBuf};

/// A map pack being opened: its path, and the task giving the opened pack or why not.
pub(super) type PackTask = (
    PathBuf,
    Task<Result<Box<dyn crate::tilepack::TileStore>, String>>,
);

impl ShelfwindApp {
    /// Shows a base layer: online tiles are set up once; a pack not yet open is opened
    /// first, and shown only if it opens.
    pub(super) fn set_base_layer(&mut self, layer: BaseLayer, ctx: &egui::Context) {
        match &layer {
            BaseLayer::OnlineTiles if self.tiles.is_none() => {
                self.tiles = Some(super::map::online_tiles(ctx, &self.options));
            }
            BaseLayer::Pack(path) if self.pack.as_ref().is_none_or(|p| &p.path != path) => {
                self.open_pack(path.clone(), ctx);
                return;
            }
            _ => {}
        }
        self.view.base_layer = layer;
    }

    /// Opens a map pack in the background; it becomes the base map once open.
    pub(super) fn open_pack(&mut self, path: PathBuf, ctx: &egui::Context) {
        self.forget(Subject::MapPack);
        let at = path.clone();
        let task = Task::spawn("map pack", ctx, move || {
            crate::tilepack::open_pack(&at).map_err(|e| {
                format!(
                    "The map pack was not opened; the base map is as it was.\n\n{e}: {}",
                    at.display()
                )
            })
        });
        match task {
            Ok(t) => self.pack_task = Some((path, t)),
            Err(e) => self.error(Subject::MapPack, e),
        }
    }

    /// Takes an opened pack: it becomes the base map and is remembered.
    pub(super) fn poll_pack_task(&mut self, ctx: &egui::Context) {
        let Some((path, result)) = self
            .pack_task
            .as_ref()
            .and_then(|(path, t)| t.poll().map(|r| (path.clone(), r)))
        else {
            return;
        };
        self.pack_task = None;
        match result.and_then(|r| r) {
            Ok(store) => {
                let pack = PackTiles::new(path.clone(), store, ctx);
                let added = self.remember_pack(&path, &pack.info.name);
                if added {
                    let text = format!(
                        "Added the map pack \"{}\" ({}); it is the base map now.",
                        pack.info.name,
                        path.display()
                    );
                    self.info(Subject::MapPack, text);
                }
                self.pack = Some(pack);
                self.view.base_layer = BaseLayer::Pack(path);
            }
            Err(e) => {
                // A pack remembered from last time that cannot be opened now: the land.
                if self.view.base_layer == BaseLayer::Pack(path) {
                    self.view.base_layer = BaseLayer::BundledLand;
                }
                self.error(Subject::MapPack, e);
            }
        }
    }

    /// Puts a pack in the remembered list (its name updated); whether it is new there.
    fn remember_pack(&mut self, path: &Path, name: &str) -> bool {
        let packs = &mut self.remembered.map_packs;
        if let Some(p) = packs.iter_mut().find(|p| p.path == path) {
            name.clone_into(&mut p.name);
            return false;
        }
        packs.push(SavedPack {
            path: path.to_path_buf(),
            name: name.to_string(),
        });
        true
    }

    /// The packs added, for the Base map list.
    #[must_use]
    pub fn map_packs(&self) -> &[SavedPack] {
        &self.remembered.map_packs
    }

    /// The base map shown now.
    #[must_use]
    pub fn base_layer(&self) -> &BaseLayer {
        &self.view.base_layer
    }
}
