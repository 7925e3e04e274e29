//! G2P model files (`Model::from_bytes`) on arbitrary bytes: it never panics, and a model it
//! accepts writes bytes that read back to a model writing the same bytes, and can guess.
#![no_main]

use libfuzzer_sys::fuzz_target;
use orthoepy::g2p::Model;

fuzz_target!(|data: &[u8]| {
    let Ok(model) = Model::from_bytes(data) else { return };
    let bytes = model.to_bytes();
    let again = match Model::from_bytes(&bytes) {
        Ok(m) => m,
        Err(e) => panic!("a model we wrote does not read again: {e}"),
    };
    assert!(again.to_bytes() == bytes, "model bytes changed on a second pass");
    assert_eq!(model.order(), again.order());
    assert_eq!(model.phoneset_id(), again.phoneset_id());
    for word in ["harbour", "a", "", "ŋ"] {
        let guess = model.guess(word, 3);
        assert!(guess.hypotheses.len() <= 3);
        let total: f64 = guess.hypotheses.iter().map(|h| h.posterior).sum();
        assert!(total <= 1.0 + 1e-6, "posteriors sum to {total}");
    }
});
