//! The scenario's coast pack in the app: a detailed land file for the scenario's waters
//! (made by `shelfwind coast-pack`), laid over the bundled land in the background and
//! then used for the map's land, the sea side of drawn segments, fetch and ways by sea.

use super::edit::Edit;
use super::land_layer::LandMesh;
use super::messages::Subject;
use super::state::ShelfwindApp;
use crate::coast::{Land, Pack};
use eframe::egui;
use std::path::{Path, PathBuf};
use std::sync::Arc;

/// The bundled land with a pack laid over it, and the pack's file.
pub(super) struct PackedLand {
    /// The pack file as read.
    pub(super) path: PathBuf,
    /// The land with the pack.
    pub(super) land: Arc<Land>,
}

/// Reads a pack file and lays it over the bundled land.
fn pack_land(path: &Path) -> Result<(Land, LandMesh), String> {
    let bytes = std::fs::read(path).map_err(|e| format!("cannot read the file: {e}"))?;
    let pack = Pack::from_bytes(&bytes).map_err(|e| e.to_string())?;
    let land = Land::bundled().with_pack(&pack);
    let mesh = LandMesh::new(&land);
    Ok((land, mesh))
}

impl ShelfwindApp {
    /// The land the scenario uses: the bundled land, with the scenario's coast pack laid
    /// over it once the pack is read.
    pub(super) fn land_model(&self) -> Option<Arc<Land>> {
        let wanted = self.coast_pack_path()?;
        self.packed_land
            .as_ref()
            .filter(|p| p.path == wanted)
            .map(|p| p.land.clone())
    }

    /// The scenario's coast pack, as a path to read.
    fn coast_pack_path(&self) -> Option<PathBuf> {
        let p = self.doc.scenario.coast_pack.as_ref()?;
        Some(if p.is_absolute() {
            p.clone()
        } else {
            self.base_dir().join(p)
        })
    }

    /// Sets (or with `None` clears) the scenario's coast pack: one undo step.
    pub(super) fn use_coast_pack(&mut self, path: Option<PathBuf>) {
        self.forget(Subject::Coast);
        self.edit(Edit::SetCoastPack(path));
    }

    /// Starts reading the scenario's coast pack when it changed; takes the result when
    /// ready (the land, its drawing, a fresh plan).
    pub(super) fn poll_coast_pack(&mut self, ctx: &egui::Context) {
        if let Some(task) = &self.coast_pack_task {
            let Some(result) = task.poll() else { return };
            self.coast_pack_task = None;
            let path = self.coast_pack_reading.take().unwrap_or_default();
            match result.and_then(|r| r) {
                Ok((land, mesh)) => {
                    self.packed_land = Some(PackedLand {
                        path: path.clone(),
                        land: Arc::new(land),
                    });
                    self.land = Some(Arc::new(mesh));
                    self.stage_cache = None;
                    self.plan_stale = true;
                    self.info(
                        Subject::Coast,
                        format!("Coast pack in use: {}", path.display()),
                    );
                }
                Err(e) => {
                    self.coast_pack_failed = Some(path.clone());
                    self.error(
                        Subject::Coast,
                        format!(
                            "The coast pack cannot be used; the bundled land is used instead.\n\n{e}: {}",
                            path.display()
                        ),
                    );
                }
            }
            return;
        }
        let wanted = self.coast_pack_path();
        let loaded = self.packed_land.as_ref().map(|p| p.path.clone());
        if wanted == loaded || (wanted.is_some() && wanted == self.coast_pack_failed) {
            return;
        }
        match wanted {
            None => {
                // Back to the bundled land and its drawing.
                self.packed_land = None;
                self.coast_pack_failed = None;
                self.stage_cache = None;
                self.plan_stale = true;
                self.land_task =
                    super::tasks::Task::spawn("land", ctx, || LandMesh::new(Land::bundled())).ok();
            }
            Some(path) => {
                self.coast_pack_reading = Some(path.clone());
                match super::tasks::Task::spawn("coast pack", ctx, move || pack_land(&path)) {
                    Ok(task) => self.coast_pack_task = Some(task),
                    Err(e) => self.error(Subject::App, e),
                }
            }
        }
    }
}
