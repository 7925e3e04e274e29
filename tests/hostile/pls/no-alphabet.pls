<?xml version="1.0" encoding="UTF-8"?>
<lexicon version="1.0" xmlns="http://www.w3.org/2005/01/pronunciation-lexicon" xml:lang="en-US">
<lexeme><grapheme>quay</grapheme><phoneme>ˈki</phoneme></lexeme>
</lexicon>
