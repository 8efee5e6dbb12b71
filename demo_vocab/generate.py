"""Generate foretype's bundled demo text: messages from an invented ferry cooperative.

The Saltmarrow Tidal Ferry Cooperative, its islands, harbour towns, boats and
people are all made up. This script writes their everyday messages (crossing
updates, shift handovers, weather reports, café orders, yard logs, ticket-office
queries, cargo manifests, council minutes, rota requests and staff chat) with a
probabilistic template grammar:

* a *rule* is a list of alternative templates; a template may contain slots
  such as ``{first}``, ``{boat}`` or ``{part.pl}`` that expand recursively;
* alternatives are drawn with Zipf-like weights by their position in the list,
  so the first alternatives are common and the last ones form a long tail;
* slot modifiers inflect the expansion: ``.pl`` (plural), ``.past``, ``.ing``,
  ``.s`` (third person), ``.er``/``.est`` (comparative/superlative),
  ``.a`` (prefix "a"/"an"), ``.be`` (add "is"/"are"), ``.lc`` (lower-case a
  sentence start); ``{slot?}`` expands only some of the time;
* an entry ``"scarf|scarves"`` or ``"strip|stripped|stripping"`` gives the
  irregular forms explicitly.

Everything comes from one ``random.Random(seed)``, so a given seed and word
count always yield byte-identical output. With no options the script rewrites
both bundled files::

    python demo_vocab/generate.py                  # corpus.txt and heldout.txt
    python demo_vocab/generate.py --seed 7 --words 5000 --out /tmp/sample.txt
"""

from __future__ import annotations

import argparse
import bisect
import random
import re
import sys
from itertools import accumulate
from pathlib import Path
from typing import Callable, Iterator

HERE = Path(__file__).resolve().parent

# (seed, target word count, file name) for the bundled files. The held-out
# text uses the same grammar with another seed, so it is in-domain but unseen.
DEFAULT_JOBS = (
    (1, 320_000, "corpus.txt"),
    (2, 40_000, "heldout.txt"),
)

# Zipf exponent for ordinary rules and short word lists; a few rules override
# it. Long word lists get a flatter curve so their tails still turn up.
DEFAULT_EXPONENT = 0.9
LONG_LIST_EXPONENT = 0.5
LONG_LIST_LENGTH = 40
OPTIONAL_SLOT_PROBABILITY = 0.35
MAX_DEPTH = 25
# Redraws allowed when a slot repeats a value already used in the same line
# ("printer paper, printer paper"); a few repeats are natural, most are not.
REDRAWS = 3


def _items(text: str) -> list[str]:
    """Split a word-list block on commas; an entry may wrap onto the next line."""
    return [part.strip() for part in " ".join(text.split()).split(",") if part.strip()]


def _lines(text: str) -> list[str]:
    """Split a template block into one template per non-empty line."""
    return [line.strip() for line in text.splitlines() if line.strip()]


# ---------------------------------------------------------------------------
# Inflection
# ---------------------------------------------------------------------------

_IRREGULAR_PLURALS = {
    "man": "men", "woman": "women", "child": "children", "person": "people",
    "foot": "feet", "tooth": "teeth", "mouse": "mice", "goose": "geese",
    "sheep": "sheep", "fish": "fish", "deer": "deer", "salmon": "salmon",
    "cod": "cod", "haddock": "haddock", "knife": "knives", "shelf": "shelves",
    "loaf": "loaves", "leaf": "leaves", "half": "halves", "life": "lives",
    "wife": "wives", "calf": "calves", "scarf": "scarves", "wolf": "wolves",
    "potato": "potatoes", "tomato": "tomatoes", "cargo": "cargoes",
    "echo": "echoes", "hero": "heroes", "volcano": "volcanoes",
    "cactus": "cacti", "series": "series", "species": "species",
}

_IRREGULAR_PAST = {
    "make": "made", "take": "took", "get": "got", "put": "put", "cut": "cut",
    "set": "set", "run": "ran", "go": "went", "do": "did", "have": "had",
    "find": "found", "give": "gave", "bring": "brought", "buy": "bought",
    "send": "sent", "leave": "left", "hold": "held", "tell": "told",
    "sell": "sold", "lend": "lent", "build": "built", "rebuild": "rebuilt",
    "hang": "hung", "sweep": "swept", "lay": "laid", "pay": "paid",
    "feed": "fed", "shut": "shut", "split": "split", "wind": "wound",
    "rewind": "rewound", "sew": "sewed", "stick": "stuck", "swing": "swung",
    "dig": "dug", "grind": "ground", "refit": "refitted", "fit": "fitted",
    "ring": "rang", "write": "wrote", "meet": "met", "read": "read",
    "sit": "sat", "swim": "swam", "drive": "drove", "ride": "rode",
    "catch": "caught", "teach": "taught", "think": "thought", "sleep": "slept",
    "eat": "ate", "drink": "drank", "lose": "lost", "win": "won", "fall": "fell",
    "see": "saw", "come": "came", "know": "knew", "throw": "threw",
    "grow": "grew", "blow": "blew", "break": "broke", "choose": "chose",
    "spend": "spent", "sing": "sang", "fly": "flew", "draw": "drew",
    "hear": "heard", "keep": "kept", "say": "said", "wear": "wore",
    "freeze": "froze", "stand": "stood", "bleed": "bled", "feel": "felt",
    "light": "lit", "shake": "shook", "wake": "woke", "speak": "spoke",
    "learn": "learnt", "burn": "burnt", "mow": "mowed", "sow": "sowed",
    "reset": "reset", "forget": "forgot", "begin": "began",
}


# Compound nouns inflect like their last element: postwoman, midwife, starfish.
_IRREGULAR_ENDINGS = (("woman", "women"), ("man", "men"), ("wife", "wives"),
                      ("louse", "lice"), ("fish", "fish"), ("child", "children"))
_NOT_COMPOUNDS = {"human", "german", "shaman", "caiman"}
_PREPOSITIONS = (" of ", " with ", " on ", " in ", " for ")


def plural(phrase: str) -> str:
    """Pluralise a noun phrase's head noun.

    The head is the last word ("fuel filter" -> "fuel filters"), or the word
    before a preposition ("slice of cake" -> "slices of cake").
    """
    for preposition in _PREPOSITIONS:
        if preposition in phrase:
            head, _, rest = phrase.partition(preposition)
            return plural(head) + preposition + rest
    head, _, word = phrase.rpartition(" ")
    lower = word.lower()
    ending = next((pair for pair in _IRREGULAR_ENDINGS if lower.endswith(pair[0])), None)
    if lower in _IRREGULAR_PLURALS:
        new = _IRREGULAR_PLURALS[lower]
    elif ending and lower not in _NOT_COMPOUNDS:
        new = word[: len(word) - len(ending[0])] + ending[1]
    elif re.search(r"[^su]s$", lower) and not lower.endswith(("as", "is")):
        new = word  # already plural ("brakes", "fairy lights")
    elif re.search(r"(s|x|z|ch|sh)$", lower):
        new = word + "es"
    elif re.search(r"[^aeiou]y$", lower):
        new = word[:-1] + "ies"
    else:
        new = word + "s"
    return f"{head} {new}" if head else new


def looks_plural(phrase: str) -> bool:
    """Guess whether a noun phrase is plural from its head noun ("taps", "chest of drawers")."""
    for preposition in _PREPOSITIONS:
        phrase = phrase.partition(preposition)[0]
    word = phrase.rpartition(" ")[2].lower()
    if word in _IRREGULAR_PLURALS.values() and word not in _IRREGULAR_PLURALS:
        return True
    return bool(re.search(r"[^su]s$", word)) and not word.endswith(("as", "is"))


def with_verb_be(phrase: str) -> str:
    """Append "is" or "are" to agree with a noun phrase ("the taps are")."""
    return f"{phrase} {'are' if looks_plural(phrase) else 'is'}"


def _split_verb(phrase: str) -> tuple[str, str]:
    verb, _, rest = phrase.partition(" ")
    return verb, (" " + rest if rest else "")


# Longer verbs that still double their last consonant in British spelling.
_DOUBLING_VERBS = {
    "label", "cancel", "travel", "level", "signal", "model", "patrol", "refuel",
    "unclog", "refit", "rebed", "reset", "unplug", "unzip", "regret", "forget",
    "begin", "permit", "admit", "equip", "format", "handicap", "kidnap",
}


def _doubles_final(verb: str) -> bool:
    # One-syllable verbs ending in a single vowel and consonant double it
    # (plug -> plugged, strip -> stripping).
    return verb in _DOUBLING_VERBS or bool(re.fullmatch(r"[^aeiou]*[aeiou][bdgklmnprt]", verb))


def past(phrase: str) -> str:
    """Put the first word of a verb phrase into the past tense."""
    verb, rest = _split_verb(phrase)
    stem = verb.rpartition("-")[2]
    prefix = verb[: len(verb) - len(stem)]
    if stem in _IRREGULAR_PAST:
        new = _IRREGULAR_PAST[stem]
    elif stem.endswith("e"):
        new = stem + "d"
    elif re.search(r"[^aeiou]y$", stem):
        new = stem[:-1] + "ied"
    elif _doubles_final(stem):
        new = stem + stem[-1] + "ed"
    else:
        new = stem + "ed"
    return prefix + new + rest


def ing(phrase: str) -> str:
    """Put the first word of a verb phrase into its -ing form."""
    verb, rest = _split_verb(phrase)
    stem = verb.rpartition("-")[2]
    prefix = verb[: len(verb) - len(stem)]
    if stem.endswith("ie"):
        new = stem[:-2] + "ying"
    elif stem.endswith("e") and not stem.endswith(("ee", "ye", "oe")):
        new = stem[:-1] + "ing"
    elif _doubles_final(stem):
        new = stem + stem[-1] + "ing"
    else:
        new = stem + "ing"
    return prefix + new + rest


def third_person(phrase: str) -> str:
    """Put the first word of a verb phrase into the third person ("fix" -> "fixes")."""
    verb, rest = _split_verb(phrase)
    if re.search(r"(s|x|z|ch|sh|o)$", verb):
        new = verb + "es"
    elif re.search(r"[^aeiou]y$", verb):
        new = verb[:-1] + "ies"
    else:
        new = verb + "s"
    return new + rest


def _graded(adjective: str, suffix: str, periphrasis: str) -> str:
    if " " in adjective or "-" in adjective or len(re.findall(r"[aeiouy]+", adjective)) > 2:
        return f"{periphrasis} {adjective}"
    if adjective.endswith("e"):
        return adjective + suffix[1:]
    if re.search(r"[^aeiou]y$", adjective):
        return adjective[:-1] + "i" + suffix
    if re.fullmatch(r"[^aeiou]*[aeiou][bdgmnpt]", adjective):
        return adjective + adjective[-1] + suffix
    return adjective + suffix


def comparative(adjective: str) -> str:
    """Comparative form: "windy" -> "windier", "cold" -> "colder", "hot" -> "hotter"."""
    return _graded(adjective, "er", "more")


def superlative(adjective: str) -> str:
    """Superlative form: "windy" -> "windiest", "busy" -> "busiest"."""
    return _graded(adjective, "est", "most")


def lower_first(sentence: str) -> str:
    """Lower-case a sentence's first letter unless it begins with a name or "I"."""
    first_word = re.match(r"[\w']*", sentence).group(0)
    if first_word.split("'")[0] in PROPER_WORDS or re.fullmatch(r"I('\w+)?", first_word):
        return sentence
    return sentence[:1].lower() + sentence[1:]


def with_article(phrase: str) -> str:
    """Prefix "a" or "an" to a phrase, judged by its first word."""
    lower = phrase.lower()
    vowel_sound = lower[:1] in "aeiou" and not lower.startswith(
        ("uni", "use", "usu", "ure", "eu", "one", "once")
    )
    if lower.startswith(("hour", "honest", "heir", "8", "11", "18")):
        vowel_sound = True
    return ("an " if vowel_sound else "a ") + phrase


# ---------------------------------------------------------------------------
# Number, time and date slots (functions of the random source)
# ---------------------------------------------------------------------------

_HOURS = [7, 8, 6, 9, 10, 11, 12, 1, 2, 3, 4, 5]
_MINUTES = ["30", "15", "00", "45", "40", "20", "10", "50", "05", "25", "35", "55"]
_HOUR_WORDS = ["seven", "eight", "six", "nine", "ten", "eleven", "twelve",
               "one", "two", "three", "four", "five"]
_WORD_NUMBERS = ["two", "three", "four", "five", "six", "ten", "eight",
                 "twelve", "seven", "nine", "eleven", "twenty"]
_WEEKDAYS = ["Friday", "Monday", "Saturday", "Tuesday", "Thursday",
             "Wednesday", "Sunday"]
_MONTHS = ["June", "July", "August", "May", "September", "April", "October",
           "March", "December", "November", "February", "January"]


def _zipf_index(rng: random.Random, n: int, exponent: float = 1.0) -> int:
    weights = [1.0 / (rank + 1) ** exponent for rank in range(n)]
    cum = list(accumulate(weights))
    return bisect.bisect_right(cum, rng.random() * cum[-1])


def time_hm(rng: random.Random) -> str:
    """A clock time such as "7:40"; quarter and half hours dominate."""
    hour = _HOURS[_zipf_index(rng, len(_HOURS), 0.6)]
    minute = _MINUTES[_zipf_index(rng, len(_MINUTES), 0.8)]
    return f"{hour}:{minute}"


def time_words(rng: random.Random) -> str:
    """A spoken time such as "half past six" or "nine o'clock"."""
    hour = _HOUR_WORDS[_zipf_index(rng, len(_HOUR_WORDS), 0.6)]
    form = _zipf_index(rng, 9, 0.9)
    return [
        f"half past {hour}", f"{hour} o'clock", f"quarter past {hour}",
        f"quarter to {hour}", f"{hour}-ish", f"ten past {hour}",
        f"twenty to {hour}", f"half-past {hour}", f"five to {hour}",
    ][form]


def small_number(rng: random.Random) -> str:
    """A small count, written as a word or as digits."""
    if rng.random() < 0.55:
        return _WORD_NUMBERS[_zipf_index(rng, len(_WORD_NUMBERS), 0.8)]
    return str(2 + _zipf_index(rng, 28, 1.0))


def big_number(rng: random.Random) -> str:
    """A head count or tally between 20 and about 480."""
    return str(20 + int(460 * rng.random() ** 2))


def four_digits(rng: random.Random) -> str:
    """A member number or an engine-hours reading."""
    return str(1000 + int(8999 * rng.random()))


def _ordinal(day: int) -> str:
    suffix = "th" if 10 <= day % 100 <= 20 else {1: "st", 2: "nd", 3: "rd"}.get(day % 10, "th")
    return f"{day}{suffix}"


def ordinal(rng: random.Random) -> str:
    """A day of the month such as "2nd" or "14th"."""
    return _ordinal(1 + int(31 * rng.random()))


def price(rng: random.Random) -> str:
    """A café or fare price such as "£3.20"."""
    pounds = 1 + _zipf_index(rng, 14, 0.8)
    pence = ["50", "20", "80", "00", "40", "60", "90", "10", "75", "25"][
        _zipf_index(rng, 10, 0.7)
    ]
    return f"£{pounds}.{pence}"


def weekday(rng: random.Random) -> str:
    """A day of the week."""
    return _WEEKDAYS[_zipf_index(rng, len(_WEEKDAYS), 0.4)]


def month(rng: random.Random) -> str:
    """A month name, summer months most often."""
    return _MONTHS[_zipf_index(rng, len(_MONTHS), 0.5)]


def berth(rng: random.Random) -> str:
    """A berth number on the main pier."""
    return f"berth {1 + _zipf_index(rng, 9, 0.9)}"


def _clock(total_minutes: int) -> str:
    hour, minute = divmod(total_minutes % (12 * 60), 60)
    return f"{hour or 12}:{minute:02d}"


def time_range(rng: random.Random) -> str:
    """A slot such as "7:30 to 8:15"; the end is always after the start."""
    start = 6 * 60 + 15 * int(rng.random() * 56)
    length = 15 * (1 + _zipf_index(rng, 8, 0.8))
    return f"{_clock(start)} to {_clock(start + length)}"


def tide_times(rng: random.Random) -> str:
    """High and low water about six and a quarter hours apart."""
    high = int(rng.random() * 12 * 60)
    low = high + 6 * 60 + int(rng.random() * 25)
    return f"{_clock(high)}, low water {_clock(low)}"


def leave_dates(rng: random.Random) -> str:
    """A short leave period such as "from the 3rd to the 10th"."""
    start = 1 + int(rng.random() * 24)
    end = start + 1 + _zipf_index(rng, 14, 0.7)
    return f"from the {_ordinal(start)} to the {_ordinal(end)}"


def votes(rng: random.Random) -> str:
    """A council vote tally where the motion wins, such as "14 votes to 3"."""
    against = int(rng.random() * 9)
    return f"{against + 1 + int(rng.random() * 20)} votes to {against}"


FUNCTIONS: dict[str, Callable[[random.Random], str]] = {
    "time_hm": time_hm,
    "time_words": time_words,
    "n": small_number,
    "big_n": big_number,
    "four_digits": four_digits,
    "ordinal": ordinal,
    "price": price,
    "weekday": weekday,
    "month": month,
    "berth": berth,
    "time_range": time_range,
    "tide_times": tide_times,
    "votes": votes,
    "leave_dates": leave_dates,
}


# ---------------------------------------------------------------------------
# Expansion engine
# ---------------------------------------------------------------------------

_SLOT = re.compile(r"\{([a-z_]+)(?:\.([a-z]+))?(\?)?\}")
_WHOLE_SLOT = re.compile(r"\{[a-z_]+\}")
# Position of the explicit form in an "a|b|c" entry, by modifier.
_EXPLICIT_FORM = {"pl": 1, "past": 1, "ing": 2}


def _check_slots() -> None:
    """Fail early on a slot name defined twice, or a slot or modifier that does not exist."""
    clashes = (LEXICON.keys() & RULES.keys()) | (FUNCTIONS.keys() & (LEXICON.keys() | RULES.keys()))
    if clashes:
        raise ValueError(f"slot names defined twice: {sorted(clashes)}")
    known = LEXICON.keys() | RULES.keys() | FUNCTIONS.keys()
    for name, options in {**LEXICON, **RULES}.items():
        for option in options:
            for slot, modifier, _ in _SLOT.findall(option):
                if slot not in known:
                    raise KeyError(f"{name}: unknown slot {{{slot}}} in {option!r}")
                if modifier and modifier not in _MODIFIERS:
                    raise KeyError(f"{name}: unknown modifier .{modifier} in {option!r}")


class WeightedChoice:
    """A list of alternatives drawn with fixed weights (Zipf by rank unless given)."""

    def __init__(self, options: list[str], exponent: float = DEFAULT_EXPONENT,
                 weights: list[float] | None = None):
        if not options:
            raise ValueError("a rule needs at least one alternative")
        if weights is None:
            weights = [1.0 / (rank + 1) ** exponent for rank in range(len(options))]
        if len(weights) != len(options):
            raise ValueError("one weight per alternative")
        self.options = options
        self._cumulative = list(accumulate(weights))

    def pick(self, rng: random.Random) -> str:
        """Draw one alternative."""
        point = rng.random() * self._cumulative[-1]
        return self.options[bisect.bisect_right(self._cumulative, point)]


class Grammar:
    """Expands templates with slots drawn from rules, word lists and functions."""

    def __init__(self, rng: random.Random):
        self.rng = rng
        self._used: dict[str, set[str]] = {}
        self.choices: dict[str, WeightedChoice] = {}
        _check_slots()
        for name, options in {**LEXICON, **RULES}.items():
            if name in EXPLICIT_WEIGHTS:
                self.choices[name] = WeightedChoice(options, weights=EXPLICIT_WEIGHTS[name])
            else:
                exponent = EXPONENTS.get(name) or (
                    LONG_LIST_EXPONENT if len(options) >= LONG_LIST_LENGTH else DEFAULT_EXPONENT
                )
                self.choices[name] = WeightedChoice(options, exponent)

    def expand(self, template: str, depth: int = 0) -> str:
        """Fill every slot in a template, recursively."""
        if depth > MAX_DEPTH:
            raise RecursionError(f"template nests too deeply: {template!r}")
        return _SLOT.sub(lambda m: self._fill(m, depth), template)

    def _fill(self, match: re.Match, depth: int) -> str:
        name, modifier, optional = match.groups()
        if optional and self.rng.random() >= OPTIONAL_SLOT_PROBABILITY:
            return ""
        return self.symbol(name, modifier, depth + 1)

    def new_line(self) -> None:
        """Forget the values used so far; call before each message line."""
        self._used.clear()

    def _draw(self, name: str, draw: Callable[[], str]) -> str:
        used = self._used.setdefault(name, set())
        value = draw()
        for _ in range(REDRAWS):
            if value not in used:
                break
            value = draw()
        used.add(value)
        return value

    def symbol(self, name: str, modifier: str | None = None, depth: int = 0) -> str:
        """Expand one named slot and apply its modifier.

        Args:
            name: a LEXICON, RULES or FUNCTIONS name.
            modifier: one of the _MODIFIERS keys, or None.
            depth: current nesting depth, to catch runaway recursion.

        Returns:
            The expanded text, not yet tidied.
        """
        if name in FUNCTIONS:
            return _apply(self._draw(name, lambda: FUNCTIONS[name](self.rng)), modifier)
        option = self._draw(name, lambda: self.choices[name].pick(self.rng))
        if "|" in option:
            # "base|plural" or "base|past|ing": use an explicit form if there
            # is one for this modifier, otherwise inflect the base by rule.
            forms = option.split("|")
            index = _EXPLICIT_FORM.get(modifier or "")
            if index is not None and index < len(forms):
                return self.expand(forms[index], depth)
            option = forms[0]
        if modifier and _WHOLE_SLOT.fullmatch(option):
            # Pass the modifier down so nested irregular forms are honoured.
            return self.symbol(option[1:-1], modifier, depth + 1)
        return _apply(self.expand(option, depth), modifier)


_MODIFIERS: dict[str, Callable[[str], str]] = {
    "pl": plural,
    "past": past,
    "ing": ing,
    "lc": lower_first,
    "s": third_person,
    "be": with_verb_be,
    "er": comparative,
    "est": superlative,
    "a": with_article,
}


def _apply(text: str, modifier: str | None) -> str:
    if modifier is None:
        return text
    return _MODIFIERS[modifier](text)


# ---------------------------------------------------------------------------
# Output and command line
# ---------------------------------------------------------------------------

def tidy(line: str) -> str:
    """Normalise spacing and punctuation and capitalise sentence starts."""
    line = re.sub(r"\s+", " ", line).strip()
    line = re.sub(r"\s+([,.!?;])", r"\1", line)
    line = re.sub(r",([.!?])", r"\1", line)
    line = re.sub(r"([.!?])\.", r"\1", line)
    line = re.sub(r"(^|[.!?] )([a-z])", lambda m: m.group(1) + m.group(2).upper(), line)
    return re.sub(r"([.!?]) X$", r"\1 x", line)  # a kiss sign-off stays lower case


