//! The trip sheet's map: the home port and the day's stretches on the land, as inline
//! SVG, equirectangular about the centre with longitudes scaled by cos(latitude) so that
//! shapes are not stretched; north up; a scale bar in nautical miles.

use super::{esc, halo_text, nice_step, num, points_attr, rank_label, score_colour};
use crate::coast::{Land, LatLon};
use crate::export::colour::{SAFE_EXCLUDED, hex, productivity_colour};
use crate::plan::{DayPlan, Plan, RankedStretch, StretchInfo};
use std::fmt::Write as _;

/// Width of the map, SVG units.
const MAP_WIDTH: f64 = 720.0;
/// Smallest side of the map, nautical miles.
const MAP_MIN_SPAN_NM: f64 = 8.0;

/// Wraps a longitude difference into [-180, 180).
fn wrap180(dlon_deg: f64) -> f64 {
    (dlon_deg + 180.0).rem_euclid(360.0) - 180.0
}

/// The map's frame: equirectangular about its centre, with longitudes scaled by the
/// cosine of the centre latitude so that shapes keep their proportions; north up.
struct Frame {
    lat0_deg: f64,
    lon0_deg: f64,
    /// cos(lat0).
    kx: f64,
    /// Half the width and height, nautical miles.
    half_w_nm: f64,
    half_h_nm: f64,
    /// SVG units per nautical mile.
    scale: f64,
    width: f64,
    height: f64,
}

impl Frame {
    /// The home port and the day's ranked stretches (or, without any, the stretches
    /// within the boat's range), with a margin.
    fn around(plan: &Plan, day: &DayPlan) -> Frame {
        let port = plan.port.position;
        let mut points = vec![port];
        for r in &day.ranked {
            points.extend_from_slice(&plan.stretches[r.stretch].points);
        }
        if day.ranked.is_empty() {
            for s in plan
                .stretches
                .iter()
                .filter(|s| s.distance_nm <= plan.vessel.range_nm)
            {
                points.extend_from_slice(&s.points);
            }
        }
        let (mut lat_lo, mut lat_hi) = (port.lat_deg, port.lat_deg);
        let (mut dlon_lo, mut dlon_hi) = (0.0_f64, 0.0_f64);
        for p in &points {
            lat_lo = lat_lo.min(p.lat_deg);
            lat_hi = lat_hi.max(p.lat_deg);
            let dlon = wrap180(p.lon_deg - port.lon_deg);
            dlon_lo = dlon_lo.min(dlon);
            dlon_hi = dlon_hi.max(dlon);
        }
        let lat0_deg = f64::midpoint(lat_lo, lat_hi);
        let lon0_deg = port.lon_deg + f64::midpoint(dlon_lo, dlon_hi);
        // Near the poles the scaling would blow up; a planner for day boats never goes there.
        let kx = lat0_deg.to_radians().cos().max(0.1);
        let w_nm = (dlon_hi - dlon_lo) * 60.0 * kx;
        let h_nm = (lat_hi - lat_lo) * 60.0;
        let margin_nm = (0.15 * w_nm.max(h_nm)).max(2.0);
        let mut w_nm = (w_nm + 2.0 * margin_nm).max(MAP_MIN_SPAN_NM);
        let mut h_nm = (h_nm + 2.0 * margin_nm).max(MAP_MIN_SPAN_NM);
        // Not too flat for the page, not so tall that it pushes the list off the first page.
        let aspect = (h_nm / w_nm).clamp(0.55, 0.65);
        if h_nm < w_nm * aspect {
            h_nm = w_nm * aspect;
        } else {
            w_nm = h_nm / aspect;
        }
        Frame {
            lat0_deg,
            lon0_deg,
            kx,
            half_w_nm: w_nm / 2.0,
            half_h_nm: h_nm / 2.0,
            scale: MAP_WIDTH / w_nm,
            width: MAP_WIDTH,
            height: MAP_WIDTH * aspect,
        }
    }

