//! The document composes the stages: it hands each stage the values it needs (coast,
//! sources, boat, port, that stage's settings), never the whole document.

use super::Scenario;
use crate::coast::{Land, LatLon, Segment};
use crate::plan::{
    ForecastGeometry, Plan, PlanError, PlanRequest, Port, UpwellingSettings, Vessel, rank_plan,
    sample_forecast_conditions,
};
use crate::progress::Progress;
use crate::wind::WindSource;
use chrono::{DateTime, NaiveDate, Utc};
use chrono_tz::Tz;

/// Which boat, port and days to plan for.
#[derive(Debug, Clone, Copy)]
pub struct PlanChoice<'a> {
    /// Vessel id; the first vessel when `None`.
    pub vessel_id: Option<&'a str>,
    /// Home port id; the first port when `None`.
    pub port_id: Option<&'a str>,
    /// First local day (see [`PlanRequest::from`]).
    pub from: Option<NaiveDate>,
    /// Number of days.
    pub days: usize,
    /// "Now", for the default first day.
    pub now: DateTime<Utc>,
}

fn pick<'a, T>(
    kind: &str,
    items: &'a [T],
    id_of: impl Fn(&T) -> &str,
    id: Option<&str>,
) -> Result<&'a T, PlanError> {
    match id {
        None => items
            .first()
            .ok_or_else(|| PlanError::Scenario(format!("the scenario has no {kind}: add one"))),
        Some(id) => items.iter().find(|x| id_of(x) == id).ok_or_else(|| {
            let ids: Vec<&str> = items.iter().map(&id_of).collect();
            PlanError::Scenario(format!(
                "no {kind} {id:?} in the scenario: expected one of {}",
                ids.join(", ")
            ))
        }),
    }
}

impl Scenario {
    /// The scenario's time zone.
    pub fn tz(&self) -> Result<Tz, PlanError> {
        self.time_zone
            .parse()
            .map_err(|_| PlanError::Scenario(format!("time zone {:?} is unknown", self.time_zone)))
    }

    /// The settings of the upwelling stage.
    #[must_use]
    pub fn upwelling_settings(&self) -> UpwellingSettings {
        UpwellingSettings {
            index: self.settings.index,
            events: self.settings.events,
            response: self.settings.response,
        }
    }

    /// Positions of the home ports, in order.
    #[must_use]
    pub fn port_positions(&self) -> Vec<LatLon> {
        self.ports.iter().map(|p| p.position).collect()
    }

    /// What the conditions are sampled for.
    #[must_use]
    pub fn forecast_geometry<'a>(
        &self,
        segments: &'a [Segment],
        ports: &'a [LatLon],
        land: &'a Land,
    ) -> ForecastGeometry<'a> {
        ForecastGeometry {
            segments,
            stretch_length_nm: self.settings.stretch_length_nm,
            ports,
            route_step_nm: self.settings.trip.route_step_nm,
            route: crate::coast::RouteSettings {
                clearance_m: self.settings.trip.sea_clearance_nm * crate::physics::NAUTICAL_MILE_M,
                ..crate::coast::RouteSettings::default()
            },
            land,
        }
    }

    /// The vessel with this id, or the first.
    pub fn vessel(&self, id: Option<&str>) -> Result<&Vessel, PlanError> {
        pick("vessel", &self.vessels, |v| v.id.as_str(), id)
    }

    /// The port with this id, or the first.
    pub fn port(&self, id: Option<&str>) -> Result<&Port, PlanError> {
        pick("port", &self.ports, |p| p.id.as_str(), id)
    }

    /// The ranking request for a choice of boat, port and days.
    pub fn plan_request<'a>(
        &'a self,
        choice: &PlanChoice<'_>,
    ) -> Result<PlanRequest<'a>, PlanError> {
        Ok(PlanRequest {
            scenario_name: &self.name,
            coast: &self.segments,
            vessel: self.vessel(choice.vessel_id)?,
            port: self.port(choice.port_id)?,
            trip: &self.settings.trip,
            from: choice.from,
            days: choice.days,
            now: choice.now,
        })
    }
}

/// The names to show for resolved segments: the drawn segment's label, or the id.
#[must_use]
pub fn segment_names(scenario: Option<&Scenario>, segments: &[Segment]) -> Vec<String> {
    segments
        .iter()
        .map(|seg| {
            scenario
                .and_then(|s| s.segments.iter().find(|c| c.id == seg.id))
                .map_or_else(|| seg.id.clone(), |c| c.label().to_string())
        })
        .collect()
}

/// The settings of a long record's analysis from a scenario's.
#[must_use]
pub fn record_settings(scenario: &Scenario) -> crate::upwelling::RecordSettings {
    crate::upwelling::RecordSettings {
        index: scenario.settings.index,
        events: scenario.settings.events,
        coverage: scenario.settings.seasons,
        years: None,
    }
}

/// The whole pipeline at once, for the command line and tests: sample the sources,
/// compute the upwelling, rank for the chosen boat and port; fetch and ways by sea on
/// `land` (`Land::bundled()`, or with a coast pack laid over it).
pub fn plan_scenario(
    scenario: &Scenario,
    segments: &[Segment],
    sources: &[WindSource],
    choice: &PlanChoice<'_>,
    land: &Land,
    progress: &Progress,
) -> Result<Plan, PlanError> {
    let tz = scenario.tz()?;
    let request = scenario.plan_request(choice)?;
    let ports = scenario.port_positions();
    let geometry = scenario.forecast_geometry(segments, &ports, land);
    let conditions = sample_forecast_conditions(&geometry, sources, scenario.run_rule(), progress)?;
    let forecast = conditions.forecast(tz, &scenario.upwelling_settings());
    rank_plan(&forecast, &request)
}
