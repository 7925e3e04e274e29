//! Shared support code that several modules need and none owns: stable hashing, the held-out
//! split of words, edit-distance alignment, "a problem at a place in a file" and size-capped
//! file reads. One small file per idea; each is written once here instead of once per caller.
//!
//! Nothing here knows about lexicons, phones or models, and nothing here imports another
//! module of the crate: every other module may depend on `support`, never the reverse.

pub mod align;
pub mod clock;
pub mod hash;
pub mod located;
pub mod read;
pub mod split;