    /// SVG position of a point whose longitude is given relative to the centre.
    fn xy_rel(&self, lat_deg: f64, dlon_deg: f64) -> (f64, f64) {
        let x_nm = dlon_deg * 60.0 * self.kx;
        let y_nm = (lat_deg - self.lat0_deg) * 60.0;
        (
            (x_nm + self.half_w_nm) * self.scale,
            (self.half_h_nm - y_nm) * self.scale,
        )
    }

    /// The position at an SVG point (the inverse of [`Frame::xy`]).
    fn lat_lon(&self, (x, y): (f64, f64)) -> LatLon {
        let x_nm = x / self.scale - self.half_w_nm;
        let y_nm = self.half_h_nm - y / self.scale;
        LatLon::new(
            self.lat0_deg + y_nm / 60.0,
            wrap180(self.lon0_deg + x_nm / (60.0 * self.kx)),
        )
    }

    fn xy(&self, p: LatLon) -> (f64, f64) {
        self.xy_rel(p.lat_deg, wrap180(p.lon_deg - self.lon0_deg))
    }

    /// Whether a set of SVG points has any part near the frame.
    fn sees(&self, xy: &[(f64, f64)], pad: f64) -> bool {
        let (mut x0, mut y0, mut x1, mut y1) = (f64::MAX, f64::MAX, f64::MIN, f64::MIN);
        for &(x, y) in xy {
            x0 = x0.min(x);
            y0 = y0.min(y);
            x1 = x1.max(x);
            y1 = y1.max(y);
        }
        x1 >= -pad && x0 <= self.width + pad && y1 >= -pad && y0 <= self.height + pad
    }
}

/// Clips a polygon to an axis-aligned rectangle (Sutherland–Hodgman: exact for a convex
/// clip window; a concave polygon may keep zero-width slivers along the edge, which a
/// fill does not show).
fn clip_polygon(points: Vec<(f64, f64)>, x0: f64, y0: f64, x1: f64, y1: f64) -> Vec<(f64, f64)> {
    let mut poly = points;
    for edge in 0..4 {
        let Some(&last) = poly.last() else {
            break;
        };
        let inside = |p: (f64, f64)| match edge {
            0 => p.0 >= x0,
            1 => p.0 <= x1,
            2 => p.1 >= y0,
            _ => p.1 <= y1,
        };
        // Only called for a pair on either side of the edge, so the divisor is not zero.
        let cross = |a: (f64, f64), b: (f64, f64)| match edge {
            0 | 1 => {
                let x = if edge == 0 { x0 } else { x1 };
                (x, a.1 + (b.1 - a.1) * (x - a.0) / (b.0 - a.0))
            }
            _ => {
                let y = if edge == 2 { y0 } else { y1 };
                (a.0 + (b.0 - a.0) * (y - a.1) / (b.1 - a.1), y)
            }
        };
        let mut out = Vec::with_capacity(poly.len() + 4);
        let mut prev = last;
        for &cur in &poly {
            match (inside(prev), inside(cur)) {
                (true, true) => out.push(cur),
                (true, false) => out.push(cross(prev, cur)),
                (false, true) => {
                    out.push(cross(prev, cur));
                    out.push(cur);
                }
                (false, false) => {}
            }
            prev = cur;
        }
        poly = out;
    }
    poly
}

