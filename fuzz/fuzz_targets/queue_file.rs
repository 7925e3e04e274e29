//! Queue files (`Queue::parse`) on arbitrary bytes: it never panics, and a queue it accepts
//! writes bytes that read back to the same items, which write the same bytes.
#![no_main]

use std::path::Path;

use libfuzzer_sys::fuzz_target;
use orthoepy::queue::Queue;

fuzz_target!(|data: &[u8]| {
    let path = Path::new("fuzz-queue.jsonl");
    let Ok(queue) = Queue::parse(data, path) else { return };
    let bytes = match queue.to_bytes() {
        Ok(b) => b,
        Err(e) => panic!("a queue we read cannot be written: {e}"),
    };
    let again = match Queue::parse(&bytes, path) {
        Ok(q) => q,
        Err(e) => panic!("a queue we wrote does not read again: {e}\n{}", String::from_utf8_lossy(&bytes)),
    };
    assert_eq!(queue.items(), again.items());
    assert_eq!(again.to_bytes().ok(), Some(bytes));
    for item in queue.items() {
        assert!(queue.get(&item.key()).is_some(), "item {:?} not found by its key", item.key());
    }
});
