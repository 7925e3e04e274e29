//! N-best decoding of a spelling into pronunciations with the joint-sequence model
//! (Bisani & Ney 2008, section 4): a beam search over graphone sequences whose letter parts
//! spell the word. Paths that give the same phone string with the same n-gram history are
//! merged (their probabilities add), so a hypothesis' score sums over its segmentations
//! that survive the beam. Owns the public guess types; must not print.
//!
//! **Pruning** keeps at most `beam_width` partial hypotheses per letter position and none more
//! than `log_beam` nats below the best there. Candidate graphones are tried in order of their
//! best probability in any context, so a loop stops at the first one that cannot reach the
//! floor; phone insertions are skipped as a group when their bound in the current context
//! (see `NgramModel::group_bounds`) cannot reach it; neither shortcut changes the result.
//! Once a column is full, an insertion scoring below its weakest kept item is not made: it
//! could only add a share below the beam to a path that is kept anyway.
//! The default width (32) was chosen on CMUdict: against an unbounded search it costs 0.03
//! points of word error without stress and 0.1 with stress (16 cost 0.15 and 0.4), and keeps
//! 5-best decoding of the order-8 model above 2,000 words/s on one thread (BENCHMARKS.md).
//!
//! **Posteriors** are normalised by the forward total of the beam: `posterior = P(word, phones)
//! / Σ P(word, phones')` where both sums run over all complete paths that survived the beam
//! (not only the N returned), so the posteriors of the returned hypotheses sum to at most 1.

use serde::Serialize;
use unicode_normalization::char::is_combining_mark;
use unicode_normalization::UnicodeNormalization;

use super::em::log_add;
use crate::support::hash::FastMap;
use super::model::Model;
use super::ngram::{push_history, start_history, History, NONE};

/// Search settings.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DecodeOptions {
    /// Number of hypotheses to return (at least 1).
    pub nbest: usize,
    /// Most partial hypotheses kept per letter position.
    pub beam_width: usize,
    /// Partial hypotheses more than this many nats below the best at their position are dropped.
    pub log_beam: f64,
    /// Most consecutive graphones without letters (phone insertions).
    pub max_insertions: usize,
}

impl Default for DecodeOptions {
    fn default() -> Self {
        DecodeOptions { nbest: 5, beam_width: 32, log_beam: 10.0, max_insertions: 1 }
    }
}

/// One piece of a hypothesis' letter↔phone alignment: a run of letters (possibly empty, for a
/// phone insertion) and the phones it stands for (possibly empty, for a silent letter).
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct AlignedPiece {
    /// Letters of the word (after the model's normalisation: NFC, maybe lower-cased).
    pub letters: String,
    /// Phone symbols for those letters.
    pub phones: Vec<String>,
}

/// One candidate pronunciation.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Hypothesis {
    /// Phone symbols, in order.
    pub phones: Vec<String>,
    /// Natural log of the joint probability `P(word, phones)`, summed over the segmentations
    /// that survived the beam.
    pub log_prob: f64,
    /// `P(phones | word)` normalised by the beam's forward total (see the module docs).
    pub posterior: f64,
    /// Probability that this hypothesis is right, stress as written: the posterior through the
    /// model's calibration (see [`super::Calibration`]), or the posterior itself when the model
    /// carries none.
    pub score: f64,
    /// Alignment of the best segmentation of this hypothesis; the letters concatenate to the
    /// normalised word.
    pub alignment: Vec<AlignedPiece>,
}

/// Something the caller should know about a guess.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum GuessWarning {
    /// The word has no letters after normalisation.
    EmptyWord,
    /// These letters have no single-letter graphone (never seen in training); they were
    /// passed over with no phones.
    UnseenLetters {
        /// The letters, in order of first appearance.
        letters: Vec<String>,
    },
    /// These letters were never seen in training and were read as their base letter (NFD
    /// without combining marks), as (letter, base) pairs in order of first appearance.
    MappedLetters {
        /// The (letter, base letter) pairs.
        letters: Vec<(String, String)>,
    },
    /// The search found no complete hypothesis.
    NoPronunciation,
}