/// SVG path data of the land inside the frame.
fn land_path(frame: &Frame, land: &Land) -> String {
    // A little beyond the frame, so that the clipped edges fall outside the visible map.
    let pad = 6.0;
    let lat_lo = frame.lat0_deg - (frame.half_h_nm + pad / frame.scale) / 60.0;
    let lat_hi = frame.lat0_deg + (frame.half_h_nm + pad / frame.scale) / 60.0;
    let dlon_half = (frame.half_w_nm + pad / frame.scale) / (60.0 * frame.kx);
    let mut d = String::new();
    for ring in land.rings() {
        let Some(first) = ring.first() else {
            continue;
        };
        // Longitudes unwrapped along the ring, so that a ring crossing the far side of
        // the globe from the map has no jump across it.
        let mut dlons = Vec::with_capacity(ring.len());
        let mut prev = (first.lon_deg, wrap180(first.lon_deg - frame.lon0_deg));
        for p in ring {
            let dlon = prev.1 + wrap180(p.lon_deg - prev.0);
            dlons.push(dlon);
            prev = (p.lon_deg, dlon);
        }
        let (r_lat_lo, r_lat_hi) = ring.iter().fold((f64::MAX, f64::MIN), |(lo, hi), p| {
            (lo.min(p.lat_deg), hi.max(p.lat_deg))
        });
        if r_lat_hi < lat_lo || r_lat_lo > lat_hi {
            continue;
        }
        let (r_lon_lo, r_lon_hi) = dlons
            .iter()
            .fold((f64::MAX, f64::MIN), |(lo, hi), &x| (lo.min(x), hi.max(x)));
        for shift in [0.0, -360.0, 360.0] {
            if r_lon_hi + shift < -dlon_half || r_lon_lo + shift > dlon_half {
                continue;
            }
            let projected: Vec<(f64, f64)> = ring
                .iter()
                .zip(&dlons)
                .map(|(p, dlon)| frame.xy_rel(p.lat_deg, dlon + shift))
                .collect();
            let clipped =
                clip_polygon(projected, -pad, -pad, frame.width + pad, frame.height + pad);
            write_ring(&mut d, &clipped);
        }
    }
    d
}

/// Appends one closed ring to SVG path data, dropping points closer than a fraction of
/// a unit to the last one kept.
fn write_ring(d: &mut String, ring: &[(f64, f64)]) {
    if ring.len() < 3 {
        return;
    }
    let mut last: Option<(f64, f64)> = None;
    let mut kept = 0;
    let start = d.len();
    for &(x, y) in ring {
        if let Some((lx, ly)) = last
            && (x - lx).abs() < 0.4
            && (y - ly).abs() < 0.4
        {
            continue;
        }
        let _ = write!(d, "{}{x:.1} {y:.1}", if kept == 0 { "M" } else { "L" });
        last = Some((x, y));
        kept += 1;
    }
    if kept < 3 {
        d.truncate(start);
    } else {
        d.push('Z');
    }
}

pub(super) fn map_section(o: &mut String, plan: &Plan, land: &Land, day: &DayPlan) {
    let frame = Frame::around(plan, day);
    let (w, h) = (frame.width, frame.height);
    let _ = writeln!(o, "<div class=\"map\">");
    let _ = writeln!(o, "<h2>Map</h2>");
    let _ = writeln!(
        o,
        "<svg class=\"map\" xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {w:.0} {h:.0}\" role=\"img\" aria-label=\"Map of the home port and the stretches\" font-family=\"DejaVu Sans, Liberation Sans, Arial, sans-serif\">"
    );
    let _ = writeln!(
        o,
        "<defs><clipPath id=\"map-clip\"><rect x=\"0\" y=\"0\" width=\"{w:.0}\" height=\"{h:.0}\"/></clipPath></defs>"
    );
    let _ = writeln!(o, "<g clip-path=\"url(#map-clip)\">");
    let _ = writeln!(
        o,
        "<rect x=\"0\" y=\"0\" width=\"{w:.0}\" height=\"{h:.0}\" fill=\"#ffffff\"/>"
    );
    let land_d = land_path(&frame, land);
    if !land_d.is_empty() {
        let _ = writeln!(
            o,
            "<path class=\"land\" d=\"{land_d}\" fill=\"#d9d9d9\" fill-rule=\"evenodd\" stroke=\"#7a7a7a\" stroke-width=\"0.8\"/>"
        );
    }
    route_lines(o, plan, day, &frame);
    stretch_lines(o, plan, day, &frame);
    let _ = writeln!(o, "</g>");
    port_marker(o, plan, &frame);
    rank_labels(o, plan, land, day, &frame);
    scale_bar(o, &frame);
    north_arrow(o, &frame);
    let _ = writeln!(
        o,
        "<rect x=\"0.5\" y=\"0.5\" width=\"{:.1}\" height=\"{:.1}\" fill=\"none\" stroke=\"#000\" stroke-width=\"1\"/>",
        w - 1.0,
        h - 1.0
    );
    let _ = writeln!(o, "</svg>");
    map_legend(o, plan);
    let _ = writeln!(o, "</div>");
}

