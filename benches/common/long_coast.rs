//! The long coast some benchmarks share: the demo coast, each segment eight times over
//! (ids `<id>-<k>`), cut into 0.5 nm stretches: 2,328 stretches.

use shelfwind::scenario::{Scenario, demo_scenario};

/// The demo scenario on the long coast.
pub fn long_demo_scenario() -> Scenario {
    let mut scenario = demo_scenario().expect("demo");
    scenario.settings.stretch_length_nm = 0.5;
    scenario.segments = scenario
        .segments
        .iter()
        .flat_map(|s| {
            (0..8).map(move |k| {
                let mut c = s.clone();
                c.id = format!("{}-{k}", s.id);
                c
            })
        })
        .collect();
    scenario
}
