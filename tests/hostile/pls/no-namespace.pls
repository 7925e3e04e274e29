<?xml version="1.0" encoding="UTF-8"?>
<lexicon version="1.0" alphabet="ipa" xml:lang="en-US">
<lexeme><grapheme>quay</grapheme><phoneme>ˈki</phoneme></lexeme>
</lexicon>