impl std::fmt::Display for GuessWarning {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            GuessWarning::EmptyWord => write!(f, "the word has no letters"),
            GuessWarning::UnseenLetters { letters } => {
                write!(f, "letters never seen in training were left silent: {}", letters.join(" "))
            }
            GuessWarning::MappedLetters { letters } => {
                let pairs: Vec<String> = letters.iter().map(|(from, to)| format!("{from} as {to}")).collect();
                write!(f, "letters never seen in training were read as their base letter: {}", pairs.join(", "))
            }
            GuessWarning::NoPronunciation => write!(f, "no pronunciation found; try a wider beam"),
        }
    }
}

/// The result of guessing one word.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Guess {
    /// The word as given.
    pub word: String,
    /// Hypotheses, best first (highest `log_prob`).
    pub hypotheses: Vec<Hypothesis>,
    /// Warnings (unseen letters, no result).
    pub warnings: Vec<GuessWarning>,
}

/// Log-probability charged for passing over a letter the model has no graphone for.
const UNSEEN_LETTER_LOG_PROB: f32 = -12.0;

struct Node {
    parent: u32,
    graphone: u32,
    letter: u32,
}

#[derive(Clone, Copy)]
struct Partial {
    node: u32,
    history: History,
    /// Context id of `history` once looked up ([`NONE`] before).
    context: u32,
    /// Context id of the history before the last graphone (to find `context` quickly).
    parent_context: u32,
    score: f64,
    best: f64,
    phone_hash: u64,
    insertions: usize,
}

#[inline]
fn extend_hash(hash: u64, phone: u32) -> u64 {
    (hash.rotate_left(5) ^ u64::from(phone + 1)).wrapping_mul(0x51_7c_c1_b7_27_22_0a_95)
}

/// Partial hypotheses at one letter position, merged by (history, phone string).
#[derive(Default)]
struct Column {
    items: Vec<Partial>,
    index: FastMap<(History, u64), usize>,
}

impl Column {
    fn push(&mut self, p: Partial) {
        match self.index.get(&(p.history, p.phone_hash)) {
            Some(&i) => {
                let old = &mut self.items[i];
                old.score = log_add(old.score, p.score);
                if p.best > old.best {
                    old.best = p.best;
                    old.node = p.node;
                    old.insertions = p.insertions;
                }
            }
            None => {
                self.index.insert((p.history, p.phone_hash), self.items.len());
                self.items.push(p);
            }
        }
    }

    fn prune(&mut self, opts: &DecodeOptions) {
        self.items.sort_by(|a, b| b.score.total_cmp(&a.score));
        if let Some(best) = self.items.first().map(|p| p.score) {
            let keep = self.items.iter().take(opts.beam_width.max(1)).take_while(|p| p.score >= best - opts.log_beam).count();
            self.items.truncate(keep.max(1));
        }
        self.index.clear();
        for (i, p) in self.items.iter().enumerate() {
            self.index.insert((p.history, p.phone_hash), i);
        }
    }
}

impl Model {
    /// Guesses up to `nbest` pronunciations of `word` with the default search settings.
    ///
    /// ```
    /// use orthoepy::g2p::{train, TrainOptions};
    /// let data: Vec<(String, Vec<String>)> = [("ab", "A B"), ("ba", "B A"), ("aa", "A A"), ("bb", "B B")]
    ///     .iter().map(|(w, p)| (w.to_string(), p.split(' ').map(String::from).collect())).collect();
    /// let opts = TrainOptions { order: 2, heldout_percent: 0, ..TrainOptions::default() };
    /// let model = train(&data, &opts, &mut |_| {}).unwrap();
    /// let guess = model.guess("abba", 3);
    /// assert_eq!(guess.hypotheses[0].phones, ["A", "B", "B", "A"]);
    /// let total: f64 = guess.hypotheses.iter().map(|h| h.posterior).sum();
    /// assert!(total <= 1.0 + 1e-9);
    /// ```
    pub fn guess(&self, word: &str, nbest: usize) -> Guess {
        self.guess_with(word, &DecodeOptions { nbest, ..DecodeOptions::default() })
    }

