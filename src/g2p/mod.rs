//! (being written)
pub mod lts;
