"""How chat.model.learned was made: run once with the journalled store (format 1), before SQLite.

The file is the learned state a person would have after a few sessions: compacted
state, then changes of every kind appended (learn, sentences, settings, never,
forget, prune), then a torn last line.  expected.json holds what that code read
back from it (counts, shares, suggestions), so the conversion is checked against
the reading of the code that wrote the file.
"""

import json
import sys
from pathlib import Path

import foretype
from foretype.adapt.store import LearnedFile, load_learned

HERE = Path(__file__).resolve().parent
CORPUS = "the tide is high\nthe ferry sails at dawn\nthe nets are dry\nthe ferry is late\n"


def main() -> None:
    corpus = HERE / "corpus.txt"
    corpus.write_text(CORPUS, encoding="utf-8")
    base = foretype.build([corpus])
    path = HERE / "chat.model.learned"
    path.unlink(missing_ok=True)
    with LearnedFile(path, base, compact_every=6) as learned:
        learned.learn(["Gorbalt", "sails"], after=["the"], end=True)
        learned.learn_sentences([["the", "Gorbalt", "ferry", "is", "late"], ["Tamsin", "mends", "the", "nets"], ["gorbalt", "sails", "at", "dawn"]])
        learned.learn(["Gorbalt"], after=["the"])
        learned.end_sentence(["the", "Gorbalt"])
        for i in range(4):
            learned.learn(["Quillon", "tide", f"w{i}"], after=["the"], end=i % 2 == 0)
        learned.set_settings(learned.model.settings.changed(min_uses=1, half_life=40.0))
        learned.add_never(["dam*", "Sprocket"])
        learned.remove_never(["sprocket"])
        learned.learn(["Mooring", "damp", "nets"], after=[], end=True)
        learned.forget("w1")
        assert learned.prune(below=0.95) > 0
        learned.learn(["Gorbalt", "ferry"], after=["at", "dawn"])
        learned.learn(["Tamsin", "sails"], after=["the"])
    with open(path, "ab") as handle:  # a torn last line, as a killed writer leaves it
        handle.write(b'0badc0de {"kind": "learn", "words": ["tor')
    path.with_name(path.name + ".lock").unlink()
    model = load_learned(path, base)
    user = model.user
    queries = [((), ""), (("the",), ""), (("the",), "g"), (("the",), "t"), (("at", "dawn"), ""), (("gorbalt",), "s"), ((), "m"), (("the", "ferry"), "")]
    expected = {
        "words": sorted([form, uses, count, seen] for _, form, count, uses, seen in user.word_rows()),
        "bigrams": sorted([[user.form(i) for i in ids], count, uses, seen] for ids, count, uses, seen in user.ngram_rows(2)),
        "trigrams": sorted([[user.form(i) for i in ids], count, uses, seen] for ids, count, uses, seen in user.ngram_rows(3)),
        "shares": [[user.worth(b), user.evidence(b)] for b in range(3)],
        "tick": user.tick,
        "settings": model.settings.to_json(),
        "never": model.never.entries,
        "displays": user.display_votes(),
        "suggestions": [[list(c), p, [list(s) for s in model.suggest(c, p, k=6)]] for c, p in queries],
    }
    (HERE / "expected.json").write_text(json.dumps(expected, indent=1, ensure_ascii=False) + "\n", encoding="utf-8")
    print(path, path.stat().st_size, "bytes", file=sys.stderr)


if __name__ == "__main__":
    main()