    /// Guesses pronunciations of `word` with explicit search settings.
    pub fn guess_with(&self, word: &str, opts: &DecodeOptions) -> Guess {
        let letters = self.symbols.letters(word);
        let mut guess = Guess { word: word.to_string(), hypotheses: Vec::new(), warnings: Vec::new() };
        if letters.is_empty() {
            guess.warnings.push(GuessWarning::EmptyWord);
            return guess;
        }
        let known = |l: &str| self.letters.get(l).filter(|&id| !self.inventory.with_letters(&[id]).is_empty());
        let mut ids: Vec<Option<u32>> = letters.iter().map(|l| known(l)).collect();
        let mut unseen: Vec<String> = Vec::new();
        let mut mapped: Vec<(String, String)> = Vec::new();
        for (l, id) in letters.iter().zip(ids.iter_mut()) {
            if id.is_some() {
                continue;
            }
            // A letter the model never saw is read as its base letter when it has one
            // (Unicode canonical decomposition, NFD, without combining marks: é → e, ë → e).
            let base: String = l.nfd().filter(|c| !is_combining_mark(*c)).collect();
            match known(&base).filter(|_| !base.is_empty() && base != *l) {
                Some(base_id) => {
                    *id = Some(base_id);
                    if !mapped.iter().any(|(from, _)| from == l) {
                        mapped.push((l.clone(), base));
                    }
                }
                None if !unseen.contains(l) => unseen.push(l.clone()),
                None => {}
            }
        }
        if !mapped.is_empty() {
            guess.warnings.push(GuessWarning::MappedLetters { letters: mapped });
        }
        if !unseen.is_empty() {
            guess.warnings.push(GuessWarning::UnseenLetters { letters: unseen });
        }
        let finals = self.search(&ids, &letters, opts);
        if finals.is_empty() {
            guess.warnings.push(GuessWarning::NoPronunciation);
        }
        guess.hypotheses = finals.into_iter().take(opts.nbest.max(1)).collect();
        let posteriors: Vec<f64> = guess.hypotheses.iter().map(|h| h.posterior).collect();
        for (h, score) in guess.hypotheses.iter_mut().zip(self.calibrated_nbest(&posteriors)) {
            h.score = score;
        }
        guess
    }

    /// Beam search over the letter ids (`None`: no graphone for that letter); returns complete
    /// hypotheses, best first.
    fn search(&self, ids: &[Option<u32>], letters: &[String], opts: &DecodeOptions) -> Vec<Hypothesis> {
        let n = ids.len();
        let order = self.ngram.order();
        let hist_len = order - 1;
        let end = self.inventory.len() as u32;
        let max_letters = self.inventory.max_letters().max(1);
        let mut nodes = vec![Node { parent: NONE, graphone: NONE, letter: NONE }];
        let mut columns: Vec<Column> = (0..=n).map(|_| Column::default()).collect();
        let start = start_history(order);
        columns[0].push(Partial { node: 0, history: start, context: self.ngram.context(&start[..hist_len]), parent_context: 0, score: 0.0, best: 0.0, phone_hash: 0, insertions: 0 });
        let mut finals: FastMap<u64, (f64, f64, u32)> = FastMap::default();
        let insertions = self.inventory.with_letters(&[]);
        let mut letter_ids: Vec<u32> = Vec::with_capacity(max_letters);
        let mut best_at = vec![f64::NEG_INFINITY; n + 1];
        let bound = |g: u32| f64::from(self.bounds.get(g as usize).copied().unwrap_or(0.0));
        for i in 0..=n {
            let mut column = std::mem::take(&mut columns[i]);
            column.prune(opts);
            // An insertion below the column's weakest kept item cannot enter the beam (scores
            // only rise when paths merge), so the floor is that item once the column is full.
            let full = column.items.len() >= opts.beam_width.max(1);
            let floor = (column.items[0].score - opts.log_beam).max(if full { column.items[column.items.len() - 1].score } else { f64::NEG_INFINITY });
            let mut k = 0;
            while k < column.items.len() {
                let p = column.items[k];
                k += 1;
                if p.insertions >= opts.max_insertions {
                    continue;
                }
                let ctx = self.context_of(&p, hist_len);
                column.items[k - 1].context = ctx;
                if p.score + f64::from(self.insertion_bounds[ctx as usize]) < floor {
                    continue;
                }
                for &g in insertions {
                    if p.score + bound(g) < floor {
                        break;
                    }
                    let lp = f64::from(self.ngram.log_prob(ctx, g));
                    if p.score + lp < floor {
                        continue;
                    }
                    let (node, hash) = self.extend(&mut nodes, &p, g, NONE);
                    column.push(Partial { node, history: push_history(&p.history, order, g), context: NONE, parent_context: ctx, score: p.score + lp, best: p.best + lp, phone_hash: hash, insertions: p.insertions + 1 });
                }
            }
            column.prune(opts);
            for p in &column.items {
                let ctx = self.context_of(p, hist_len);
                if i == n {
                    let lp = f64::from(self.ngram.log_prob(ctx, end));
                    let e = finals.entry(p.phone_hash).or_insert((f64::NEG_INFINITY, f64::NEG_INFINITY, p.node));
                    e.0 = log_add(e.0, p.score + lp);
                    if p.best + lp > e.1 {
                        e.1 = p.best + lp;
                        e.2 = p.node;
                    }
                    continue;
                }
                if ids[i].is_none() {
                    let node = nodes.len() as u32;
                    nodes.push(Node { parent: p.node, graphone: NONE, letter: i as u32 });
                    let lp = f64::from(UNSEEN_LETTER_LOG_PROB);
                    columns[i + 1].push(Partial { node, context: ctx, score: p.score + lp, best: p.best + lp, insertions: 0, ..*p });
                    continue;
                }
                for a in 1..=max_letters.min(n - i) {
                    letter_ids.clear();
                    for id in &ids[i..i + a] {
                        match id {
                            Some(id) => letter_ids.push(*id),
                            None => break,
                        }
                    }
                    if letter_ids.len() < a {
                        break;
                    }
                    for &g in self.inventory.with_letters(&letter_ids) {
                        let floor = best_at[i + a] - opts.log_beam;
                        if p.score + bound(g) < floor {
                            break;
                        }
                        let lp = f64::from(self.ngram.log_prob(ctx, g));
                        if p.score + lp < floor {
                            continue;
                        }
                        best_at[i + a] = best_at[i + a].max(p.score + lp);
                        let (node, hash) = self.extend(&mut nodes, p, g, i as u32);
                        columns[i + a].push(Partial { node, history: push_history(&p.history, order, g), context: NONE, parent_context: ctx, score: p.score + lp, best: p.best + lp, phone_hash: hash, insertions: 0 });
                    }
                }
            }
        }
        // Normalised relative to the best score in the linear domain: `best + ln(sum)` in log
        // space loses the sum next to a huge |best| (a model with log-probabilities near -1e37
        // gave every hypothesis posterior 1; found by the `model_file` fuzz target).
        let best = finals.values().fold(f64::NEG_INFINITY, |acc, f| acc.max(f.0));
        let sum: f64 = finals.values().map(|f| (f.0 - best).exp()).sum();
        let posterior = |score: f64| if sum > 0.0 { (score - best).exp() / sum } else { 0.0 };
        let mut out: Vec<Hypothesis> =
            finals.into_values().map(|(score, _, node)| self.backtrack(&nodes, letters, node, score, posterior(score))).collect();
        out.sort_by(|a, b| b.log_prob.total_cmp(&a.log_prob));
        out
    }

