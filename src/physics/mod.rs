//! Pure physics of wind-driven coastal upwelling: units and direction conventions, drag
//! laws, wind stress, the Coriolis parameter, Ekman transport, the coastal upwelling
//! index, Ekman layer depth and Ekman pumping.
//!
//! Everything here is a plain function of numbers: no files, no time, no GUI. Each
//! public function states its formula, its units and its source.

mod coriolis;
mod drag;
mod ekman;
mod pumping;
mod stress;
mod units;
mod waves;

pub use coriolis::{
    EARTH_ROTATION_RAD_S, EquatorError, LatitudeCheck, REFUSE_BELOW_LAT_DEG, WARN_BELOW_LAT_DEG,
    check_latitude, coriolis_parameter,
};
pub use drag::{ConstantDrag, DragChoice, DragLaw, LargePond1981, LargeYeager2009, Trenberth1990};
pub use ekman::{
    EkmanTransport, OffshoreNormal, ekman_depth_empirical_m, ekman_transport,
    upwelling_index_m3s_per_100m,
};
pub use pumping::{ProbeStress, PumpingProbes, ekman_pumping_m_s, ekman_pumping_with_f_m_s};
pub use stress::{
    RHO_AIR_KG_M3, RHO_AIR_RANGE_KG_M3, RHO_WATER_KG_M3, RHO_WATER_RANGE_KG_M3, WindStress,
    wind_stress,
};
pub use units::{
    KMH_IN_M_S, KNOT_IN_M_S, NAUTICAL_MILE_M, Wind, bearing_deg, km_h_to_m_s, knots_to_m_s,
    m_s_to_knots,
};
pub use waves::{SeaLimit, WindSea, wind_sea, wind_stress_factor_m_s};
