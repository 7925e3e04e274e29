//! The binary model file. Layout (all integers little-endian):
//!
//! | bytes | field |
//! |---|---|
//! | 8 | magic `b"OEPYG2P\x1a"` |
//! | 2 | format version (`u16`, currently 4; versions 1 to 3 are still read) |
//! | 8 | payload length (`u64`) |
//! | 4 | CRC-32 (IEEE) of the payload |
//! | … | payload |
//!
//! The payload holds, in order: phone-set id; letter unit, case folding and stress flags (one
//! byte each); the letter table; the phone table (strings are `u32` byte length + UTF-8); the
//! graphones (`u8` count + `u32` ids, letters then phones); the n-gram order (`u8`) and three
//! `f64` discounts per order (one per evidence class, see [`super::ngram::Discount`]; version 1
//! stored one, read as the same value for every class); the unigram table (`u32` count + `f32`
//! log-probabilities); the contexts (`u32` count; each: `u8` history length + `u32` symbols,
//! `f32` back-off, `u32` entry count + (`u32` symbol, `f32` log-probability) pairs); from version
//! 3 on, the score calibration (see [`super::calibration`]): a flag byte (0: none), then for the
//! top hypothesis and for the lower ranks a `u32` knot count + (`f64` posterior, `f64`
//! probability) knots; from version 4 on, the calibration of the hybrid guesser's rule-based
//! sources: a `u32` count of sources, each its name (string), `u32` held-out observations and a
//! map as above (`u32` knot count + `f64` pairs), names strictly increasing. Files of versions 1
//! and 2 read as models without a calibration, whose scores are their raw posteriors; files of
//! version 3 as models without source calibrations.
//!
//! Reading never panics and never allocates more than the bytes that remain justify: every
//! count is checked against the remaining length before anything is allocated. This module
//! owns only the encoding; validation of the meaning is delegated to the parts' constructors.

use std::path::{Path, PathBuf};

use super::calibration::{Calibration, IsotonicMap, SourceCalibration, SourceFit};
use super::graphone::{Graphone, Inventory, LetterUnit, SymbolOptions, SymbolTable};
use super::model::Model;
use super::ngram::{Discount, NgramError, NgramModel, StoredContext};
use crate::support::located::{origin_of, Located};
use crate::support::read::{read_capped, Limit, ReadError, MIB};

/// First bytes of every model file.
pub const MAGIC: [u8; 8] = *b"OEPYG2P\x1a";
/// Format version written by this build. It also reads [`OLDEST_READ_VERSION`] and later.
pub const FORMAT_VERSION: u16 = 4;
/// The oldest format version this build still reads.
pub const OLDEST_READ_VERSION: u16 = 1;
const HEADER_LEN: usize = 8 + 2 + 8 + 4;
/// The largest model file accepted. The demo model is 6 MiB; one trained on all of CMUdict at a
/// high order is some tens of MiB.
pub const MAX_MODEL_FILE: Limit = Limit { bytes: 1024 * MIB, what: "model file" };

/// Why a model file could not be read or written.
#[derive(Debug, thiserror::Error)]
pub enum ModelFileError {
    /// The file could not be read, or is larger than [`MAX_MODEL_FILE`].
    #[error(transparent)]
    Read(#[from] ReadError),
    /// The file could not be written.
    #[error("{}: cannot write the model: {reason}", path.display())]
    Write {
        /// The file.
        path: PathBuf,
        /// What the system said.
        reason: std::io::Error,
    },
    /// A problem with the contents of a named file. A model file is binary, so the place is a
    /// byte offset inside the message rather than a line and column.
    #[error("{0}")]
    InFile(Box<Located<ModelFileError>>),
    /// The bytes do not start with the model magic: not a model file of this program.
    #[error("not an orthoepy G2P model (wrong magic bytes); pass a file written by `orthoepy train`")]
    NotAModel,
    /// Written by another format version.
    #[error("model format version {found} is not supported (this build reads versions {oldest} to {newest}); retrain the model")]
    UnsupportedVersion {
        /// Version in the file.
        found: u16,
        /// Oldest version this build reads.
        oldest: u16,
        /// Newest version this build reads (the one it writes).
        newest: u16,
    },
    /// The file ends before the data it announces.
    #[error("model file is truncated at byte {offset}: {needed} more bytes expected; the file is incomplete, copy or train it again")]
    Truncated {
        /// Byte offset (from the start of the file) where data ran out.
        offset: usize,
        /// Bytes needed at that point.
        needed: usize,
    },
    /// The payload checksum does not match: the file was damaged.
    #[error("model file checksum mismatch (stored {stored:08x}, computed {computed:08x}); the file is corrupted, copy or train it again")]
    Checksum {
        /// CRC-32 stored in the header.
        stored: u32,
        /// CRC-32 of the payload as read.
        computed: u32,
    },
    /// The payload decodes but does not describe a valid model.
    #[error("invalid model data at byte {offset}: {reason}")]
    Invalid {
        /// Byte offset (from the start of the file) of the offending field.
        offset: usize,
        /// What is wrong.
        reason: String,
    },
}

struct Writer(Vec<u8>);

impl Writer {
    fn u8(&mut self, v: u8) {
        self.0.push(v);
    }
    fn u32(&mut self, v: u32) {
        self.0.extend_from_slice(&v.to_le_bytes());
    }
    fn len(&mut self, v: usize) {
        self.u32(v as u32);
    }
    fn f32(&mut self, v: f32) {
        self.0.extend_from_slice(&v.to_le_bytes());
    }
    fn f64(&mut self, v: f64) {
        self.0.extend_from_slice(&v.to_le_bytes());
    }
    fn str(&mut self, s: &str) {
        self.len(s.len());
        self.0.extend_from_slice(s.as_bytes());
    }
    fn ids(&mut self, ids: &[u32]) {
        self.u8(ids.len() as u8);
        ids.iter().for_each(|&i| self.u32(i));
    }
}

struct Reader<'a> {
    data: &'a [u8],
    pos: usize,
    base: usize,
}

