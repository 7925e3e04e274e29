//! (being written)
pub mod lts;
pub mod hybrid;
