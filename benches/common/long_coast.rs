//! The long coast some benchmarks share: the demo coast, each segment `copies` times
//! over (ids `<id>-<k>`), cut into 0.5 nm stretches: 291 stretches a copy (eight copies
//! 2,328 stretches; 35 copies 10,185).

use shelfwind::scenario::{Scenario, demo_scenario};

/// The demo scenario on the long coast of `copies` copies.
pub fn long_demo_scenario(copies: usize) -> Scenario {
    let mut scenario = demo_scenario().expect("demo");
    scenario.settings.stretch_length_nm = 0.5;
    scenario.segments = scenario
        .segments
        .iter()
        .flat_map(|s| {
            (0..copies).map(move |k| {
                let mut c = s.clone();
                c.id = format!("{}-{k}", s.id);
                c
            })
        })
        .collect();
    scenario
}
