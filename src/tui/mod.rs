//! The review screen: app state with a pure `update`, the ratatui view, the lexicon lookups it
//! asks for, and the terminal loop that runs it all.
//!
//! The screen never parses files or runs models itself: the caller hands it queue items, a
//! ledger replayed from the journal, phone knowledge and a [`CandidateSource`](crate::queue::CandidateSource); it hands back decisions
//! through [`Effect::AppendJournal`], which the terminal loop writes (and fsyncs) before the
//! screen moves on.

mod editor;
mod filter;
mod fit;
mod help;
mod lookups;
mod phones;
mod state;
mod terminal;
mod update;
mod view;

pub use editor::{EditPurpose, Editor};
pub use filter::{Filter, FilterError, TERMS};
pub use help::KEYS;
pub use lookups::{align, AlignedPair, Lookups, NEIGHBOUR_LIMIT};
pub use phones::{check_all, CheckVerdict, PhoneCheck, PhonesetCheck, SymbolList, TokenVerdict};
pub use state::{
    App, BatchConfirm, Comparison, Confirm, JobProgress, Mode, Neighbours, PendingWrite, SaveState, SearchBox,
    SearchMode, WordPron,
};
pub use update::{update, Effect, Event, Key};
pub use view::draw;
pub use terminal::{dispatch, execute_effect, map_key, run, Services};
