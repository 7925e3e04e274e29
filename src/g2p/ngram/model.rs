//! The runtime half of the n-gram code: the smoothed model in back-off form, as the decoder
//! queries it and the model file stores it. It validates stored parts and answers
//! log-probabilities, context transitions and score bounds; it must not depend on how a model
//! is estimated (that is [`super::estimate`]).

use super::{Discount, History, MAX_HISTORY, MAX_ORDER, NONE, START};
use crate::support::hash::FastMap;

/// An explicit successor of a history: `(symbol, ln p)`.
pub(super) type Entry = (u32, f32);

/// One stored history of the back-off model.
#[derive(Clone, Debug, PartialEq)]
pub struct StoredContext {
    /// The history symbols, oldest first (may start with [`START`]).
    pub history: Vec<u32>,
    /// Natural log of the back-off weight γ(h).
    pub backoff: f32,
    /// Explicit successors `(symbol, ln p)`, sorted by symbol.
    pub entries: Vec<(u32, f32)>,
}

#[derive(Clone, Debug)]
struct Node {
    backoff: f32,
    suffix: u32,
    first: u32,
    end: u32,
    /// History length.
    len: u8,
}

/// The smoothed n-gram model in back-off form: explicit probabilities for seen n-grams, and a
/// back-off weight per history. Context id 0 is the empty history (dense unigram table).
///
/// Besides the stored contexts, every proper prefix of a stored history is a context too (with
/// no entries and back-off weight 1, so it answers exactly as its longest stored suffix). With
/// that closure the context after one more symbol is a suffix of the previous context plus
/// that symbol, which lets [`NgramModel::next_context`] find it with one or two look-ups.
#[derive(Clone, Debug)]
pub struct NgramModel {
    order: usize,
    discounts: Vec<Discount>,
    unigram: Vec<f32>,
    contexts: Vec<StoredContext>,
    nodes: Vec<Node>,
    symbols: Vec<u32>,
    logps: Vec<f32>,
    index: FastMap<History, u32>,
}

/// Why a set of model parts does not form a valid model.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum NgramError {
    /// The order is 0 or above [`MAX_ORDER`], or discounts do not match it.
    #[error("n-gram order {0} is not in 1..={MAX_ORDER} or does not match the discounts")]
    Order(usize),
    /// The unigram table is empty or holds a non-finite or positive log-probability.
    #[error("unigram table is empty or holds an invalid log-probability")]
    Unigram,
    /// A context is malformed.
    #[error("context {index}: {reason}")]
    InvalidContext {
        /// Position of the context in the list.
        index: usize,
        /// What is wrong.
        reason: &'static str,
    },
}

fn valid_logp(x: f32) -> bool {
    x.is_finite() && x <= 1e-4
}

impl NgramModel {
    /// The uniform model over `vocab` symbols, of order 1.
    pub fn uniform(vocab: usize) -> NgramModel {
        let lp = -(vocab.max(1) as f32).ln();
        NgramModel::from_parts(1, vec![Discount::flat(0.5)], vec![lp; vocab.max(1)], Vec::new())
            .unwrap_or_else(|_| unreachable!("uniform model parts are valid by construction"))
    }

    /// Assembles a model from stored parts, validating every field (used by the model file).
    pub fn from_parts(order: usize, discounts: Vec<Discount>, unigram: Vec<f32>, contexts: Vec<StoredContext>) -> Result<NgramModel, NgramError> {
        if order == 0 || order > MAX_ORDER || discounts.len() != order || discounts.iter().any(|d| !d.is_finite()) {
            return Err(NgramError::Order(order));
        }
        if unigram.is_empty() || !unigram.iter().all(|&x| valid_logp(x)) {
            return Err(NgramError::Unigram);
        }
        let vocab = unigram.len() as u32;
        let mut index = FastMap::default();
        let mut nodes = vec![Node { backoff: 0.0, suffix: 0, first: 0, end: 0, len: 0 }];
        let mut histories: Vec<History> = vec![[NONE; MAX_HISTORY]];
        let mut symbols = Vec::new();
        let mut logps = Vec::new();
        for (i, c) in contexts.iter().enumerate() {
            let bad = |reason| Err(NgramError::InvalidContext { index: i, reason });
            if c.history.is_empty() || c.history.len() >= order {
                return bad("history length must be in 1..order");
            }
            if c.history.iter().any(|&s| s >= vocab && s != START) {
                return bad("history symbol out of range");
            }
            if !(c.backoff.is_finite() && c.backoff <= 1e-4) {
                return bad("invalid back-off weight");
            }
            if c.entries.windows(2).any(|w| w[0].0 >= w[1].0) {
                return bad("entries not strictly sorted");
            }
            if c.entries.iter().any(|&(s, lp)| s >= vocab || !valid_logp(lp)) {
                return bad("entry symbol or log-probability invalid");
            }
            let mut h = [NONE; MAX_HISTORY];
            h[..c.history.len()].copy_from_slice(&c.history);
            if index.insert(h, (i + 1) as u32).is_some() {
                return bad("history repeated");
            }
            let first = symbols.len() as u32;
            for &(s, lp) in &c.entries {
                symbols.push(s);
                logps.push(lp);
            }
            nodes.push(Node { backoff: c.backoff, suffix: 0, first, end: symbols.len() as u32, len: c.history.len() as u8 });
            histories.push(h);
        }
        for c in &contexts {
            for len in 1..c.history.len() {
                let mut h = [NONE; MAX_HISTORY];
                h[..len].copy_from_slice(&c.history[..len]);
                if let std::collections::hash_map::Entry::Vacant(slot) = index.entry(h) {
                    slot.insert(nodes.len() as u32);
                    nodes.push(Node { backoff: 0.0, suffix: 0, first: 0, end: 0, len: len as u8 });
                    histories.push(h);
                }
            }
        }
        let mut model = NgramModel { order, discounts, unigram, contexts, nodes, symbols, logps, index };
        for (i, h) in histories.iter().enumerate().skip(1) {
            let len = model.nodes[i].len as usize;
            let suffix = model.longest_context(h, 1, len);
            model.nodes[i].suffix = suffix;
        }
        Ok(model)
    }

