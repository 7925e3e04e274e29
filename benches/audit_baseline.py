"""The straightforward Python equivalent of `orthoepy audit` with every check.

Reads the CSV store with the csv module and the phoneset TOML with tomllib, then runs the same
checks in plain Python: unknown phones (with difflib suggestions), bad stress marks, missing and
multiple primary stress, no nucleus, empty pronunciation, exact duplicates, normalisation twins and
untidy headwords (NFC, case folding, whitespace), invisible characters, mixed script (script read
from the Unicode character name, the usual stdlib approximation), redundant variants, length
outliers (modified z-score within spelling-length classes) and the phoneset's phonotactic
constraints. Prints the median wall time of several runs in milliseconds and the finding count.

usage: python3 benches/audit_baseline.py STORE.csv PHONESET.toml [RUNS]
"""
import csv
import difflib
import statistics
import sys
import time
import tomllib
import unicodedata
from collections import defaultdict

INVISIBLE = set("\u00a0\u00ad\u061c\u1680\u180e\u2028\u2029\u202f\u205f\u2060\u2061\u2062\u2063\u2064\u3000\ufeff")
INVISIBLE |= {chr(c) for c in range(0x2000, 0x2010)} | {chr(c) for c in range(0x202A, 0x202F)}
INVISIBLE |= {chr(c) for c in range(0x2066, 0x206A)}


def load_phoneset(path):
    with open(path, "rb") as f:
        data = tomllib.load(f)
    phones = {}
    for p in data["phone"]:
        cls = p["class"]
        syllabic = p.get("syllabic", cls in ("vowel", "diphthong"))
        feats = dict(p.get("features", {}))
        feats["class"] = cls
        feats["syllabic"] = "yes" if syllabic else "no"
        phones[p["symbol"]] = (syllabic, feats)
    marks = {m["mark"]: m["level"] for m in data.get("stress", {}).get("marks", [])}
    required = data.get("stress", {}).get("required", False)
    constraints = []
    for c in data.get("constraint", []):
        elems, start, end = [], False, False
        # split on spaces outside brackets
        items, depth, cur = [], 0, ""
        for ch in c["pattern"]:
            if ch == "[":
                depth += 1
            if ch == "]":
                depth -= 1
            if ch == " " and depth == 0:
                if cur:
                    items.append(cur)
                cur = ""
            else:
                cur += ch
        if cur:
            items.append(cur)
        if items and items[0] == "#":
            start, items = True, items[1:]
        if items and items[-1] == "#":
            end, items = True, items[:-1]
        for it in items:
            if it.startswith("["):
                conds = [cond.split("=") for cond in it[1:-1].split()]
                elems.append(("class", [(n, v.split("|")) for n, v in conds]))
            else:
                elems.append(("symbol", it))
        constraints.append((c["id"], start, end, elems))
    return phones, marks, required, constraints


def split_stress(token, phones, marks):
    if token in phones:
        return token, None
    for mark in sorted(marks, key=len, reverse=True):
        if len(token) > len(mark) and token.endswith(mark):
            return token[: -len(mark)], mark
    return token, None


def script_of(ch):
    if not ch.isalpha():
        return None
    name = unicodedata.name(ch, "")
    return name.split(" ")[0] if name else None


