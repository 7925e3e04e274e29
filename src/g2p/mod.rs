//! Grapheme-to-phoneme conversion with joint-sequence models (Bisani & Ney, "Joint-sequence
//! models for grapheme-to-phoneme conversion", Speech Communication 50(5), 2008): graphones,
//! EM training over all segmentations, a smoothed graphone n-gram model, N-best decoding with
//! posteriors and alignments, and the binary model file. Letter-to-sound rules and the hybrid
//! guesser live in their own submodules. Nothing here prints; training reports through a callback.

mod calibration;
mod decode;
mod em;
mod graphone;
pub mod hybrid;
pub mod lts;
mod model;
mod model_file;
mod ngram;
mod train;

pub use calibration::{
    reliability, Calibration, IsotonicMap, Reliability, ReliabilityBin, SourceCalibration, SourceFit, MIN_MODEL_OBSERVATIONS, MIN_SOURCE_OBSERVATIONS, RELIABILITY_BINS,
};
pub use decode::{AlignedPiece, DecodeOptions, Guess, GuessWarning, Hypothesis};
pub use em::LatticeBeam;
pub use graphone::{strip_stress, LetterUnit, SymbolOptions, MAX_UNIT};
pub use model::Model;
pub use model_file::{ModelFileError, FORMAT_VERSION, MAGIC, MAX_MODEL_FILE};
pub use ngram::{Count, Discount, DISCOUNT_CLASSES, MAX_ORDER};
pub use train::{train, train_with_sources, training_pairs, RuleSources, TrainError, TrainOptions, TrainProgress};