/// The ways by sea from the home port to the day's best three stretches, dashed.
fn route_lines(o: &mut String, plan: &Plan, day: &DayPlan, frame: &Frame) {
    for r in day.ranked.iter().take(3) {
        let Some(route) = &plan.stretches[r.stretch].route else {
            continue;
        };
        let pts: Vec<String> = route
            .points
            .iter()
            .map(|p| {
                let (x, y) = frame.xy(*p);
                format!("{x:.1},{y:.1}")
            })
            .collect();
        let _ = writeln!(
            o,
            "<polyline class=\"route\" points=\"{}\" fill=\"none\" stroke=\"#1f3c9e\" stroke-width=\"1.5\" stroke-dasharray=\"5 3\"/>",
            pts.join(" ")
        );
    }
}

fn stretch_lines(o: &mut String, plan: &Plan, day: &DayPlan, frame: &Frame) {
    let visible = |s: &StretchInfo| -> Option<Vec<(f64, f64)>> {
        let xy: Vec<(f64, f64)> = s.points.iter().map(|p| frame.xy(*p)).collect();
        frame.sees(&xy, 10.0).then_some(xy)
    };
    // Stretches left out first, underneath; then the ranked ones, the best on top.
    for (k, s) in plan.stretches.iter().enumerate() {
        if day.ranked.iter().any(|r| r.stretch == k) {
            continue;
        }
        let Some(xy) = visible(s) else {
            continue;
        };
        let _ = writeln!(
            o,
            "<polyline class=\"stretch excluded\" data-stretch=\"{}\" points=\"{}\" fill=\"none\" stroke=\"{}\" stroke-width=\"4\" stroke-dasharray=\"7 5\"/>",
            esc(&s.id),
            points_attr(&xy),
            hex(SAFE_EXCLUDED)
        );
    }
    for r in day.ranked.iter().rev() {
        let s = &plan.stretches[r.stretch];
        let Some(xy) = visible(s) else {
            continue;
        };
        let pts = points_attr(&xy);
        // A dark edge under the colour keeps pale (low-score) lines visible in print.
        let _ = writeln!(
            o,
            "<polyline class=\"edge\" points=\"{pts}\" fill=\"none\" stroke=\"#000\" stroke-width=\"9\" stroke-linecap=\"round\" stroke-linejoin=\"round\"/>"
        );
        let _ = writeln!(
            o,
            "<polyline class=\"stretch ranked\" data-stretch=\"{}\" points=\"{pts}\" fill=\"none\" stroke=\"{}\" stroke-width=\"6\" stroke-linecap=\"round\" stroke-linejoin=\"round\"/>",
            esc(&s.id),
            score_colour(r)
        );
    }
}

/// Where the port's name goes: to the right of the marker, or to the left when there is
/// no room. Gives the text's x, its anchor, and the area it covers.
fn port_name_place(plan: &Plan, frame: &Frame) -> (f64, &'static str, Area) {
    let (x, y) = frame.xy(plan.port.position);
    let approx_width = 8.5 * plan.port.name.chars().count() as f64;
    if x + 12.0 + approx_width < frame.width - 4.0 {
        (
            x + 11.0,
            "start",
            (x, y - 12.0, x + 14.0 + approx_width, y + 10.0),
        )
    } else {
        (
            x - 11.0,
            "end",
            (x - 14.0 - approx_width, y - 12.0, x, y + 10.0),
        )
    }
}

