//! From wind at the coast to the coastal upwelling index, per segment and time.

mod index;

pub use index::{IndexSeries, IndexSettings, UpwellingError, index_series};
