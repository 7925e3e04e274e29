//! The model file refuses truncated, corrupted, foreign and future files with a clear error
//! (never a panic), and round-trips a trained model exactly.

use orthoepy::g2p::{train, Model, ModelFileError, TrainOptions, FORMAT_VERSION, MAGIC};

fn small_model() -> Model {
    // Invented mini-lexicon (demo scenario: a coastal rail-and-ferry operator).
    let data: Vec<(String, Vec<String>)> = [("ferry", "F EH1 R IY0"), ("pier", "P IH1 R"), ("quay", "K IY1"), ("rail", "R EY1 L"), ("tide", "T AY1 D"), ("deck", "D EH1 K")]
        .iter()
        .map(|(w, p)| (w.to_string(), p.split(' ').map(String::from).collect()))
        .collect();
    let opts = TrainOptions { order: 2, heldout_percent: 0, phoneset_id: "en-arpa".into(), ..TrainOptions::default() };
    train(&data, &opts, &mut |_| {}).expect("training runs")
}

#[test]
fn round_trip_keeps_every_guess() {
    let model = small_model();
    let bytes = model.to_bytes();
    assert_eq!(&bytes[..8], &MAGIC);
    let back = Model::from_bytes(&bytes).expect("own file reads back");
    assert_eq!(back.to_bytes(), bytes);
    assert_eq!(back.phoneset_id(), "en-arpa");
    for w in ["ferry", "pieray", "tidedeck"] {
        assert_eq!(model.guess(w, 3), back.guess(w, 3));
    }
}

#[test]
fn every_truncation_is_an_error() {
    let bytes = small_model().to_bytes();
    for len in 0..bytes.len() {
        let err = Model::from_bytes(&bytes[..len]).expect_err("a truncated file is refused");
        assert!(matches!(err, ModelFileError::Truncated { .. } | ModelFileError::NotAModel), "length {len}: {err}");
    }
}

#[test]
fn flipped_payload_byte_fails_the_checksum() {
    let mut bytes = small_model().to_bytes();
    let last = bytes.len() - 1;
    bytes[last] ^= 0x40;
    assert!(matches!(Model::from_bytes(&bytes), Err(ModelFileError::Checksum { .. })));
}

#[test]
fn foreign_and_future_files_are_named_as_such() {
    assert!(matches!(Model::from_bytes(b"word,pronunciation\nquay,K IY1\n"), Err(ModelFileError::NotAModel)));
    let mut bytes = small_model().to_bytes();
    bytes[8..10].copy_from_slice(&(FORMAT_VERSION + 1).to_le_bytes());
    assert!(matches!(Model::from_bytes(&bytes), Err(ModelFileError::UnsupportedVersion { .. })));
}

/// A payload with a valid checksum but an absurd count must be refused before allocating.
#[test]
fn huge_counts_with_valid_checksum_do_not_allocate() {
    let mut payload = Vec::new();
    payload.extend_from_slice(&0u32.to_le_bytes()); // empty phoneset id
    payload.extend_from_slice(&[0, 1, 0]); // flags
    payload.extend_from_slice(&u32::MAX.to_le_bytes()); // 4 billion letters announced
    let mut bytes = MAGIC.to_vec();
    bytes.extend_from_slice(&FORMAT_VERSION.to_le_bytes());
    bytes.extend_from_slice(&(payload.len() as u64).to_le_bytes());
    bytes.extend_from_slice(&crc32fast::hash(&payload).to_le_bytes());
    bytes.extend_from_slice(&payload);
    assert!(matches!(Model::from_bytes(&bytes), Err(ModelFileError::Truncated { .. })));
}

#[test]
fn every_single_byte_corruption_is_refused_or_harmless() {
    // Corrupt each payload byte and fix the checksum, so decoding itself is exercised.
    let bytes = small_model().to_bytes();
    for at in 22..bytes.len() {
        let mut b = bytes.clone();
        b[at] = b[at].wrapping_add(0x81);
        let crc = crc32fast::hash(&b[22..]);
        b[18..22].copy_from_slice(&crc.to_le_bytes());
        if let Ok(model) = Model::from_bytes(&b) {
            let _ = model.guess("ferry", 2); // a model that decodes must also guess without panicking
        }
    }
}

#[test]
fn missing_file_names_the_path() {
    let err = Model::load(std::path::Path::new("/nonexistent/harbour.g2p")).expect_err("missing");
    assert!(err.to_string().contains("harbour.g2p"), "{err}");
}

#[test]
fn format_version_1_files_still_read() {
    // Written by the build before modified Kneser–Ney (one discount per order): trained with
    // `orthoepy train --order 2` on the six words of `small_model` (invented demo words).
    let bytes = std::fs::read(concat!(env!("CARGO_MANIFEST_DIR"), "/tests/fixtures/g2p-model-format-1.g2p")).expect("fixture present");
    assert_eq!(u16::from_le_bytes([bytes[8], bytes[9]]), 1);
    let model = Model::from_bytes(&bytes).expect("version 1 reads");
    let best = &model.guess("ferry", 1).hypotheses[0];
    assert_eq!(best.phones, ["F", "EH1", "R", "IY0"]);
    assert_eq!(&model.to_bytes()[8..10], &FORMAT_VERSION.to_le_bytes(), "saving writes the current version");
}

#[test]
fn format_version_3_files_read_without_source_calibrations() {
    // Format 4 appended the source calibrations to format 3's payload, so this fixture is a
    // model trained with held-out words (`train --order 2 --heldout-percent 50` on twelve
    // invented demo words) whose payload ends before that section: version 3 with a posterior
    // calibration, as the demo model (demo-lexicon/model.g2p) was written until 2026-12-04.
    let bytes = std::fs::read(concat!(env!("CARGO_MANIFEST_DIR"), "/tests/fixtures/g2p-model-format-3.g2p")).expect("fixture present");
    assert_eq!(u16::from_le_bytes([bytes[8], bytes[9]]), 3);
    let model = Model::from_bytes(&bytes).expect("version 3 reads");
    assert!(model.calibration().is_some());
    assert!(model.source_calibration().is_none());
    let again = Model::from_bytes(&model.to_bytes()).expect("written in the current format and read back");
    assert_eq!(&model.to_bytes()[8..10], &FORMAT_VERSION.to_le_bytes());
    assert_eq!(again.guess("ferry", 3), model.guess("ferry", 3));
}