def generate_lines(seed: int, target_words: int) -> Iterator[str]:
    """Yield message lines until at least target_words words have been produced.

    Args:
        seed: seed for the one random source behind every choice.
        target_words: stop after the line that reaches this many words.

    Returns:
        An iterator of tidy lines without trailing newlines.
    """
    grammar = Grammar(random.Random(seed))
    produced = 0
    while produced < target_words:
        grammar.new_line()
        line = tidy(grammar.symbol("line"))
        produced += len(line.split())
        yield line


def write_corpus(path: Path, seed: int, target_words: int) -> int:
    """Write one generated file, UTF-8 with one message per line.

    Args:
        path: file to create or overwrite.
        seed: random seed passed to generate_lines.
        target_words: minimum number of words to write.

    Returns:
        The number of whitespace-separated words written.
    """
    lines = list(generate_lines(seed, target_words))
    path.parent.mkdir(parents=True, exist_ok=True)
    with open(path, "w", encoding="utf-8", newline="\n") as handle:
        handle.write("\n".join(lines) + "\n")
    return sum(len(line.split()) for line in lines)


def main(argv: list[str] | None = None) -> int:
    """Regenerate the bundled files, or one custom file when any option is given.

    Args:
        argv: command-line arguments; None means sys.argv.

    Returns:
        The process exit status.
    """
    parser = argparse.ArgumentParser(
        description=__doc__.splitlines()[0],
        epilog="With no options, rewrites corpus.txt and heldout.txt beside this script.",
    )
    parser.add_argument("--seed", type=int, help="random seed (default 1)")
    parser.add_argument("--words", type=int, help="target word count (default 320000)")
    parser.add_argument("--out", type=Path, help="output file (default: corpus.txt beside this script)")
    args = parser.parse_args(argv)

    if args.seed is None and args.words is None and args.out is None:
        jobs = [(seed, words, HERE / name) for seed, words, name in DEFAULT_JOBS]
    else:
        seed, words, name = DEFAULT_JOBS[0]
        jobs = [(
            seed if args.seed is None else args.seed,
            words if args.words is None else args.words,
            HERE / name if args.out is None else args.out,
        )]
    for seed, words, path in jobs:
        count = write_corpus(path, seed, words)
        print(f"wrote {path} ({count} words, seed {seed})", file=sys.stderr)
    return 0


# ---------------------------------------------------------------------------
# Lexicon: people, places, boats and the long tail of everyday words
# ---------------------------------------------------------------------------