fn port_marker(o: &mut String, plan: &Plan, frame: &Frame) {
    let (x, y) = frame.xy(plan.port.position);
    let _ = writeln!(
        o,
        "<rect class=\"port\" x=\"{:.1}\" y=\"{:.1}\" width=\"11\" height=\"11\" fill=\"#000\" stroke=\"#fff\" stroke-width=\"2\"/>",
        x - 5.5,
        y - 5.5
    );
    let (tx, anchor, _) = port_name_place(plan, frame);
    halo_text(o, tx, y + 5.0, anchor, 14.0, true, &plan.port.name);
}

/// An axis-aligned box in SVG units: x0, y0, x1, y1.
type Area = (f64, f64, f64, f64);

fn overlaps(a: Area, b: Area) -> bool {
    a.0 < b.2 && b.0 < a.2 && a.1 < b.3 && b.1 < a.3
}

/// A rank label: where its stretch is, where it goes, its half width, its text.
struct Label {
    stretch_at: (f64, f64),
    at: (f64, f64),
    half_w: f64,
    text: String,
}

/// Rank labels out to sea from each ranked stretch's centre, with a leader line. A label
/// that would cover a line, another label or the port tries further out and to either
/// side.
fn rank_labels(o: &mut String, plan: &Plan, land: &Land, day: &DayPlan, frame: &Frame) {
    let (px, py) = frame.xy(plan.port.position);
    let mut taken: Vec<Area> = vec![
        (px - 16.0, py - 16.0, px + 16.0, py + 16.0),
        port_name_place(plan, frame).2,
    ];
    // The stretch lines themselves, sampled every few units.
    for s in &plan.stretches {
        let xy: Vec<(f64, f64)> = s.points.iter().map(|p| frame.xy(*p)).collect();
        if !frame.sees(&xy, 10.0) {
            continue;
        }
        for pair in xy.windows(2) {
            let (from, to) = (pair[0], pair[1]);
            let steps = ((to.0 - from.0).hypot(to.1 - from.1) / 4.0).ceil().max(1.0) as usize;
            for k in 0..=steps {
                let share = k as f64 / steps as f64;
                let mid = (
                    from.0 + (to.0 - from.0) * share,
                    from.1 + (to.1 - from.1) * share,
                );
                taken.push((mid.0 - 4.0, mid.1 - 4.0, mid.0 + 4.0, mid.1 + 4.0));
            }
        }
    }
    let mut labels: Vec<Label> = Vec::new();
    // In order along the coast, so that neighbours' leader lines do not cross.
    let mut in_coast_order: Vec<&RankedStretch> = day.ranked.iter().collect();
    in_coast_order.sort_by_key(|r| r.stretch);
    for r in in_coast_order {
        let s = &plan.stretches[r.stretch];
        let (cx, cy) = frame.xy(s.centre);
        if !frame.sees(&[(cx, cy)], 0.0) {
            continue;
        }
        let label = rank_label(r);
        let half_w = 4.5 + 4.2 * label.chars().count() as f64;
        let half_h = 10.0;
        let area = |at: (f64, f64)| {
            (
                at.0 - half_w - 1.5,
                at.1 - half_h - 1.5,
                at.0 + half_w + 1.5,
                at.1 + half_h + 1.5,
            )
        };
        let inside = |at: (f64, f64)| {
            at.0 - half_w >= 2.0
                && at.0 + half_w <= frame.width - 2.0
                && at.1 - half_h >= 2.0
                && at.1 + half_h <= frame.height - 2.0
        };
        let mut candidates = Vec::new();
        for out in [22.0, 46.0, 70.0, 94.0, 118.0, 142.0] {
            for turn_deg in [0.0, 30.0, -30.0, 60.0, -60.0] {
                let b = (s.offshore_bearing_deg + turn_deg).to_radians();
                candidates.push((cx + out * b.sin(), cy - out * b.cos()));
            }
        }
        let first = candidates[0];
        let free = |at: &(f64, f64)| inside(*at) && taken.iter().all(|t| !overlaps(*t, area(*at)));
        // At sea if it can be, where the label cannot be taken for a place ashore.
        let at = candidates
            .iter()
            .copied()
            .find(|at| free(at) && !land.is_land(frame.lat_lon(*at)))
            .or_else(|| candidates.iter().copied().find(free))
            .unwrap_or((
                first.0.clamp(half_w + 2.0, frame.width - half_w - 2.0),
                first.1.clamp(half_h + 2.0, frame.height - half_h - 2.0),
            ));
        taken.push(area(at));
        labels.push(Label {
            stretch_at: (cx, cy),
            at,
            half_w,
            text: label,
        });
    }
    // Leader lines first, so that no line crosses a label.
    for Label {
        stretch_at: (cx, cy),
        at,
        ..
    } in &labels
    {
        let _ = writeln!(
            o,
            "<line x1=\"{cx:.1}\" y1=\"{cy:.1}\" x2=\"{:.1}\" y2=\"{:.1}\" stroke=\"#000\" stroke-width=\"1\"/>",
            at.0, at.1
        );
    }
    for Label {
        at, half_w, text, ..
    } in &labels
    {
        let _ = writeln!(
            o,
            "<rect class=\"rank\" x=\"{:.1}\" y=\"{:.1}\" width=\"{:.1}\" height=\"20\" rx=\"10\" fill=\"#fff\" stroke=\"#000\" stroke-width=\"1.6\"/>",
            at.0 - half_w,
            at.1 - 10.0,
            2.0 * half_w
        );
        let _ = writeln!(
            o,
            "<text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"middle\" font-size=\"13\" font-weight=\"bold\" fill=\"#000\">{}</text>",
            at.0,
            at.1 + 4.5,
            esc(text)
        );
    }
}

