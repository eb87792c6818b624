//! Invariants of the index physics, checked on random inputs (proptest).

use proptest::prelude::*;
use shelfwind::physics::*;

fn index(lat: f64, offshore_deg: f64, wind: Wind, drag: &DragChoice) -> f64 {
    let tau = wind_stress(wind, drag, RHO_AIR_KG_M3);
    let m = ekman_transport(tau, coriolis_parameter(lat), RHO_WATER_KG_M3);
    upwelling_index_m3s_per_100m(m, offshore_deg)
}

fn drag_law() -> impl Strategy<Value = DragChoice> {
    prop_oneof![
        Just(DragChoice::default()),
        Just(DragChoice::LargePond1981),
        Just(DragChoice::Trenberth1990),
        Just(DragChoice::LargeYeager2009),
    ]
}

fn latitude() -> impl Strategy<Value = f64> {
    prop_oneof![10.0..75.0_f64, -75.0..-10.0_f64]
}

proptest! {
    /// Turning the wind and the coast by the same angle changes nothing: the index
    /// depends only on the angle between them.
    #[test]
    fn rotating_wind_and_coast_together_leaves_the_index(
        lat in latitude(), speed in 0.0..30.0_f64, from in 0.0..360.0_f64,
        offshore in 0.0..360.0_f64, turn in -360.0..360.0_f64, drag in drag_law(),
    ) {
        let a = index(lat, offshore, Wind::from_speed_direction(speed, from), &drag);
        let b = index(lat, offshore + turn, Wind::from_speed_direction(speed, from + turn), &drag);
        prop_assert!((a - b).abs() <= 1e-9 * a.abs().max(1.0), "{a} vs {b}");
    }

    /// The same wind on the same coast, mirrored to the other hemisphere, moves the water
    /// to the other side: the index changes sign, and keeps its size.
    #[test]
    fn mirroring_across_the_equator_flips_the_transport(
        lat in 10.0..75.0_f64, speed in 0.0..30.0_f64, from in 0.0..360.0_f64,
        offshore in 0.0..360.0_f64, drag in drag_law(),
    ) {
        let w = Wind::from_speed_direction(speed, from);
        let north = index(lat, offshore, w, &drag);
        let south = index(-lat, offshore, w, &drag);
        prop_assert!((north + south).abs() <= 1e-9 * north.abs().max(1.0));
    }

    /// Ekman transport is perpendicular to the stress: to its right in the north
    /// (clockwise, negative cross product), to its left in the south.
    #[test]
    fn transport_is_perpendicular_to_stress(
        lat in latitude(), speed in 0.5..30.0_f64, from in 0.0..360.0_f64, drag in drag_law(),
    ) {
        let tau = wind_stress(Wind::from_speed_direction(speed, from), &drag, RHO_AIR_KG_M3);
        let m = ekman_transport(tau, coriolis_parameter(lat), RHO_WATER_KG_M3);
        let dot = tau.x_pa * m.x_m2_s + tau.y_pa * m.y_m2_s;
        let cross = tau.x_pa * m.y_m2_s - tau.y_pa * m.x_m2_s;
        let scale = tau.magnitude_pa() * m.x_m2_s.hypot(m.y_m2_s);
        prop_assert!(dot.abs() <= 1e-12 * scale.max(1e-30));
        prop_assert!(cross.signum() == -lat.signum(), "right of the stress in the north");
    }

    /// A wind blowing straight on- or offshore moves no water along the normal: index 0.
    #[test]
    fn cross_shore_wind_gives_no_index(
        lat in latitude(), speed in 0.0..30.0_f64, offshore in 0.0..360.0_f64,
        onshore in any::<bool>(), drag in drag_law(),
    ) {
        let from = if onshore { offshore } else { offshore + 180.0 };
        let along = index(lat, offshore + 90.0, Wind::from_speed_direction(speed, from + 90.0), &drag);
        let i = index(lat, offshore, Wind::from_speed_direction(speed, from), &drag);
        prop_assert!(i.abs() <= 1e-9 * along.abs().max(1.0), "{i}");
    }

    /// Direction "from" and components convert both ways.
    #[test]
    fn direction_round_trip(speed in 0.01..60.0_f64, from in 0.0..360.0_f64) {
        let w = Wind::from_speed_direction(speed, from);
        prop_assert!((w.speed_m_s() - speed).abs() < 1e-9);
        let back = w.direction_from_deg().expect("not calm");
        let diff = (back - from + 540.0).rem_euclid(360.0) - 180.0;
        prop_assert!(diff.abs() < 1e-7);
    }
}

/// The rule of the trade (REFERENCES.md): in the north, upwelling when the wind blows
/// along the coast with the coast on its left, looking downwind; in the south, with the
/// coast on its right.
#[test]
fn rule_of_the_trade_in_both_hemispheres() {
    // Coast to the east (sea to the west, offshore 270°); wind from the north blows
    // south, with the coast on its left looking downwind.
    let w = Wind::from_speed_direction(10.0, 0.0);
    assert!(index(40.0, 270.0, w, &DragChoice::default()) > 0.0);
    assert!(index(-40.0, 270.0, w, &DragChoice::default()) < 0.0);
    let s = Wind::from_speed_direction(10.0, 180.0);
    assert!(index(-40.0, 270.0, s, &DragChoice::default()) > 0.0);
}