    fn longest_context(&self, history: &History, from: usize, len: usize) -> u32 {
        for start in from..len {
            let mut key = [NONE; MAX_HISTORY];
            key[..len - start].copy_from_slice(&history[start..len]);
            if let Some(&id) = self.index.get(&key) {
                return id;
            }
        }
        0
    }

    /// The context id to use after `history` (oldest first, any length): the longest suffix of
    /// its last `order-1` symbols that the model stores (0 = the empty history).
    #[inline]
    pub fn context(&self, history: &[u32]) -> u32 {
        self.longest_tail_context(history, MAX_HISTORY)
    }

    /// The longest stored context among the last `most` (and at most `order-1`) symbols of
    /// `history`.
    #[inline]
    fn longest_tail_context(&self, history: &[u32], most: usize) -> u32 {
        let take = history.len().min(self.order - 1).min(most).min(MAX_HISTORY);
        let mut arr = [NONE; MAX_HISTORY];
        arr[..take].copy_from_slice(&history[history.len() - take..]);
        self.longest_context(&arr, 0, take)
    }

    /// The context id after `history` (its last `order-1` symbols, newest last) when `previous`
    /// was the context id of the history one symbol shorter: the same as
    /// [`Self::context`]`(history)`, found from the longest candidate the prefix closure allows
    /// (one more symbol than `previous`) instead of from the whole history.
    #[inline]
    pub fn next_context(&self, previous: u32, history: &[u32]) -> u32 {
        let previous_len = self.nodes.get(previous as usize).map_or(0, |n| usize::from(n.len));
        self.longest_tail_context(history, previous_len + 1)
    }

    /// Natural-log probability of `symbol` in context `context` (ids from [`Self::context`]).
    #[inline]
    pub fn log_prob(&self, context: u32, symbol: u32) -> f32 {
        let mut acc = 0.0f32;
        let mut c = context as usize;
        loop {
            let Some(node) = self.nodes.get(c).filter(|_| c != 0) else {
                return acc + self.unigram.get(symbol as usize).copied().unwrap_or(f32::NEG_INFINITY);
            };
            let range = node.first as usize..node.end as usize;
            if let Ok(pos) = self.symbols[range.clone()].binary_search(&symbol) {
                return acc + self.logps[range.start + pos];
            }
            acc += node.backoff;
            c = node.suffix as usize;
        }
    }

    /// For every symbol, an upper bound of its log-probability in any context: the larger of
    /// its unigram value and its largest explicit value (back-off weights are ≤ 0).
    pub fn upper_bounds(&self) -> Vec<f32> {
        let mut bounds = self.unigram.clone();
        for (&s, &lp) in self.symbols.iter().zip(&self.logps) {
            if let Some(b) = bounds.get_mut(s as usize) {
                *b = b.max(lp);
            }
        }
        bounds
    }

    /// For every context id, an upper bound of the largest log-probability of any symbol of
    /// `set` in that context: the larger of the best explicit entry of `set` there and the
    /// back-off weight plus the bound of the suffix context (exact when no symbol of `set` is
    /// both explicit and best at the suffix). Lets a search skip a whole group of symbols,
    /// e.g. all phone insertions, with one comparison.
    pub fn group_bounds(&self, set: &[u32]) -> Vec<f32> {
        let mut member = vec![false; self.unigram.len()];
        for &s in set {
            if let Some(m) = member.get_mut(s as usize) {
                *m = true;
            }
        }
        let mut bounds = vec![f32::NEG_INFINITY; self.nodes.len()];
        bounds[0] = set.iter().filter_map(|&s| self.unigram.get(s as usize)).fold(f32::NEG_INFINITY, |a, &b| a.max(b));
        // Suffix contexts have shorter histories, so visiting by history length sees them first.
        let mut by_length: Vec<usize> = (1..self.nodes.len()).collect();
        by_length.sort_by_key(|&i| self.nodes[i].len);
        for i in by_length {
            let node = &self.nodes[i];
            let range = node.first as usize..node.end as usize;
            let explicit = self.symbols[range.clone()]
                .iter()
                .zip(&self.logps[range])
                .filter(|(&s, _)| member.get(s as usize).copied().unwrap_or(false))
                .fold(f32::NEG_INFINITY, |a, (_, &lp)| a.max(lp));
            bounds[i] = explicit.max(node.backoff + bounds[node.suffix as usize]);
        }
        bounds
    }

    /// Model order (history length + 1).
    pub fn order(&self) -> usize {
        self.order
    }

    /// The discounts of each order, lowest first.
    pub fn discounts(&self) -> &[Discount] {
        &self.discounts
    }

    /// The unigram log-probabilities.
    pub fn unigram(&self) -> &[f32] {
        &self.unigram
    }

    /// All stored contexts (for the model file).
    pub fn contexts(&self) -> &[StoredContext] {
        &self.contexts
    }

    /// Number of explicit n-grams of order ≥ 2.
    pub fn explicit_ngrams(&self) -> usize {
        self.symbols.len()
    }
}
