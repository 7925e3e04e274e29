//! The key list: one table that the `?` overlay draws and the README's KEYS section repeats
//! (a test keeps the two in step).

/// `(keys, what they do)` for the normal screen, in the order the help overlay shows them.
pub const KEYS: &[(&str, &str)] = &[
    ("↑/↓  k/j", "move among candidates"),
    ("1–9", "pick candidate N"),
    ("Enter", "accept the selected candidate"),
    ("e", "edit it in the phone editor (Tab completes, Esc cancels)"),
    ("x", "reject the item"),
    ("A / X", "accept / reject every shown pending item by score (type the threshold; asks first)"),
    ("s", "set the item aside"),
    ("m", "note for this item's next decision (Enter keeps, Esc cancels)"),
    ("n / p", "next / previous item"),
    ("u", "undo the last decision"),
    ("Ctrl-r", "redo"),
    ("/", "search the lexicon (Tab: exact, prefix, fuzzy; ↑/↓ pick; Esc)"),
    ("Enter in /", "open the result: its queue item, else the lexicon entry"),
    ("c v d", "on an entry: change it, add a variant, deprecate it"),
    ("y", "yes to a question (replace a decision, deprecate an entry)"),
    ("f", "filter the queue (source= origin= kind= score< score> state=)"),
    ("i", "pronunciations in IPA or in the phoneset's symbols"),
    ("?", "this help (any key closes)"),
    ("q  Ctrl-c", "quit (every decision is already saved)"),
];