LEXICON: dict[str, list[str]] = {
    "first": _items("""
        Maren, Tobin, Ines, Wendell, Priya, Oskar, Nell, Rufus, Talia, Bram,
        Cerys, Dario, Hettie, Jory, Lowenna, Milo, Petra, Quin, Rosalind, Sefton,
        Tamsin, Ulla, Vesna, Wilf, Yara, Ansel, Bettany, Corin, Delphine, Emrys,
        Fenna, Gideon, Hollis, Ilse, Jonah, Kerensa, Linnet, Morwen, Niall, Odile,
        Piran, Rhoswen, Tegan, Ulric, Verity, Wynn, Xanthe, Yusuf, Zillah, Agnes,
        Barnaby, Clem, Dora, Ewan, Florrie, Gus, Hal, Ivo, Juno, Kit, Lottie,
        Mabli, Nye, Orla, Ronan, Sunniva, Teodor, Una, Vikram, Wren, Alfie,
        Beatrix, Cosmo, Dilys, Efa, Fergus, Greer, Henrike, Idris, Jessamy, Kasia,
        Leif, Mireille, Noor, Osian, Pim, Rowan, Senna, Thea, Valentin, Willa,
        Zofia, Anouk, Bex, Cai, Dagny, Elowen, Farah, Gethin, Honor, Isak, Jana,
        Lorcan, Mags, Nico, Ottilie, Pasco, Rhiannon, Sorrel, Tiago, Effie,
        Aurelio, Zoë, Béla, Perpetua, Ezra, Marisol, Tansy, Oisin, Brannoc,
        Aldo, Bryony, Casimir, Dunja, Eamon, Fia, Gwilym, Hedda, Imogen, Jerzy,
        Keziah, Lyra, Magnus, Nerys, Olwen, Paavo, Ragna, Silas, Tove, Urszula,
        Vaughan, Wilhelmina, Yestin, Zeno, Adaeze, Carys, Desmond, Elin,
        Faisal, Gwen, Hamish, Iona, Jem, Lachlan, Meena, Ottoline, Percy,
        Rosa, Stellan, Tabitha, Ursula, Wallis, Ysolde, Ambrose, Bronwen,
        Cyrus, Dulcie, Edmund, Flick, Gregor, Hester, Ishbel, Jasper, Kenan,
        Liesel, Morag, Nesta, Obi, Pippa, Quentin, Rafferty, Signe, Tomos,
        Umar, Viola, Winnie, Bethan, Caspian, Dewi, Esme, Fraser, Gianni,
        Harriet, Ivor, Joss, Kofi, Lenka, Mungo, Nadia, Orin, Phoebe, Reuben,
        Saskia, Tariq, Uma, Vida, Wolfie, Xavi, Yolanda, Zak, Anselm, Briony,
        Cormac, Demelza, Eluned, Fintan, Gwenllian, Hywel, Isolde, Jethro,
        Kieran, Lowri, Merryn, Nolwenn, Ozzie, Peregrine, Rhodri, Seren,
        Torin, Ulrika, Wenna, Yannick, Zinnia, Alaric, Blodwen, Conan,
        Dervla, Eilidh, Fitz, Gaspard, Hebe, Inigo, Kestrel,
        Madoc, Nessa, Oriel, Pryce, Romilly, Steffan, Tegwen
    """),
    "surname": _items("""
        Pellow, Tresize, Marrack, Quennell, Brackwater, Fenwright, Caddick,
        Lorimer, Penhallow, Rainsford, Scarrow, Varcoe, Wetherell, Yelland,
        Abernant, Blewett, Coppinger, Dewlish, Eddowes, Gorran, Hensley, Ivesby,
        Jolliffe, Kittow, Lanyon, Nancarrow, Ottery, Quiller, Roskilly, Sennett,
        Trevaskis, Uglow, Vosper, Angove, Bolitho, Carveth, Fraddon, Hocking,
        Jewell, Keast, Lugg, Menhenick, Polglase, Spargo, Trounson, Verran,
        Wearne, Bellweather, Cransley, Drummock, Farrant, Gillow, Harbottle,
        Ingledew, Kettleby, Loveday, Nettleship, Ormerod, Quarrie, Ravenhill,
        Stannard, Threlfall, Upcott, Vickery, Birtwhistle, Dimmock, Eversleigh,
        Fothergill, Gamlin, Hext, Jago, Kernick, Moyle, Northey, Prowse, Rundle,
        Skewes, Tonkin, Uren, Yendle, Marrowby, Tidball, Crumplin, Sallow,
        Pendower, Chegwidden, Tregarthen, Hawksworth, Ashcombe, Culverhouse,
        Goodspeed, Hallworthy, Quickfall, Rattenbury, Sloggett, Tapscott,
        Underhay, Vellacott, Westaway, Yeoland, Bickle, Dingle, Eastcott,
        Furze, Gribble, Isbell, Jope, Kellow, Lethbridge, Netherton, Oxenham,
        Pidgeon, Quance, Rowse, Screech, Tuckett, Vanstone, Widdicombe,
        Yabsley, Ashplant, Doidge, Endacott, Gidley, Hannaford, Ilott, Kivell,
        Luscombe, Medland, Northcott, Ough, Petherick, Rodda, Sobey, Treloar,
        Wonnacott, Yole, Penwarden, Blamey
    """),
    # Islands, harbour towns and landmarks of the invented archipelago.
    "place": _items("""
        Quellhaven, Brisket Rock, Little Ossory Pier, Gullhallow, Tarnmouth,
        Fennick Isle, Hobb's Landing, Cragwen, Dunnock Bay, Merrow Quay,
        Scarra Point, Pennycress Island, Mallowick Harbour, Kelp Strand,
        Morrowby, Lantern Head, Ferrisholt, Drowned Oak, Cobble Cove,
        Wrenna Sands, Haddock Steps, Nether Tolly, Upper Tolly, Skerrimore,
        Bellhook, Ashmere Quay, Puffin Ledge, Long Mallow, Grisling, Tillyhaven,
        Inchmarrow, Gossamer Head, Thornsey, Calloway Flats, Tidewick,
        Hennet's Cove, Bramble Holm, Great Ossory, Cullet Bay, Sorrow's End,
        Gannet Skerry, Oyster Reach, Windle Isle, Mossbank Quay, Cairnmere,
        Flint Harbour, Kestle Point, Tansy Island, Widdershins Rock, Lowmarsh,
        Old Tolly Slip, Curlew Spit, Barnacle Hythe, Harrowsea, Peddleby,
        Glimmering Sands, Cowrie Bay, Starling Holm, Quillet, Brackenmouth,
        Selkie Point, Nettlecombe Quay, Oarsby, Fathom Isle, Pewter Cove,
        Ladle Rock, Sunken Mill, Hagstone Bay, Wimbrel Island, Scrattle Head,
        Tollhouse Pier, Periwinkle Strand, Crabapple Isle, Frostwick
    """),
    "pub": _items("""
        the Tolly Arms, the Gannet and Anchor, the Mended Net, the Salt Cellar,
        the Three Herrings, the Ferryman's Rest, the Jolly Heron, the Cockle Inn,
        the Lamplighter, the Drowned Oak Inn, the Quell Arms, the Bosun's Whistle,
        the Crooked Anchor, the Rope and Lantern, the Sleeping Seal,
        the Kelpie, the Smugglers' Rest, the Blue Lobster, the Harbour Lights,
        the Tarred Rope, the Old Customs House, the Wandering Gull
    """),
    "boat": _items("""
        the Gannet's Wake, the Marrow Queen, the Little Tern, the Brisk Morning,
        the Kittiwake, the Patient Heron, the Old Salt, the Quell Star,
        the Saltmarrow Belle, the Dunnock, the Spindrift, the Cormorant's Rest,
        the Heron's Luck, the Cockle, the Tolly Rose, the Grey Mare,
        the Merrow Lass, the Wrenna, the Plover, the Stubborn Puffin,
        the Morning Tide, the Ossory Maid, the Lantern, the Bellhook barge,
        the Curlew's Call, the Lucky Sprat, the Sea Lavender, the Tansy Belle,
        the Stormy Petrel, the Honest Oyster, the Marram, the Tern Again,
        the Drift Along, the Widdershins, the Ebb and Flow, the Salt Herring,
        the Brave Limpet, the Pewter Gull, the Quiet Otter, the Fathom,
        the Ossory Lantern, the Cowrie, the Lady Peddleby, the Selkie,
        the Patience, the Maid of Frostwick, the Glimmer, the Second Chance
    """),
    "sea_area": _items("""
        Saltmarrow Sound, the Quell Narrows, the outer channel, the Ossory banks,
        the western approaches, Tolly Reach, the Skerrimore shallows
    """),
    "role": _items("""
        skipper, pilot, harbour master, duty manager, deckhand, yard foreman,
        relief pilot, engineer, night watch, treasurer,
        council secretary, council chair, café manager, weather desk,
        ticket office, apprentice, cook, cleaner, first mate, bosun,
        booking clerk, membership secretary, safety officer
    """),
    "sign_word": _items("""
        Thanks, Cheers, Best, Many thanks, Thanks again, Ta, Best wishes,
        All the best, Kind regards, Speak soon, See you soon, Love
    """),
    "minutes": _items("""
        ten, five, fifteen, 10, twenty, 5, 15, 20, thirty, 25, forty, 45, 30, 35
    """),
    "room": _items("""
        ticket office, waiting room, café, staff kitchen, store room, mess room,
        locker room, drying room, yard office, workshop, paint shed, net loft,
        chandlery, fuel dock, harbour office, weather desk, wheelhouse,
        engine room, passenger lounge, members' hall, boardroom, staff toilets,
        first aid room, lost property cupboard, boot room, bike shed,
        bus shelter, bunkhouse, slipway hut, radio room, cold store, tool store,
        gas cage, bin store, back office, upstairs office, porch, car park,
        sail loft, rope store, smokehouse, fish shed, washroom, laundry room,
        meeting room, quiet room, crew room, chart room, lamp room, boiler room
    """),
    "deck_area": _items("""
        upper deck, lower deck, car deck, stern, bow, foredeck, aft deck,
        passenger lounge, wheelhouse, ramp, cargo hold, bench by the stairs,
        back seats, luggage rack, café counter, toilets
    """),
    "meeting_place": _items("""
        the station, the pier head, the café, the bus stop, the ticket office,
        {pub}, the car park, the slipway, the lifeboat station,
        the harbour wall, the chip shop, the post office, the yard gate,
        the bandstand, the church gate, the clock tower, the library,
        the school gates, the top of the steps, the end of the breakwater
    """),
    "venue": _items("""
        members' hall, net loft, back room of {pub}, café,
        {place} library, lifeboat station, {place} village hall, boardroom,
        function room at the {place} Hotel, church hall in {place}
    """),
    "passenger_kind": _items("""
        passenger, foot passenger, cyclist, day-tripper, walker, family,
        pensioner, student, dog owner, wheelchair user, tourist, visitor,
        islander, commuter, member, non-member, contractor, delivery driver,
        birdwatcher, photographer, surveyor, schoolchild|schoolchildren,
        camper, hiker, wedding guest, season-ticket holder, teenager, nurse,
        teacher, vet, plumber, builder, film crew|film crews, backpacker,
        honeymooner, music festival goer, island hopper, art student,
        sea swimmer, coach party|coach parties, fisherman|fishermen,
        school inspector, wedding photographer, newly-wed, yoga retreat guest
    """),
    "group_kind": _items("""
        schoolchildren, walkers, birdwatchers, pensioners, cyclists, scouts,
        students, wedding guests, choir members, rugby players, surveyors,
        archaeologists, artists, anglers, divers, volunteers, teachers
    """),
    "group_need": _items("""
        bikes, luggage, wheelchairs, buggies, a guide dog, packed lunches,
        kayaks, surf boards, camping gear, musical instruments, easels,
        fishing tackle, dive kit, a cake, a coffin, sound equipment
    """),
    "discount_group": _items("""
        members, students, pensioners, children under five, families,
        islanders, carers, volunteers, groups of ten or more, cyclists,
        school trips, season-ticket holders, veterans, staff families
    """),
    "relative": _items("""
        mum, sister, brother, dad, nan, partner, cousin, gran, aunt, kids,
        husband, wife, daughter, son, uncle, niece, nephew, grandad, grandma,
        auntie, best mate, flatmate, neighbour, boyfriend, girlfriend,
        mother-in-law, father-in-law, sister-in-law, brother-in-law, stepdad,
        stepmum, godson, goddaughter, twin, grandkids, fiancée, landlord,
        oldest friend, old school friend
    """),
    "service_person": _items("""
        plumber, electrician, mechanic, dentist, vet, hairdresser, builder,
        roofer, carpenter, barber, plasterer, locksmith, glazier, gardener,
        tree surgeon, chimney sweep, window cleaner, piano tuner, tailor,
        cobbler, accountant, solicitor, optician, physio, osteopath,
        chiropodist, childminder, babysitter, dog walker, dog groomer, farrier,
        boat builder, sailmaker, rigger, welder, signwriter, photographer,
        caterer, baker, butcher, fishmonger, florist, cleaner, handyman, tiler,
        bricklayer, stonemason, thatcher, upholsterer, watch repairer,
        bike mechanic, driving instructor, swimming teacher, music teacher,
        maths tutor, painter and decorator,
        roof thatcher, plumber from {place}, well digger, dry-stone waller,
        hedge layer, sheep shearer, knife sharpener, clock repairer, saddler
    """),
    "occupation": _items("""
        teacher, nurse, farmer, fisherman, vicar, doctor, midwife, pharmacist,
        postwoman, postman, {job}, ranger, coastguard, lifeguard, shepherd, beekeeper,
        potter, painter, poet, journalist, headteacher, librarian, shopkeeper,
        publican, chef, student, retired engineer, oyster farmer, boat builder,
        sculptor, weaver, cheesemaker, baker, surveyor, archaeologist,
        geologist, ornithologist, marine biologist
    """),
    # Things people lose, lend and leave behind.
    "belonging": _items("""
        umbrella, rucksack, phone, phone charger, wallet, scarf|scarves, hat,
        glove, set of keys|sets of keys, water bottle, flask, lunchbox, book,
        notebook, diary, camera, tablet, laptop, pair of glasses|pairs of glasses,
        pair of sunglasses|pairs of sunglasses, pair of headphones|pairs of headphones,
        earring, ring, bracelet, necklace, watch, hairbrush, walking stick,
        teddy bear, toy boat, football, tennis racket, fishing rod,
        bucket and spade|buckets and spades, beach towel, swimming costume,
        raincoat, jacket, fleece, jumper, cardigan, hoodie, cap, beanie,
        pushchair, bike helmet, shopping bag, tote bag, handbag, briefcase,
        suitcase, holdall, passport, library card, bus pass, season ticket,
        lanyard, key card, vacuum flask, packed lunch, knitting bag, map, guidebook,
        pair of binoculars|pairs of binoculars, dog lead, dog bowl, throwing ring,
        kite, skateboard, scooter, doll, jigsaw, box of crayons|boxes of crayons,
        sketchbook, paintbrush, guitar case, violin case, tripod, hearing aid,
        inhaler, pill box, glasses case, wellington boot, trainer, sandal,
        slipper, sock, mitten, bobble hat, parka, cagoule, poncho,
        picnic blanket, cool box, deckchair, windbreak, camping stool,
        sleeping bag, tent peg, torch, pocket knife|pocket knives, lighter, pen,
        pencil case, calculator, clipboard, folder, envelope, parcel, postcard,
        birthday card, bouquet, plant pot, cake tin, casserole dish,
        baking tray, plastic tub, ukulele, harmonica, jigsaw puzzle,
        fountain pen, purse, cuddly rabbit, rain hat, reusable cup,
        fishing tackle bag, yoga mat, umbrella stand, sun lounger, walking pole,
        bird book, field notebook, paddle, snorkel mask, pair of flippers|pairs of flippers,
        wetsuit, body board, crabbing bucket, picnic hamper, pair of gloves|pairs of gloves,
        hand warmer, hip flask, tobacco tin, harmonica case, travel pillow, eye mask,
        sewing kit, car key, bike lock, hairband, shell collection, box of fudge,
        bag of shopping, bunch of flowers|bunches of flowers, dog toy, cat carrier
    """),
    "borrow_item": _items("""
        ladder, drill, car, van, trailer, wheelbarrow, lawnmower, tent,
        camping stove, cool box, barbecue, gazebo, bike, bike pump, tow rope,
        jump leads, pressure washer, hedge trimmer, strimmer, paddleboard,
        kayak, wetsuit, fishing rod, binoculars, telescope, camera, tripod,
        projector, speaker, microphone, guitar, keyboard, sewing machine,
        slow cooker, bread maker, food processor, blender, punch bowl,
        folding table, folding chairs, trestle table, extension lead,
        sack truck, steam cleaner, carpet cleaner, vacuum cleaner, iron, ironing board,
        hair clippers, suit, wedding hat, pram, car seat, travel cot, highchair,
        dog crate, cat basket, board games, laptop charger, printer, sledge,
        snorkel, roof rack, bike rack, chainsaw, log splitter, leaf blower
    """),
    "clothing": _items("""
        boots, wellies, waterproofs, oilskins, jacket, fleece, hi-vis vest,
        gloves, hat, beanie, scarf, socks, thermals, overalls, boiler suit,
        apron, uniform shirt, polo shirt, jumper, hoodie, cap, sunhat,
        sunglasses, deck shoes, trainers, jeans, shorts, trousers, coat,
        raincoat, cagoule, gilet, waistcoat, belt, name badge, hard hat,
        ear defenders, safety goggles, steel toecaps, woolly hat, neck warmer,
        leggings, tracksuit bottoms, flip-flops, sandals, slippers, pyjamas
    """),
    "colour": _items("""
        red, blue, green, yellow, black, navy, grey, white, orange, pink,
        purple, brown, beige, cream, maroon, teal, turquoise, lilac, mustard,
        olive, khaki, burgundy, silver, gold, tartan, striped, spotty, checked,
        floral, bright orange, dark green, light blue, pale pink, charcoal,
        mint green, sky blue, rust-coloured, lime green, camouflage
    """),
    "material": _items("""
        leather, wooden, plastic, metal, canvas, woollen, knitted, denim,
        waterproof, cotton, tweed, suede, rubber, wicker, glass, brass, velvet,
        corduroy, fleecy, linen, silk, cork, bamboo, felt, ceramic, tin, copper,
        steel, enamel, patchwork, hand-knitted, crocheted
    """),
    "vehicle": _items("""
        car, van, pickup, camper van, tractor, trailer, horsebox, motorbike,
        quad bike, minibus, lorry, flatbed, delivery van, ambulance, fire engine,
        bin lorry, caravan, forklift, milk tanker, fuel tanker, mobile library,
        ice-cream van, post van, school bus, electric bike, tandem, cargo bike,
        moped, mobility scooter, hearse, cement mixer, four-by-four, tipper truck
    """),
    "grocery": _items("""
        milk, bread, eggs, butter, cheese, bananas, teabags, coffee, apples,
        sugar, flour, oats, rice, pasta, potatoes, onions, carrots, tomatoes,
        lemons, oranges, grapes, strawberries, raspberries, blueberries, plums,
        pears, peaches, cucumber, lettuce, spinach, kale, broccoli, cauliflower,
        cabbage, leeks, celery, garlic, ginger, mushrooms, peppers, courgettes,
        aubergines, parsnips, turnips, beetroot, sweetcorn, peas, beans,
        lentils, chickpeas, tinned tomatoes, baked beans, stock cubes,
        gravy granules, ketchup, mayonnaise, mustard, pickle, chutney, jam,
        marmalade, honey, peanut butter, biscuits, crisps, crackers, oatcakes,
        yoghurt, cream, custard, ice cream, frozen peas, fish fingers, sausages,
        bacon, ham, chicken, mince, lamb chops, pork pies, smoked mackerel,
        kippers, tuna, sardines, crab, mussels, prawns, olive oil, vinegar,
        salt, pepper, cinnamon, nutmeg, paprika, cumin, oregano, basil, thyme,
        rosemary, parsley, mint, coriander, chives, dill, bay leaves, raisins,
        sultanas, dates, figs, apricots, walnuts, almonds, hazelnuts, cashews,
        sunflower seeds, cornflakes, muesli, porridge oats, bagels, crumpets,
        muffins, bread rolls, pitta bread, tortillas, noodles, couscous,
        quinoa, tofu, hummus, olives, capers, anchovies, sun-dried tomatoes,
        batteries, bin bags, washing-up liquid, kitchen roll, toilet roll,
        matches, candles, firelighters, dog food, cat food, birdseed,
        lightbulbs, tin foil, cling film, sandwich bags, toothpaste, soap,
        shampoo, plasters, paracetamol, suncream, oat milk, soya milk,
        almond milk, sparkling water, lemonade, orange juice, apple juice,
        cider, chocolate, fudge, toffee, mints, liquorice, marshmallows,
        popcorn, doughnuts, jalapeños, clotted cream, rhubarb, samphire,
        seaweed butter, black pudding, gherkins, horseradish, treacle, cocoa
    """),
    "drink": _items("""
        tea, coffee, flat white, latte, cappuccino, hot chocolate, mug of tea,
        builder's tea, oat latte, americano, espresso, mocha, chai latte,
        peppermint tea, herbal tea, green tea, fruit tea, decaf coffee,
        ginger beer, lemonade, orange juice, apple juice, bottle of water,
        glass of milk, milkshake, smoothie, iced coffee, hot blackcurrant,
        cortado, babyccino, rooibos, hot apple juice, chamomile tea,
        lapsang souchong, matcha latte, turmeric latte,
        ginger and lemon tea, elderflower pressé, dandelion and burdock,
        cream soda, cloudy lemonade, banana milkshake, affogato
    """),
    "cafe_food": _items("""
        bacon roll, sausage roll, crab sandwich, cheese scone, fruit scone,
        slice of {cake}, bowl of {soup} soup, cheese toastie, pasty,
        egg and cress sandwich, ham and cheese toastie, tuna melt,
        jacket potato with {filling}, portion of chips, fish finger sandwich,
        bacon and egg bap, porridge, full breakfast, veggie breakfast,
        beans on toast, cheese on toast|cheese on toast, poached eggs on toast, crumpet,
        teacake, cookie, flapjack, brownie, sausage bap, egg roll,
        cheese and pickle sandwich, mackerel pâté on toast, crab cake,
        kippers and brown bread, bag of crisps, ice cream, fruit salad,
        mushroom toastie, halloumi wrap, hummus wrap, quiche,
        {sandwich} sandwich, crab roll, lobster roll, sausage and mash,
        shakshuka, smashed avocado on toast, eggs royale|eggs royale, kedgeree,
        welsh rarebit, bubble and squeak, potato cake, laverbread and cockles,
        vegan sausage roll, pork pie, scotch egg, cheese straw, waffle, pancake stack
    """),
    "filling": _items("""
        cheese, beans, tuna mayo, cheese and beans, coleslaw, chilli, prawns,
        ham and cheese, mushrooms, butter, curried chicken, hummus
    """),
    "extra": _items("""
        butter, ketchup, brown sauce, cheese, mayo, bacon, onions, pickle,
        mustard, chilli sauce, salad
    """),
    "cake": _items("""
        lemon drizzle, carrot cake, coffee and walnut, chocolate fudge cake,
        banana bread, flapjack, millionaire's shortbread, rocky road,
        ginger cake, date and walnut loaf, apple crumble, rhubarb crumble,
        bread pudding, treacle tart, cherry bake, blueberry muffin, brownie,
        lemon meringue pie, sticky toffee pudding, marmalade cake, seed cake,
        saffron bun, fruit cake, parkin, cinnamon swirl, custard slice,
        jam roly-poly, gingerbread, honey cake, almond slice,
        coconut macaroon, cheesecake, tiffin, crème brûlée, plum tart,
        gooseberry fool, raspberry and white chocolate blondie, apple pie
    """),
    "soup": _items("""
        tomato, leek and potato, carrot and coriander, pea and ham, mushroom,
        minestrone, lentil, spiced parsnip, butternut squash, onion,
        chicken noodle, seafood chowder, crab bisque, tomato and basil,
        sweet potato and chilli, roasted red pepper, cauliflower cheese,
        beetroot, watercress, celeriac, spinach and nutmeg, smoked haddock,
        mulligatawny, vegetable, bean and barley, nettle, fish
    """),
    "dish_style": _items("""
        smoked, grilled, fried, roast, baked, battered, spiced, pan-fried,
        slow-cooked, steamed, chilli, garlic, lemon, devilled, braised,
        poached, stuffed, homemade, herb-crusted, honey-glazed, seaweed-crusted,
        beer-battered, char-grilled, crispy
    """),
    # Things a cooking style ("smoked", "pan-fried") can sensibly apply to.
    "dish_protein": _items("""
        haddock, mackerel, mussels, hake, pollock, sardines, herring, prawns,
        scallops, squid, lamb, pork belly, chicken, sausages, mushrooms,
        halloumi, tofu, aubergine, cauliflower, potatoes, ham hock, gurnard,
        whiting, cockles, monkfish, plaice, sea bass, salmon, trout, duck
    """),
    "dish_main": _items("""
        {dish_protein}, crab cakes,
        beef stew, fish pie, fishcakes, risotto, lasagne, quiche, omelette,
        frittata, curry, chowder, hotpot, shepherd's pie, macaroni cheese,
        gurnard, whiting, cockles, lobster, monkfish, plaice, sea bass
    """),
    "side": _items("""
        chips, mash, new potatoes, salad, peas, coleslaw, rice, samphire,
        greens, crusty bread, garlic bread, sweet potato fries, onion rings,
        mushy peas, roasted veg, tartare sauce, buttered leeks, red cabbage
    """),
    "cafe_supply": _items("""
        milk, coffee beans, teabags, paper cups, lids, napkins, sugar sachets,
        oat milk, bread, butter, eggs, bacon, sausages, cheese, scones,
        cleaning spray, bin bags, washing-up liquid, takeaway boxes,
        wooden forks, straws, jam portions, ketchup sachets, hot chocolate
        powder, crab meat, potatoes, salad, flour, lemons, cream
    """),
    "appliance": _items("""
        coffee machine, dishwasher, fridge, freezer, oven, grill, toaster,
        microwave, milk steamer, hot water urn, fryer, till, card reader,
        extractor fan, ice-cream freezer, soup kettle, grinder, sandwich press
    """),
    "cafe_reason": _items("""
        a staff training session, a private party, the deep clean,
        a delivery, the inspection, a family emergency, the council meeting,
        the power cut, the {event}, stocktaking
    """),
    # Boat, engine and pier hardware for yard logs and handovers.
    "part": _items("""
        bilge pump, fuel filter, oil filter, impeller, water pump, alternator,
        starter motor, fan belt, ramp hinge, exhaust elbow, heat exchanger,
        raw water strainer, injector, glow plug, gearbox, propeller, prop shaft,
        stern gland, cutlass bearing, rudder, steering cable, hydraulic ram,
        throttle cable, gear lever, fuel pump, lift pump, day tank, fuel line,
        breather pipe, sea cock, hose clamp, anode, battery, battery charger,
        shore power lead, bow thruster, windlass, anchor, anchor chain,
        capstan, cleat, bollard, fairlead, fender, mooring line, spring line,
        gangway, boarding ramp, ramp winch, hydraulic hose, deck hatch,
        hatch seal, porthole, window seal, wiper blade, wiper motor, horn,
        searchlight, navigation light, masthead light, stern light, radar,
        chart plotter, depth sounder, VHF radio, handheld radio, aerial,
        compass, autopilot, life raft, lifebuoy, lifejacket locker, flare box,
        fire extinguisher, fire blanket, first aid kit, smoke alarm,
        bilge alarm, float switch, handrail, guardrail, stanchion, deck plate,
        non-slip strip, seat cushion, passenger door, door latch, hinge,
        padlock, toilet pump, holding tank, sink tap, water heater, cabin heater,
        cabin light, fuse box, circuit breaker, switch panel, wiring loom,
        junction box, solenoid, relay, temperature sensor, temperature gauge,
        oil pressure gauge, rev counter, hour meter, fuel gauge, dipstick,
        oil seal, gasket, head gasket, shackle, pulley, winch handle, davit,
        crane hook, cargo net, tarpaulin, ratchet strap, cargo door,
        loading boom, hull plate, weld seam, transom, bow door, wheelhouse door,
        wheelhouse roof, funnel, exhaust pipe, silencer, engine mount,
        expansion tank, thermostat, sump, fuel tank, water tank, bulkhead,
        deck drain, scupper, stern rail, flagpole, boat hook, heaving line,
        mooring buoy, chain locker, skeg, trim tab, gunwale, rubbing strake,
        kick plate, tiller arm, drive belt, coolant hose, wheelhouse window,
        ramp chain, pier ladder, bow rope,
        bilge hose, bow fender, stern fender, gangway wheel, ramp seal, deck light,
        chart table lamp, engine room fan, exhaust blower, fuel sender, oil cooler,
        gear cable, morse control, steering pump, rudder bearing, prop nut,
        shaft coupling, drive plate, raw water hose, sea strainer lid, deck filler cap,
        tank vent, breather filter, toilet seacock, lifebuoy light, hatch hinge,
        window wiper arm, horn button, radar mount, aerial bracket
    """),
    "tool": _items("""
        torque wrench, socket set, big spanner, adjustable spanner, ratchet,
        impact driver, drill, angle grinder, heat gun, soldering iron,
        multimeter, crimping tool, hacksaw, jigsaw, circular saw, belt sander,
        orbital sander, chisel, mallet, hammer, crowbar, grease gun, oil can,
        funnel, drain pan, trolley jack, axle stand, pressure washer, wet vac,
        extension lead, work light, head torch, ladder, step ladder,
        scaffold tower, tape measure, spirit level, vice, bench grinder,
        welder, welding mask, caulking gun, paint roller, scraper, wire brush,
        hex key set, pipe wrench, filter wrench, feeler gauge,
        inspection camera, chain hoist, engine hoist, pallet truck, sack truck,
        wheelbarrow, rivet gun, staple gun, glue gun, pair of pliers,
        pair of mole grips, utility knife, bolt cutters, tin snips
    """),
    "tool_part": _items("""
        guard, blade, cable, plug, chuck, trigger, battery, switch, handle,
        hose, nozzle, bit, disc, belt, clamp
    """),
    "yard_consumable": _items("""
        grease, engine oil, gear oil, coolant, antifreeze, diesel,
        hydraulic fluid, distilled water, degreaser, epoxy, resin,
        fibreglass matting, filler, primer, antifouling, varnish, deck paint,
        masking tape, duct tape, cable ties, sandpaper, rags, nitrile gloves,
        sealant, silicone, thread tape, penetrating oil, stainless bolts,
        zinc anodes, rope, whipping twine, spare fuses, heat shrink, solder,
        electrical tape, rust remover, bilge cleaner, hand cleaner,
        paper towels, absorbent pads, split pins, hose clips, washers
    """),
    "consumable": _items("""
        diesel, fresh water, engine oil, coolant, hand gel, toilet roll,
        paper towels, first aid kit, sick bags, bin bags, lifejacket cartridges,
        tea and coffee, milk, hydraulic fluid, grease, spare fuses, lightbulbs
    """),
    "maint_verb": _items("""
        replace, check, fix, tighten, grease, clean, drain, flush, bleed,
        inspect, test, swap, adjust, rewire, reseal, repaint, sand, varnish,
        patch, weld, grind, polish, service, lubricate, remove,
        reattach, bolt down, tape up, sort out, look at, strip,
        prime, scrape, scrub, hose down, pressure-wash, descale, recalibrate,
        reset, top up, change, mend, fit, measure, label, secure, lash down,
        splice, rig, unblock, unclog, dry out, charge, jump-start, tune,
        rebuild, overhaul, degrease, seal, caulk, glue, clamp, loosen, realign,
        refill, rebed, re-torque, free off, refit
    """),
    "part_state": _items("""
        leaking, cracked, corroded, seized, worn, loose, rattling, sticking,
        noisy, bent, split, frayed, chafed, rusty, broken, jammed, blocked,
        knackered, on its last legs, fine for now, due for replacement,
        working again, as good as new, held together with tape,
        making a funny noise, dripping, squeaking, wobbly, misaligned,
        buckled, weeping, pitted, perished, sorted
    """),
    "broken_state": _items("""
        playing up, broken, on the blink, out of order, leaking again,
        making that noise again, working again, fixed, dead, temperamental,
        tripping the fuse, acting up, back in action
    """),
    "engine_symptom": _items("""
        overheating, running rough, smoking, making a knocking noise,
        losing power, hard to start, leaking oil, leaking coolant,
        vibrating at high revs, stalling at idle, misfiring, surging,
        making a whining noise, juddering, belching black smoke,
        tripping the alarm, running hot, sounding fine now, hunting at idle
    """),
    "maint_job": _items("""
        a hull survey, antifouling, a new propeller, an engine service,
        a gearbox rebuild, repainting, a new ramp hinge, welding on the bow,
        her annual inspection, new anodes, a full refit, rewiring,
        a new bow thruster, shaft alignment, the insurance survey,
        deck repairs, new windows, a steering overhaul, a fuel tank clean,
        a new wheelhouse roof, osmosis treatment, a paint job
    """),
    "crack_type": _items("""
        hairline crack, dent, blister, split, soft spot, scrape, gouge,
        rust patch, bubble in the paint, chip, weeping weld, bit of rot
    """),
    "survey_result": _items("""
        well, fine, better than expected, badly, okay apart from the rudder,
        really well, about as expected, not brilliantly, smoothly
    """),
    # Goods on the cargo runs.
    "cargo_goods": _items("""
        timber, slate, flour, animal feed, fertiliser, cement, sand, gravel,
        bricks, roof tiles, fence posts, paving slabs, plasterboard,
        insulation, copper pipe, scaffold poles, gas bottles, heating oil,
        coal, logs, kindling, hay, straw, potatoes, cabbages, apples, beer,
        cider, wine, bottled water, cheese, butter, eggs, frozen fish,
        fresh fish, crab, lobster, oysters, mussels, seaweed, wool, fleeces,
        furniture, mattresses, washing machines, fridges, cookers, bicycles,
        school books, medical supplies, prescriptions, post, parcels,
        newspapers, stationery, paint, wallpaper, carpet, ceramic tiles,
        glass panes, window frames, doors, kitchen units, solar panels,
        batteries, cable, fencing wire, netting, fishing nets, lobster pots,
        rope, chain, outboard engines, engine parts, tyres, garden furniture,
        compost, seed potatoes, seedlings, saplings, bulbs, flowers,
        honey, jam, bread, cakes, vegetables, fruit, soft drinks, crisps,
        sweets, tinned food, cleaning products, toilet rolls, nappies,
        pet food, bird seed, sandbags, road grit, diesel drums, paint tins,
        pottery, books, hymn books, sheep feed, chicken feed, pig nuts,
        lime, peat-free compost, barley, oats, turnips, leeks, onions,
        ice, charcoal, firewood, marquee poles, stage lights, chairs, tables,
        yarn, driftwood, kelp, oyster spat, smoked fish, sea salt, bottled cider,
        ice cream, frozen peas, wedding flowers, funeral flowers, school dinners,
        library books, hospital linen, clean laundry, dirty laundry, recycling,
        scrap metal, empty gas bottles, wheelie bins, bunting, trestle tables,
        camping gear, sound equipment, bee hives, chicks, straw bales, horse feed
    """),
    "cargo_unit": _items("""
        crate, box, pallet, sack, bag, barrel, keg, drum, bale, roll, tray,
        tub, tin, case, carton, bundle, jar, bucket, trolley, basket, hamper,
        container, churn, bottle, load, tonne, bag-for-life|bags-for-life, cage
    """),
    "cargo_single": _items("""
        piano, fridge-freezer, rowing boat, quad bike, tractor tyre,
        wedding cake, sofa, hot tub, grandfather clock, outboard motor,
        cement mixer, ride-on mower, canoe, generator, water tank, boiler,
        bathtub, set of bunk beds, goat, beehive, dinghy, motorbike,
        wheelie bin, chest freezer, church bell, harp, pony, pair of ewes,
        garden shed, ice-cream freezer, pallet of bricks, stained-glass window
    """),
    "hazard": _items("""
        two gas bottles, a drum of diesel, paint thinners, a car battery,
        fireworks for the {event}, a box of flares, weedkiller, pool chlorine,
        a jerrycan of petrol, lithium batteries
    """),
    "cargo_run": _items("""
        {weekday} cargo run, {place} run, morning cargo boat, island drop,
        {time_hm} cargo crossing, milk run, post run, late freight
    """),
    # Sea life, birds and animals for sightings and gossip.
    "sea_animal": _items("""
        dolphin, seal, porpoise, grey seal, basking shark, minke whale,
        sunfish, jellyfish, otter, orca, turtle, shoal of mackerel|shoals of mackerel,
        bottlenose dolphin, common seal, lion's mane jellyfish, moon jellyfish,
        blue shark, humpback, fin whale, harbour porpoise, risso's dolphin,
        common dolphin, leatherback turtle, thresher shark, pilot whale,
        barrel jellyfish, compass jellyfish, flying fish
    """),
    "seabird": _items("""
        gannet, puffin, guillemot, razorbill, kittiwake, fulmar, cormorant,
        shearwater, storm petrel, chough, herring gull, arctic tern, skua,
        great black-backed gull, eider, rock pipit
    """),
    "bird": _items("""
        {seabird}, heron, little egret, oystercatcher, curlew, redshank,
        turnstone, sanderling, dunlin, ringed plover, lapwing, tern,
        black-headed gull, merganser, peregrine, kestrel,
        buzzard, osprey, sea eagle, raven, jackdaw, starling, swallow,
        house martin, pied wagtail, wheatear, stonechat, wren,
        robin, blackbird, song thrush, barn owl, kingfisher, snow bunting
    """),
    "animal": _items("""
        dog, cat, goat, cockerel, pony, parrot, rabbit, tortoise, ferret, duck,
        goose, donkey, sheep, pig, hen, puppy, kitten, alpaca, llama, heron
    """),
    "animal_did": _items("""
        got out, dug up the {plant.pl}, eaten my {grocery},
        been barking since six, escaped onto the pier, stolen {cafe_food.a},
        chewed through the {belonging}, followed me to work,
        taken over the {room}, learned to open the gate, been sick on the mat,
        chased the postman, fallen asleep in the {vehicle}
    """),
    "plant": _items("""
        sunflower, sweet pea, runner bean, tomato plant, marigold, lavender,
        rose bush, daffodil, tulip, crocus, snowdrop, bluebell, foxglove,
        poppy, geranium, fuchsia, hydrangea, dahlia, hebe, gorse bush, heather,
        fern, palm tree, apple tree, pear tree, herb pot, strawberry plant,
        courgette plant, pumpkin, squash, lettuce, cabbage, onion,
        rhubarb plant, gooseberry bush, blackcurrant bush, raspberry cane,
        hanging basket, window box, planter, cactus, succulent, begonia,
        pansy, petunia, lobelia, nasturtium, cornflower, daisy, honeysuckle,
        clematis|clematis, wisteria|wisteria, camellia, rhododendron, magnolia,
        olive tree, bay tree, fig tree, tree fern, sea holly, agapanthus|agapanthus
    """),
    "plant_state": _items("""
        lovely, gorgeous, a bit sad, thirsty, amazing, windswept, battered,
        brilliant, half-dead, very cheerful, overgrown, finally flowering
    """),
    "ailment": _items("""
        a cold, a cough, a sore throat, a temperature, a migraine, a headache,
        a stomach bug, food poisoning, the flu, a chest infection,
        an ear infection, hay fever, a bad back, a stiff neck,
        a sprained ankle, a twisted knee, a pulled muscle, a trapped nerve,
        toothache, an abscess, conjunctivitis, tonsillitis, a sinus infection,
        sunburn, a rash, a bee sting, a splinter, blisters, a cut hand,
        a bruised wrist, a swollen finger, shingles, a chesty cough,
        a runny nose, laryngitis, vertigo, an upset stomach, cramp,
        a dodgy knee, a sore shoulder, a crick in my neck, a broken toe,
        a bump on my head, earache, eye strain, heartburn, gout,
        a chipped tooth, a wasp sting, mild concussion,
        a frozen shoulder, tennis elbow, a swollen ankle, chilblains, a stye,
        a cold sore, hiccups that won't stop, a sunstroke headache, a dodgy hip,
        a bad chest, a strained calf, pins and needles, a rotten cold
    """),
    "body_part": _items("""
        back, neck, shoulder, knee, ankle, wrist, hand, finger, thumb, elbow,
        foot, toe, hip, ribs, chest, head, jaw, calf, hamstring, shin,
        knuckle, collarbone, lower back, little finger, big toe
    """),
    "feeling": _items("""
        knackered, exhausted, shattered, tired, great, fine, rough, grim,
        rubbish, brilliant, chuffed, excited, nervous, anxious, stressed,
        relaxed, happy, fed up, bored, restless, grumpy, cheerful, hungry,
        starving, frozen, soaked, sunburnt, sore, stiff, achy, queasy,
        sea-sick, homesick, lucky, grateful, proud, guilty, embarrassed,
        confused, hopeful, worried, better, worse, half-asleep, wide awake,
        full of beans, under the weather, on top of the world, a bit flat,
        a bit wobbly, ready for a holiday, miles better, all over the place
    """),
    "feeling_reason": _items("""
        didn't sleep much, the baby was up all night, too much cake,
        the gulls woke me at four, back-to-back shifts, finally got some sun,
        it's nearly the weekend, it's payday, the heating's broken,
        just had the best breakfast, the car wouldn't start, my {relative} is
        staying, I've been on the {crossing} three days running,
        the swell yesterday, the new rota, I won the raffle,
        I've just booked a holiday, my {body_part} is killing me,
        the neighbours had a party, I passed my boat licence
    """),
    "opinion": _items("""
        great, lovely, brilliant, amazing, fantastic, wonderful, excellent,
        gorgeous, delicious, really nice, decent, okay, not bad, pretty good,
        rubbish, awful, terrible, weird, odd, funny, hilarious, bonkers,
        surreal, magical, peaceful, relaxing, exhausting, hard work, fiddly,
        tricky, easy, straightforward, confusing, frustrating, satisfying,
        addictive, therapeutic, {opinion_more}, messy, noisy, quiet, busy, packed, heaving,
        stunning, beautiful, cosy, charming, overrated, underrated,
        a nightmare, a laugh, a disaster, spot on,
        perfect, cracking, smashing, epic, dodgy, surprisingly good,
        way better than I expected, harder than it looks, well worth it,
        absolutely brilliant, a right laugh, not my cup of tea, a bit much,
        worth every penny, better than last year, a total washout, an absolute treat
    """),
    "food_opinion": _items("""
        it's really good, not bad at all, a bit salty, absolutely delicious,
        needs more pepper, very filling, a bit dry, lovely and fresh,
        the best I've had, too spicy for me, perfect after a cold shift,
        bit pricey but worth it, dangerously moreish, naïve of me to share it
    """),
    "trip_comment": _items("""
        lovely day for it, the crossing was a bit lumpy, saw seals on the way,
        the café there is really good, it was heaving, the wind was wild,
        got soaked walking up from the pier, the views were amazing,
        bought far too much cheese, the bus was late again,
        found a brilliant second-hand bookshop, the market was on,
        everyone was asking about the new timetable, forgot my coat
    """),
    "outdoor_hobby": _items("""
        swimming, sea swimming, paddleboarding, kayaking, rowing, sailing,
        fishing, crabbing, rockpooling, birdwatching, hiking, cycling, running,
        climbing, bouldering, surfing, snorkelling, diving, foraging,
        beachcombing, wild camping, fell running, kitesurfing, dinghy racing,
        metal detecting, stargazing, bodyboarding, coasteering, orienteering
    """),
    "hobby": _items("""
        {outdoor_hobby}, gardening, baking,
        cooking, knitting, crocheting, sewing, painting, drawing, sketching,
        pottery, woodwork, whittling, photography, reading, writing,
        singing, yoga, pilates, boxing, bell ringing, learning the fiddle,
        learning the accordion, learning to knit, learning to sail,
        making jam, making bread, brewing beer, making cider, keeping bees,
        building a shed, quilting, weaving, calligraphy, chess, juggling,
        shanty singing,
        archery, fencing, ballroom dancing, salsa, tap dancing, origami,
        bookbinding, candle making, soap making, glass painting, model making,
        rug making, basket weaving, fermenting, wine making, bread baking
    """),
    "plan": _items("""
        a pint, chips on the harbour wall, a swim, a walk up to {place},
        a curry in {place}, fish and chips at {place}, a barbecue on the beach,
        a quick drink at {pub}, the pub quiz, a film night,
        karaoke, bingo, board games, a bonfire on the beach, a picnic,
        a game of darts, pool, crabbing off the pier, a paddle at {place},
        a bike ride to {place}, a cuppa, breakfast at the café,
        the {event}, rockpooling at low tide, a sunset walk, the late boat to
        {place}, a takeaway, a sea swim before work, a round of crazy golf
    """),
    "event": _items("""
        quiz night, summer fair, regatta, harbour festival, AGM, ceilidh,
        beach clean, open day, raffle, carol service, bonfire night,
        lantern parade, boat blessing, fun run, bake sale, barn dance,
        shanty night, film night, jumble sale, swimming gala,
        sandcastle contest, oyster festival, cheese and wine evening,
        retirement do, leaving do, Christmas party, midsummer barbecue,
        kite festival, birdwatching walk, choir concert, talent show,
        craft fair, car boot sale, book swap, litter pick, crab-racing day,
        duck race, plant sale, pancake race, seafood supper, panto,
        members' picnic, volunteer thank-you dinner, harvest supper,
        wassail, midwinter swim, regatta dance, gig race, open mic night,
        poetry reading, beer festival, apple day, storytelling evening,
        dog show, vegetable show, sheepdog trials, flower show, pie competition,
        scarecrow festival, seaweed festival, harbour clean-up, wreath making,
        lantern walk, ghost walk, tide-watching party
    """),
    "life_event": _items("""
        new baby, engagement, wedding, new house, promotion, retirement,
        exam results, skipper's ticket, driving test, new job, anniversary,
        graduation, half marathon, allotment
    """),
    "thanks_reason": _items("""
        covering my shift, the lift, the cake, sorting the rota,
        fixing the {part}, picking up the {grocery}, the birthday card,
        the flowers, holding the boat, your help yesterday,
        lending me your {borrow_item}, all your hard work, the lovely message,
        the tea, organising the {event}, tidying the {room},
        looking after the dog, the heads up, the photos, the recipe,
        waiting for me, the advice, dropping off the {cargo_goods},
        staying late, swapping with me, the soup, finding my {belonging},
        sorting out the manifest, the early start, putting up with me,
        the birthday cake, teaching me that knot, the lift home in the rain,
        sorting my payslip, the spare gloves, the jump start, the plant cuttings,
        feeding the cat, taking my shift at short notice, the lovely card,
        getting the kettle fixed, mending my bike
    """),
    "nice_reply": _items("""
        you're a star, much appreciated, I owe you one, you're a lifesaver,
        really kind of you, drinks are on me, made my day, legend,
        couldn't have done it without you
    """),
    "busy_with": _items("""
        on the {crossing}, up a ladder, in the engine room, with a passenger,
        driving, in the shower, on the slipway, in a meeting,
        at the dentist, halfway up the {place} steps, elbow-deep in the bilge,
        serving a queue of {n} people, on the radio to the harbour master
    """),
    "shop": _items("""
        chemist, post office, bakery, butcher's, co-op, chip shop, library,
        hardware shop, chandlery, fishmonger's, farm shop, garage, bank,
        bookshop, launderette, deli, charity shop, ice-cream parlour, florist,
        newsagent, pharmacy, tip, recycling centre, sorting office
    """),
    "spare_thing": _items("""
        ticket for the {event}, lifejacket, pair of wellies, umbrella,
        bike, seat in the car to {place}, bag of {grocery}, camp bed,
        phone charger, sleeping bag, box of {plant} seedlings, head torch,
        set of waterproofs, plate at the {event}, room at mine
    """),
    "potluck_item": _items("""
        salad, quiche, plate of sandwiches, cake, bowl of crisps, dessert,
        bottle of something, pasta bake, tray of sausage rolls, cheese board,
        pot of chilli, batch of scones, trifle, bag of ice, fruit platter
    """),
    "dinner": _items("""
        a curry, fish pie, a roast, pizza, chilli, stew, a barbecue, crab,
        lasagne, soup and bread, pasta, mussels, a stir-fry, fish and chips,
        a big salad, tacos, shepherd's pie, sausage and mash, dhal, risotto
    """),
    "meal": _items("breakfast, lunch, dinner, tea, brunch, a drink, supper, coffee"),
    "show": _items("""
        the match, the quiz show, the cooking programme, the nature
        documentary, the new drama, the weather forecast, the darts final,
        the baking show, the gardening programme, the late film, the rugby,
        the snooker, the lifeboat documentary, the local news
    """),
    "appointment": _items("""
        a dentist appointment, a doctor's appointment, the optician,
        a hospital appointment in {place}, parents' evening, my driving test,
        a job interview, the vet for the dog, the school play, sports day,
        a funeral, a wedding, a christening, an eye test, the physio,
        a meeting at the bank, a haircut, a scan, my flu jab,
        the mortgage people, a hearing test
    """),
    "challenge": _items("""
        driving test, interview, exam, assessment, half marathon, skipper's exam,
        radio exam, first aid test, audition, charity swim, race, presentation,
        house move, job interview, sea trial, inspection, hearing
    """),
    "training_topic": _items("""
        first aid, fire safety, sea survival, manual handling,
        man overboard drills, radio procedure, food hygiene, crowd control,
        passenger safety briefings, customer service, forklift driving,
        ramp operation, knots and splicing, engine basics, lifejacket checks,
        dangerous goods, card machine basics, booking system basics,
        mental health first aid, pilotage, chart work, night navigation,
        fog procedures, berthing in strong winds, working at height,
        wheelchair assistance, allergen awareness, conflict resolution,
        hot work permits, cold water shock
    """),
    "shift": _items("""
        early, late, night watch, morning shift,
        afternoon shift, café shift, ticket office shift,
        yard shift, double, split shift, relief shift
    """),
    "admin_doc": _items("""
        timesheet, rota, deck log, fuel log, manifest, risk assessment,
        incident report, invoice, receipt, order form, delivery note,
        insurance form, booking sheet, membership form, expenses claim,
        handover sheet, maintenance log, training record, lost property log,
        accident book, cash sheet, till roll, passenger count, permit
    """),
    "report_doc": _items("""
        survey report, insurance quote, fuel figures, passenger numbers,
        engineer's report, three quotes, treasurer's figures, legal advice,
        harbour authority's reply, tide data, feedback from members
    """),
    "council_topic": _items("""
        the winter timetable, fares for {passenger_kind.pl},
        the {place} slipway repairs, replacing {boat}, the café lease,
        winter opening hours, the {event}, members' discounts,
        staff parking at {place}, the fuel budget, insurance for {boat},
        the pier lighting, dredging at {place}, the new booking system,
        pay rises for deckhands, the bunkhouse roof, the second relief pilot,
        dog rules on the {crossing}, the {place} waiting room,
        the lost property policy, solar panels on the {room}, the pension scheme,
        late crossings in summer, the harbour grant, the café façade,
        bike spaces on {boat}, accessibility at {place},
        the noise complaint from {place}, the memorial bench for {first} {surname},
        cash payments, the members' newsletter, volunteer drivers
    """),
    "council_action": _items("""
        raise fares by {n} per cent, freeze fares for members,
        extend the café lease, repaint {boat}, replace the {part} on {boat},
        buy a second-hand {vehicle}, fund a second relief pilot,
        review the winter timetable, repair the {place} slipway,
        hold the {event} on the {ordinal}, write to the harbour authority,
        apply for a harbour grant, hire two more deckhands,
        install solar panels on the {room}, trial a late crossing on {weekday}s,
        publish the accounts online, buy a defibrillator for the {room},
        open the café on Sundays, sell the old {vehicle},
        put up new signs at {place}, start a members' newsletter,
        set up a working group on {council_topic}, ban dogs from the café,
        give staff a free lunch on double shifts, re-tender the fuel contract,
        move the council meeting to {weekday}s, plant a hedge along the car park,
        add a bike rack at {place}, offer free crossings for the {event},
        survey members about {council_topic}, fix the leak in the {room},
        upgrade the radios, replace the benches at {place}
    """),
    "council_task": _items("""
        get three quotes for the {part}, write to the harbour authority,
        draft the new timetable, book the hall for the {event},
        update the members' list, speak to {first} about {council_topic},
        check the insurance, order new signs, sort the raffle prizes,
        chase the invoice from {business}, price up a new {vehicle},
        circulate the minutes, find a date for the {event}
    """),
    "finance_report": _items("""
        a small surplus for the quarter, fuel costs up {n} per cent,
        café takings up on last year, a shortfall on the {place} route,
        record passenger numbers in {month}, the grant has come through,
        repair costs higher than budgeted, reserves holding steady,
        ticket income down because of the weather,
        membership up by {big_n} this year
    """),
    "aob": _items("""
        the gulls on the café roof, parking at {place}, the state of the toilets,
        {first}'s retirement, the lost property cupboard, prizes for the {event},
        the squeaky gangway, noise from the yard, the broken bench at {place},
        a thank-you card from {place} school, the Christmas rota
    """),
    "business": _items("""
        the {place} Bakery, {surname}'s Hardware, {surname} and Sons,
        the {place} Co-op, {pub}, the school at {place},
        the surgery at {place}, {first}'s farm, the post office at {place},
        the {place} Hotel, {surname}'s Builders' Merchants, the chip shop,
        the {place} dairy, {surname} Fisheries, the vet at {place},
        {first} at the farm shop, the pottery at {place}, {surname}'s garage,
        the campsite at {place}, the {place} brewery, the church at {place},
        the {place} Smokehouse, {surname}'s Chandlery, {first}'s Yarn Shop,
        the {place} Creamery, {surname} Oysters, the {place} Bookshop,
        {surname} Timber, the {place} Distillery, {first}'s Bakehouse,
        {surname} Plumbing and Heating, the {place} Community Shop,
        the {place} Surf School, {surname}'s Boatyard, the {place} Honey Co
    """),
    "pass_question": _items("""
        the {crossing} stops at {place}, dogs are allowed on {boat},
        there's a toilet on {boat}, the café takes cards,
        there's parking at {place}, the boats run on bank holidays,
        bikes go free, they can bring {cargo_single.a},
        the {crossing} is wheelchair accessible, they need to book,
        there's a discount for {discount_group}, we sell day returns,
        the boat waits for the bus, they can change their ticket,
        there's a later boat back from {place}, we've found their {belonging}
    """),
    "passenger_instruction": _items("""
        keep dogs on a lead, stay seated until we're alongside,
        fold up buggies, keep away from the ramp, hold on to the handrail,
        take all their belongings, have tickets ready, keep the gangway clear,
        put bikes in the rack, listen to the safety briefing,
        keep children off the rails, stow bags under the seats
    """),
    "delay_reason": _items("""
        the swell, fog off {place}, a stuck ramp, the bilge pump,
        a late cargo lorry, a missing passenger, the tide, engine trouble,
        weed round the prop, a rope round the prop, the wind,
        a queue at the ticket office, a loose dog on the pier,
        a medical call on board, the gangway, the card machine,
        a late delivery, the harbour master's inspection,
        a fishing boat in the channel, the dredger, a yacht race,
        the lifeboat exercise, low water at {place}, the fuel delivery,
        a flat battery, a jammed cargo door, cows on the road,
        roadworks in {place}, a wedding party, a broken-down van on the ramp,
        the crane, an alarm going off, a wasp nest in the wheelhouse,
        a crew change, the coach from {place}, strong currents at the narrows,
        a fire drill, a passenger being sick, waiting for the doctor,
        waiting for the post, heavy rain, a squall, the school run,
        a sheep on the slipway, a tractor on the ramp, a lost passport,
        a passenger who wanted a refund, the pilot boat, a stuck car alarm,
        the gulls nesting on the gangway, a funeral procession, a film crew,
        the harbour wall repairs, a puncture on the bus, a burst water main
    """),
    "cancel_reason": _items("""
        the gale warning, the swell, engine failure, lack of crew, fog,
        high winds, a storm surge, the ramp at {place} being out of action,
        very low tides, maintenance, an inspection, ice on the slipway,
        a burst hose, staff shortages, a lifeboat callout, a fuel leak
    """),
    "adj_crossing": _items("""
        smooth, lumpy, a bit rough, lovely, calm, bumpy, wet, quick,
        slow, busy, quiet, choppy, bouncy, grim, glorious, uneventful
    """),
    "crossing_comment": _items("""
        nobody was sick, passengers loved it, two people were sick,
        spray over the bow the whole way, dolphins off {place},
        sold out of tea by halfway, the bikes came loose,
        a kid spotted a seal, fog lifted just in time, ramp was fine,
        the new deckhand did really well, only {n} aboard
    """),
    "quiet_comment": _items("""
        just the gulls, all boats secure, kettle's on, very peaceful,
        one fox on the pier, rain most of the night, lovely sunrise
    """),
    "fuel_level": _items("""
        full, half, three-quarters, a quarter, plenty of, not much, low,
        just enough
    """),
    "key_thing": _items("""
        wheelhouse, yard gate, fuel dock, van, ticket office, cold store,
        forklift, chain locker, paint shed, bunkhouse, padlock on the ramp
    """),
    "key_place": _items("""
        key safe, usual drawer, top drawer in the office, mug on the shelf,
        box behind the kettle, pocket of the spare jacket, lock box
    """),
    "clean_type": _items("clean, hose down, proper clean, quick sweep, deep clean, mop"),
    "card_state": _items("""
        down, playing up, offline, out of paper, only taking contactless,
        working again, back up, not connecting, rebooting
    """),
    "card_down": _items("""
        down, playing up, offline, out of paper, not connecting, rebooting,
        on the blink, refusing every card
    """),
    "visibility_low": _items("""
        under a mile, about two hundred metres, fifty metres, a few boat lengths,
        almost nothing, half a mile, the end of the pier
    """),
    "weather_pair": _items("""
        grey and drizzly, cold and clear, windy and wet, warm and muggy,
        bright and breezy, damp and miserable, calm and sunny, wild and wet,
        cold and frosty, foggy and still, mild and cloudy, sunny and hot,
        wet and blustery, dull and damp, clear and still, raw and windy
    """),
    "visibility": _items("""
        good, moderate, poor, good occasionally poor, under a mile,
        about two hundred metres, very poor in fog, excellent, fair
    """),
    "wind_dir": _items("""
        westerly, south-westerly, north-westerly, southerly, northerly,
        easterly, south-easterly, north-easterly, variable
    """),
    "sea_state": _items("""
        slight, moderate, calm, smooth, rough, slight to moderate,
        moderate occasionally rough, very rough, choppy in the narrows
    """),
    "swell_height": _items("""
        one metre, half a metre, two metres, a metre and a half, three metres,
        knee-high, about a metre
    """),
    "weather_adj": _items("""
        sunny, cloudy, overcast, grey, drizzly, rainy, wet, windy, blustery,
        breezy, gusty, stormy, foggy, misty, murky, hazy, clear, bright,
        fine, mild, warm, hot, humid, muggy, chilly, cold, freezing, frosty,
        icy, bitter, raw, damp, wild, calm, still, glorious, miserable,
        changeable, unsettled, showery, squally, thundery, bleak, crisp,
        fresh, balmy, dreich, perishing, baking, close
    """),
    "weather_noun": _items("""
        rain, drizzle, fog, wind, mist, swell, showers, sea fog, chop, gale,
        sleet, hail, snow, squalls, sunshine, spray, murk, downpour,
        thunder, haar, heat, cloud
    """),
    "compass": _items("west, south-west, north, east, south, north-west, south-east, north-east"),
    "barometer": _items("""
        falling fast, rising, steady, dropping, climbing slowly, all over the
        place, lower than I've seen it this year
    """),
    "weather_opinion": _items("""
        I wouldn't trust the afternoon, should be a nice day, batten down the
        hatches, good for the {place} run, expect a lumpy evening,
        perfect crossing weather, keep an eye on the {time_hm},
        might be worth bringing {boat} in early
    """),
    "distance": _items("""
        half a mile, a mile, ten minutes, two miles, halfway,
        a few hundred metres, just
    """),
    "time_of_day": _items("morning, evening, afternoon, day, sunset, sunrise, night"),
    "marker": _items("""
        north cardinal, Ossory buoy, harbour light, leading lights,
        {place} beacon, green buoy, red can, breakwater light, outer mark,
        old wreck buoy
    """),
    "email_note": _items("""
        the new rota is on the shared drive, your payslip is in the office,
        the {event} has moved to {weekday}, we've fixed the {part},
        your lost {belonging} turned up in the {room}, thanks for {thanks_reason},
        the fuel delivery is due on {weekday}, the minutes are attached,
        I've booked you on the {training_topic} course, the {room} is being
        painted next week
    """),
    # --- Life outside work: homes, errands, food, books, sport and nature ---
    "errand": _items("""
        post the letters, pay the electric bill, book the car in, ring the bank,
        renew my passport, collect the prescription, return the library books,
        drop off the recycling, pick up the kids, walk the dog,
        feed the chickens, get a haircut, buy a present for my {relative},
        wrap the presents, write the thank-you cards, fill in the {admin_doc},
        sort out the car insurance, cancel the milk, water the {plant.pl},
        defrost the freezer, fix the puncture on my bike, charge the drill batteries,
        chase the plumber, email the school, phone the council, text {first} back,
        order more {grocery}, send the parcel to my {relative}, finish my tax return,
        clean the car, iron my uniform, wash the dog, hang out the washing,
        bring in the washing, take back the {borrow_item}, swap the gas bottle,
        top up my phone, update my address, print the tickets, scan the forms,
        sign the lease, shred the old bank statements, count the raffle money,
        bank the café takings, book the dentist, register the new car,
        empty the bins, clear the gutters, change the sheets, cook for the week,
        make a cake for the {event}, dig the potatoes, pick the runner beans,
        mend the fence, bleed the radiators, tax the van, move the compost heap,
        visit my {relative} in {place}, buy new {clothing}, sort the loft out,
        book the chimney sweep, order the heating oil, pick up the dry cleaning,
        drop the dog at the groomer's, take the van for its service, collect the eggs,
        deliver the parish magazine, sort out the broadband, chase the insurance claim,
        return the empties, swap the library books, buy stamps, get the bike fixed,
        pick up the prescription for my {relative}, book the ferry for my {relative},
        collect the cake for the {event}, sell the old {borrow_item}, walk the neighbour's dog
    """),
    "chore_verb": _items("""
        paint, clean, fix, clear, tidy, sort, mend, sand, repaint, wallpaper,
        tile, vacuum, dust, polish, scrub, empty, declutter, rearrange, move,
        assemble, build, dismantle, replace, insulate, reseal, regrout,
        unblock, defrost, descale, jet-wash, weed, mow, trim, prune, dig over,
        plant up, water, re-felt, re-point, creosote, varnish, oil, treat,
        waterproof, re-hang, reupholster, reorganise, measure up, clear out,
        sort through, sweep, mop, bleach, disinfect, fumigate, strip, restore,
        redecorate, re-roof, lag, rewire, plaster, whitewash
    """),
    "home_thing": _items("""
        fence, shed, gutters, kitchen, bathroom, spare room, loft, garage,
        porch, front gate, back door, roof, chimney, boiler, oven, fridge,
        freezer, washing machine, tumble dryer, dishwasher, windows, curtains,
        blinds, carpets, sofa, armchair, wardrobe, chest of drawers, bookshelves,
        desk, bed, bunk beds, cot, stairs, banister, skirting boards, hallway,
        landing, patio, decking, greenhouse, polytunnel, chicken coop,
        log store, compost bin, drains, water butt, lawn, hedge, flower beds,
        vegetable patch, allotment, garden wall, driveway, path, front step,
        letterbox, doorbell, radiators, woodburner, fireplace, mantelpiece,
        kitchen cupboards, worktops, sink, taps, shower, bath, toilet, grout,
        ceiling, floorboards, loft hatch, cellar, attic, utility room,
        airing cupboard, conservatory, summerhouse, garden bench, picnic table,
        trampoline, paddling pool, washing line, bird table, bird feeder,
        guttering, downpipe, satellite dish, heat pump, light fittings,
        lampshades, mirror, picture frames, toy box, filing cabinet,
        junk drawer, cutlery drawer, spice rack, pantry, larder, doormat,
        coat hooks, shoe rack, ironing pile, bedding, duvet, pillows, towels,
        tablecloth, cushions, lino, parquet, wood stove, rabbit hutch, dog kennel,
        sash window, boot rack, log basket, coal bunker, oil tank, water softener,
        bread oven, range cooker, kitchen table, dresser, piano stool, sewing room,
        potting shed, garden gate, stone wall, slate roof, thatch, rose arch,
        pond, gravel path, vegetable beds, fruit cage, hen house, cold frame
    """),
    "home_state": _items("""
        leaking, falling apart, full of damp, mouldy, rotten, wobbly, blocked,
        creaking, making a racket, smelling funny, on its last legs, broken,
        covered in moss, full of spiders, flooded, freezing, filthy, lopsided,
        a state, a disaster zone, finally finished, looking great
    """),
    "home_appliance": _items("""
        kettle, toaster, washing machine, vacuum cleaner, fridge, freezer, boiler,
        laptop, phone, printer, lawnmower, car battery, telly, radio,
        hairdryer, microwave, slow cooker, tumble dryer, dishwasher, cooker,
        shower pump, immersion heater, doorbell, alarm clock, sewing machine
    """),
    "home_dish": _items("""
        lasagne, stir-fry, risotto, dumplings, noodles, goulash, falafel,
        tagine, moussaka, enchiladas, burritos, gnocchi, ramen, laksa, biryani,
        korma, dhal, samosas, pakoras, kedgeree, cassoulet, ratatouille, gumbo,
        jambalaya, pierogi, borscht, blinis, paella, frittata, quesadillas,
        nachos, fajitas, katsu curry, teriyaki salmon, bibimbap,
        kimchi fried rice, shakshuka, halloumi burgers, bean burgers,
        veggie chilli, toad in the hole, bangers and mash, cottage pie,
        fish pie, cauliflower cheese, mac and cheese, jacket potatoes,
        homemade pizza, flatbreads, spanakopita, tabbouleh, couscous salad,
        carbonara, bolognese, pesto pasta, puttanesca, arancini, calzone,
        stroganoff, chicken pie, steak and ale pie, roast chicken, roast lamb,
        pork chops, sausage casserole, lentil soup, crab linguine,
        mussels in cider, grilled mackerel, fish tacos, crab cakes, pancakes,
        waffles, crumble, flapjacks, scones, bread and butter pudding, trifle,
        tiramisu, pavlova, meringues, rice pudding, jam tarts, bao buns,
        gyoza, sushi, tempura, dim sum, empanadas, churros, pasties, hotpot
    """),
    "book_kind": _items("""
        crime novel, thriller, biography, cookbook, history book, ghost story,
        romance, fantasy series, sci-fi novel, poetry collection, memoir,
        travel book, field guide, graphic novel, picture book, audiobook,
        detective story, short story collection, comic, murder mystery,
        nature book, gardening book, self-help book, podcast, documentary
    """),
    "book_topic": _items("""
        lighthouses, shipwrecks, whales, smugglers, knitting, bees, tides,
        the stars, islands, seabirds, old maps, pirates, mountaineering,
        polar explorers, the deep sea, fungi, rivers, volcanoes, bread, cheese,
        architecture, steam trains, bridges, clocks, codebreakers, spies,
        chess, time travel, dragons, witches, a murder on a ferry,
        a haunted lighthouse, a family of boat builders, a detective who keeps bees,
        a lost island, the history of knots, a mermaid, an old sea captain,
        a cat who runs a bookshop, a storm that lasts a year, octopuses,
        weather forecasting, the moon, the first lifeboats, salt, sailmaking
    """),
    "fish": _items("""
        mackerel, pollock, bass, wrasse, gurnard, dogfish, mullet, conger eel,
        ray, plaice, flounder, dab, sole, turbot, brill, bream, garfish,
        sand eel, herring, sprat, pilchard, whiting, ling, cod, haddock, hake,
        skate, spider crab, brown crab, velvet crab, lobster, crayfish, squid,
        cuttlefish, octopus, prawn, shrimp, limpet, winkle, whelk, cockle,
        razor clam, scallop, oyster, mussel, sea urchin, starfish, anemone,
        sea slug, sea squirt, brittlestar, blenny, goby, pipefish, weever fish
    """),
    "insect": _items("""
        wasp, midge, bee, bumblebee, mosquito, horsefly, ladybird, butterfly,
        moth, dragonfly, damselfly, spider, ant, earwig, slug, snail, woodlouse,
        beetle, crane fly, cricket, grasshopper, caterpillar, flea, tick,
        bluebottle, greenfly, hoverfly, silverfish, centipede, millipede,
        sand hopper, gnat
    """),
    "tree": _items("""
        oak, ash, beech, birch, hawthorn, blackthorn, elder, rowan, holly,
        hazel, willow, alder, sycamore, pine, larch, spruce, yew, elm,
        chestnut, horse chestnut, lime tree, cherry tree, crab apple,
        monkey puzzle, walnut tree, plum tree, poplar, cedar, eucalyptus
    """),
    "wildflower": _items("""
        primrose, sea campion, thrift|thrift, bluebell, foxglove, cowslip, buttercup,
        clover|clover, vetch|vetch, knapweed|knapweed, scabious, yarrow|yarrow, ragwort|ragwort, dandelion,
        cow parsley|cow parsley, hogweed|hogweed, meadowsweet|meadowsweet, willowherb|willowherb, orchid, violet,
        speedwell|speedwell, forget-me-not, harebell, eyebright|eyebright, tormentil|tormentil, red campion,
        bird's-foot trefoil|bird's-foot trefoil, ox-eye daisy, sea lavender|sea lavender, marram grass|marram grass,
        wild thyme|wild thyme, honeysuckle|honeysuckle, dog rose, gorse|gorse, broom|broom, bracken|bracken, heather|heather,
        sea pea|sea pea, stonecrop|stonecrop, lady's bedstraw|lady's bedstraw, sea aster|sea aster
    """),
    "instrument": _items("""
        fiddle, guitar, accordion, ukulele, banjo, mandolin, harmonica,
        tin whistle, flute, clarinet, trumpet, trombone, tuba, saxophone,
        drums, bodhrán, piano, keyboard, cello, double bass, harp, bagpipes,
        concertina, melodeon, recorder, bass guitar, glockenspiel, oboe
    """),
    "sport": _items("""
        football, rugby, cricket, gig racing, rowing, netball, hockey, darts,
        bowls, tug of war, five-a-side, rounders, badminton, table tennis,
        volleyball, beach volleyball, water polo, bowling, squash, tennis
    """),
    "team": _items("""
        Rovers, Wanderers, Athletic, Harriers, Mariners, Gulls, Seals,
        Pilots, Tide, Buccaneers, Rangers, Saints, Dolphins, Crabs, Ravens
    """),
    "result": _items("""
        won {score}, lost {score}, drew {score}, won on penalties,
        scraped a win, got thrashed, won the cup, made the final,
        came second, got knocked out
    """),
    "score": _items("3-1, 2-0, 1-0, 2-1, 4-2, 3-3, 0-0, 5-1, 1-1, 6-3, 2-2, 7-0"),
    "sport_comment": _items("""
        what a game, absolutely soaked, great effort, robbed by the ref,
        brilliant atmosphere, the crowd went wild, never in doubt,
        {first} scored twice, gutted, massive well done to everyone
    """),
    "gift": _items("""
        scented candle, bottle of wine, box of chocolates, book token, jigsaw,
        mug, tea towel, cookbook, novel, board game, bird feeder, houseplant,
        bunch of flowers, bath bomb, pair of socks, pair of slippers, scarf,
        pair of gloves, hip flask, cheese board, picture frame, photo album,
        pocket knife, head torch, plant pot, seed kit, bird box, bee hotel,
        knitted hat, wooly jumper, pottery bowl, tide clock, barometer,
        ship in a bottle, model lighthouse, sea-glass necklace, watercolour set,
        sketchbook, fountain pen, journal, calendar, framed map, cushion,
        blanket, tea set, coffee grinder, cafetière, teapot, hamper,
        voucher for the café, membership of the cooperative
    """),
    "school_thing": _items("""
        sports day, a school trip, the nativity play, parents' evening,
        swimming lessons, a spelling test, a maths exam, a music exam,
        a football tournament, a sleepover, a dance show, the science fair,
        a school disco, an inset day, a trip to the aquarium
    """),
    "giveaway": _items("""
        a sofa, a bag of kids' clothes, a box of books, an old fridge,
        three kittens, loads of rhubarb, far too many courgettes, jam jars,
        moving boxes, a pile of logs, well-rotted manure, a cot, a bike,
        a fish tank, a double bed, some paving slabs, a stack of magazines,
        two armchairs, plant cuttings, egg boxes, a chest of drawers
    """),
    "size_adj": _items("""
        small, big, little, tiny, large, huge, massive, enormous, giant,
        medium-sized, miniature, gigantic
    """),
    "condition_adj": _items("""
        battered, brand-new, second-hand, scuffed, muddy, soggy, damp, sandy,
        torn, patched, faded, shiny, dented, chewed, soaked, well-worn, tatty,
        expensive-looking, very old, handmade, broken, dusty, crumpled,
        mud-splattered, salt-stained, sticky
    """),
    "knot": _items("""
        bowline, clove hitch, reef knot, sheet bend, cleat hitch,
        figure of eight, rolling hitch, round turn and two half hitches,
        fisherman's bend, eye splice, back splice, short splice,
        monkey's fist, sheepshank, trucker's hitch, lighterman's hitch
    """),
    "vessel": _items("""
        fishing boat, yacht, trawler, dinghy, kayaker, paddleboarder, rib,
        tug, dredger, coaster, survey vessel, lifeboat, pilot boat, tanker,
        catamaran, schooner, ketch, sloop, crabber, launch, tender, water scooter,
        swimmer, rowing gig, canoe, motor cruiser, barge, tall ship
    """),
    "bearing": _items("""
        off the port bow, off the starboard bow, abeam to port,
        abeam to starboard, astern of us, dead ahead, fine on the port bow,
        on our starboard quarter, inshore of us, just outside the channel
    """),
    "admin_noun": _items("""
        proposal, budget, policy, insurance renewal, constitution, amendment,
        ballot, nomination, election, audit, account, surplus, tender,
        contract, lease, licence, permit, consultation, survey, complaint,
        petition, grant application, sponsorship deal, fundraiser, donation,
        subscription, membership fee, discount scheme, fare structure,
        business plan, risk register, safeguarding policy, environmental policy,
        fuel strategy, staffing plan, pay scale, pension scheme, appraisal,
        fire risk assessment, accessibility audit, carbon footprint,
        emissions target, procurement policy, code of conduct,
        complaints procedure, privacy policy, annual report, newsletter,
        website, noticeboard, suggestion box, repair fund, hardship fund,
        loan, overdraft, rent review, service charge, harbour dues,
        mooring fees, landing fees, berthing charges, pilotage fees,
        volunteer handbook, staff handbook, induction pack, asset register,
        depreciation schedule, cash-flow forecast, tide table, emergency plan
    """),
    "interjection": _items("""
        Honestly, Ugh, Right, So, Well, Ha, Blimey, Crikey, Aw, Phew, Wow,
        Oops, Oh, Hmm, Argh, Typical, Yikes, Hooray, Gosh, Oh dear, Oh well,
        Oh my goodness, Bless, Brr, Woohoo, Jeez, Whoops, Ooh
    """),
    "adverb": _items("""
        really, honestly, definitely, probably, apparently, basically,
        literally, actually, absolutely, totally, seriously, genuinely,
        properly, finally, luckily, annoyingly, weirdly, hopefully,
        thankfully, surprisingly, obviously, technically, officially,
        unfortunately, frankly, desperately, secretly, quietly
    """),
    "kitchen_item": _items("""
        big teapot, kettle, saucepan, frying pan, wok, colander, sieve, whisk,
        ladle, spatula, rolling pin, chopping board, cheese grater, peeler,
        tin opener, corkscrew, casserole dish, roasting tin, baking sheet,
        mixing bowl, measuring jug, kitchen scales, egg timer, cafetière,
        bread knife, bread bin, tea strainer, milk jug, sugar bowl, cake stand,
        butter dish, toast rack, oven gloves, tea towels, ice-cube tray,
        potato masher, salad spinner, lemon squeezer, pastry brush,
        cooling rack, pie dish, soup ladle, flask, water jug, biscuit tin
    """),
    "stationery": _items("""
        printer paper, envelopes, sticky notes, highlighters, marker pens,
        whiteboard pens, drawing pins, paper clips, elastic bands, sticky tape,
        staples, lever arch files, ring binders, receipt books, ink cartridges,
        toner, stamps, labels, plastic wallets, notepads, ballpoint pens, pencils,
        rubber bands, card for the printer, laminating pouches, treasury tags,
        bulldog clips, index cards, scissors, glue sticks
    """),
    "first_aid": _items("""
        plasters, bandages, antiseptic wipes, burn gel, eye wash, ice packs,
        tweezers, gauze, saline, foil blankets, triangular bandages, slings,
        medical tape, gloves, resuscitation masks, defibrillator pads,
        sick bags, seasickness tablets, blister plasters, finger dressings,
        eye pads, safety pins, splints, cold packs, hand gel
    """),
    "coast_feature": _items("""
        beach, cove, headland, cliff path, shingle, dunes, saltmarsh,
        mudflats, estuary, creek, lagoon, reef, skerry, sea stack, rock arch,
        sea cave, sandbank, spit, causeway, jetty, breakwater, harbour wall,
        pontoon, quay, wharf, lighthouse, daymark, rockpools, tideline,
        strandline, foreshore, boulder beach, slipway, sea wall, groyne,
        promenade, shell beach, cliff top, tombolo, blowhole, kelp bed
    """),
    "sky_sight": _items("""
        sunset, northern lights, full moon, rainbow, double rainbow,
        shooting stars, meteor shower, eclipse, mackerel sky, lightning,
        red sky, harvest moon, supermoon, halo round the moon, fog bow,
        thunderstorm over {place}, noctilucent clouds, sun dog
    """),
    "car_problem": _items("""
        a flat tyre, a dead battery, a warning light on, a cracked windscreen,
        a dodgy clutch, squeaky brakes, a leaking radiator, a blown fuse,
        a broken exhaust, a slow puncture, a broken wing mirror,
        no reverse gear, a rattling exhaust, a stuck handbrake,
        a smashed headlight, dead wipers, an oil leak, no heater,
        a broken door lock, a seized wheel nut
    """),
    "car_part": _items("""
        clutch, brakes, exhaust, radiator, windscreen, wiper motor, headlight,
        indicator, wing mirror, bumper, tyre, alternator, starter motor,
        spark plugs, handbrake, gearbox, cambelt, suspension, power steering,
        heater core, tow bar, battery, fuel pump, water pump, cylinder head
    """),
    "bill": _items("""
        electric bill, water bill, council tax, phone bill, broadband, rent,
        mortgage, car insurance, vet bill, parking fine, season ticket,
        gas bill, oil delivery, dentist bill, mooring fees, boat insurance,
        garage bill, childcare fees, music lessons, gym membership
    """),
    "person_adj": _items("""
        kind, patient, generous, funny, hilarious, clever, organised,
        chaotic, brave, calm, cheerful, thoughtful, reliable, punctual,
        hopeless, stubborn, brilliant, talented, creative, practical, handy,
        nosy, chatty, shy, quiet, loud, bossy, laid-back, easy-going,
        hard-working, unflappable, dependable, sensible, sweet, lovely,
        gentle, fearless, cheeky, mischievous, dry, witty, sharp, canny,
        unstoppable, enthusiastic, conscientious, meticulous, scatty,
        forgetful, good with people, great with kids, brilliant in a crisis,
        a natural on the radio, unbeatable at darts
    """),
    "tech_thing": _items("""
        printer, office computer, card machine, booking system, wi-fi,
        router, till, laptop, tablet, phone, radio, screen in the waiting room,
        departure board, email, shared drive, group chat, spreadsheet,
        website, scanner, CCTV camera, public address system, projector, ticket printer,
        barcode scanner, clocking-in machine
    """),
    "tech_problem": _items("""
        isn't working, keeps crashing, has frozen again, won't turn on,
        needs an update, is really slow, has lost the connection,
        is showing yesterday's times, is beeping, won't print,
        keeps asking for a password, has gone blank
    """),
    "party_thing": _items("""
        balloon, paper plate, napkin, candle, streamer, party popper,
        fairy lights, bunting, paper cup, cake knife, folding chair,
        gazebo, extension lead, speaker, cool box, tablecloth, banner,
        fancy dress costume, lantern, glow stick
    """),
    "game": _items("""
        Cards, Dominoes, Darts, Cribbage, Backgammon, Chess, Draughts,
        Poker, Rummy, Charades, Bingo, Pub quiz, Table football, Pool,
        Whist, Mahjong, Quoits, Shove ha'penny, Skittles
    """),
    "travel_mode": _items("""
        bus, train, coach, night train, taxi, early flight, sleeper,
        hospital shuttle, post bus, school bus, last bus, water taxi
    """),
    "accommodation": _items("""
        B&B, campsite, hostel, caravan park, guest house, holiday cottage,
        glamping pod, bunkhouse, boutique hotel, farmhouse, yurt,
        shepherd's hut, camper van, youth hostel, lighthouse cottage
    """),
    "bread": _items("""
        sourdough, wholemeal, granary, rye bread, soda bread, focaccia,
        ciabatta, brioche, baguettes, bloomers, cobs, baps, seeded loaves,
        fruit loaf, cheese straws, saffron buns, croissants, pain au chocolat,
        cinnamon buns, bagels, teacakes, crumpets, pretzels, flatbreads
    """),
    "cheese": _items("""
        Tolly Blue, Ossory Smoked, Quellhaven Crumbly, goat's cheese,
        mature cheddar, sheep's cheese, brie, halloumi, blue cheese,
        seaweed cheese, nettle cheese, cream cheese, smoked cheese,
        Gullhallow Gold, Marrow Mild
    """),
    "saying": _items("""
        Better late than never, Every cloud, Touch wood, No rest for the wicked,
        It never rains but it pours, Onwards and upwards,
        That's a weight off my mind, You're a gem, Rather you than me,
        Famous last words, Don't speak too soon, Many hands make light work,
        Slowly but surely, All's well that ends well, Needs must,
        Such is life, Chin up, Small mercies, Safe crossing, Fair winds,
        Mind how you go, Keep your hair on, Don't count your chickens,
        Easy does it, Steady as she goes, Sounds like a plan, Spot on,
        Bang on time for once, Right you are, Righto, Ta very much,
        Much obliged, You legend, Champion, Lush, Gutted for you,
        What a palaver, What a faff, Nightmare, Bless you, Wish me luck,
        Break a leg, Have a lovely holiday, Drive safe, Sleep well, Night all,
        Morning sunshine, Red sky at night, Ouch, Tell me about it,
        Fingers crossed, Here's hoping, Story of my life, Same here,
        Couldn't agree more, Not a chance, Why not, Go on then,
        Twist my arm, Watch this space, Leave it with me, Consider it done,
        Nice one, Good on you, About time, Hear hear, Ahoy
    """),
    "number_word": _items("""
        thirteen, fourteen, sixteen, seventeen, eighteen, nineteen, thirty,
        forty, fifty, sixty, seventy, eighty, ninety, a hundred, a dozen,
        a couple of, a few, loads of, a handful of, dozens of
    """),
    "person_kind": _items("""
        man, woman, lad, lass, kid, gentleman, lady, couple, family,
        bloke, old chap, young woman, little boy, little girl, teenager,
        grandad, grandma, toddler, baby, student
    """),
    "farm_thing": _items("""
        lambing, shearing, silage, haymaking, muck spreading, milking,
        calving, dipping the sheep, ploughing, harvest, hedge laying,
        fencing, tupping, weaning, worming the ewes, rounding up the sheep
    """),
    "livestock": _items("""
        ewe, ram, lamb, heifer, bullock, calf, piglet, sow, boar, hen,
        cockerel, duck, goose, goat, kid, pony, donkey, alpaca, turkey
    """),
    "tackle": _items("""
        rod, reel, spinning rod, landing net, keepnet, tackle box, float,
        lure, spinner, sinker, lead weight, hook, swivel, mackerel feathers,
        crab line, bait box, lugworm, ragworm, peeler crab, squid strip,
        headlamp, rod rest, fishing stool, gaff
    """),
    "garden_tool": _items("""
        spade, garden fork, trowel, hoe, rake, pair of secateurs, pair of shears,
        pair of loppers, watering can, hosepipe, dibber, seed tray, cloche,
        cold frame, leaf rake, pruning saw, kneeling pad, bulb planter,
        sprinkler, wheelbarrow, garden sieve, edging iron, hand fork
    """),
    "garden_supply": _items("""
        horticultural fleece, netting, bamboo canes, garden twine, mulch,
        bonemeal, potting compost, seed packets, plant labels, grow bags,
        seaweed feed, chicken manure pellets, grit, bark chippings, slug traps
    """),
    "baking_item": _items("""
        yeast, baking powder, bicarbonate of soda, caster sugar, icing sugar,
        brown sugar, golden syrup, vanilla extract, cocoa powder,
        ground almonds, desiccated coconut, glacé cherries, mixed peel,
        currants, self-raising flour, strong flour, cornflour, gelatine,
        food colouring, sprinkles, buttermilk, lard, suet, black treacle,
        poppy seeds, sesame seeds, cardamom, cloves, star anise, allspice
    """),
    "build_thing": _items("""
        scaffolding, breeze blocks, joists, rafters, lintel, render,
        pebble-dash, flashing, soffits, fascia boards, damp course, roof felt,
        ridge tiles, slates, guttering, rendering, floor screed, plaster,
        cavity wall, chimney stack, dormer window, skylight, sash windows,
        lean-to, extension, foundations, drainage, septic tank, water main
    """),
    "art_supply": _items("""
        watercolours, acrylics, oil paints, canvas, easel, charcoal, pastels,
        brushes, palette, sketch pad, clay, kiln, glaze, potter's wheel,
        lino cutters, printing ink, embroidery thread, knitting needles,
        crochet hook, yarn, fabric scraps, sewing pattern, beads, driftwood,
        sea glass, shells
    """),
    "toiletry": _items("""
        toothbrush, toothpaste, deodorant, razor, moisturiser, lip balm,
        hand cream, sun cream, flannel, shower gel, conditioner, hairbands,
        nail clippers, cotton buds, tissues, face wipes, hair gel, mouthwash,
        dental floss, insect repellent, after-sun, contact lens solution
    """),
    "school_subject": _items("""
        maths, English, history, geography, science, chemistry, physics,
        biology, art, music, drama, PE, design technology, computing, French,
        Spanish, German, Latin, religious studies, economics, psychology,
        sociology, media studies, food technology, marine science, Welsh
    """),
    "music_genre": _items("""
        folk, jazz, blues, rock, punk, pop, reggae, soul, funk, country,
        classical, opera, hip hop, metal, sea shanties, ceilidh music,
        brass band music, choral music, disco, techno, bluegrass, swing,
        indie, gospel, ska, electronic
    """),
    "place_adj": _items("""
        windswept, sheltered, picturesque, deserted, crowded, muddy, sleepy,
        lively, rammed, quiet, gorgeous, bleak, beautiful, foggy, empty,
        buzzing, peaceful, wild, chilly, sunny, overrun with tourists,
        heaving with day-trippers, full of campers, dead, magical, unspoilt,
        stunning, spooky, charming, ramshackle, bustling
    """),
    "time_word": _items("""
        dawn, dusk, midnight, teatime, elevenses, sunrise, sunset, first light,
        last light, lunchtime, bedtime, closing time, low tide, high tide,
        slack water, half-tide, twilight
    """),
    "office_task": _items("""
        chase up the invoice, sort out the keys, update the noticeboard,
        restock the leaflets, answer the emails, file the receipts,
        print the new timetables, laminate the signs, count the float,
        reconcile the till, order the uniforms, book the engineer,
        check the voicemails, renew the licences, update the website,
        photocopy the rota, send out the newsletter, log the complaints,
        scan the manifests, back up the computer, refill the printer,
        tidy the lost property cupboard, label the keys, water the office plants,
        defrost the staff fridge, empty the shredder, clean the whiteboard
    """),
    "complaint": _items("""
        the noise from the yard, the queue at the ticket office, the price of tea,
        dogs in the café, the state of the toilets, the smell from the bins,
        the delays on the {crossing}, the seats on {boat}, the lack of shelter at {place},
        the parking at {place}, the gulls, the music in the waiting room,
        the wi-fi on the boats, the lack of bike spaces, the steep ramp,
        the cold waiting room, the timetable changes, the rude sign on the door
    """),
    "compliment": _items("""
        the friendly crew, the café's {cake}, the smooth crossing,
        how helpful {first} was, the new waiting room, the clean boats,
        the views from {boat}, the quick refund, the dog-friendly policy,
        the lovely ticket office staff, the hot chocolate, the flowers on the pier
    """),
    "opinion_more": _items("""
        adorable, appalling, astonishing, baffling, bizarre, blissful, boring,
        breathtaking, chaotic, comforting, creepy, cute, daft, dazzling,
        delightful, depressing, dismal, dreamy, dull, eerie, electric,
        elegant, enchanting, endless, exhilarating, eye-watering, fabulous,
        fascinating, fierce, flawless, fraught, frightening, ghastly,
        gloomy, gripping, gruelling, haunting, heartbreaking, heavenly,
        hectic, heroic, horrendous, impressive, incredible, inspiring,
        intense, jaw-dropping, joyful, ludicrous, magnificent, manic,
        marvellous, memorable, mesmerising, mind-blowing, miserable, moving,
        mysterious, nerve-racking, nostalgic, outrageous, painful, pleasant,
        pointless, precious, priceless, quirky, ridiculous, romantic, rowdy,
        scary, scenic, serene, shocking, silly, soothing, spectacular,
        splendid, sublime, superb, tedious, tense, terrific, thrilling,
        tiresome, touching, tranquil, tremendous, unbelievable,
        unforgettable, unreal, uplifting, vibrant, wacky, wholesome, wonky
    """),
    "job": _items("""
        architect, actor, astronomer, au pair, bank clerk, barista, bookkeeper,
        bus driver, care worker, cartographer, civil engineer, composer,
        counsellor, crane operator, curator, dental nurse, designer, ecologist,
        economist, editor, estate agent, film-maker, firefighter, forester,
        gamekeeper, glassblower, graphic designer, groundsman, historian,
        illustrator, instrument maker, interpreter, lawyer, lecturer,
        lighthouse keeper, magistrate, marine engineer, meteorologist,
        musician, novelist, paramedic, park ranger, pastry chef,
        physiotherapist, police officer, porter, printer, professor,
        psychologist, radio presenter, receptionist, researcher, sailor,
        scientist, seamstress, secretary, shipwright, social worker,
        software developer, sound engineer, statistician, surgeon,
        tattoo artist, translator, travel agent, undertaker, vet nurse,
        warden, web designer, wildlife warden, zookeeper, youth worker
    """),
    "deck_call": _items("""
        Stand by to let go forward, Let go aft, All fast aft, All fast forward,
        Ramp down, Ramp up, Make fast the bow line, Slack off the stern line,
        Fenders out on the port side, Fenders in, Gangway secure,
        Cast off when ready, Hold her there, Easy astern, Slow ahead,
        Full ahead, Stop engines, Clear the ramp, Doors closed,
        Passengers aboard, Head count done, Springing off now
    """),
    "ice_cream": _items("""
        vanilla, chocolate, strawberry, mint choc chip, rum and raisin,
        salted caramel, honeycomb, pistachio, clotted cream, lemon sorbet,
        raspberry ripple, coffee, cookie dough, banana, toffee fudge,
        blackcurrant, cherry, coconut, mango sorbet, gooseberry, elderflower,
        stem ginger, bubblegum, lavender honey, sea salt
    """),
    "sandwich": _items("""
        cheese and pickle, egg mayo, ham salad, tuna and sweetcorn, crab,
        prawn mayonnaise, chicken and stuffing, BLT, coronation chicken,
        brie and cranberry, hummus and roasted veg, smoked salmon,
        cheese and onion, beef and horseradish, falafel, club, fish finger,
        mackerel and beetroot, cheddar and apple, sausage and onion
    """),
    "toy": _items("""
        building blocks, train set, doll's house, rocking horse, trike,
        balance bike, crayons, colouring book, sticker book, skipping rope,
        hula hoop, yo-yo, marbles, spinning top, teddy, puppet, water pistol,
        bubble wand, dressing-up box, toy tractor, plastic dinosaur,
        fishing net, toy pirate ship, stuffed seal, wooden puzzle
    """),
    "accessory": _items("""
        brooch, hairclip, scrunchie, headband, bow tie, braces, beret,
        flat cap, trilby, balaclava, earmuffs, snood, shawl, kilt, dungarees,
        pinafore, blazer, anorak, duffel coat, pea coat, trench coat, mac,
        bobble hat, sou'wester, fisherman's smock, wristwatch, umbrella hat
    """),
    "weather_kit": _items("""
        anemometer, barograph, rain gauge, wind vane, weather buoy,
        thermometer, hygrometer, satellite picture, pressure chart,
        wave rider buoy, weather station, tide gauge, lightning detector,
        sunshine recorder, webcam on the lighthouse
    """),
    "harbour_thing": _items("""
        pontoon, fuel berth, ice plant, fish market, net store, crane,
        travel hoist, boat park, dinghy rack, launching trolley,
        visitors' moorings, harbour light, fog horn, bell buoy, leading marks,
        tide board, lifebuoy post, boat ramp, water tap on the quay,
        harbour steps, pier railings, breakwater lamp, waste oil tank
    """),
    "attraction": _items("""
        amusement arcade, crazy golf, pier theatre, aquarium, lido,
        beach huts, deckchair hire, ice-cream kiosk, souvenir shop, museum,
        art gallery, craft shop, heritage centre, lifeboat museum,
        smokehouse, boat trips, seal sanctuary, bird hide, castle ruins,
        standing stones, walled garden, observatory, lighthouse tour,
        adventure playground, ropes course, maze, petting farm, vineyard
    """),
    "comparable": _items("""
        windy, cold, wet, busy, quiet, rough, calm, foggy, sunny, warm,
        choppy, late, early, grey, bright, chilly, stormy, muggy, lumpy
    """),
    "weather_system": _items("""
        cold front, warm front, occluded front, ridge of high pressure,
        trough, deep depression, small low, band of rain, squall line,
        area of high pressure, sea breeze, line of showers, weak front,
        tropical airmass, northerly airstream
    """),
    "cloud": _items("""
        cumulus, cumulonimbus, cirrus, stratus, nimbostratus, altocumulus,
        anvil clouds, towering cumulus, low cloud, sea mist, lenticular cloud
    """),
    "emergency": _items("""
        the coastguard, the lifeboat, the air ambulance, the harbour master,
        the doctor on {place}, the district nurse, the police, the fire crew
    """),
    "incident": _items("""
        a kayaker in difficulty, a swimmer cut off by the tide,
        a dinghy capsized off {place}, a walker stuck on the cliffs,
        a yacht with a fouled propeller, a passenger with chest pains,
        a dog over the side, a child with a suspected broken arm,
        a fire on a fishing boat, a person in the water near {marker},
        a broken-down rib drifting towards the rocks, flares seen off {place}
    """),
    "seamanship": _items("""
        tidal stream, set and drift, leeway, overfalls, eddy, tide race,
        ground swell, backwash, standing waves, transit marks, waypoint,
        compass bearing, heading, clearing line, back eddy
    """),
    "kitchen_job": _items("""
        sharpen the knives, stack the logs, chop kindling, split the logs,
        light the stove, net the strawberries, pot on the seedlings,
        prick out the seedlings, harden off the tomatoes, thin the carrots,
        earth up the potatoes, lift the onions, pickle the beetroot,
        freeze the blackberries, bottle the plums, knead the dough,
        ice the cake, marinate the mackerel, gut the fish, fillet the mackerel,
        pick the crab, shell the peas, peel the potatoes, grate the cheese,
        whisk the eggs, darn my socks, polish my boots, oil the hinges,
        reproof my waterproofs, wax my jacket, sort the recycling,
        scrub the potatoes, salt the fish, smoke the mackerel, dry the herbs,
        strain the jam, sterilise the jars, label the chutney
    """),
    "fruit_veg": _items("""
        damsons, sloes, rosehips, elderberries, blackberries, bilberries,
        redcurrants, gooseberries, mulberries, quinces, greengages,
        nectarines, melons, watermelon, pineapple, mangoes, kiwis,
        passion fruit, pomegranates, limes, grapefruit, clementines,
        satsumas, avocados, asparagus, artichokes, fennel, kohlrabi, swede,
        radishes, rocket, chard, pak choi, mangetout, sugar snap peas,
        broad beans, runner beans, butternut squash, marrows, shallots,
        spring onions, chillies, okra, sweet potatoes, celeriac, sea beet,
        rhubarb, new potatoes, purple sprouting broccoli, sprouts, leeks
    """),
    "condiment": _items("""
        brown sauce, salad cream, piccalilli, aioli, mint sauce, apple sauce,
        cranberry sauce, chilli jam, harissa, miso, soy sauce, fish sauce,
        tahini, pesto, relish, garam masala, turmeric, saffron, smoked paprika,
        chilli flakes, five-spice, mango chutney, hot sauce, vinaigrette
    """),
    "pub_drink": _items("""
        pint of bitter, half of cider, pint of stout, glass of red,
        glass of white, lager, shandy, scrumpy, perry, rum and ginger,
        whisky, gin and tonic, mulled wine, mocktail, lemonade, orange squash,
        pint of mild, bottle of porter, sherry, brandy
    """),
    "baby_thing": _items("""
        nappies, wipes, baby bottle, formula, dummy, buggy, baby sling,
        car seat, high chair, potty, teething ring, bib, babygrow, muslin,
        changing bag, cot sheet, baby monitor, rain cover
    """),
    "medical": _items("""
        blood test, x-ray, plaster cast, stitches, antibiotics, ointment,
        crutches, walking frame, eye drops, steroid cream, tetanus jab,
        hearing aid batteries, physio exercises, knee brace, repeat prescription
    """),
    "rock": _items("""
        granite, slate, basalt, limestone, sandstone, chalk, clay, quartz,
        fossils, ammonites, serpentine, mudstone, flint, sea glass, agate
    """),
    "legend": _items("""
        the drowned bell of Drowned Oak, the Saltmarrow mermaid,
        the smugglers' tunnel under {pub}, the grey lady of Lantern Head,
        the lost ferry of 1903, the giant's stepping stones at {place},
        the ghost ship off Scarra Point, the witch's well on {place},
        the seal woman of Gullhallow, the buried treasure on Fennick Isle
    """),
    "sport_term": _items("""
        hat-trick, penalty, free kick, corner, own goal, bullseye, double top,
        nine-darter, try, conversion, wicket, six, no-ball, clean sheet,
        last-minute winner, red card, sending-off, extra time
    """),
}


