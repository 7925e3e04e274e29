//! Plain-text lexicon import (`read_plain`) on arbitrary bytes: it never panics, every line is
//! accounted for (an entry or a rejection, never both), and the build lexicon written from what
//! it read reads back, with no line rejected, to entries that write the same build lexicon (also
//! in the layout with a probability column).
#![no_main]

use libfuzzer_sys::fuzz_target;
use orthoepy::lexicon::plain::{read_plain, write_plain, PlainExport};
use orthoepy::lexicon::HeadwordPolicy;

fuzz_target!(|data: &[u8]| {
    let import = read_plain(data, "fuzz", "fuzz");
    assert_eq!(import.entries.len() + import.rejected.len(), import.content_lines);
    for e in &import.entries {
        assert!(!e.word.is_empty(), "empty headword from line {}", e.line);
        assert!(e.phones().next().is_some(), "no phones from line {}", e.line);
    }
    let policy = HeadwordPolicy::default();
    for options in [
        PlainExport::default(),
        PlainExport { strip_stress: true, ..PlainExport::default() },
        PlainExport { variant_suffix: true, ..PlainExport::default() },
        PlainExport { probability: true, ..PlainExport::default() },
    ] {
        let first = write_plain(&import.entries, &policy, &options);
        let again = read_plain(first.text.as_bytes(), "fuzz", "fuzz");
        assert!(again.rejected.is_empty(), "the written build lexicon has lines it cannot read ({options:?}): {:?}", again.rejected);
        assert_eq!(again.entries.len(), first.lines, "{options:?}");
        // The second pass does not strip again: a token such as `A11` is the symbol `A1` with a
        // stress mark, and its stripped form `A1` is a symbol of its own (the writer does not
        // validate phones). What must hold is that the written text reads back to itself.
        let second = write_plain(&again.entries, &policy, &PlainExport { strip_stress: false, ..options.clone() });
        assert_eq!(first, second, "build lexicon changed on a second pass ({options:?})");
    }
});
