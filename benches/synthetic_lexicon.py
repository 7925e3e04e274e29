"""Writes a deterministic synthetic lexicon in the plain `word PH PH ...` layout for scale tests.

usage: python3 benches/synthetic_lexicon.py OUT.dict [ENTRIES]      (default 2,000,000 entries)

Headwords are pseudo-words of 3-14 letters drawn by a linear congruential generator (the
constants of the ANSI C `rand`); a word drawn again is skipped, so headwords are unique;
about one word in eight gets a second pronunciation, written `word(2)` as CMUdict does. Each
pronunciation is spelled out letter by letter through a fixed letter-to-phone table (ARPAbet
symbols of the shipped en-arpa phoneset), the first vowel with primary stress and the others
unstressed, so every line is well formed. The same arguments always give the same bytes.
"""
import sys

PHONES = {
    "a": "AE", "b": "B", "c": "K", "d": "D", "e": "EH", "f": "F", "g": "G", "h": "HH", "i": "IH",
    "j": "JH", "k": "K", "l": "L", "m": "M", "n": "N", "o": "AA", "p": "P", "q": "K", "r": "R",
    "s": "S", "t": "T", "u": "AH", "v": "V", "w": "W", "x": "K S", "y": "Y", "z": "Z",
}
VOWELS = {"AE", "EH", "IH", "AA", "AH"}
LETTERS = "etaoinshrdlucmfwypvbgkjqxz"  # English letter frequency order: drawn with a skew


class Lcg:
    def __init__(self, seed):
        self.state = seed

    def next(self):
        self.state = (self.state * 1103515245 + 12345) % 2**31
        return self.state >> 8


def pronounce(word, variant):
    phones, stressed = [], False
    for letter in word:
        for phone in PHONES[letter].split():
            if phone in VOWELS:
                mark = "0" if stressed else "1"
                stressed = True
                if variant and mark == "0":
                    phone = "AH"
                phone += mark
            phones.append(phone)
    return " ".join(phones)


def main():
    out = sys.argv[1]
    total = int(sys.argv[2]) if len(sys.argv) > 2 else 2_000_000
    rng = Lcg(20261202)
    seen = set()
    lines = []
    while len(lines) < total:
        length = 3 + rng.next() % 12
        word = "".join(LETTERS[min(rng.next() % 26, rng.next() % 26)] for _ in range(length))
        if word in seen:
            continue
        seen.add(word)
        lines.append(f"{word} {pronounce(word, False)}")
        if rng.next() % 8 == 0 and len(lines) < total:
            lines.append(f"{word}(2) {pronounce(word, True)}")
    with open(out, "w", encoding="utf-8") as f:
        f.write("\n".join(lines))
        f.write("\n")


if __name__ == "__main__":
    main()
