//! Candidates for queued items from the project's guesser: the conversion of the guesser's
//! [`Proposal`]s into review [`Candidate`]s, the [`CandidateSource`] the review screen's
//! background thread asks, and filling in items that have no candidates yet.
//!
//! The guesser itself is assembled only by [`Workspace`]; this file never builds one, so the
//! queue, the review screen and `orthoepy guess` all see the same candidates and scores.

use std::sync::Arc;

use rayon::prelude::*;

use super::item::{AlignPair, Candidate, Item};
use crate::g2p::hybrid::Proposal;
use crate::workspace::{Workspace, CANDIDATES_PER_WORD};

impl Candidate {
    /// The review form of a guesser's proposal: its sources joined by `+`, its calibrated
    /// score, the model's letter↔phone alignment when it has one, and its warnings.
    ///
    /// ```
    /// use orthoepy::g2p::hybrid::{Proposal, Source};
    /// use orthoepy::queue::Candidate;
    /// let p = Proposal { pronunciation: "F EH1 R IY0 B OW2 T".into(), score: 0.7, alignment: vec![], warnings: vec![],
    ///                    sources: vec![Source::Compound { parts: vec!["ferry".into(), "boat".into()] }] };
    /// let c = Candidate::from_proposal(&p);
    /// assert_eq!((c.source.as_str(), c.score), ("compound:ferry+boat", Some(0.7)));
    /// ```
    pub fn from_proposal(proposal: &Proposal) -> Candidate {
        let mut candidate = Candidate::new(&proposal.pronunciation, &proposal.source_label());
        candidate.score = Some(proposal.score);
        candidate.alignment = proposal
            .alignment
            .iter()
            .map(|piece| AlignPair { letters: piece.letters.clone(), phones: piece.phones.join(" ") })
            .collect();
        candidate.warnings = proposal.warnings.clone();
        candidate
    }
}

/// Produces candidates for items that have none; the review screen runs it on a background
/// thread.
pub trait CandidateSource: Send {
    /// What the progress gauge calls the work ("guessing").
    fn label(&self) -> &str;
    /// Candidates for a word, best first.
    fn candidates(&self, word: &str) -> Vec<Candidate>;
}

/// The project's guesser as a [`CandidateSource`], shareable with a background thread.
pub struct WorkspaceGuesser(pub Arc<Workspace>);

impl CandidateSource for WorkspaceGuesser {
    fn label(&self) -> &str {
        "guessing"
    }

    fn candidates(&self, word: &str) -> Vec<Candidate> {
        candidates_for(&self.0, word)
    }
}

/// The review candidates of `word` in `workspace`: the guesser's best
/// [`CANDIDATES_PER_WORD`] proposals.
pub fn candidates_for(workspace: &Workspace, word: &str) -> Vec<Candidate> {
    workspace.guess(word, CANDIDATES_PER_WORD).iter().map(Candidate::from_proposal).collect()
}

/// Fills in candidates for every item that has none, in parallel; `progress(done, total)` is
/// called after each batch.
pub fn fill_candidates(items: &mut [Item], workspace: &Workspace, progress: &mut dyn FnMut(usize, usize)) {
    const BATCH: usize = 512;
    let mut todo: Vec<&mut Item> = items.iter_mut().filter(|i| i.candidates.is_empty()).collect();
    let total = todo.len();
    let mut done = 0;
    for batch in todo.chunks_mut(BATCH) {
        batch.par_iter_mut().for_each(|item| item.candidates = candidates_for(workspace, &item.word));
        done += batch.len();
        progress(done, total);
    }
}
