//! Colour scales shared by the map and the printed trip sheet, as plain RGB.
//!
//! The index scale is diverging and readable with the common colour-vision deficiencies:
//! blue for upwelling (cold water coming up), a light neutral near zero, and orange-brown
//! for downwelling (warm water held ashore). Blue and orange differ in hue and in
//! lightness, so the two sides stay apart for deuteranopes and protanopes; the neutral is
//! light, so "nothing happening" recedes.

/// An sRGB colour.
pub type Rgb = [u8; 3];

fn mix(a: Rgb, b: Rgb, t: f64) -> Rgb {
    let t = t.clamp(0.0, 1.0);
    [0, 1, 2].map(|k| (f64::from(a[k]) + (f64::from(b[k]) - f64::from(a[k])) * t).round() as u8)
}

fn ramp(stops: &[(f64, Rgb)], x: f64) -> Rgb {
    let x = x.clamp(stops[0].0, stops[stops.len() - 1].0);
    for w in stops.windows(2) {
        if x <= w[1].0 {
            return mix(w[0].1, w[1].1, (x - w[0].0) / (w[1].0 - w[0].0));
        }
    }
    stops[stops.len() - 1].1
}

/// Index values at the ends of the index scale, m^3/s per 100 m.
pub const INDEX_SCALE_LIMIT: f64 = 300.0;

/// Colour for an upwelling index (m^3/s per 100 m): blue positive, orange negative,
/// light grey near zero, saturating at ±[`INDEX_SCALE_LIMIT`].
#[must_use]
pub fn index_colour(index_m3s_per_100m: f64) -> Rgb {
    let stops = [
        (-1.0, [140, 81, 10]),
        (-0.5, [216, 150, 60]),
        (-0.12, [235, 225, 205]),
        (0.0, [225, 225, 225]),
        (0.12, [205, 222, 235]),
        (0.5, [90, 150, 205]),
        (1.0, [8, 48, 107]),
    ];
    ramp(&stops, index_m3s_per_100m / INDEX_SCALE_LIMIT)
}

/// Colour for expected productivity or a score share (0–1): light to dark teal-green.
#[must_use]
pub fn productivity_colour(share: f64) -> Rgb {
    let stops = [
        (0.0, [237, 248, 233]),
        (0.35, [161, 217, 155]),
        (0.7, [49, 163, 84]),
        (1.0, [0, 90, 50]),
    ];
    ramp(&stops, share)
}

/// Colours of the "safe for this boat" view: a full day, part of the day, not at all,
/// closed, and out of range.
pub const SAFE_ALL_DAY: Rgb = [26, 152, 80];
/// Part of the day is inside the boat's limits.
pub const SAFE_PART_DAY: Rgb = [230, 171, 2];
/// Over the boat's limits all day.
pub const SAFE_NOT: Rgb = [197, 27, 125];
/// Closed to fishing (dark, under the dashed red of a closure).
pub const SAFE_CLOSED: Rgb = [60, 60, 60];
/// Out of the boat's range, or without a forecast (light).
pub const SAFE_EXCLUDED: Rgb = [185, 185, 185];

/// CSS hex form, `#rrggbb`.
#[must_use]
pub fn hex(c: Rgb) -> String {
    format!("#{:02x}{:02x}{:02x}", c[0], c[1], c[2])
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn index_scale_is_diverging_with_a_light_neutral() {
        let up = index_colour(300.0);
        let down = index_colour(-300.0);
        let zero = index_colour(0.0);
        assert!(up[2] > up[0], "upwelling is blue");
        assert!(down[0] > down[2], "downwelling is orange-brown");
        assert!(zero.iter().all(|c| *c > 200), "near zero is light");
        assert_eq!(index_colour(1e9), index_colour(300.0));
        assert_eq!(hex([8, 48, 107]), "#08306b");
    }
}
