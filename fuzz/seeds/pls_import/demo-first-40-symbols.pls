<?xml version="1.0" encoding="UTF-8"?>
<lexicon version="1.0" xmlns="http://www.w3.org/2005/01/pronunciation-lexicon" alphabet="x-orthoepy-en-arpa" xml:lang="en-US">
  <lexeme><grapheme>a</grapheme><phoneme>AH0</phoneme><phoneme>EY1</phoneme></lexeme>
  <lexeme><grapheme>about</grapheme><phoneme>AH0 B AW1 T</phoneme></lexeme>
  <lexeme><grapheme>access</grapheme><phoneme>AE1 K S EH2 S</phoneme></lexeme>
  <lexeme><grapheme>adult</grapheme><phoneme>AH0 D AH1 L T</phoneme><phoneme>AE1 D AH0 L T</phoneme></lexeme>
  <lexeme><grapheme>adults</grapheme><phoneme>AH0 D AH1 L T S</phoneme><phoneme>AE1 D AH0 L T S</phoneme></lexeme>
  <lexeme><grapheme>after</grapheme><phoneme>AE1 F T ER0</phoneme></lexeme>
  <lexeme><grapheme>afternoon</grapheme><phoneme>AE2 F T ER0 N UW1 N</phoneme></lexeme>
  <lexeme><grapheme>again</grapheme><phoneme>AH0 G EH1 N</phoneme><phoneme>AH0 G EY1 N</phoneme></lexeme>
  <lexeme><grapheme>all</grapheme><phoneme>AO1 L</phoneme></lexeme>
  <lexeme><grapheme>also</grapheme><phoneme>AO1 L S OW0</phoneme></lexeme>
  <lexeme><grapheme>am</grapheme><phoneme>AE1 M</phoneme><phoneme>EY1 EH1 M</phoneme></lexeme>
  <lexeme><grapheme>an</grapheme><phoneme>AE1 N</phoneme><phoneme>AH0 N</phoneme></lexeme>
  <lexeme><grapheme>and</grapheme><phoneme>AH0 N D</phoneme><phoneme>AE1 N D</phoneme></lexeme>
  <lexeme><grapheme>annual</grapheme><phoneme>AE1 N Y UW0 AH0 L</phoneme></lexeme>
  <lexeme><grapheme>any</grapheme><phoneme>EH1 N IY0</phoneme></lexeme>
  <lexeme><grapheme>app</grapheme><phoneme>AE1 P</phoneme></lexeme>
  <lexeme><grapheme>are</grapheme><phoneme>AA1 R</phoneme><phoneme>ER0</phoneme></lexeme>
  <lexeme><grapheme>arrival</grapheme><phoneme>ER0 AY1 V AH0 L</phoneme></lexeme>
  <lexeme><grapheme>arrive</grapheme><phoneme>ER0 AY1 V</phoneme></lexeme>
  <lexeme><grapheme>arrives</grapheme><phoneme>ER0 AY1 V Z</phoneme></lexeme>
  <lexeme><grapheme>assistance</grapheme><phoneme>AH0 S IH1 S T AH0 N S</phoneme></lexeme>
  <lexeme><grapheme>at</grapheme><phoneme>AE1 T</phoneme></lexeme>
  <lexeme><grapheme>available</grapheme><phoneme>AH0 V EY1 L AH0 B AH0 L</phoneme></lexeme>
  <lexeme><grapheme>back</grapheme><phoneme>B AE1 K</phoneme></lexeme>
  <lexeme><grapheme>bag</grapheme><phoneme>B AE1 G</phoneme></lexeme>
  <lexeme><grapheme>bags</grapheme><phoneme>B AE1 G Z</phoneme></lexeme>
  <lexeme><grapheme>bay</grapheme><phoneme>B EY1</phoneme></lexeme>
  <lexeme><grapheme>be</grapheme><phoneme>B IY1</phoneme><phoneme>B IY0</phoneme></lexeme>
  <lexeme><grapheme>beach</grapheme><phoneme>B IY1 CH</phoneme></lexeme>
  <lexeme><grapheme>before</grapheme><phoneme>B IH0 F AO1 R</phoneme></lexeme>
</lexicon>