    /// The context id of a partial hypothesis' history (from its parent's, see
    /// `NgramModel::next_context`).
    #[inline]
    fn context_of(&self, p: &Partial, hist_len: usize) -> u32 {
        if p.context != NONE {
            p.context
        } else {
            self.ngram.next_context(p.parent_context, &p.history[..hist_len])
        }
    }

    fn extend(&self, nodes: &mut Vec<Node>, p: &Partial, g: u32, letter: u32) -> (u32, u64) {
        let node = nodes.len() as u32;
        nodes.push(Node { parent: p.node, graphone: g, letter });
        let phones = self.inventory.get(g).map_or(&[][..], |gr| gr.phones.as_slice());
        (node, phones.iter().fold(p.phone_hash, |h, &ph| extend_hash(h, ph)))
    }

    fn backtrack(&self, nodes: &[Node], letters: &[String], mut node: u32, score: f64, posterior: f64) -> Hypothesis {
        let mut pieces = Vec::new();
        while let Some(n) = nodes.get(node as usize).filter(|n| n.parent != NONE) {
            let (count, phones) = match self.inventory.get(n.graphone) {
                Some(g) => (g.letters.len(), g.phones.iter().map(|&p| self.phones.name(p).to_string()).collect()),
                None => (1, Vec::new()),
            };
            let start = n.letter as usize;
            let text = if count == 0 { String::new() } else { letters.get(start..start + count).map(|l| l.concat()).unwrap_or_default() };
            pieces.push(AlignedPiece { letters: text, phones });
            node = n.parent;
        }
        pieces.reverse();
        let phones = pieces.iter().flat_map(|p| p.phones.iter().cloned()).collect();
        Hypothesis { phones, log_prob: score, posterior, score: posterior, alignment: pieces }
    }
}