type Read<T> = Result<T, ModelFileError>;

impl<'a> Reader<'a> {
    fn offset(&self) -> usize {
        self.base + self.pos
    }
    fn take(&mut self, n: usize) -> Read<&'a [u8]> {
        let remaining = self.data.len() - self.pos;
        if n > remaining {
            return Err(ModelFileError::Truncated { offset: self.offset(), needed: n - remaining });
        }
        let s = &self.data[self.pos..self.pos + n];
        self.pos += n;
        Ok(s)
    }
    fn array<const N: usize>(&mut self) -> Read<[u8; N]> {
        let mut out = [0u8; N];
        out.copy_from_slice(self.take(N)?);
        Ok(out)
    }
    fn u8(&mut self) -> Read<u8> {
        Ok(self.array::<1>()?[0])
    }
    fn u32(&mut self) -> Read<u32> {
        Ok(u32::from_le_bytes(self.array()?))
    }
    fn f32(&mut self) -> Read<f32> {
        Ok(f32::from_le_bytes(self.array()?))
    }
    fn f64(&mut self) -> Read<f64> {
        Ok(f64::from_le_bytes(self.array()?))
    }
    /// Reads a count of items each at least `min_size` bytes long, checked against the rest.
    fn count(&mut self, min_size: usize) -> Read<usize> {
        let n = self.u32()? as usize;
        let remaining = self.data.len() - self.pos;
        if n.saturating_mul(min_size) > remaining {
            return Err(ModelFileError::Truncated { offset: self.offset(), needed: n.saturating_mul(min_size) - remaining });
        }
        Ok(n)
    }
    fn str(&mut self) -> Read<String> {
        let n = self.count(1)?;
        let at = self.offset();
        let bytes = self.take(n)?;
        String::from_utf8(bytes.to_vec()).map_err(|_| invalid(at, "string is not UTF-8"))
    }
    fn ids(&mut self) -> Read<Vec<u32>> {
        let n = self.u8()? as usize;
        (0..n).map(|_| self.u32()).collect()
    }
    fn flag(&mut self) -> Read<bool> {
        let at = self.offset();
        match self.u8()? {
            0 => Ok(false),
            1 => Ok(true),
            _ => Err(invalid(at, "flag byte must be 0 or 1")),
        }
    }
}

fn invalid(offset: usize, reason: &str) -> ModelFileError {
    ModelFileError::Invalid { offset, reason: reason.to_string() }
}

