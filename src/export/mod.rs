//! Writing results for other tools: CSV and JSON tables of the upwelling index.

mod index_table;

pub use index_table::{IndexFormat, IndexRecord, index_records, write_index};
