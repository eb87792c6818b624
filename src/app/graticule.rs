//! The latitude/longitude graticule of the map: lines every round number of degrees or
//! minutes, chosen for the zoom, labelled in degrees and minutes along the left (latitude)
//! and top (longitude) edges.

use eframe::egui::{self, Align2, Color32, FontId, Pos2, Rect, Stroke, Vec2};
use walkers::{MapMemory, Plugin, Projector};

/// Spacings the graticule may use, in minutes of arc: round numbers on a chart.
const SPACINGS_MIN: [u32; 14] = [1, 2, 5, 10, 15, 20, 30, 60, 120, 300, 600, 900, 1800, 3600];

/// The graticule aims for at least this many pixels between its lines.
const MIN_GAP_PX: f64 = 110.0;

/// The smallest round spacing (minutes of arc) that keeps lines `MIN_GAP_PX` apart, given
/// how many degrees the map shows per pixel; the largest spacing when even that is too
/// close.
pub(super) fn spacing_min(deg_per_px: f64) -> u32 {
    let wanted_min = deg_per_px * MIN_GAP_PX * 60.0;
    SPACINGS_MIN
        .iter()
        .copied()
        .find(|&s| f64::from(s) >= wanted_min)
        .unwrap_or(SPACINGS_MIN[SPACINGS_MIN.len() - 1])
}

/// A graticule line's label: whole degrees (`38°N`) when the spacing is whole degrees,
/// else degrees and whole minutes (`38°30'N`). `minutes` is the line's signed position in
/// minutes of arc.
pub(super) fn label(minutes: i64, spacing: u32, positive: char, negative: char) -> String {
    let hemisphere = if minutes < 0 { negative } else { positive };
    let (deg, min) = (minutes.unsigned_abs() / 60, minutes.unsigned_abs() % 60);
    if spacing.is_multiple_of(60) {
        format!("{deg}°{hemisphere}")
    } else {
        format!("{deg}°{min:02}'{hemisphere}")
    }
}

/// The walkers plugin that draws the graticule.
pub(super) struct Graticule;

/// Ink of the lines and labels: a dark blue-grey, faint over land and sea alike.
const LINE: Color32 = Color32::from_rgba_premultiplied(40, 60, 90, 90);
const INK: Color32 = Color32::from_rgb(30, 45, 70);

impl Plugin for Graticule {
    fn run(
        self: Box<Self>,
        ui: &mut egui::Ui,
        _response: &egui::Response,
        projector: &Projector,
        _memory: &MapMemory,
    ) {
        let map = ui.max_rect();
        let at = |p: Pos2| projector.unproject(p.to_vec2());
        let (nw, se) = (at(map.left_top()), at(map.right_bottom()));
        let (west, east, north, south) = (nw.x(), se.x(), nw.y(), se.y());
        if !(west.is_finite() && east > west && north > south) {
            return;
        }
        let deg_per_px = (east - west) / f64::from(map.width().max(1.0));
        let spacing = spacing_min(deg_per_px);
        let step = i64::from(spacing);
        let painter = ui.painter_at(map);
        let stroke = Stroke::new(1.0, LINE);
        let font = FontId::proportional(12.0);
        let to_min = |deg: f64| (deg * 60.0).floor() as i64;
        let first = |lo: f64| to_min(lo).div_euclid(step) * step + step;
        let mut lat = first(south);
        while lat as f64 / 60.0 < north && lat <= 90 * 60 {
            let y = projector
                .project(walkers::lat_lon(lat as f64 / 60.0, west))
                .y;
            painter.line_segment(
                [Pos2::new(map.left(), y), Pos2::new(map.right(), y)],
                stroke,
            );
            let text = label(lat, spacing, 'N', 'S');
            edge_label(
                &painter,
                Pos2::new(map.left() + 4.0, y - 1.0),
                Align2::LEFT_BOTTOM,
                text,
                &font,
            );
            lat += step;
        }
        let mut lon = first(west);
        while (lon as f64 / 60.0) < east {
            let x = projector
                .project(walkers::lat_lon(north, lon as f64 / 60.0))
                .x;
            painter.line_segment(
                [Pos2::new(x, map.top()), Pos2::new(x, map.bottom())],
                stroke,
            );
            // Longitudes beyond ±180° (the map pans round the world) are named as usual.
            let wrapped = (lon + 180 * 60).rem_euclid(360 * 60) - 180 * 60;
            let text = label(wrapped, spacing, 'E', 'W');
            let at = Pos2::new(x + 3.0, map.top() + 3.0);
            // The zoom buttons keep the top right corner (a label is under 70 px wide).
            if at.x + 70.0 < super::map::zoom_buttons_rect(map).left() {
                edge_label(&painter, at, Align2::LEFT_TOP, text, &font);
            }
            lon += step;
        }
        let every = if spacing.is_multiple_of(60) {
            format!("{}°", spacing / 60)
        } else {
            format!("{spacing}'")
        };
        let name = format!("Graticule every {every}");
        let corner = Rect::from_min_size(map.left_top(), Vec2::splat(1.0));
        ui.interact(
            corner,
            ui.scope_id().with("graticule"),
            egui::Sense::hover(),
        )
        .widget_info(|| egui::WidgetInfo::labeled(egui::Role::Label, true, &name));
    }
}

/// A label on a light box, so it reads over land, sea and tiles.
fn edge_label(painter: &egui::Painter, at: Pos2, align: Align2, text: String, font: &FontId) {
    let galley = painter.layout_no_wrap(text, font.clone(), INK);
    let rect = align.anchor_size(at, galley.size()).expand(1.5);
    painter.rect_filled(rect, 2.0, Color32::from_white_alpha(190));
    painter.galley(rect.min + Vec2::splat(1.5), galley, INK);
}

#[cfg(test)]
mod tests {
    use super::*;

    /// At the demo's zoom (about 0.001° per pixel) lines fall every 10'; a harbour at
    /// close zoom gets 1'; a whole ocean gets 30° or the largest spacing.
    #[test]
    fn spacing_keeps_lines_apart_on_round_numbers() {
        assert_eq!(spacing_min(0.001), 10);
        assert_eq!(spacing_min(0.0001), 1);
        assert_eq!(spacing_min(0.002), 15);
        assert_eq!(spacing_min(0.2), 1800);
        assert_eq!(spacing_min(5.0), 3600);
    }

    #[test]
    fn labels_read_in_degrees_and_minutes() {
        assert_eq!(label(38 * 60 + 30, 10, 'N', 'S'), "38°30'N");
        assert_eq!(label(-(123 * 60 + 10), 10, 'E', 'W'), "123°10'W");
        assert_eq!(label(38 * 60, 60, 'N', 'S'), "38°N");
        assert_eq!(label(0, 60, 'E', 'W'), "0°E");
        assert_eq!(label(-5, 5, 'N', 'S'), "0°05'S");
    }
}