impl Model {
    /// Encodes the model in the binary model format (see the module docs of `model_file`).
    pub fn to_bytes(&self) -> Vec<u8> {
        let mut w = Writer(Vec::new());
        w.str(&self.phoneset_id);
        w.u8(match self.symbols.letter_unit {
            LetterUnit::CodePoint => 0,
            LetterUnit::GraphemeCluster => 1,
        });
        w.u8(u8::from(self.symbols.lowercase));
        w.u8(u8::from(self.symbols.strip_stress));
        for table in [&self.letters, &self.phones] {
            w.len(table.len());
            table.names().iter().for_each(|n| w.str(n));
        }
        w.len(self.inventory.len());
        for g in self.inventory.graphones() {
            w.ids(&g.letters);
            w.ids(&g.phones);
        }
        w.u8(self.ngram.order() as u8);
        self.ngram.discounts().iter().flat_map(|d| d.0).for_each(|d| w.f64(d));
        w.len(self.ngram.unigram().len());
        self.ngram.unigram().iter().for_each(|&p| w.f32(p));
        w.len(self.ngram.contexts().len());
        for c in self.ngram.contexts() {
            w.ids(&c.history);
            w.f32(c.backoff);
            w.len(c.entries.len());
            for &(s, lp) in &c.entries {
                w.u32(s);
                w.f32(lp);
            }
        }
        w.u8(u8::from(self.calibration.is_some()));
        let write_map = |w: &mut Writer, map: &IsotonicMap| {
            w.len(map.knots().len());
            map.knots().iter().for_each(|&(x, y)| {
                w.f64(x);
                w.f64(y);
            });
        };
        for map in self.calibration.iter().flat_map(|c| [&c.top, &c.rest]) {
            write_map(&mut w, map);
        }
        let fits = self.sources.as_ref().map_or(&[][..], |s| s.fits());
        w.len(fits.len());
        for fit in fits {
            w.str(&fit.source);
            w.u32(fit.observations);
            write_map(&mut w, &fit.map);
        }
        let payload = w.0;
        let mut out = Vec::with_capacity(HEADER_LEN + payload.len());
        out.extend_from_slice(&MAGIC);
        out.extend_from_slice(&FORMAT_VERSION.to_le_bytes());
        out.extend_from_slice(&(payload.len() as u64).to_le_bytes());
        out.extend_from_slice(&crc32fast::hash(&payload).to_le_bytes());
        out.extend_from_slice(&payload);
        out
    }

    /// Decodes a model from bytes written by [`Model::to_bytes`].
    ///
    /// ```
    /// use orthoepy::g2p::{Model, ModelFileError};
    /// assert!(matches!(Model::from_bytes(b"not a model at all, sorry"), Err(ModelFileError::NotAModel)));
    /// ```
    pub fn from_bytes(bytes: &[u8]) -> Result<Model, ModelFileError> {
        let mut header = Reader { data: bytes, pos: 0, base: 0 };
        let magic_len = MAGIC.len().min(bytes.len());
        if bytes[..magic_len] != MAGIC[..magic_len] || bytes.len() < MAGIC.len() {
            return Err(ModelFileError::NotAModel);
        }
        header.take(MAGIC.len())?;
        let version = u16::from_le_bytes(header.array()?);
        if !(OLDEST_READ_VERSION..=FORMAT_VERSION).contains(&version) {
            return Err(ModelFileError::UnsupportedVersion { found: version, oldest: OLDEST_READ_VERSION, newest: FORMAT_VERSION });
        }
        let length = u64::from_le_bytes(header.array()?);
        let stored = header.u32()?;
        let rest = bytes.len() - HEADER_LEN;
        if length > rest as u64 {
            return Err(ModelFileError::Truncated { offset: bytes.len(), needed: (length - rest as u64) as usize });
        }
        if length < rest as u64 {
            return Err(invalid(HEADER_LEN + length as usize, "extra bytes after the payload"));
        }
        let payload = &bytes[HEADER_LEN..];
        let computed = crc32fast::hash(payload);
        if computed != stored {
            return Err(ModelFileError::Checksum { stored, computed });
        }
        decode_payload(&mut Reader { data: payload, pos: 0, base: HEADER_LEN }, version)
    }

    /// Writes the model to `path` atomically (temporary file in the same folder, fsync, rename;
    /// see [`crate::safe_io::atomic_write`]), so an interrupted save leaves the old file whole.
    pub fn save(&self, path: &Path) -> Result<(), ModelFileError> {
        crate::safe_io::atomic_write(path, &self.to_bytes(), false).map_err(|reason| ModelFileError::Write { path: path.to_path_buf(), reason })
    }

    /// Reads a model file.
    pub fn load(path: &Path) -> Result<Model, ModelFileError> {
        let bytes = read_capped(path, MAX_MODEL_FILE)?;
        Model::from_bytes(&bytes).map_err(|e| ModelFileError::InFile(Box::new(Located::new(origin_of(path), None, e))))
    }
}

