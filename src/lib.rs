//! orthoepy: a workbench for people who maintain pronunciation lexicons for speech recognisers
//! and synthesisers.
//!
//! The crate holds every piece of logic; the `orthoepy` binary only parses arguments and calls in.
//! Data flows one way: files are read by [`project`], turned into a [`lexicon::Lexicon`] and a
//! [`phoneset::Phoneset`], examined by [`audit`], extended by [`g2p`] and [`variants`], queued for
//! people in [`queue`], reviewed in [`tui`], and saved back through [`lexicon::Lexicon::save`].
//! Commands that write a project hold its [`lock::ProjectLock`]; every save goes through [`safe_io`].

#![deny(missing_docs)]

pub mod audit;
pub mod convert;
pub mod diff;
pub mod eval;
pub mod g2p;
pub mod lexicon;
pub mod lock;
pub mod phoneset;
pub mod pls;
pub mod project;
pub mod queue;
pub mod safe_io;
pub mod support;
pub mod tui;
pub mod variants;
pub mod workspace;
