//! The trained joint-sequence model as one value: symbol tables, graphone inventory, n-gram
//! model and the normalisation options it was trained with. Training lives in `train`,
//! decoding in `decode`, the file format in `model_file`; this module only holds the parts
//! together and answers questions about them.

use super::calibration::{Calibration, SourceCalibration};
use super::graphone::{Inventory, SymbolOptions, SymbolTable};
use super::ngram::NgramModel;

/// A trained grapheme-to-phoneme model (see [`crate::g2p`] for the method).
#[derive(Clone, Debug)]
pub struct Model {
    pub(crate) symbols: SymbolOptions,
    pub(crate) phoneset_id: String,
    pub(crate) letters: SymbolTable,
    pub(crate) phones: SymbolTable,
    pub(crate) inventory: Inventory,
    pub(crate) ngram: NgramModel,
    /// Per graphone: upper bound of its log-probability in any context (see
    /// [`NgramModel::upper_bounds`]); kept in step with `ngram` by [`Model::set_ngram`].
    pub(crate) bounds: Vec<f32>,
    /// Per context id: upper bound of the log-probability of any phone insertion (graphone
    /// without letters) there (see [`NgramModel::group_bounds`]); kept in step with `ngram`.
    pub(crate) insertion_bounds: Vec<f32>,
    /// Map from N-best posterior to the probability of being right, fitted on the words held
    /// out at training time (`None` for models trained without held-out words or read from
    /// files older than format 3).
    pub(crate) calibration: Option<Calibration>,
    /// Calibration of the hybrid guesser's rule-based sources, fitted on the same held-out
    /// words (`None` when training had no language configuration, or for files older than
    /// format 4).
    pub(crate) sources: Option<SourceCalibration>,
}

impl Model {
    /// Assembles a model and its decoding caches.
    pub(crate) fn new(symbols: SymbolOptions, phoneset_id: String, letters: SymbolTable, phones: SymbolTable, inventory: Inventory, ngram: NgramModel) -> Model {
        let mut model = Model { symbols, phoneset_id, letters, phones, inventory, ngram: NgramModel::uniform(1), bounds: Vec::new(), insertion_bounds: Vec::new(), calibration: None, sources: None };
        model.set_ngram(ngram);
        model
    }

    /// Replaces the n-gram model and refreshes the decoding caches.
    pub(crate) fn set_ngram(&mut self, ngram: NgramModel) {
        self.bounds = ngram.upper_bounds();
        self.inventory.sort_candidates(&self.bounds);
        self.insertion_bounds = ngram.group_bounds(self.inventory.with_letters(&[]));
        self.ngram = ngram;
    }

    /// The calibration of the model's scores, if it carries one.
    pub fn calibration(&self) -> Option<&Calibration> {
        self.calibration.as_ref()
    }

    /// The calibration of the hybrid guesser's rule-based sources, if the model carries one.
    pub fn source_calibration(&self) -> Option<&SourceCalibration> {
        self.sources.as_ref()
    }

    /// The probabilities that the hypotheses of one N-best list (`posteriors`, best first) are
    /// right (stress as written): [`Calibration::apply_nbest`] when the model carries a
    /// calibration, else the posteriors themselves.
    pub fn calibrated_nbest(&self, posteriors: &[f64]) -> Vec<f64> {
        self.calibration.as_ref().map_or_else(|| posteriors.to_vec(), |c| c.apply_nbest(posteriors))
    }

    /// Identifier of the phone set the pronunciations were written in (e.g. `en-arpa`).
    pub fn phoneset_id(&self) -> &str {
        &self.phoneset_id
    }

    /// How spellings and phones are normalised (letter unit, case folding, stress).
    pub fn symbol_options(&self) -> SymbolOptions {
        self.symbols
    }

    /// Order of the graphone n-gram model.
    pub fn order(&self) -> usize {
        self.ngram.order()
    }

    /// Number of graphones in the inventory.
    pub fn graphone_count(&self) -> usize {
        self.inventory.len()
    }

    /// Number of explicit n-grams of order two and above.
    pub fn ngram_count(&self) -> usize {
        self.ngram.explicit_ngrams()
    }

    /// Longest letter part and longest phone part of a graphone.
    pub fn graphone_limits(&self) -> (usize, usize) {
        (self.inventory.max_letters(), self.inventory.max_phones())
    }

    /// The graphone inventory rendered as `(letters, phones)` strings, in id order.
    pub fn graphones(&self) -> Vec<(String, Vec<String>)> {
        self.inventory
            .graphones()
            .iter()
            .map(|g| {
                let letters = g.letters.iter().map(|&l| self.letters.name(l)).collect();
                let phones = g.phones.iter().map(|&p| self.phones.name(p).to_string()).collect();
                (letters, phones)
            })
            .collect()
    }
}