fn decode_payload(r: &mut Reader<'_>, version: u16) -> Result<Model, ModelFileError> {
    let phoneset_id = r.str()?;
    let at = r.offset();
    let letter_unit = match r.u8()? {
        0 => LetterUnit::CodePoint,
        1 => LetterUnit::GraphemeCluster,
        _ => return Err(invalid(at, "unknown letter unit")),
    };
    let symbols = SymbolOptions { letter_unit, lowercase: r.flag()?, strip_stress: r.flag()? };
    let mut tables = Vec::new();
    for what in ["letter", "phone"] {
        let at = r.offset();
        let n = r.count(4)?;
        let names = (0..n).map(|_| r.str()).collect::<Read<Vec<String>>>()?;
        tables.push(SymbolTable::from_names(names).ok_or_else(|| invalid(at, &format!("{what} table has a repeated symbol"))))
    }
    let phones = tables.pop().ok_or_else(|| invalid(at, "missing phone table"))??;
    let letters = tables.pop().ok_or_else(|| invalid(at, "missing letter table"))??;
    let at = r.offset();
    let n = r.count(2)?;
    let graphones = (0..n).map(|_| Ok(Graphone { letters: r.ids()?, phones: r.ids()? })).collect::<Read<Vec<Graphone>>>()?;
    if graphones.iter().any(|g| g.letters.iter().any(|&l| l as usize >= letters.len()) || g.phones.iter().any(|&p| p as usize >= phones.len())) {
        return Err(invalid(at, "graphone refers to an unknown letter or phone"));
    }
    let inventory = Inventory::from_graphones(graphones).ok_or_else(|| invalid(at, "graphone inventory has an empty, oversized or repeated graphone"))?;
    let at = r.offset();
    let order = r.u8()? as usize;
    let discount = |r: &mut Reader<'_>| -> Read<Discount> {
        if version == 1 {
            return Ok(Discount::flat(r.f64()?));
        }
        Ok(Discount([r.f64()?, r.f64()?, r.f64()?]))
    };
    let discounts = (0..order).map(|_| discount(r)).collect::<Read<Vec<Discount>>>()?;
    let n = r.count(4)?;
    let unigram = (0..n).map(|_| r.f32()).collect::<Read<Vec<f32>>>()?;
    if unigram.len() != inventory.len() + 1 {
        return Err(invalid(at, "unigram table size does not match the graphone inventory"));
    }
    let n = r.count(9)?;
    let mut contexts = Vec::with_capacity(n);
    for _ in 0..n {
        let history = r.ids()?;
        let backoff = r.f32()?;
        let m = r.count(8)?;
        let entries = (0..m).map(|_| Ok((r.u32()?, r.f32()?))).collect::<Read<Vec<(u32, f32)>>>()?;
        contexts.push(StoredContext { history, backoff, entries });
    }
    let ngram = NgramModel::from_parts(order, discounts, unigram, contexts).map_err(|e: NgramError| invalid(at, &e.to_string()))?;
    let calibration = if version >= 3 && r.flag()? { Some(read_calibration(r)?) } else { None };
    let sources = if version >= 4 { read_sources(r)? } else { None };
    if r.pos != r.data.len() {
        return Err(invalid(r.offset(), "extra bytes after the model"));
    }
    let mut model = Model::new(symbols, phoneset_id, letters, phones, inventory, ngram);
    model.calibration = calibration;
    model.sources = sources;
    Ok(model)
}

fn read_map(r: &mut Reader<'_>) -> Read<IsotonicMap> {
    let at = r.offset();
    let n = r.count(16)?;
    let knots = (0..n).map(|_| Ok((r.f64()?, r.f64()?))).collect::<Read<Vec<(f64, f64)>>>()?;
    IsotonicMap::from_knots(knots).ok_or_else(|| invalid(at, "calibration knots must be in 0..=1, increasing, and at least one"))
}

fn read_calibration(r: &mut Reader<'_>) -> Read<Calibration> {
    Ok(Calibration { top: read_map(r)?, rest: read_map(r)? })
}

/// The source calibrations; none stored reads as `None`.
fn read_sources(r: &mut Reader<'_>) -> Read<Option<SourceCalibration>> {
    let at = r.offset();
    // Each source: a name's length, the observations, a knot count: at least 12 bytes.
    let n = r.count(12)?;
    let fits = (0..n).map(|_| Ok(SourceFit { source: r.str()?, observations: r.u32()?, map: read_map(r)? })).collect::<Read<Vec<SourceFit>>>()?;
    if fits.is_empty() {
        return Ok(None);
    }
    SourceCalibration::from_fits(fits).map(Some).ok_or_else(|| invalid(at, "source calibrations must be named in increasing order"))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn extreme_log_probabilities_still_give_posteriors_summing_to_at_most_one() {
        // Found by the `model_file` fuzz target: a file with log-probabilities near -1e37 gave
        // three hypotheses with posterior 1 each; the decoder now normalises in the linear
        // domain relative to the best score.
        let bytes = include_bytes!("../../fuzz/regressions/model_file/posteriors-sum-to-3.g2p");
        let model = Model::from_bytes(bytes).unwrap();
        let guess = model.guess("harbour", 3);
        assert_eq!(guess.hypotheses.len(), 3);
        let total: f64 = guess.hypotheses.iter().map(|h| h.posterior).sum();
        assert!(total <= 1.0 + 1e-9, "{total}");
    }

    #[test]
    fn the_format_1_fixture_still_loads() {
        assert!(Model::from_bytes(include_bytes!("../../tests/fixtures/g2p-model-format-1.g2p")).is_ok());
    }
}