fn scale_bar(o: &mut String, frame: &Frame) {
    let length_nm = nice_step(2.0 * frame.half_w_nm / 5.0);
    let len = length_nm * frame.scale;
    let (x, y) = (16.0, frame.height - 18.0);
    let _ = writeln!(
        o,
        "<rect x=\"{:.1}\" y=\"{:.1}\" width=\"{:.1}\" height=\"34\" fill=\"#fff\" fill-opacity=\"0.85\" stroke=\"none\"/>",
        x - 8.0,
        y - 24.0,
        len + 62.0
    );
    let _ = writeln!(
        o,
        "<rect x=\"{x:.1}\" y=\"{y:.1}\" width=\"{:.1}\" height=\"6\" fill=\"#000\" stroke=\"#000\" stroke-width=\"1\"/>",
        len / 2.0
    );
    let _ = writeln!(
        o,
        "<rect x=\"{:.1}\" y=\"{y:.1}\" width=\"{:.1}\" height=\"6\" fill=\"#fff\" stroke=\"#000\" stroke-width=\"1\"/>",
        x + len / 2.0,
        len / 2.0
    );
    let _ = writeln!(
        o,
        "<text x=\"{x:.1}\" y=\"{:.1}\" text-anchor=\"middle\" font-size=\"12\">0</text>",
        y - 4.0
    );
    let _ = writeln!(
        o,
        "<text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"start\" font-size=\"12\">{} nm</text>",
        x + len - 4.0,
        y - 4.0,
        num(length_nm)
    );
}

fn north_arrow(o: &mut String, frame: &Frame) {
    let (x, y) = (frame.width - 26.0, 16.0);
    let _ = writeln!(
        o,
        "<rect x=\"{:.1}\" y=\"{:.1}\" width=\"28\" height=\"54\" fill=\"#fff\" fill-opacity=\"0.85\"/>",
        x - 14.0,
        y - 10.0
    );
    let _ = writeln!(
        o,
        "<text x=\"{x:.1}\" y=\"{:.1}\" text-anchor=\"middle\" font-size=\"14\" font-weight=\"bold\">N</text>",
        y + 6.0
    );
    let _ = writeln!(
        o,
        "<polygon points=\"{x:.1},{:.1} {:.1},{:.1} {x:.1},{:.1} {:.1},{:.1}\" fill=\"#000\" stroke=\"#000\" stroke-width=\"1\" stroke-linejoin=\"round\"/>",
        y + 10.0,
        x + 8.0,
        y + 40.0,
        y + 33.0,
        x - 8.0,
        y + 40.0
    );
}

