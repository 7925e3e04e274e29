//! The review state of a queue item — pending, decided, set aside, applied or removed — derived from
//! the decision the journal holds for it. Shared by `queue list`, the review screen's filter and
//! progress counts, and batch decisions; it owns no data of its own.

use super::journal::Action;

/// Review state of one item, as the journal's ledger makes it.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum ItemState {
    /// No decision in force.
    Pending,
    /// Accepted (possibly edited) or rejected, not yet merged.
    Decided,
    /// Set aside.
    Aside,
    /// Decided and merged into the lexicon.
    Applied,
    /// Removed from review (`orthoepy queue remove`); hidden until the removal is revoked.
    Removed,
}

impl ItemState {
    /// Lower-case name, as used by the filter's `state=`.
    pub fn name(self) -> &'static str {
        match self {
            ItemState::Pending => "pending",
            ItemState::Decided => "decided",
            ItemState::Aside => "aside",
            ItemState::Applied => "applied",
            ItemState::Removed => "removed",
        }
    }

    /// Derive the state from the decision in force.
    ///
    /// ```
    /// use orthoepy::queue::{Action, ItemState};
    /// assert_eq!(ItemState::of(None, false), ItemState::Pending);
    /// assert_eq!(ItemState::of(Some(&Action::SetAside), false).name(), "aside");
    /// assert_eq!(ItemState::of(Some(&Action::Reject), true), ItemState::Applied);
    /// assert_eq!(ItemState::of(Some(&Action::Remove), true), ItemState::Removed);
    /// ```
    pub fn of(action: Option<&Action>, applied: bool) -> ItemState {
        match (action, applied) {
            (None, _) => ItemState::Pending,
            (Some(Action::Remove), _) => ItemState::Removed,
            (Some(_), true) => ItemState::Applied,
            (Some(Action::SetAside), false) => ItemState::Aside,
            (Some(_), false) => ItemState::Decided,
        }
    }
}