def audit(path, phoneset):
    phones, marks, required, constraints = phoneset
    primary = [m for m, l in marks.items() if l == "primary"]
    rows = []
    with open(path, newline="", encoding="utf-8") as f:
        reader = csv.reader(f)
        header = next(reader)
        col = {n: i for i, n in enumerate(header)}
        for line, row in enumerate(reader, start=2):
            rows.append((line, row[col["word"]], row[col["pronunciation"]]))
    findings = []
    parsed = []
    for i, (line, word, pron) in enumerate(rows):
        tokens = pron.split()
        if not tokens:
            findings.append(("empty-pronunciation", i))
        known, info = True, []
        for t in tokens:
            bare, mark = split_stress(t, phones, marks)
            if bare not in phones:
                base = t.rstrip("0123456789")
                if base != t and base in phones:
                    findings.append(("bad-stress-mark", i))
                else:
                    findings.append(("unknown-phone", i, difflib.get_close_matches(bare, list(phones), 3)))
                known = False
                info.append((None, mark))
                continue
            nucleus = phones[bare][0]
            if mark is not None and not nucleus:
                findings.append(("bad-stress-mark", i))
            if mark is None and nucleus and required:
                findings.append(("bad-stress-mark", i))
            info.append((bare, mark))
        parsed.append((tokens, info, known))
        if known and tokens:
            nuclei = sum(1 for b, _ in info if phones[b][0])
            prim = sum(1 for _, m in info if m in primary)
            if nuclei == 0:
                findings.append(("no-nucleus", i))
            elif prim == 0:
                findings.append(("missing-primary-stress", i))
            if prim > 1:
                findings.append(("multiple-primary-stress", i))
            for cid, start, end, elems in constraints:
                n = len(elems)
                for s in range(0, len(info) - n + 1):
                    if start and s != 0 or end and s + n != len(info):
                        continue
                    ok = True
                    for k, (kind, val) in enumerate(elems):
                        b = info[s + k][0]
                        if kind == "symbol":
                            ok = b == val
                        else:
                            ok = all(phones[b][1].get(name) in vals for name, vals in val)
                        if not ok:
                            break
                    if ok:
                        findings.append(("phonotactic", i, cid))
        if any(c in INVISIBLE or unicodedata.category(c) == "Cc" for c in word):
            findings.append(("invisible-character", i))
        scripts = {script_of(c) for c in word} - {None}
        if len(scripts) > 1 and not scripts <= {"CJK", "HIRAGANA", "KATAKANA"} and not scripts <= {"CJK", "HANGUL"}:
            findings.append(("mixed-script", i))
    groups = defaultdict(list)
    for i, (line, word, pron) in enumerate(rows):
        key = unicodedata.normalize("NFC", " ".join(word.split())).lower()
        groups[key].append(i)
    for key, ids in groups.items():
        spellings = {rows[i][1] for i in ids}
        tidy = [rows[i][1] for i in ids if rows[i][1] == unicodedata.normalize("NFC", " ".join(rows[i][1].split()))]
        if len(spellings) > 1:
            ref = max(tidy or [rows[i][1] for i in ids], key=lambda w: sum(1 for j in ids if rows[j][1] == w))
            findings.extend(("normalization-duplicate", i) for i in ids if rows[i][1] != ref)
        elif not tidy:
            findings.extend(("headword-form", i) for i in ids)
        seen = {}
        for n, i in enumerate(ids):
            tokens = parsed[i][0]
            k = (rows[i][1], tuple(tokens))
            if k in seen:
                findings.append(("duplicate-entry", i))
            else:
                seen[k] = i
            bare = tuple(split_stress(t, phones, marks)[0] for t in tokens)
            for j in ids[:n]:
                other = parsed[j][0]
                if other != tokens and tuple(split_stress(t, phones, marks)[0] for t in other) == bare:
                    findings.append(("redundant-variant", i))
                    break
    classes = defaultdict(list)
    measured = []
    for i, (line, word, pron) in enumerate(rows):
        letters = sum(1 for c in word if c.isalpha())
        tokens, info, known = parsed[i]
        if letters and tokens and known:
            r = len(tokens) / letters
            measured.append((i, min(letters, 16), r))
            classes[min(letters, 16)].append(r)
    everyone = [r for _, _, r in measured]
    spreads = {}
    for c, vals in list(classes.items()) + [("all", everyone)]:
        if len(vals) >= 50:
            med = statistics.median(vals)
            spreads[c] = (med, statistics.median([abs(v - med) for v in vals]))
    for i, c, r in measured:
        med, mad = spreads.get(c, spreads.get("all", (0, 0)))
        if mad > 0 and abs(0.6745 * (r - med) / mad) > 3.5:
            findings.append(("length-outlier", i))
    return findings


def main():
    path, phoneset_path = sys.argv[1], sys.argv[2]
    runs = int(sys.argv[3]) if len(sys.argv) > 3 else 3
    times = []
    for _ in range(runs):
        start = time.perf_counter()
        findings = audit(path, load_phoneset(phoneset_path))
        times.append((time.perf_counter() - start) * 1000)
    print(f"python findings={len(findings)} median_ms={statistics.median(times):.1f}")


if __name__ == "__main__":
    main()