fn map_legend(o: &mut String, plan: &Plan) {
    let key = |body: String| {
        format!(
            "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"34\" height=\"12\" viewBox=\"0 0 34 12\">{body}</svg>"
        )
    };
    let ranked = key(format!(
        "<line x1=\"2\" y1=\"6\" x2=\"32\" y2=\"6\" stroke=\"#000\" stroke-width=\"8\" stroke-linecap=\"round\"/><line x1=\"2\" y1=\"6\" x2=\"32\" y2=\"6\" stroke=\"{}\" stroke-width=\"5\" stroke-linecap=\"round\"/>",
        hex(productivity_colour(0.6))
    ));
    let excluded = key(format!(
        "<line x1=\"1\" y1=\"6\" x2=\"33\" y2=\"6\" stroke=\"{}\" stroke-width=\"4\" stroke-dasharray=\"7 5\"/>",
        hex(SAFE_EXCLUDED)
    ));
    let port = key("<rect x=\"12\" y=\"1\" width=\"10\" height=\"10\" fill=\"#000\"/>".into());
    let way = key(
        "<line x1=\"1\" y1=\"6\" x2=\"33\" y2=\"6\" stroke=\"#1f3c9e\" stroke-width=\"1.5\" stroke-dasharray=\"5 3\"/>"
            .into(),
    );
    let _ = writeln!(
        o,
        "<p class=\"legend\">{ranked} ranked stretch, numbered by rank, darker green for a higher score &#160; {excluded} not ranked this day (closed, out of range, wind, waves or window) &#160; {way} the way by sea to the best three &#160; {port} home port, {} &#160; land shaded grey. North is up.</p>",
        esc(&plan.port.name)
    );
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn clipping_keeps_the_part_inside() {
        let square = vec![(-5.0, -5.0), (5.0, -5.0), (5.0, 5.0), (-5.0, 5.0)];
        let clipped = clip_polygon(square, 0.0, 0.0, 10.0, 10.0);
        let area = clipped
            .iter()
            .zip(clipped.iter().cycle().skip(1))
            .map(|(a, b)| a.0 * b.1 - b.0 * a.1)
            .sum::<f64>()
            .abs()
            / 2.0;
        assert!((area - 25.0).abs() < 1e-9, "{clipped:?}");
        assert!(
            clip_polygon(
                vec![(20.0, 20.0), (30.0, 20.0), (30.0, 30.0)],
                0.0,
                0.0,
                10.0,
                10.0
            )
            .is_empty()
        );
    }

    #[test]
    fn the_map_keeps_shapes_and_inverts() {
        let frame = Frame {
            lat0_deg: 60.0,
            lon0_deg: 179.9,
            kx: 60_f64.to_radians().cos(),
            half_w_nm: 10.0,
            half_h_nm: 6.0,
            scale: 36.0,
            width: 720.0,
            height: 432.0,
        };
        // One nautical mile east and one north are as long on the map, across the
        // antimeridian too.
        let c = frame.xy(LatLon::new(60.0, 179.9));
        let east = frame.xy(LatLon::new(60.0, 179.9 + 1.0 / 30.0 - 360.0));
        let north = frame.xy(LatLon::new(60.0 + 1.0 / 60.0, 179.9));
        assert!((east.0 - c.0 - 36.0).abs() < 1e-6 && (east.1 - c.1).abs() < 1e-9);
        assert!((c.1 - north.1 - 36.0).abs() < 1e-6);
        assert!((c.0 - 360.0).abs() < 1e-9 && (c.1 - 216.0).abs() < 1e-9);
        let back = frame.lat_lon(east);
        assert!((back.lat_deg - 60.0).abs() < 1e-9);
        assert!((wrap180(back.lon_deg - (179.9 + 1.0 / 30.0))).abs() < 1e-9);
    }
}
