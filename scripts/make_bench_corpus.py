#!/usr/bin/python3
"""Write a large English-like benchmark corpus in loupe's folder layout.

Usage: /usr/bin/python3 scripts/make_bench_corpus.py --out DIR [--megabytes N]
           [--seed S] [--groups G]
Writes DIR/<group>/<id>.txt letters of about 5 KB each (about N x 1,000,000
bytes of letter text in all), DIR/manifest.csv (id, group, role, path, year,
decade, clerk; paths relative to DIR) and DIR/corpus-info.json (seed, sizes).
Uses the demo corpus's vocabulary and sentence frames (scripts/demo_vocabulary.py,
scripts/make_demo_corpus.py); each group has its own Dirichlet prior over the
16 topics. Same arguments, same bytes: only random.Random(seed) is used. The
folder is written to a temporary sibling and renamed into place at the end.
"""

import argparse
import json
import os
import random
import shutil
import sys
import time
from pathlib import Path

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import demo_vocabulary as vocab  # noqa: E402
import make_demo_corpus as demo  # noqa: E402

GENERATOR_VERSION = "bench-corpus-1"
DEFAULT_SEED = 20240601
# Letter length in words: about 5 KB of text at ~5.6 bytes a word.
WORDS_MIN, WORDS_MAX = 650, 1150
FLUSH_BYTES = 8 << 20  # write letters to disk in batches of about 8 MB


def group_prior_weights(group_index, topic_names):
    """Group g favours three topics (3g, 3g+1, 3g+2 mod K); the rest share a
    small weight. Example with K=16: group 0 -> topics 0,1,2; group 5 -> 15,0,1."""
    k = len(topic_names)
    favoured = {(3 * group_index + j) % k for j in range(3)}
    return {name: (2.5 if i in favoured else 0.3) for i, name in enumerate(topic_names)}


def group_names(group_index):
    office = vocab.OFFICES[group_index % len(vocab.OFFICES)]
    return demo.office_names(office), office


def letter_text(group_label, clerk, date, body):
    return ("%s, %s.\n\nTo the Secretary, %s.\n\nSir,\n\n%s\n\n%s\n%s\n"
            % (group_label, demo.format_date(date), vocab.BOARD, body,
               vocab.CLOSINGS[0], clerk))


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", required=True, help="output folder")
    parser.add_argument("--megabytes", type=float, default=100.0,
                        help="letter text to write, in units of 1,000,000 bytes")
    parser.add_argument("--seed", type=int, default=DEFAULT_SEED)
    parser.add_argument("--groups", type=int, default=4)
    args = parser.parse_args(argv)
    if args.groups < 1 or args.groups > 99:
        raise SystemExit("error: --groups must be between 1 and 99, got %d" % args.groups)
    if args.megabytes <= 0:
        raise SystemExit("error: --megabytes must be positive, got %g" % args.megabytes)

    out = Path(args.out).absolute()
    if not out.parent.is_dir():
        raise SystemExit("error: the folder %s does not exist; create it first"
                         % out.parent)
    started = time.monotonic()
    vocab.check_vocabulary()
    rng = random.Random(args.seed)
    writer = demo.LetterWriter(rng)
    target_bytes = int(args.megabytes * 1_000_000)

    groups = []
    for g in range(args.groups):
        names, office = group_names(g)
        slug = "collection-%02d" % (g + 1)
        groups.append({
            "slug": slug,
            "label": "Letter-book %d, %s" % (g + 1, office["name"]),
            "weights": group_prior_weights(g, writer.topic_names),
            "names": names,
            "clerks": office["clerks"],
            "count": 0,
        })

    tmp = out.parent / (".%s.tmp-%d" % (out.name, os.getpid()))
    if tmp.exists():
        shutil.rmtree(tmp)
    try:
        for group in groups:
            (tmp / group["slug"]).mkdir(parents=True)
        manifest = ["id,group,role,path,year,decade,clerk\n"]
        pending, pending_bytes = [], 0
        written, letters = 0, 0
        alpha_cache = {}
        while written + pending_bytes < target_bytes:
            group = groups[letters % len(groups)]
            group["count"] += 1
            year = rng.randint(demo.YEAR_FIRST, demo.YEAR_LAST)
            decade = demo.decade_of(year)
            key = (group["slug"], decade)
            if key not in alpha_cache:
                alpha_cache[key] = writer.alpha_vector(group["weights"], decade)
            theta = writer.draw_mixture(alpha_cache[key])
            clerks = [c for c in group["clerks"] if c[1] <= year <= c[2]]
            clerk = clerks[rng.randrange(len(clerks))][0]
            date = writer.date(year)
            body, _ = writer.body(theta, group["names"], rng.randint(WORDS_MIN, WORDS_MAX))
            text = letter_text(group["label"], clerk, date, body).encode("ascii")
            letter_id = "c%02d-%06d" % (letters % len(groups) + 1, group["count"])
            rel = "%s/%s.txt" % (group["slug"], letter_id)
            pending.append((rel, text))
            pending_bytes += len(text)
            clerk_field = '"%s"' % clerk.replace('"', '""') if ("," in clerk or '"' in clerk) else clerk
            manifest.append("%s,%s,known,%s,%d,%s,%s\n"
                            % (letter_id, group["slug"], rel, year, decade, clerk_field))
            letters += 1
            if pending_bytes >= FLUSH_BYTES:
                for rel_path, data in pending:
                    with open(tmp / rel_path, "wb") as f:
                        f.write(data)
                written += pending_bytes
                pending, pending_bytes = [], 0
        for rel_path, data in pending:
            with open(tmp / rel_path, "wb") as f:
                f.write(data)
        written += pending_bytes
        with open(tmp / "manifest.csv", "w", encoding="ascii", newline="\n") as f:
            f.write("".join(manifest))
        info = {
            "generator": "scripts/make_bench_corpus.py",
            "generator_version": GENERATOR_VERSION,
            "vocabulary_version": vocab.GENERATOR_VOCABULARY_VERSION,
            "seed": args.seed,
            "random_source": "random.Random(seed), Python %d.%d" % sys.version_info[:2],
            "megabytes_requested": args.megabytes,
            "letter_bytes": written,
            "letters": letters,
            "groups": [{"slug": g["slug"], "label": g["label"], "letters": g["count"],
                        "prior_weights_before_drift": g["weights"]} for g in groups],
            "note": "invented English-like letters; no real people, places or texts",
        }
        with open(tmp / "corpus-info.json", "w", encoding="ascii", newline="\n") as f:
            f.write(json.dumps(info, indent=2) + "\n")
    except BaseException:
        shutil.rmtree(tmp, ignore_errors=True)
        raise
    demo.replace_folder(tmp, out, "corpus-info.json")
    print("wrote %s: %d letters in %d groups, %d bytes of letter text, seed %d, %.1f s"
          % (out, letters, len(groups), written, args.seed, time.monotonic() - started))


if __name__ == "__main__":
    main()