# Capitalised words that stay capitalised mid-sentence.
PROPER_WORDS = {
    word
    for name in ("first", "surname", "place", "pub", "boat", "sea_area", "cheese",
                 "team", "school_subject", "marker")
    for entry in LEXICON[name]
    for word in re.findall(r"[A-Z][\w']*", entry)
} | set(_WEEKDAYS) | set(_MONTHS) | {"Christmas", "AGM", "ETA", "VHF", "CCTV", "BLT", "PE"}


# ---------------------------------------------------------------------------
# Grammar: message kinds and their templates
# ---------------------------------------------------------------------------

RULES: dict[str, list[str]] = {
    "line": _lines("""
        {message}
        {chatty} {followup}
        {opener} {chatty}
        {soft_opener} {chatty.lc}
        {pair}
    """),
    # Kinds that read naturally with a greeting or a sign-off attached.
    "chatty": _lines("""
        {chat}
        {crossing_msg}
        {cafe}
        {rota}
        {tickets}
        {maintenance}
        {cargo}
        {wildlife}
        {life}
        {training}
        {work_misc}
        {home_misc}
        {country}
        {talk}
    """),
    # Two messages of one kind sent together.
    "pair": _lines("""
        {chat} {chat}
        {life} {life}
        {chat} {life}
        {home_misc} {chat}
        {talk} {reply}
        {talk} {talk}
        {work_misc} {reply}
        {crossing_msg} {crossing_msg}
        {reply} {reply}
        {crossing_msg} {reply}
        {cafe} {cafe}
        {maintenance} {maintenance}
        {weather} {weather}
        {rota} {reply}
        {tickets} {tickets}
        {handover} {handover}
        {council} {council}
    """),
    "followup": _lines("""
        Thanks!
        Cheers.
        Thanks {first}.
        Let me know.
        I'll keep you posted.
        Sorry for the short notice.
        Ta.
        Speak soon.
        Cheers, {first}
        Let me know if that's a problem.
        Any questions, give me a shout.
        See you later.
        Fingers crossed.
        I'll update you when I know more.
        Can you pass that on to {first}?
        I've told {first} too.
        Sorry!
        x
    """),
    # Openers that end a sentence, so the message keeps its capital.
    "opener": _lines("""
        Morning!
        Hi {first}!
        Hey {first}.
        Morning all.
        Evening all!
        Hiya!
        {interjection}.
        {interjection}!
        Afternoon all.
        Hello!
    """),
    # Openers that run on into the message, which then starts in lower case.
    "soft_opener": _lines("""
        Hi {first},
        Quick one:
        Hey {first},
        Sorry to bother you, but
        Morning all,
        Just so you know,
        {first},
        Heads up:
        Hiya,
        FYI
        {interjection},
        Random question:
        Quick question,
        Update:
        By the way,
        Also,
        Between you and me,
        Not to panic anyone, but
        Apparently
        Rumour has it
    """),
    "message": _lines("""
        {chat}
        {crossing_msg}
        {reply}
        {cafe}
        {handover}
        {maintenance}
        {weather}
        {rota}
        {tickets}
        {cargo}
        {council}
        {email}
        {notice}
        {lost}
        {wildlife}
        {radio}
        {life}
        {training}
        {admin}
        {work_misc}
        {home_misc}
        {country}
        {talk}
        {asides}
        {more_talk}
    """),
    "crossing_msg": _lines("""
        Running {minutes} minutes late, can you hold the {crossing}?
        {boat} is running about {minutes} minutes behind because of {delay_reason}.
        The {time_hm} to {place} is cancelled due to {cancel_reason}.
        Is the {crossing} still going ahead?
        Just left {place}, should be alongside at {place} by {time_hm}.
        Can someone meet {boat} at {berth}? We'll be in at {time_any}.
        We're holding the {crossing} for {n} {passenger_kind.pl} off the bus.
        {boat} has swapped to {berth} for the {crossing}.
        The tide window at {place} is {time_range}, so we need to be off the slipway in good time.
        Heads up, the {crossing} is full.
        Loading is slow this morning because of {delay_reason}.
        The {crossing} will leave from {berth} instead of {berth} today.
        We've got {n} cars and {big_n} foot passengers on the {crossing}.
        Any room on the {crossing} for {vehicle.a}?
        The pilot for the {crossing} is {first} today, not {first}.
        Swell's picking up off {place}, we might have to divert to {place}.
        Back in at {berth}, all passengers off.
        {boat} is alongside and loading.
        Crossing was {adj_crossing}, {crossing_comment}.
        Please remind passengers to {passenger_instruction} before we leave.
        {first}, are you on the {crossing} or the {crossing}?
        Extra sailing to {place} at {time_hm} on {weekday} for the {event}.
        Fog's lifting, we should be able to run the {crossing} on time.
        We had to turn back {distance} out of {place} because of {delay_reason}.
        No crossings to {place} until further notice because of {cancel_reason}.
        Who's taking {boat} out first thing?
        Don't let anyone on the ramp until the tide's up, it's low-tide mud everywhere.
        We'll run the {crossing} with {boat} while {boat} is in the yard.
        Can you ring {place} and tell them we'll be {minutes} minutes late?
        I've got {n} {passenger_kind.pl} waiting at {place}, is anyone coming?
        The {crossing} won't stop at {place} today, the berth slot has gone to {boat}.
        Berth slot at {place} is {time_range}, don't be late or we lose it.
        We're alongside at {place}, {delay_reason} held us up.
        Last crossing tonight is {time_hm}, not {time_hm} as it says on the board.
        It's {weather_adj} out there, the {crossing} might be a bit {adj_crossing}.
        {person_kind.a} with {n} {belonging.pl} needs a hand up the ramp at {place}.
        {job.a} from {place} left {belonging.a} on the {crossing}.
        Passengers on the {crossing} were {adverb} {feeling}, it was that {comparable}.
        {title} {surname} is bringing {cargo_single.a} on the {crossing}, can we make room?
        The {crossing} smelt of {grocery} all the way, someone's shopping split.
    """),
    # A particular sailing, as in "the {crossing}" -> "the 7:40 crossing".
    "crossing": _items("""
        {time_hm} crossing, {time_hm}, {time_hm} to {place}, first crossing,
        last crossing, early {place} run, evening boat, {weekday} cargo run,
        {time_hm} from {place}, late boat, school boat, low-tide crossing,
        morning sailing, lunchtime boat, {place} shuttle
    """),
    # Repeated alternatives are deliberate: they raise that option's weight.
    "time_any": _lines("""
        {time_hm}
        {time_words}
        {time_hm}
        noon
        lunchtime
        midday
        {time_hm} at the latest
        about {time_hm}
    """),
    "day_phrase": _lines("""
        today
        tomorrow
        this afternoon
        tonight
        this morning
        on {weekday}
        at the weekend
        first thing
        later
        after lunch
        next {weekday}
        {weekday} morning
        {weekday} evening
        over the next few days
        for the rest of the week
    """),
    "date": _lines("""
        the {ordinal}
        {weekday} the {ordinal}
        the {ordinal} of {month}
        {weekday} {ordinal} {month}
        {month} {ordinal}
    """),
    "person": _lines("""
        {first}
        {first}
        {first} {surname}
        the {role}
        {first} from the {room}
        {title} {surname}
        {first} {surname} from {place}
    """),
    "title": _items("Mrs, Mr, Ms, Dr, Miss, Captain"),
    "handover": _lines("""
        Handover: {handover_item}, {handover_item} and {handover_item}.
        Shift notes for {weekday}: {handover_item}. {handover_item}.
        Night watch all quiet, {handover_item}.
        {boat} is on {berth} with {fuel_level} fuel, {handover_item}.
        For the morning crew: {handover_item}.
        Left the keys for the {key_thing} in the {key_place}.
        Bilge pump on {boat} cycled {n} times overnight, worth keeping an eye on.
        Engine hours on {boat} are now {four_digits}, service is due soon.
        Deck log is up to date apart from the {crossing}.
        Passenger count for the day was {big_n}.
        Still waiting on {person} to sign off the {admin_doc}.
        I've topped up the {consumable} on {boat}.
        Mooring lines on {berth} need checking at high water, around {time_hm}.
        {first} is covering the ticket office until {time_any}.
        Nothing to report, {quiet_comment}.
        Handover for {first}: {handover_item}, and {handover_item}.
        Late shift done. {handover_item}, {handover_item}.
        Please can the early shift {maint_verb} the {part} on {boat}?
        {n} passengers asked about the {wildflower.pl} on {place}, maybe we need a leaflet.
        {insect.pl} all over the waiting room again, I've left the door open.
        {title} {surname} rang about {complaint}, I said someone would call back.
        {boat} is locked up, {handover_item}.
        All boats fuelled, {handover_item}.
    """),
    "handover_item": _lines("""
        {boat} fuelled and locked
        fenders out on {berth}
        the {part} on {boat} is {part_state}
        {n} {belonging.pl} handed in to the office
        {boat} needs a {clean_type} before the {crossing}
        the {room} is unlocked
        radio check done at {time_hm}
        lifejacket check done on {boat}
        {first} has the spare keys
        the {crossing} ran {minutes} minutes late
        bins emptied
        card machine at the ticket office is {card_state}
        the {part} on {boat} was {maint_verb.past}
        {admin_doc} is on the desk
        we're low on {consumable}
        high water {time_hm}
        {boat} is on a swing mooring for the night
        a passenger rang about a lost {belonging}
        the heater in the {room} is {broken_state}
        {first} called in sick for tomorrow
        the {cargo_goods} for {place} are in the cold store
        gangway lights are {broken_state}
    """),
    "weather": _lines("""
        Weather desk, {time_hm}: wind {wind_dir} {force}, sea {sea_state}, visibility {visibility}.
        The forecast {day_phrase} is {weather_phrase}.
        Expect {weather_phrase} {day_phrase}, then {weather_phrase}.
        Small craft warning for {sea_area} from {time_any}.
        Swell {swell_height} and building off {place}.
        High water at {place} is {tide_times}.
        Spring tides this week, so the tide window at {place} is shorter than usual.
        Fog bank sitting over {place}, visibility down to {visibility_low}.
        Wind backing {wind_dir} this afternoon, {weather_phrase} by evening.
        Looks {weather_adj} {day_phrase}, good for the {crossing}.
        Barometer is {barometer}, {weather_opinion}.
        It's {weather_adj} out here at {place}!
        Anyone know if the {crossing} will run in this {weather_noun}?
        Gusts up to {big_n} knots forecast around {time_any}.
        Neap tides from {weekday}, which should make the {place} run easier.
        Rain clearing from the {compass} by {time_any}, then {weather_phrase}.
        Weather update: {weather_phrase}, wind {wind_dir} {force}.
        {weather_pair} at {place} right now.
        Is it still {weather_adj} over your way?
        Tide's running hard through the narrows until about {time_hm}.
        Sea fog rolling in over {place}, it's like soup out there.
        Weather desk says {weather_phrase} {day_phrase}, so pack your waterproofs.
    """),
    "force": _lines("""
        force {force_n}
        {force_n} to {force_n}
        {force_n} gusting {force_n}
        {force_n} or {force_n}, occasionally {force_n} later
    """),
    "force_n": _items("four, five, three, six, seven, 4, 5, 6, two, eight, 3, 7"),
    "weather_phrase": _lines("""
        {weather_adj} with {weather_noun} at times
        {weather_pair}
        {weather_noun} spreading from the {compass}
        sunny spells and scattered showers
        a dry start, then {weather_noun} by evening
        {weather_noun} clearing by {time_words}
        fog patches, lifting by mid-morning
        persistent rain, easing later
        bright but breezy
        cold with a risk of frost
        mainly dry, wind {wind_dir} {force}
        heavy showers, some thundery
        {weather_adj} and still
        grey and {weather_adj}
    """),
    "cafe": _lines("""
        Can I get {cafe_order.a} and {cafe_order.a}, please?
        Two {drink.pl} and {cafe_food.a} for the wheelhouse when you get a chance.
        Café is out of {grocery} until {weekday}.
        Today's soup is {soup} and the special is {dish}.
        Could you save me {cafe_food.a}? I'll be back off the {crossing}.
        We need more {cafe_supply} from {business}.
        Cake of the day is {cake}.
        The {appliance} in the café is {broken_state}.
        {n} {drink.pl}, {n} {drink.pl} and {cafe_food.a} for table {table}.
        Is the café open on {weekday}?
        Café closing at {time_any} today for {cafe_reason}.
        Delivery of {cafe_supply} has come in, can someone help carry it up from the pier?
        {first}'s {cake} is the best thing on the menu.
        Tried the new {dish}, {food_opinion}.
        Anyone want anything from the café? I'm going up now.
        Put it on the staff tab, thanks!
        Can you do {cafe_food.a} without the {extra}?
        {cafe_food} and {drink.a}, please, to take away.
        Special tonight is {dish} with {side}, {price}.
        {drink} is {price} now, {drink} is {price}.
        Does the {cake} have nuts in it?
        Lunch order for the yard: {n} {cafe_food.pl} and {n} {drink.pl}.
        We're doing {dish} for the {event}, can you let me know numbers by {weekday}?
        Who left the {appliance} on all night?
        Café takings were up today, {big_n} covers!
        Oat milk or regular?
        Sorry, we've just sold the last {cafe_food}.
        Could someone bring up {n} {cargo_unit.pl} of {cafe_supply} from the store room?
        Café shopping list: {grocery}, {grocery}, {grocery} and {cafe_supply}.
        A passenger says the {cake} is {opinion_more}, take a bow {first}!
        We're trying {fruit_veg} in the salads this week, let me know what you think.
        Can you do {home_dish} for the staff lunch on {weekday}?
    """),
    "cafe_order": _lines("""
        {drink}
        {cafe_food}
        {drink} with oat milk
        large {drink}
        {cafe_food} with extra {extra}
    """),
    "dish": _lines("""
        {dish_style} {dish_protein}
        {dish_main} with {side}
        {dish_style} {dish_protein} with {side}
        {dish_main} and {side}
    """),
    "table": _items("4, 2, 6, 1, 3, 5, 7, 8, 9, 10, 11, 12"),
    "maintenance": _lines("""
        Replaced the {part} on {boat}, {maint_outcome}.
        {boat} is out of the water until {weekday} for {maint_job}.
        Yard log: {maint_verb.past} the {part}, {maint_verb.past} the {part}.
        Need {n} new {part.pl} for {boat}, can you order them from the chandlery?
        The {part} on {boat} is {part_state}.
        Slipway is booked for {boat} on {weekday} from {time_hm}.
        Who borrowed the {tool}? It's not on the board.
        Can someone help me {maint_verb} the {part} on {boat} after lunch?
        Bilge pump on {boat} is {broken_state}, using the spare for now.
        Engine on {boat} is {engine_symptom}, I'll have a look at {time_any}.
        {first} finished {maint_verb.ing} the {part} this morning.
        We're low on {yard_consumable}, I'll pick some up in {place}.
        Hull survey on {boat} went {survey_result}.
        Please don't use the {tool} until the {tool_part} is fixed.
        Antifouling on {boat} is done, it needs {n} hours to dry.
        Found {crack_type.a} in the {part}, photo is in the yard folder.
        Don't forget to log engine hours before you {maint_verb} anything.
        I'm {maint_verb.ing} the {part} on {boat}, back in {minutes} minutes.
        {boat} is back in the water, {maint_outcome}.
        The {tool} is back on the board, I've {maint_verb.past} the {tool_part}.
        Yard is closed {day_phrase} while we {maint_verb} the {part}.
        Has anyone got a spare {part}? Ours is {part_state}.
        Parts for {boat} are arriving on the {crossing}, {n} boxes.
        Order from the chandlery: {n} {part.pl}, {yard_consumable} and {yard_consumable}.
        Can we get {boat} onto the slipway at low water, around {time_hm}?
        Changed the oil and {maint_verb.past} the {part}, engine hours {four_digits}.
        Heads up, the {part} on {boat} needs {maint_verb.ing} before the weekend.
        The pressure washer's {broken_state} so the hull will have to wait.
        It's not the {part}, I think it's the {part}.
        {first} {surname} from {business} is coming to look at the {part} on {weekday}.
        The {part} on {boat} is {part_state}, and so is the {part}.
    """),
    "maint_outcome": _lines("""
        all good now
        seems to be working fine
        still needs testing
        should be good for another season
        took longer than I'd hoped
        ran it for an hour with no leaks
        old one was {part_state}
        sea trial on {weekday}
        fingers crossed
    """),
    "rota": _lines("""
        I'm not feeling great, {ailment} again, can anyone cover my shift on {weekday}?
        Can I swap my {shift} on {weekday} for your {shift} on {weekday}?
        Rota for {month} is up on the board.
        I'll be on leave {leave_dates}.
        Who's on the early tomorrow?
        Training session on {training_topic} on {weekday} at {time_any}, please sign up.
        {first} is off sick, {first} is covering the {shift}.
        Reminder: {training_topic} refresher for all deckhands by the end of {month}.
        I can do the {shift} on {weekday} but not the {shift}.
        Please put your hours on the timesheet by {weekday}.
        Could I leave at {time_any} on {weekday}? I've got {appointment}.
        Sorry, I've got {ailment} and won't make it in today.
        Hurt my {body_part} lifting {cargo_goods}, I'm going to get it looked at.
        Anyone free to do {shift.a} at {place} on {weekday}?
        I'm short-staffed in the {room} {day_phrase}, can anyone help?
        {first} and {first} have swapped {shift.pl} on {weekday}.
        Can I have {weekday} off? It's my {relative}'s {life_event}.
        New starter {first} is shadowing {first} on the {crossing} this week.
        Holiday requests for {month} need to be in by the {ordinal}.
        I'll be in late, I've got {appointment} at {time_hm}.
        Doctor says I've got {ailment}, so I'm off until {weekday}.
        I don't mind doing extra {shift.pl} in {month} if anyone needs the time off.
    """),
    "tickets": _lines("""
        Passenger asking if {pass_question}.
        Ticket office: {n} returns to {place} and {n} singles.
        Can I book {n} {passenger_kind.pl} on the {crossing} on {weekday}?
        How much is a return to {place} for {passenger_kind.a}?
        Card machine is {card_down}, cash only for now.
        Someone's asking whether dogs are allowed on {boat}.
        Group of {n} {group_kind} booked for {weekday}, they'll need help with {group_need}.
        Season tickets for {month} go on sale from the {ordinal}.
        Is there a discount for {discount_group}?
        We've sold out the {crossing}, can you put on a relief boat?
        Refund request from {passenger_kind.a} who missed the {crossing}.
        Queue at the ticket office is out the door, any chance of some help?
        Member number {four_digits} wants to change their booking to {weekday}.
        The timetable in the window still shows {month}'s times.
        A passenger left {belonging.a} at the desk, it's in the drawer.
        Day return to {place} is {price}, {price} for members.
        {big_n} tickets sold for the {crossing} so far.
        {passenger_kind.a} from {place} says the {crossing} left early, is that right?
        Can you print me a copy of the {month} timetable?
        We've had {n} calls about the {crossing}, people want to know if it's running.
        Ticket office is closing at {time_any} {day_phrase}.
        {occupation.a} from {place} asked if we can carry {cargo_single.a} on the {crossing}.
        Lady at the desk wants a single to {place}, but it's full. What's the next one?
        Booking for {person}: {n} adults, {n} children and a dog, {crossing} on {weekday}.
        {title} {surname} wants to bring {cargo_single.a} and {n} {belonging.pl} on the {crossing}.
        Can {passenger_kind.pl} bring {grocery} on board? Someone's asking.
        {job.a} from {place} wants a season ticket, what's the rate?
        {n} {occupation.pl} booked on the {crossing} for a conference at {place}.
    """),
    "cargo": _lines("""
        Manifest for the {cargo_run}: {n} {cargo_unit.pl} of {cargo_goods}, {n} {cargo_unit.pl} of {cargo_goods} and {cargo_single.a}.
        Manifest updated, added {n} {cargo_unit.pl} of {cargo_goods} for {business}.
        The {cargo_goods} for {place} didn't arrive, can you check with {business}?
        Delivery for {business} at {place}: {n} {cargo_unit.pl} of {cargo_goods}.
        Please sign the manifest before the {crossing} leaves.
        Load on {boat} is {n} tonnes, well under the limit.
        Can we fit {cargo_single.a} on the {crossing}?
        Cold store has {n} {cargo_unit.pl} of {cargo_goods} waiting for the {cargo_run}.
        Forklift is free, start unloading the {cargo_goods} onto {berth}.
        {business} wants their {cargo_goods} on the first boat tomorrow.
        Dangerous goods on the {crossing}: {hazard}, stowed on the {deck_area}.
        Who signed for the {cargo_goods}?
        {n} {cargo_unit.pl} of {cargo_goods} and {n} {cargo_unit.pl} of {cargo_goods} for {place}.
        The {cargo_run} is delayed, {business} have been told.
        Can you add {cargo_single.a} for {business} to the manifest?
        Strap the {cargo_goods} down properly, the swell is picking up.
        We're short {n} {cargo_unit.pl} of {cargo_goods} on the {place} order.
        Manifest for {boat} is on the clipboard by the ramp.
    """),
    "council": _lines("""
        Minutes: the council agreed to {council_action}.
        Motion to {council_action} was carried, {votes}.
        {person} raised concerns about {council_topic}.
        The members' council meets on {weekday} at {time_any} in the {venue}.
        Agenda item {n}: {council_topic}.
        Apologies received from {first} and {first}.
        The treasurer reported {finance_report}.
        Action: {first} to {council_task} by {date}.
        Council deferred the decision on {council_topic} to the {month} meeting.
        Please send any items for the agenda to {first} by {weekday}.
        The vote on {council_topic} is postponed until we have the {report_doc}.
        {big_n} members attended, so the meeting was quorate.
        Any other business: {aob}.
        {first} thanked {first} for {thanks_reason}.
        Proposal from {person} to {council_action}, seconded by {first}.
        Maybe I'm being naïve, but couldn't we just {council_action}?
        The council will vote on whether to {council_action} at the AGM.
        {first} {surname} has been elected {role}, congratulations!
        Minutes of the {month} meeting are pinned up in the {room}.
        Members asked for an update on {council_topic}.
    """),
    "email": _lines("""
        Hi {first}, {email_note}. {sign_word}, {first}
        Dear members, {notice_body} {sign_word}, {first} {surname}
        Dear {first}, thank you for renewing your membership of the Saltmarrow Tidal Ferry Cooperative. {sign_word}, {first} {surname}, {role}
        Hello {first}, just a quick note to say {email_note}. {sign_word}, {first}
        Hi all, {email_note}. Let me know if you have any questions. {first}
        Dear {first}, thank you for your email about {council_topic}. We'll discuss it on {weekday}. {sign_word}, {first}
        Hi {first}, can you send me the {admin_doc} for {month} when you get a chance? {sign_word}, {first}
        Hello, I'm writing on behalf of {business} about the {cargo_goods} delivery. Could you call me back? {sign_word}, {first} {surname}
        Hi {first}, I've attached the {report_doc}. {sign_word}, {first}
    """),
    "notice_body": _lines("""
        the {place} slipway will be closed from {date} for {maint_job}.
        the annual {event} will be held on {date} in the {venue}.
        lost property is now kept in the {room}.
        the new timetable starts on {date}, copies are at the ticket office.
        there's no {crossing} on {date} because of the {event}.
        please don't park in front of the {room}.
        the café will open at {time_hm} from {weekday}.
        tickets for the {event} are on sale at the café, {price} each.
        we're looking for volunteers to help with the {event}.
        the {crossing} will now stop at {place}.
    """),
    "notice": _lines("""
        Notice to members: {notice_body}
        Saltmarrow Tidal Ferry Cooperative notice: {notice_body}
        Welcome to the Saltmarrow Tidal Ferry Cooperative, {first}! Your membership number is {four_digits}.
        A message from the members' council of the Saltmarrow Tidal Ferry Cooperative: {notice_body}
        Reminder: {notice_body}
        Please note {notice_body}
        Important: {notice_body}
        Just a reminder that {notice_body}
    """),
    "lost": _lines("""
        Found on {boat}: {lost_desc.a}.
        Has anyone handed in {lost_desc.a}? A passenger lost it on the {crossing}.
        {lost_desc.a} was left on the {deck_area} of {boat}, it's at the ticket office now.
        Lost property: {n} {belonging.pl}, {lost_desc.a} and {lost_desc.a}.
        Passenger rang about {lost_desc.a}, probably left on the {crossing}.
        Is this anyone's {belonging}? Found it in the {room}.
    """),
    "lost_desc": _lines("""
        {belonging}
        {colour} {belonging}
        {material} {belonging}
        {colour} {material} {belonging}
        {size_adj} {colour} {belonging}
        {condition_adj} {belonging}
        {condition_adj} {colour} {belonging}
        {belonging} with a name tag
        {belonging} with {first}'s name on it
    """),
    "wildlife": _lines("""
        Pod of {sea_animal.pl} off {place} on the {crossing}!
        Saw {bird.a} on the stern rail of {boat} this morning.
        Passengers loved the {sea_animal.pl} near {place} today.
        There's {bird.a} nesting on the roof of the {room} again.
        Seals hauled out on {place} at low water, about {n} of them.
        {first} reckons there's {sea_animal.a} in the harbour, anyone else seen it?
        {seabird.pl} are back on the cliffs at {place}!
        First {bird} of the year spotted from the wheelhouse.
        Keep an eye out for {sea_animal.pl} on the {crossing}, {n} spotted yesterday.
    """),
    "radio": _lines("""
        Pilot log {time_hm}: departed {place}, {big_n} aboard, sea {sea_state}.
        {boat} to harbour, entering the channel now.
        Passing the {marker} at {time_hm}, all good.
        Channel buoy {n} is off station, I've reported it to the harbour master.
        {boat} clear of {place}, ETA {place} {time_hm}.
        Harbour master asks all vessels to keep clear of {berth} until {time_hm}.
        Lost sight of the {marker} in the fog, slowing right down.
        Radio check, {boat}, loud and clear.
        There's {vessel.a} {bearing}, keeping well clear.
        {vessel.a} is anchored in the channel at {place}, passing {bearing}.
        Watch out for {vessel.pl} near {marker}, there's a race on.
        {boat} slowing for {vessel.a} {bearing}.
    """),
    "reply": _lines("""
        Thanks {first}!
        No worries.
        Will do.
        On it.
        Sounds good to me.
        See you there.
        Yes please!
        Brilliant, thanks.
        Oh no, hope you're okay.
        I'll check and get back to you.
        Can't make it, sorry.
        Count me in!
        Not sure, ask {first}.
        Good shout.
        Fair enough.
        That's great news!
        Lovely, thank you.
        Already done.
        I think {first} has it.
        Give me {minutes} minutes.
        I'm on my way.
        Just seen this, sorry!
        Nice one, {first}.
        Cheers for letting me know.
        Ha, classic {first}.
        Is that the {time_hm} or the {time_hm}?
        Where are you?
        Who's got the keys?
        What time's high water?
        Okay, see you at {time_any}.
        Yes, I'll be there by {time_any}.
        Can we do {time_hm} instead?
        Don't worry about it.
        That's fine, I'll sort it.
        No problem, {first}.
        I'm not in until {weekday}, sorry.
        Any news on the {part}?
        Great, thanks for sorting that.
        Yep, all done.
        Hmm, not sure that's right.
        Let's talk about it at the {event}.
        Happy to help.
        Wonderful, thanks all!
        Well done everyone, {adj_crossing} day but we got through it!
        Get well soon {first}!
        Congratulations!
        Ooh yes please, {cafe_food.a} would be amazing.
        How long will it take?
        Shall I tell {first}?
        I'll ring you in {minutes}.
        {saying}!
        {saying}.
        {saying}, {first}.
        {interjection}, {saying.lc}.
        Good luck with the {challenge}!
        Enjoy the {event}!
    """),
    "chat": _lines("""
        Anyone fancy {plan} after the last crossing?
        Are you coming to the {event} on {weekday}?
        See you at {meeting_place} at {time_any}.
        Happy birthday {first}! Hope you have a lovely day.
        Can you pick up some {grocery} on your way back?
        Just got back from {place}, {trip_comment}.
        My {relative} is visiting from {place} this weekend, so I can't do {weekday}.
        Did you see {first}'s new {borrow_item}?
        I'm thinking of going {outdoor_hobby} this weekend if the weather holds.
        How's your {relative} doing?
        Thanks for {thanks_reason}, {nice_reply}!
        Sorry I missed your call, I was {busy_with}.
        Who's got my {belonging}?
        Lovely {time_of_day} for it!
        Does anyone know a good {service_person} in {place}?
        {first} and I are going to {place} for {meal} on {weekday}, want to come?
        I've got a spare {spare_thing} if anyone needs one.
        Feeling {feeling} today, {feeling_reason}.
        The {animal} next door has {animal_did} again.
        Congratulations on the {life_event}, {first}!
        Did anyone watch {show} last night?
        I've started {hobby} and it's {opinion}.
        What time does the {shop} in {place} close on {weekday}?
        Can I borrow your {borrow_item} for the weekend?
        Quiz night at {pub} on {weekday}, we need a team name!
        Is it true {first} is moving to {place}?
        Welcome aboard {first}, great to have you on the team!
        Bring {potluck_item.a} to the {event} if you can.
        I can't find my {belonging} anywhere, did I leave it in the {room}?
        We're having {dinner} tonight, you're welcome to join us.
        The {plant.pl} in the pier garden are looking {plant_state}.
        Is anyone driving to {place} {day_phrase}? I need a lift.
        Running to the {shop}, anyone need anything?
        Just a reminder it's {first}'s leaving do on {weekday}!
        {first}, you left your {clothing} in the {room} again.
        Has anyone seen my {clothing}? I think I left them on {boat}.
        Guess who I just saw in {place}? {first} {surname}!
        Went {outdoor_hobby} at {place} yesterday, it was {opinion}.
        Fancy {plan} on {weekday}?
        That {dish} at {pub} was {opinion}.
        Is the {shop} in {place} still shut?
        Thinking about getting {animal.a}, any advice?
        Our {animal} got out again this morning, took an hour to catch.
        Shall we get {first} a card for the {life_event}?
        I'll bring {potluck_item.a}, can someone else do drinks?
        Meet you by {meeting_place}, I'll be the one in the {colour} {clothing}.
        Don't forget it's {event} on {weekday}, I'm doing the {event_job}.
        Just had the best {cafe_food} in the café, {food_opinion}.
        I've lost my phone, if you find it ring me on this number!
        Let's get a team together for the {event}.
        How did the {challenge} go?
        What are you doing for {meal}?
        My {relative} wants to know if there's {crossing.a} on {weekday}.
        Anyone got {borrow_item.a} I can borrow until {weekday}?
        Our {plant} finally flowered, it's {opinion}.
        Sorry for the grumpy message earlier, I was {feeling}.
        Can you believe it's {month} already?
    """),
    "life": _lines("""
        Did you manage to {errand}?
        I still need to {errand} before {weekday}.
        Spent my day off {errand.ing}, very glamorous.
        Finally {errand.past}!
        Can you remind me to {errand} tomorrow?
        Don't forget to {errand}!
        Spent the weekend {chore_verb.ing} the {home_thing}.
        I've {chore_verb.past} the {home_thing} and it looks {opinion}.
        Need to {chore_verb} the {home_thing} before my {relative} visits.
        The {home_thing.be} {home_state}, I need to get someone in.
        Our {home_thing.be} {home_state} again.
        Made {home_dish} for tea, {food_opinion}.
        What's everyone having for tea? I'm doing {home_dish}.
        Just finished {book_kind.a} about {book_topic}, {opinion}.
        Anyone read anything good lately? I need a new {book_kind}.
        Caught {n} {fish.pl} off the end of the pier!
        Anyone want some {fish}? {first} caught loads.
        The {room} is full of {insect.pl} again.
        Got eaten alive by {insect.pl} at {place}.
        The {wildflower.pl} are out along the path to {place}.
        Lovely walk up to {place}, the {wildflower.pl} are {opinion}.
        {place} {team} {result} on {weekday}, {sport_comment}!
        Anyone up for {sport} on {weekday}? We need {n} more.
        Got my {relative} {gift.a} for their birthday, hope they like it.
        What do you get someone who has everything? I'm thinking {gift.a}.
        Learning to play the {instrument}, the neighbours are thrilled.
        Band practice has moved to {weekday}, bring your {instrument}.
        {n} {tree.pl} came down in the storm at {place}.
        Just seen {size_adj.a} {insect} in the {room}!
        My {relative} has got {school_thing} on {weekday}, so I'm leaving early.
        Anyone selling {borrow_item.a}? Looking for a cheap one.
        Giving away {giveaway}, free to a good home.
        Does anyone have a good recipe for {home_dish}?
        My {home_appliance} has died, can anyone recommend a new one?
        {adverb} can't believe how {opinion} the {event} was.
        I {adverb} need a holiday.
        The {tree} outside the {room} is {adverb} dropping everything on the cars.
        We're {chore_verb.ing} the {home_thing} this weekend, any tips?
        Is {first} still selling {home_dish} at the market on {weekday}s?
        I've been {hobby} every {weekday} for a month and I'm {adverb} hooked.
        The {fish.pl} were biting off {place} this evening, got {n} in an hour.
        Look at the size of this {fish} {first} caught!
        Listening to {book_kind.a} about {book_topic} on the {crossing}.
        Can anyone lend me {instrument.a} for the {event}?
        {n} {insect.pl} in my tea this morning, {interjection}.
        Saw {n} {bird.pl} and {sea_animal.a} on my walk round {place}.
        Our {animal} is terrified of the {home_appliance}.
    """),
    "training": _lines("""
        Practise your {knot.pl} before the assessment on {weekday}.
        Who can show the new deckhand how to tie {knot.a}?
        Training note: {knot.a} for the mooring lines, not {knot.a}.
        Man overboard drill on {boat} at {time_hm}, everyone on shift please.
        {first} passed the {training_topic} course, well done!
        Muster drill done on {boat}, {big_n} seconds to get everyone to the stations.
        Reminder that all crew need to be signed off on {training_topic} by {month}.
        Tying {knot.pl} in the mess room at {time_any} if anyone wants a refresher.
    """),
    "admin": _lines("""
        The {admin_noun} has been circulated, comments by {weekday} please.
        We need to review the {admin_noun} before the AGM.
        {first} is drafting the new {admin_noun}.
        The {admin_noun} and the {admin_noun} are both on the agenda for {weekday}.
        Has anyone seen the latest version of the {admin_noun}?
        Can we put the {admin_noun} on the noticeboard in the {room}?
        {first} {surname} has questions about the {admin_noun}, can someone call them?
        The {admin_noun} is due for renewal in {month}.
    """),
    "work_misc": _lines("""
        Who took the {kitchen_item} from the staff kitchen?
        Can someone bring {kitchen_item.a} down to the café? Ours has gone missing.
        We're out of {stationery} in the office again.
        Please don't take the {stationery} home!
        First aid kit on {boat} needs more {first_aid}.
        Used the last of the {first_aid} on {boat}, please restock.
        The {tech_thing} in the office {tech_problem}.
        Has anyone got the password for the {tech_thing}?
        The {tech_thing} {tech_problem}, has anyone rung the engineer?
        {game} in the mess room at {time_any}, who's in?
        {first} {maint_verb.s} the {part} on {boat} every {weekday}, don't touch it.
        {person_kind.a} on the {crossing} asked if we could {passenger_favour}.
        {number_word} {passenger_kind.pl} waiting at {place} and no boat, what's happening?
        Can whoever borrowed the {tool} from the yard bring it back, please?
        Order for the office: {stationery}, {stationery} and {stationery}.
        {first} is so {person_adj}, the passengers love {pronoun}.
        Great to have {first} back, {pronoun_subj}'s been {adverb} missed.
        Big thanks to {first}, {person_adj} as always.
        Put the {tool.pl} back in the {room} when you're done, please.
        Someone left the {appliance.pl} on in the café overnight.
        We need {n} more {vessel.pl} for the regatta safety cover.
        Anyone seen the spare {part.pl}? They were in the {room}.
        The {vehicle.pl} are blocking the ramp at {place} again.
    """),
    "passenger_favour": _items("""
        stop at {place}, carry their {cargo_single}, wait for their {relative},
        let the dog sit inside, charge their phone, heat up a bottle,
        look after their {belonging}, put the kettle on, take a photo of them,
        play some music, open a window, turn the heater up
    """),
    "pronoun": _items("her, him, them"),
    "pronoun_subj": _items("she, he, they"),
    "home_misc": _lines("""
        Walked along the {coast_feature} to {place} at low tide, {opinion}.
        There's {vessel.a} aground on the {coast_feature} near {place}.
        Did anyone see the {sky_sight} last night? {opinion}!
        My van's got {car_problem}, can anyone give me a lift to {place}?
        The garage says the {car_part.be} {part_state}, that's going to cost me.
        Just paid the {bill}, ouch.
        Bring {party_thing.pl} for the {event} if you've got any.
        Getting the {travel_mode} from {place} on {weekday}, back by {time_any}.
        Staying at {accommodation.a} in {place} for the weekend, {opinion}.
        The bakery in {place} has {bread} today, get there early!
        Anyone tried the {cheese} from the dairy at {place}? It's {opinion}.
        Car's in the garage for a new {car_part}, so I'm on the bike this week.
        Who wants some {bread}? I made far too much.
        Swimming off the {coast_feature} at {place} this morning, {weather_adj} but {opinion}.
        {first} found {number_word} {fish.pl} in the rockpools at {place}.
        Anyone know where I can get {kitchen_item.a} in {place}?
        Is {accommodation.a} in {place} any good for a family?
        The {bill} has gone up again, {interjection}.
        Bought {gift.a} for the {event} raffle.
        We've got {party_thing.pl}, {party_thing.pl} and {party_thing.pl} sorted for the {event}.
    """),
    "country": _lines("""
        {first}'s busy with {farm_thing} all week, so don't expect them at the {event}.
        Anyone free to help with {farm_thing} at {first}'s on {weekday}?
        {n} {livestock.pl} for the {cargo_run}, can someone bring the hurdles?
        {livestock.a} got loose on the car deck again.
        {first} says the {livestock.pl} are due any day now.
        Who's got my {tackle}? I left it by the {coast_feature}.
        Need a new {tackle} before the weekend, the old one is {part_state}.
        Bring your {tackle.pl}, the mackerel are in off {place}!
        Can I borrow your {garden_tool} for the pier garden?
        Left the {garden_tool} in the {room}, sorry.
        The pier garden needs more {garden_supply}, any donations welcome.
        Baking for the {event}, can someone grab me some {baking_item}?
        Forgot the {baking_item}, the {cake} was flat as a pancake.
        The builders are doing the {build_thing} on the bunkhouse this week.
        There's a problem with the {build_thing} at the {room}, water's coming in.
        Art group at the net loft on {weekday}, bring your own {art_supply}.
        {first} is running {hobby.a} workshop, {art_supply} provided.
        I've left my {toiletry} in the bunkhouse, can someone post it?
        Forgot my {toiletry} again, anyone got a spare?
        My {relative} has {school_subject} homework and I have no idea.
        Anyone good at {school_subject}? My {relative} is stuck.
        {music_genre} night at {pub} on {weekday}, {first} is playing the {instrument}.
        Anyone into {music_genre}? There's a gig in {place} on {weekday}.
        {place} was {place_adj} today.
        Went over to {place} on my day off, it was {place_adj}.
        Meet at the {coast_feature} at {time_word}?
        We'll go out at {time_word} and be back by {time_word}.
        Can someone {office_task} before the end of the day?
        I'll {office_task} on {weekday}, I ran out of time today.
        Still need someone to {office_task}, any volunteers?
        Complaint from a passenger about {complaint}.
        Lovely email from a passenger praising {compliment}.
        We've had {n} complaints this week about {complaint}.
        Is that {first}'s {vehicle} in the car park?
        {first}'s {relative} is on the {crossing}, can you look out for them?
        Meet at {first}'s for {meal} on {weekday}?
        It's {first}'s turn to {office_task}.
        {first}'s {cake} won first prize at the {event}!
        Has anyone seen {first}'s {belonging}? It was on the desk.
        {surname}'s van is blocking the ramp again.
        Does anyone know how {first}'s {relative} is getting on?
        {first}'s {home_thing.be} {home_state}, can anyone help at the weekend?
        There are no {service_person.pl} on the island until {weekday}.
        The {occupation.pl} from {place} are on the {crossing}.
        We've had {n} {gift.pl} donated for the raffle.
        Two {instrument.pl} left on {boat} after the {event}.
        All the {home_appliance.pl} at the bunkhouse need testing.
        Who keeps leaving {kitchen_item.pl} in the sink?
        The {coast_feature.pl} round {place} are covered in {weather_noun} this morning.
        Both {car_part.pl} on the yard van are {part_state}.
        How many {cargo_single.pl} can we fit on the {crossing}?
    """),
    # General conversation: opinions, plans, worries, jokes and small talk.
    "talk": _lines("""
        I can't remember where I put my {belonging}.
        Sorry, my mistake, the {event} is on {weekday}, not {weekday}.
        I don't understand the new {admin_noun}, can someone explain it to me?
        What's the difference between {knot.a} and {knot.a}?
        Try not to worry about it, these things happen.
        Do you think it's going to rain later?
        It's strange, the {part} seems fine now.
        I'd rather wait for the next boat, to be honest.
        Let's meet in the middle, {place} at {time_any}?
        Any idea how long it takes to walk from {place} to {place}?
        I've decided to take the job in {place}, it's a big change but I'm excited.
        It's hard to explain, you'll have to come and see it.
        I hope the weather stays like this all week.
        Do you remember the name of that {service_person} in {place}?
        I wonder if {first} ever found their {belonging}.
        That's the funniest thing I've heard all week.
        Don't tell {first}, it's a surprise!
        I'm trying to save money, so no more café lunches for me.
        I feel terrible, I completely forgot about the {event}.
        What's your favourite walk on {place}?
        My favourite bit of the job is the first crossing on a calm morning.
        It was a lovely surprise, thank you so much.
        I've got a strange feeling the {crossing} will be cancelled.
        I promise I'll be on time tomorrow.
        Nobody told me the {room} was being painted!
        Is it just me or is the {room} freezing today?
        I think I've lost my voice from shouting over the engine.
        Can't stop laughing at {first}'s joke about the gulls.
        I'm not sure that's a good idea, the swell is building.
        Let me think about it and get back to you.
        We should celebrate, the {crossing} was on time every day this week!
        My {relative} is getting married in {month}, I'll need the week off.
        I've never seen the harbour so busy.
        It depends on the tide, really.
        Can you believe the price of {grocery} at the shop in {place}?
        I'm scared of heights, so someone else can go up the mast.
        Sorry, I was half asleep when I sent that.
        That's a really good point, I hadn't thought of that.
        We'll need at least {n} people to carry the {cargo_single}.
        It's the same every year, everyone wants the {month} holidays.
        Who decided to move the {event} to {weekday}?
        Is there anything you need from {place}?
        I'll try again later, the signal is terrible out here.
        Could you speak to {first}? I think they're a bit upset.
        Thanks for listening yesterday, it really helped.
        I love this time of year, the light over {place} is amazing.
        Who's the new {role}? I haven't met them yet.
        What do you reckon, shall we go for it?
        It's a long story, I'll tell you at lunch.
        Apparently there's {animal.a} living under the pier.
        Did you hear about {first}'s {life_event}?
        Honestly, I'd be lost without {first}.
        It's been a long week, I'm going to sleep all weekend.
        Whose turn is it to buy the biscuits?
        Don't panic, but the {part} on {boat} has come off.
        I'm happy to swap if it helps.
        Remind me never to eat {cafe_food.a} before a rough crossing.
        Welcome back! How was the holiday?
        That can't be right, the timetable says {time_hm}.
        Does anyone mind if I open a window in the {room}?
        I keep meaning to ask, how's the new {home_thing} coming along?
        The view from the top of {place} is worth the climb.
        I know, I know, I should have checked the tide table.
        It was so windy my hat ended up in the harbour.
        I'm learning so much from {first}, they've been brilliant.
        Every time I wash the van it rains.
        I couldn't sleep, so I watched the boats coming in.
        There's a queue of cars all the way back to the post office.
        I don't mind either way, you choose.
        We've run out of everything, the shop's getting a delivery on {weekday}.
        Are you allowed to park on the quay on {weekday}s now?
        I'm so proud of everyone for getting through the storm.
        Let's not make a habit of it.
        Any chance you could cover for me for half an hour?
        The harbour looks like a painting this morning.
        Which one is {first}'s locker?
        I'm glad that's over.
        It's not a race, take your time.
        Whoever fixed the {part}, thank you!
        That's the third time this month the {part} has broken.
        The kids had a great day at the {event}, thanks to everyone who helped.
        Trying to decide between {home_dish} and {home_dish} for tea.
        Does anyone know whose {vehicle} this is?
        Is the shop in {place} open on Sundays now?
        You're welcome, any time.
        It's supposed to be summer!
        The fog came in so fast we couldn't see the end of the pier.
        I'd love to, but I'm working.
        Maybe next time.
        I really enjoyed the {event}, let's do it again soon.
        How do you spell {first}'s surname?
        Quick reminder that the clocks go back this weekend.
        It's getting dark so early now.
        The days are getting longer, finally.
        I'm going to miss this place when I retire.
        What a difference a day makes, it's flat calm today.
        Somebody's left a pair of trousers in the drying room.
        It took me an hour to get the knot out of the mooring line.
        I've been on my feet since five, I need a sit down.
        Does this count as overtime?
        I've written it on the whiteboard so nobody forgets.
        Is anyone else's phone playing up?
        I don't think we've met, I'm {first}, the new {role}.
        Let me know if you hear anything.
        Any excuse for cake.
        I didn't expect that many people to turn up!
        A passenger gave us a tip and said we were the friendliest crew in the islands.
        The {sea_animal.pl} followed us all the way from {place}, the kids went wild.
        The smell of the bakery in {place} at seven in the morning is the best thing.
        Is it worth going to {place} in winter or is everything shut?
        My hands are so cold I can't feel my fingers.
        That was close, the {vessel} cut right across our bow.
        I've been told off for parking in the {room} spot again.
        Sorry if I seemed grumpy this morning, rough night.
        Honestly, it's like a zoo in the waiting room today.
        We need a bigger kettle.
        Could someone teach me how to use the {tech_thing}?
        Somebody has eaten my sandwich out of the fridge.
        The gulls have learned to open the bins, we're doomed.
        Don't forget your passport if you're going on to the mainland.
        I'm saving up for a little boat of my own.
        If the weather's good we could have lunch on the beach.
        Which is quicker, the boat or the bus round via {place}?
        I've got a spare bedroom if anyone is stuck after the last boat.
        That's brilliant news, you must be so pleased.
        I'm sure it'll be fine, don't stress.
        The island feels empty now the summer visitors have gone.
    """),
    "asides": _lines("""
        Even {comparable.er} than yesterday out there.
        That was the {comparable.est} crossing of the year, no question.
        It's {comparable.er} at {place} than here, bring a coat.
        Tomorrow should be {comparable.er}, according to the weather desk.
        Is it me or is the {crossing} getting {comparable.er} every week?
        {place} is {place_adj} today but {place} is even {comparable.er}.
        The {event} was {opinion_more}, honestly.
        That storm last night was {opinion_more}.
        The view from {boat} this morning was {opinion_more}.
        What {opinion_more.a} day, thanks everyone.
        My {relative} wants to be {job.a} when they grow up.
        There's {job.a} from {place} on the {crossing} asking about {council_topic}.
        {first} used to be {job.a} before joining the cooperative.
        {deck_call}!
        {deck_call}, {first}!
        {deck_call}, thanks.
        {n} scoops of {ice_cream}, please.
        Ice-cream freezer is out of {ice_cream} and {ice_cream}.
        Who ate the last {sandwich} sandwich?
        {sandwich} sandwich and {drink.a}, please.
        The {sandwich} sandwiches sold out by eleven.
        My {relative} left their {toy} on {boat}, has anyone seen it?
        Found {toy.a} under the seats on {boat}.
        Has anyone handed in {accessory.a}? A passenger lost one on the {crossing}.
        I love {first}'s new {accessory}.
        The {weather_kit} on the roof is {broken_state}.
        Weather desk says the {weather_kit} has been reading wrong all week.
        The {harbour_thing} at {place} is {part_state}.
        Please report any damage to the {harbour_thing} to the harbour office.
        Can we use the {harbour_thing} at {place} on {weekday}?
        The {attraction} at {place} is open again.
        Passengers keep asking how to get to the {attraction} at {place}.
        Took the kids to the {attraction} in {place}, {opinion}.
        {first} {errand.s} every {weekday}, so ask them.
        Who {chore_verb.s} the {home_thing} at the bunkhouse?
        {first} usually {maint_verb.s} the {part} on {boat} first thing.
        The {crossing} {adverb} {verb_s} when it's this {comparable}.
    """),
    "verb_s": _items("""
        runs late, fills up, sells out, gets cancelled, bounces about,
        goes quiet, takes ages, leaves early
    """),
    "more_talk": _lines("""
        Spent the whole evening {kitchen_job.ing}, send help.
        Finally {kitchen_job.past}, now for a cup of tea.
        I've {office_task.past}, can someone else {office_task}?
        {first} is {office_task.ing} in the back office if you need them.
        Who {office_task.s} on {weekday}s now that {first} has left?
        {first} always {kitchen_job.s} on a {weekday}, it's a ritual.
        My {relative} {errand.s} for me when I'm on lates, bless them.
        {first} {chore_verb.s} the {home_thing} every spring without fail.
        Nobody {maint_verb.s} the {part} like {first} does.
        Kit list for new deckhands: {clothing}, {clothing}, {accessory} and {toiletry}.
        Yard jobs this week: {maint_verb} the {part}, {maint_verb} the {part} and {maint_verb} the {part}.
        To do before the weekend: {errand}, {office_task} and {errand}.
        Weekend jobs: {chore_verb} the {home_thing}, {kitchen_job} and {errand}.
        Menu for the {event}: {home_dish}, {home_dish}, {dish} and {cake}.
        Spotted today: {bird.pl}, {bird.pl}, {sea_animal.a} and loads of {insect.pl}.
        Seen on the cliff walk: {wildflower.pl}, {wildflower.pl}, {tree.pl} and {bird.a}.
        Book club picks: {book_kind.a} about {book_topic} and {book_kind.a} about {book_topic}.
        Noticeboard: {job} wanted in {place}, {service_person} available on {weekday}s.
        Rota changes: {first} to the {shift}, {first} to the {shift}, {first} off on {weekday}.
        First aid restock: {first_aid}, {first_aid} and {first_aid}.
        Office order: {stationery}, {stationery}, {stationery} and {kitchen_item.a}.
        Shopping list: {grocery}, {grocery}, {grocery} and {grocery}.
        Can you grab {grocery}, {grocery} and {grocery} from the co-op?
        Packing list for the {event}: {belonging}, {belonging}, {belonging} and {clothing}.
        Raffle prizes so far: {gift.a}, {gift.a}, {gift.a} and {gift.a}.
        Café order for {weekday}: {cafe_supply}, {cafe_supply}, {grocery} and {grocery}.
        Chandlery order: {n} {part.pl}, {yard_consumable}, {yard_consumable} and {tool.a}.
        Lost property this week: {lost_desc.a}, {lost_desc.a} and {lost_desc.a}.
        Pier garden wish list: {plant.pl}, {plant.pl}, {garden_tool.a} and {garden_supply}.
        Bunkhouse needs {home_thing}, {home_thing} and {toiletry} sorting.
        Market stall on {weekday}: {fruit_veg}, {fruit_veg}, {bread} and {cheese}.
        The {surname.pl} are on the {crossing} with {n} dogs and {cargo_single.a}.
        {title} {surname} rang again about {complaint}.
        {title} {surname} from {place} says thank you for {thanks_reason}.
        Is {title} {surname} still on the members' council?
        The Saltmarrow Tidal Ferry Cooperative has {big_n} new members this year!
        {first} has been with the Cooperative for {n} years, that's some going.
        Booking for {first} {surname}: {n} adults and a bike on the {crossing}.
        Passenger list for the charter: {first} {surname}, {first} {surname} and {first} {surname}.
        {surname}'s boat is on our mooring again.
        Have the {surname.pl} paid for the {event} tickets yet?
        Old {title} {surname} has been coming on the {crossing} every {weekday} for forty years.
        Parcel for {first} {surname} at {place}, can someone drop it off?
        {first} {surname} has been voted {role} of the year!
        The {insect.pl} are out in force at {place}, bring repellent.
        There's {insect.a} in the wheelhouse and {first} won't go in.
        Counted {n} kinds of {insect} on the nature walk.
        Is it {insect} season already?
        The {wildflower.pl} on the cliff path at {place} are {opinion}.
        Can anyone tell me what this flower is? {first} thinks it's {wildflower}.
        {first} is giving a talk on {wildflower.pl} at the net loft on {weekday}.
        {first}'s so {person_adj}, I don't know how they stay that calm.
        We need someone {person_adj} on the ticket office over the summer.
        Honestly, the most {person_adj} person I've ever worked with.
        {weather_system.a} is moving in from the {compass} this evening.
        Weather desk: {weather_system} clearing {day_phrase}, then {weather_phrase}.
        Big {cloud} building over {place}, looks like thunder later.
        Look at the {cloud} over {place}, I've never seen anything like it.
        Expect {weather_system.a} {day_phrase}, so the {crossing} could be lumpy.
        Mayday relay heard on channel 16: {incident}.
        {emergency} has been called for {incident}.
        We're standing by for {emergency}, {incident}.
        Pan-pan from {vessel.a}: {incident}.
        All clear, {emergency} has it in hand.
        Watch the {seamanship} off {place} on the ebb, it's stronger than it looks.
        New deckhands, please read up on {seamanship} before Thursday's session.
        Allow for the {seamanship} at the narrows, especially on springs.
        I need to {kitchen_job} tonight.
        Spent the evening trying to {kitchen_job}, harder than it looks.
        Has anyone got time to help me {kitchen_job} for the {event}?
        {first} showed me how to {kitchen_job}, game changer.
        The veg box this week has {fruit_veg}, {fruit_veg} and {fruit_veg}.
        Anyone want {fruit_veg}? The allotment is overflowing.
        Swapping my {fruit_veg} for your {fruit_veg}?
        We've got {fruit_veg} on the café specials board today.
        Café is out of {condiment}, sorry!
        Could we stock {condiment} in the café? Passengers keep asking.
        Put a bit of {condiment} on it, trust me.
        My round: {pub_drink}, {pub_drink} and {pub_drink}.
        {pub_drink.a} at {pub} after work, who's in?
        Can someone pick up {baby_thing} from the shop? My {relative} forgot them.
        Left the {baby_thing} on {boat}, can you keep it in the office?
        Is there anywhere on {boat} to change a baby? Passenger asking about {baby_thing}.
        {first} has to go to {place} for {medical.a}, can someone cover?
        Picking up my {medical} from the surgery, back by {time_any}.
        Just had {medical.a}, all fine, back tomorrow.
        Found a piece of {rock} with fossils in it on the beach at {place}.
        The cliffs at {place} are {rock}, that's why they're that colour.
        Passengers were asking about {legend} again.
        {first} swears they saw {legend} last night.
        Ghost walk on {weekday}: we're doing {legend}.
        What {sport_term.a} from {first} in the {sport} last night!
        {first} got {sport_term.a} in the darts final at {pub}.
        {n} more sleeps until the {event}!
        Just the {number_word} of us on the late shift tonight.
    """),
    "event_job": _items("""
        raffle, teas, car park, barbecue, music, face painting, cake stall,
        tombola, door, washing up, first aid tent, lost children point
    """),
}

