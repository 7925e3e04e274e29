"""The straightforward Python equivalent of opening the lexicon store and building its index.

Reads the CSV store with the standard csv module, checks statuses and scores as the Rust store
does, normalises each headword (NFC + lower case), and builds the three lookups the Rust index has
(headword -> rows, pronunciation -> rows, pronunciation without stress -> rows) plus the sorted key
list that prefix and fuzzy search need. Prints the median wall time of several runs in milliseconds.

usage: python3 benches/store_baseline.py STORE.csv [RUNS]
"""
import csv
import statistics
import sys
import time
import unicodedata

STATUSES = {"imported", "accepted", "proposed", "deprecated"}


def strip_stress(pron):
    return " ".join(p[:-1] if p[-1:] in "012" and len(p) > 1 else p for p in pron.split(" ") if p)


def open_and_index(path):
    entries = []
    with open(path, newline="", encoding="utf-8") as f:
        reader = csv.reader(f)
        header = next(reader)
        col = {name: i for i, name in enumerate(header)}
        for row in reader:
            word = row[col["word"]]
            if not word or word.strip() != word:
                raise ValueError("bad headword")
            if row[col["status"]] not in STATUSES:
                raise ValueError("bad status")
            score = row[col["score"]]
            entries.append((word, row[col["pronunciation"]], row[col["status"]], row[col["source"]],
                            float(score) if score else None, row[col["note"]]))
    words, prons, bare = {}, {}, {}
    for i, (word, pron, *_rest) in enumerate(entries):
        key = unicodedata.normalize("NFC", word).lower()
        words.setdefault(key, []).append(i)
        prons.setdefault(pron, []).append(i)
        bare.setdefault(strip_stress(pron), []).append(i)
    keys = sorted(words)
    return len(entries), len(keys), len(prons), len(bare)


def main():
    path = sys.argv[1]
    runs = int(sys.argv[2]) if len(sys.argv) > 2 else 5
    times = []
    for _ in range(runs):
        start = time.perf_counter()
        counts = open_and_index(path)
        times.append((time.perf_counter() - start) * 1000)
    print(f"python entries={counts[0]} words={counts[1]} median_ms={statistics.median(times):.1f}")


if __name__ == "__main__":
    main()
