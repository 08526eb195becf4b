#!/usr/bin/python3
"""Write loupe's bundled demo corpus: invented harbour-office letter-books, 1880-1910.

Usage: /usr/bin/python3 scripts/make_demo_corpus.py --out demo [--seed S]
The scenario (county of Marlbrine, its three harbour offices, every person,
place and ship) is invented. Letters come from an LDA-like process: each office
has a Dirichlet prior over topics that drifts by decade, a letter draws its
topic mixture, then every noun/verb/adjective slot of an English sentence frame
draws a topic and a word. Same seed, same bytes: only random.Random(seed) is
used and every iteration is in a fixed order. The output folder is written to a
temporary sibling and renamed into place at the end.
"""

import argparse
import bisect
import csv
import io
import json
import os
import re
import shutil
import sys
from pathlib import Path
import random

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import demo_vocabulary as vocab  # noqa: E402

GENERATOR_VERSION = "demo-corpus-1"
DEFAULT_SEED = 18870314
YEAR_FIRST, YEAR_LAST = 1880, 1910

# Words, for word counts and seam positions: maximal runs of ASCII letters and
# digits, e.g. "Sir, the 14th instant." -> ["Sir", "the", "14th", "instant"].
WORD_RE = re.compile(r"[A-Za-z0-9]+")

# Prior weight of a topic in an office's Dirichlet prior, before decade drift.
SHARED_TOPIC_ALPHA = 0.55
OTHER_OFFICE_TOPIC_ALPHA = 0.05
OUTSIDER_TOPIC_ALPHA = 0.02

# Multipliers on the prior by decade (invented history: a customs crackdown in
# the 1880s, a cholera scare in the 1890s, steam dredging after 1900).
DECADE_DRIFT = {
    "1880s": {"customs_and_smuggling": 1.6, "herring_fishery": 1.3, "dredging": 0.5,
              "lights_and_buoys": 0.8, "timber_and_dues": 1.3},
    "1890s": {"health_and_quarantine": 2.2, "lights_and_buoys": 1.4},
    "1900s": {"dredging": 2.2, "staff_and_wages": 1.6, "herring_fishery": 0.7,
              "customs_and_smuggling": 0.6, "coal_colliers": 1.4,
              "timber_and_dues": 0.8},
    "1910s": {"dredging": 2.4, "staff_and_wages": 1.8, "herring_fishery": 0.6,
              "customs_and_smuggling": 0.5, "coal_colliers": 1.5,
              "timber_and_dues": 0.7},
}

# Disputed letters are drawn from their office's prior times this factor (more
# typical of the office than a filed letter); the two halves of the stitched
# letter use the larger factor so that the seam is a clear change of subject.
DISPUTED_PRIOR_SCALE = 2.0
COMPOSITE_PRIOR_SCALE = 5.0

# Zipf-like word weights inside a topic list: weight of rank r is 1/(r+2)^0.9.
ZIPF_EXPONENT = 0.9