EXPONENTS = {
    "first": 0.8,
    "surname": 0.7,
    "place": 0.8,
    "boat": 0.8,
    "chat": 0.35,
    "life": 0.3,
    "work_misc": 0.4,
    "home_misc": 0.4,
    "country": 0.2,
    "talk": 0.2,
    "asides": 0.2,
    "more_talk": 0.2,
    "training": 0.6,
    "admin": 0.6,
    "chatty": 0.5,
    "pair": 0.6,
    "crossing_msg": 0.4,
    "reply": 0.6,
    "cafe": 0.4,
    "handover": 0.5,
    "maintenance": 0.4,
    "weather": 0.45,
    "rota": 0.45,
    "tickets": 0.45,
    "cargo": 0.5,
    "council": 0.5,
    "email": 0.5,
    "notice": 0.6,
    "lost": 0.6,
    "wildlife": 0.6,
    "radio": 0.6,
    "handover_item": 0.6,
}

EXPLICIT_WEIGHTS = {
    "line": [70, 13, 4, 5, 8],
    # chat, crossing, reply, cafe, handover, maintenance, weather, rota,
    # tickets, cargo, council, email, notice, lost, wildlife, radio, life,
    # training, admin, work_misc, home_misc, country, talk, asides, more_talk
    "message": [15, 12, 10, 7, 6, 7, 6, 6, 6, 5, 4, 3, 2, 2, 2, 2, 12, 2, 2, 5, 6, 10, 14, 9, 10],
}

if __name__ == "__main__":
    sys.exit(main())