def decade_of(year):
    """1887 -> "1880s"."""
    return "%ds" % (year // 10 * 10)


def count_words(text):
    return len(WORD_RE.findall(text))


class LetterWriter:
    """Turns topic mixtures into English-like letter text with one random stream."""

    def __init__(self, rng):
        self.rng = rng
        self.topic_names = sorted(vocab.TOPICS)
        self.topic_index = {name: i for i, name in enumerate(self.topic_names)}
        # words[part][topic] and cumulative weights cum[part][topic]
        self.words = {}
        self.cum = {}
        for part, code in (("nouns", "N"), ("verbs", "V"), ("adjectives", "A")):
            self.words[code] = []
            self.cum[code] = []
            for name in self.topic_names:
                lst = vocab.TOPICS[name][part]
                total, cum = 0.0, []
                for rank in range(len(lst)):
                    total += 1.0 / (rank + 2) ** ZIPF_EXPONENT
                    cum.append(total)
                self.words[code].append(list(lst))
                self.cum[code].append(cum)
        self.frames = [self._parse_frame(f) for f in vocab.FRAMES]
        self.openers = [self._parse_frame(f) for f in vocab.PARAGRAPH_OPENERS]

    @staticmethod
    def _parse_frame(frame):
        """"The {N} had been {V}." -> ["The ", "N", " had been ", "V", "."] as
        (is_slot, text) pairs."""
        pieces = re.split(r"\{(\w+)\}", frame)
        return [(i % 2 == 1, piece) for i, piece in enumerate(pieces) if piece or i % 2]

    def alpha_vector(self, weights, decade):
        """Dirichlet prior as a list in topic_names order, with decade drift."""
        drift = DECADE_DRIFT.get(decade, {})
        return [weights.get(name, 0.0) * drift.get(name, 1.0) for name in self.topic_names]

    def draw_mixture(self, alpha):
        """theta ~ Dirichlet(alpha), by normalised gamma variates."""
        draws = [self.rng.gammavariate(a, 1.0) if a > 0 else 0.0 for a in alpha]
        total = sum(draws)
        if total <= 0.0:
            draws = list(alpha)
            total = sum(draws)
        return [d / total for d in draws]

    def _fill(self, pieces, theta_cum, names):
        rng = self.rng
        out = []
        for is_slot, text in pieces:
            if not is_slot:
                out.append(text)
            elif text in ("N", "V", "A"):
                topic = bisect.bisect_right(theta_cum, rng.random() * theta_cum[-1])
                if topic >= len(theta_cum):
                    topic = len(theta_cum) - 1
                cum = self.cum[text][topic]
                words = self.words[text][topic]
                out.append(words[bisect.bisect_right(cum, rng.random() * cum[-1]) % len(words)])
            elif text == "NUM":
                out.append(vocab.NUMBERS[rng.randrange(len(vocab.NUMBERS))])
            elif text == "DAY":
                out.append(vocab.ORDINALS[rng.randrange(len(vocab.ORDINALS))])
            elif text == "MONTH":
                out.append(vocab.MONTHS[rng.randrange(12)])
            else:
                choices = names[text]
                out.append(choices[rng.randrange(len(choices))])
        sentence = "".join(out)
        return sentence[0].upper() + sentence[1:]

    def sentence(self, theta_cum, names):
        frame = self.frames[self.rng.randrange(len(self.frames))]
        return self._fill(frame, theta_cum, names)

    def body(self, theta, names, target_words):
        """Paragraphs of sentences until at least target_words words; returns
        (text, words). Paragraphs are separated by one blank line."""
        rng = self.rng
        theta_cum = []
        total = 0.0
        for t in theta:
            total += t
            theta_cum.append(total)
        paragraphs, words = [], 0
        while words < target_words:
            sentences = []
            if not paragraphs and rng.random() < 0.5:
                opener = self.openers[rng.randrange(len(self.openers))]
                sentences.append(self._fill(opener, theta_cum, names))
                words += count_words(sentences[-1])
            for _ in range(rng.randint(2, 5)):
                if words >= target_words:
                    break
                sentences.append(self.sentence(theta_cum, names))
                words += count_words(sentences[-1])
            paragraphs.append(" ".join(sentences))
        return "\n\n".join(paragraphs), words

    def date(self, year):
        return (vocab.ORDINALS[self.rng.randrange(len(vocab.ORDINALS))],
                vocab.MONTHS[self.rng.randrange(12)], year)


def scaled(alpha, factor):
    """Dirichlet(factor * alpha): same mean mixture, less spread around it."""
    return [a * factor for a in alpha]


def office_prior_weights(office):
    """Topic -> prior weight for an office before decade drift."""
    weights = {}
    own_of_others = set()
    for other in vocab.OFFICES:
        if other is not office:
            own_of_others.update(other["own_topics"])
    for name in sorted(vocab.TOPICS):
        if name in office["own_topics"]:
            weights[name] = office["own_topics"][name]
        elif name in vocab.SHARED_TOPICS:
            weights[name] = SHARED_TOPIC_ALPHA
        elif name in own_of_others:
            weights[name] = OTHER_OFFICE_TOPIC_ALPHA
        else:
            weights[name] = OUTSIDER_TOPIC_ALPHA
    return weights


def railway_prior_weights():
    weights = {name: 0.0 for name in sorted(vocab.TOPICS)}
    weights.update(vocab.RAILWAY["own_topics"])
    for name in ("weather", "staff_and_wages", "county_board"):
        weights[name] = 0.35
    return weights


def office_names(office):
    """Name pools for a known letter: the office's own names, then the county's."""
    return {"PLACE": office["places"] * 3 + vocab.COUNTY_PLACES,
            "PERSON": office["people"] * 3 + vocab.COUNTY_PEOPLE,
            "SHIP": office["ships"] * 3 + vocab.COUNTY_SHIPS}


COUNTY_NAMES = {"PLACE": vocab.COUNTY_PLACES, "PERSON": vocab.COUNTY_PEOPLE,
                "SHIP": vocab.COUNTY_SHIPS}


def mixture_summary(writer, theta, floor=0.02):
    """Topics with weight >= floor, heaviest first, rounded to 4 places."""
    pairs = [(writer.topic_names[i], t) for i, t in enumerate(theta) if t >= floor]
    pairs.sort(key=lambda p: (-p[1], p[0]))
    return {name: round(t, 4) for name, t in pairs}


def format_date(date):
    return "%s %s %d" % date


def known_letter_text(office, clerk, date, body):
    return ("%s Office, %s.\n\nTo the Secretary, %s.\n\nSir,\n\n%s\n\n%s\n%s\n"
            "Clerk to the Harbour Master, %s.\n"
            % (office["name"], format_date(date), vocab.BOARD, body, vocab.CLOSINGS[0],
               clerk, office["name"]))


def unsigned_letter_text(date, body):
    return ("%s.\n\nTo the Secretary, %s.\n\nSir,\n\n%s\n\n%s\n"
            % (format_date(date), vocab.BOARD, body, vocab.CLOSINGS[0]))


def letter_with_target(writer, theta, names, target_total, make_text):
    """Build a letter whose total word count lands near target_total."""
    overhead = count_words(make_text(""))
    body, _ = writer.body(theta, names, max(20, target_total - overhead))
    return make_text(body), body


def generate(seed):
    """Returns (files: dict relative path -> text, manifest rows, truth dict)."""
    vocab.check_vocabulary()
    rng = random.Random(seed)
    writer = LetterWriter(rng)
    files = {}
    rows = []
    known_by_office = {}

    # ---- known letters ---------------------------------------------------
    office_summaries = []
    for office in vocab.OFFICES:
        weights = office_prior_weights(office)
        count = rng.randint(190, 210)
        dates = []
        for _ in range(count):
            year = rng.randint(YEAR_FIRST, YEAR_LAST)
            month = rng.randrange(12)
            day = rng.randrange(len(vocab.ORDINALS))
            dates.append((year, month, day))
        dates.sort()
        sequence_in_year = {}
        letters = []
        for year, month, day in dates:
            sequence_in_year[year] = sequence_in_year.get(year, 0) + 1
            letter_id = "%s-%d-%03d" % (office["id_prefix"], year, sequence_in_year[year])
            date = (vocab.ORDINALS[day], vocab.MONTHS[month], year)
            clerks = [c for c in office["clerks"] if c[1] <= year <= c[2]]
            clerk = clerks[rng.randrange(len(clerks))][0]
            theta = writer.draw_mixture(writer.alpha_vector(weights, decade_of(year)))
            target = rng.randint(85, 375)
            text, body = letter_with_target(
                writer, theta, office_names(office), target,
                lambda b, o=office, c=clerk, d=date: known_letter_text(o, c, d, b))
            words = count_words(text)
            assert 80 <= words <= 400, (letter_id, words)
            path = "%s/%s.txt" % (office["slug"], letter_id)
            files[path] = text
            rows.append({"id": letter_id, "group": office["slug"], "role": "known",
                         "path": path, "year": year, "decade": decade_of(year),
                         "clerk": clerk})
            letters.append({"id": letter_id, "year": year, "date": date, "text": text,
                            "body": body, "words": words, "path": path})
        known_by_office[office["slug"]] = letters
        office_summaries.append({
            "slug": office["slug"], "name": office["name"],
            "id_prefix": office["id_prefix"],
            "prior_weights_before_drift": {k: weights[k] for k in sorted(weights)},
            "clerks": [{"name": c[0], "first_year": c[1], "last_year": c[2]}
                       for c in office["clerks"]],
            "known_letters": len(letters),
            "names": {"places": office["places"], "people": office["people"],
                      "ships": office["ships"]},
        })

    offices = {o["slug"]: o for o in vocab.OFFICES}
    slugs = [o["slug"] for o in vocab.OFFICES]

    # ---- disputed letters ------------------------------------------------
    # Plan, in a fixed order; ids are assigned after a seeded shuffle.
    plan = [("office_letter", slugs[0]), ("office_letter", slugs[0]),
            ("office_letter", slugs[1]), ("office_letter", slugs[1]),
            ("office_letter", slugs[2]), ("outside_all_offices", None),
            ("near_copy", slugs[2]), ("composite", (slugs[1], slugs[2]))]
    order = list(range(len(plan)))
    rng.shuffle(order)
    disputed_ids = ["dsp-%02d" % (i + 1) for i in range(len(plan))]
    id_of_plan = {plan_index: disputed_ids[pos] for pos, plan_index in enumerate(order)}

    disputed_truth = []
    near_copy_truth = None
    composite_truth = None
    disputed_files = {}
    for plan_index, (kind, what) in enumerate(plan):
        letter_id = id_of_plan[plan_index]
        path = "disputed/%s.txt" % letter_id
        entry = {"id": letter_id, "path": path, "kind": kind}
        if kind == "office_letter":
            year = rng.randint(YEAR_FIRST, YEAR_LAST)
            date = writer.date(year)
            theta = writer.draw_mixture(scaled(writer.alpha_vector(
                office_prior_weights(offices[what]), decade_of(year)), DISPUTED_PRIOR_SCALE))
            text, _ = letter_with_target(writer, theta, COUNTY_NAMES, rng.randint(180, 340),
                                         lambda b, d=date: unsigned_letter_text(d, b))
            entry.update({"true_office": what, "year": year,
                          "source": "drawn from the prior of %s, scaled by %g"
                                    % (offices[what]["name"], DISPUTED_PRIOR_SCALE),
                          "mixture": mixture_summary(writer, theta)})
        elif kind == "outside_all_offices":
            year = rng.randint(YEAR_FIRST, YEAR_LAST)
            date = writer.date(year)
            theta = writer.draw_mixture(writer.alpha_vector(railway_prior_weights(),
                                                            decade_of(year)))
            names = {"PLACE": vocab.RAILWAY["places"] * 2 + vocab.COUNTY_PLACES,
                     "PERSON": vocab.RAILWAY["people"] * 2 + vocab.COUNTY_PEOPLE,
                     "SHIP": vocab.RAILWAY["ships"]}
            text, _ = letter_with_target(writer, theta, names, rng.randint(220, 340),
                                         lambda b, d=date: unsigned_letter_text(d, b))
            entry.update({"true_office": None, "year": year,
                          "source": "written by the %s, which is none of the three offices"
                                    % vocab.RAILWAY["name"],
                          "mixture": mixture_summary(writer, theta)})
        elif kind == "near_copy":
            candidates = [l for l in known_by_office[what] if l["words"] >= 200]
            original = candidates[rng.randrange(len(candidates))]
            text, edits = near_copy(rng, original, offices[what])
            year = original["year"]
            entry.update({"true_office": what, "year": year,
                          "source": "copy of %s with its office heading and signature "
                                    "removed and seven words edited" % original["id"],
                          "original_id": original["id"]})
            near_copy_truth = {"id": letter_id, "original_id": original["id"],
                               "original_path": original["path"], "edits": edits}
        else:
            first, second = what
            year = rng.randint(YEAR_FIRST, YEAR_LAST)
            date = writer.date(year)
            theta_a = writer.draw_mixture(scaled(writer.alpha_vector(
                office_prior_weights(offices[first]), decade_of(year)), COMPOSITE_PRIOR_SCALE))
            theta_b = writer.draw_mixture(scaled(writer.alpha_vector(
                office_prior_weights(offices[second]), decade_of(year)), COMPOSITE_PRIOR_SCALE))
            part_a, _ = writer.body(theta_a, COUNTY_NAMES, 590)
            part_b, _ = writer.body(theta_b, COUNTY_NAMES, 590)
            text = unsigned_letter_text(date, part_a + "\n\n" + part_b)
            head = text[:text.index(part_a) + len(part_a) + 2]
            seam_byte = len(head.encode("ascii"))
            seam_word = count_words(head)
            entry.update({"true_office": None, "year": year,
                          "source": "first part from %s, second part from %s, each drawn "
                                    "from its office's prior scaled by %g"
                                    % (offices[first]["name"], offices[second]["name"],
                                       COMPOSITE_PRIOR_SCALE)})
            composite_truth = {
                "id": letter_id, "first_office": first, "second_office": second,
                "seam_word_index": seam_word, "seam_byte_offset": seam_byte,
                "total_words": count_words(text),
                "first_mixture": mixture_summary(writer, theta_a),
                "second_mixture": mixture_summary(writer, theta_b)}
        entry["words"] = count_words(text)
        disputed_truth.append(entry)
        disputed_files[letter_id] = (path, text, entry["year"])

    for letter_id in disputed_ids:
        path, text, year = disputed_files[letter_id]
        files[path] = text
        rows.append({"id": letter_id, "group": "", "role": "disputed", "path": path,
                     "year": year, "decade": decade_of(year), "clerk": ""})
    disputed_truth.sort(key=lambda e: e["id"])

    truth = {
        "generator": "scripts/make_demo_corpus.py",
        "generator_version": GENERATOR_VERSION,
        "vocabulary_version": vocab.GENERATOR_VOCABULARY_VERSION,
        "seed": seed,
        "random_source": "random.Random(seed), Python %d.%d" % sys.version_info[:2],
        "scenario": "Invented letter-books of three harbour offices of the invented "
                    "county of %s, 1880-1910. No real people, places or texts." % vocab.COUNTY,
        "word_rule": "a word is a maximal run of ASCII letters and digits; positions "
                     "are 0-based over the whole file",
        "topics": writer.topic_names,
        "shared_topics": sorted(vocab.SHARED_TOPICS),
        "outsider_topics": sorted(vocab.OUTSIDER_TOPICS),
        "decade_drift": {d: {k: DECADE_DRIFT[d][k] for k in sorted(DECADE_DRIFT[d])}
                         for d in sorted(DECADE_DRIFT)},
        "offices": office_summaries,
        "county_names": {"places": vocab.COUNTY_PLACES, "people": vocab.COUNTY_PEOPLE,
                         "ships": vocab.COUNTY_SHIPS},
        "outsider": {"name": vocab.RAILWAY["name"],
                     "prior_weights": {k: v for k, v in sorted(railway_prior_weights().items())
                                       if v > 0}},
        "disputed": disputed_truth,
        "near_copy": near_copy_truth,
        "composite": composite_truth,
    }
    return files, rows, truth


def near_copy(rng, original, office):
    """Copy of a known letter: heading without the office name, no signature,
    and seven edits (3 words replaced, 2 inserted, 2 deleted) in the body."""
    body = original["body"]
    body_start = original["text"].index(body)
    topic_words = {w for t in vocab.TOPICS.values() for part in t.values() for w in part}
    candidates = [m for m in re.finditer(r"\b[a-z]{4,}\b", body)
                  if m.group(0) in topic_words]
    chosen = sorted(rng.sample(range(len(candidates)), 7))
    ops = ["replace"] * 3 + ["insert"] * 2 + ["delete"] * 2
    rng.shuffle(ops)
    replacements = sorted({w for t in sorted(office["own_topics"])
                           for part in ("nouns", "adjectives")
                           for w in vocab.TOPICS[t][part]})
    edits = []
    new_body = body
    for pick, op in sorted(zip(chosen, ops), reverse=True):
        m = candidates[pick]
        old = m.group(0)
        word_index = count_words(original["text"][:body_start + m.start()])
        if op == "replace":
            new = old
            while new == old:
                new = replacements[rng.randrange(len(replacements))]
            new_body = new_body[:m.start()] + new + new_body[m.end():]
            edits.append({"op": op, "original_word_index": word_index, "old": old,
                          "new": new})
        elif op == "insert":
            new = vocab.EDIT_INSERTIONS[rng.randrange(len(vocab.EDIT_INSERTIONS))]
            new_body = new_body[:m.start()] + new + " " + new_body[m.start():]
            edits.append({"op": op, "original_word_index": word_index,
                          "inserted_before": old, "new": new})
        else:
            start, end = m.start(), m.end()
            if end < len(new_body) and new_body[end] == " ":
                end += 1
            elif start > 0 and new_body[start - 1] == " ":
                start -= 1
            new_body = new_body[:start] + new_body[end:]
            edits.append({"op": op, "original_word_index": word_index, "old": old})
    edits.sort(key=lambda e: e["original_word_index"])
    return unsigned_letter_text(original["date"], new_body), edits


def manifest_text(rows):
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n", quoting=csv.QUOTE_MINIMAL)
    writer.writerow(["id", "group", "role", "path", "year", "decade", "clerk"])
    for r in rows:
        writer.writerow([r["id"], r["group"], r["role"], r["path"], r["year"],
                         r["decade"], r["clerk"]])
    return buffer.getvalue()


def readme_text(rows, truth):
    known = sum(1 for r in rows if r["role"] == "known")
    disputed = len(rows) - known
    offices = ", ".join("%s (%d letters)" % (o["name"], o["known_letters"])
                        for o in truth["offices"])
    return """# loupe demo corpus: the Marlbrine harbour letter-books

This scenario is invented: there are no real people, places or texts in it.
It imagines the letter-books of three harbour offices of the county of
Marlbrine, written to the county harbour board between 1880 and 1910:
{offices}.
Skelloway is a fishing harbour, Cinderholt ships coal and timber,
Gannetmouth keeps a lifeboat and a customs watch; all three also write about
weather, wages, pier repairs, the board, health and quarantine, dredging, and
lights and buoys (the "1910s" decade holds only the year 1910).
{known} letters are signed and filed under their office;
{disputed} unsigned letters wait in `disputed/` to be placed: five from the
offices, one from an inland railway company (none of the three), one near
copy of a filed letter, and one long letter stitched from two offices.

The letters were generated by `scripts/make_demo_corpus.py` (version
{version}, seed {seed}) from the word lists in `scripts/demo_vocabulary.py`:
each office has a Dirichlet prior over 16 topics that drifts by decade, each
letter draws its own topic mixture and then fills English sentence frames word
by word. Regenerate byte for byte with
`/usr/bin/python3 scripts/make_demo_corpus.py --out demo`.
Files: `harbour-letters/<office>/<id>.txt` (known letters, one folder per
office), `harbour-letters/disputed/<id>.txt` (unsigned letters),
`harbour-letters/letters.csv` (manifest: id, group, role, path relative to
the manifest, year, decade, clerk), `truth.json` (seed, topic names, each
office's prior, the true source of every disputed letter, the near copy's
original and edits, the stitched letter's seam by word index and byte offset).
""".format(offices=offices, known=known, disputed=disputed,
           version=truth["generator_version"], seed=truth["seed"])


def write_text(path, text):
    path.parent.mkdir(parents=True, exist_ok=True)
    with open(path, "w", encoding="ascii", newline="\n") as f:
        f.write(text)


def replace_folder(tmp, out, marker):
    """Move the finished tmp folder to out. An existing out is replaced only
    if it is empty or holds marker (i.e. an earlier output of this script)."""
    if out.exists():
        if not out.is_dir() or (any(out.iterdir()) and not (out / marker).exists()):
            shutil.rmtree(tmp)
            raise SystemExit("error: %s exists and is not an earlier output of this "
                             "script (no %s in it); choose another --out or remove it"
                             % (out, marker))
        old = out.parent / (".%s.tmp-old-%d" % (out.name, os.getpid()))
        os.rename(out, old)
        os.rename(tmp, out)
        shutil.rmtree(old)
    else:
        os.rename(tmp, out)


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", required=True, help="output folder, e.g. demo")
    parser.add_argument("--seed", type=int, default=DEFAULT_SEED)
    args = parser.parse_args(argv)

    out = Path(args.out).absolute()
    if not out.parent.is_dir():
        raise SystemExit("error: the folder %s does not exist; create it first"
                         % out.parent)
    files, rows, truth = generate(args.seed)
    tmp = out.parent / (".%s.tmp-%d" % (out.name, os.getpid()))
    if tmp.exists():
        shutil.rmtree(tmp)
    try:
        corpus = tmp / "harbour-letters"
        for rel in sorted(files):
            write_text(corpus / rel, files[rel])
        write_text(corpus / "letters.csv", manifest_text(rows))
        write_text(tmp / "truth.json", json.dumps(truth, indent=2, sort_keys=False) + "\n")
        write_text(tmp / "README.md", readme_text(rows, truth))
    except BaseException:
        shutil.rmtree(tmp, ignore_errors=True)
        raise
    replace_folder(tmp, out, "truth.json")
    total = sum(len(t) for t in files.values())
    print("wrote %s: %d letters, %d bytes of letter text, seed %d"
          % (out, len(files), total, args.seed))


if __name__ == "__main__":
    main()
