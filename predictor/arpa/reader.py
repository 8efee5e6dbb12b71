"""Reading an ARPA file as a stream: header, sections, entries, into sorted n-gram tables.

Words get provisional ids in order of first appearance (the conversion gives
them model ids).  Unigrams are kept in lists; bigrams and trigrams go, a batch
of lines at a time, into :class:`~.tables.NgramTable` tables keyed by their
packed provisional ids, which spill to disk when they outgrow their share of
``--max-memory``.

What real files contain is accepted with a warning where it changes nothing
the file defines: blank lines, any run of spaces or tabs between fields, a
missing back-off weight (log10 0), ``-99`` or less for log zero, header counts
that disagree with the sections (the sections win), a missing ``\\end\\``, a
word that appears in a longer n-gram but not among the 1-grams (probability 0
as a unigram).  Anything else that does not parse is a
:class:`~predictor.errors.ModelFileError` naming the line.
"""

from __future__ import annotations

import gzip
import math
import os
import re
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from ..counting.scratch import SpillFolder
from ..errors import CapacityError, ModelFileError
from .syntax import LOG_ZERO, MAX_ORDER, parse_display_line
from .tables import DuplicateNgram, NgramTable

ID_BITS = 21
"""Bits of one provisional word id in a packed key (three ids fill 63 bits)."""

MAX_WORDS = (1 << ID_BITS) - 1
_COUNT_RE = re.compile(r"ngram\s+(\d+)\s*=\s*(\d+)")
_SECTION_RE = re.compile(r"\\(\d+)-grams:")
_MAX_LOG_WEIGHT = 38.0
"""A log10 back-off weight above this is beyond float32 (and beyond any sensible model)."""
_POSITIVE_SLACK = 1e-6
"""A log10 probability up to this far above 0 (rounding in a writer) reads as 0."""


@dataclass
class ParsedArpa:
    """An ARPA file as tables over provisional word ids.

    Attributes:
        source: the file read.
        tokens: the words in order of first appearance; position = provisional id.
        display: display forms from foretype's comment lines, by model form.
        order: the highest order with a section.
        uni_prob: float64 array over provisional ids: unigram probability (NaN: not listed).
        uni_bow: float64 array: unigram back-off weight (NaN: none given).
        bigrams: (keys, probabilities): sorted packed ``a << 21 | b`` keys, float64 values.
        bigram_bows: (keys, weights) of the bigrams that give a back-off weight.
        trigrams: (keys, probabilities) with keys ``a << 42 | b << 21 | c``.
        declared: the header's n-gram counts by order.
        warnings: one line per tolerated irregularity.
        spilled_rows: n-gram rows written to disk on the way (0 when all fitted in memory).
    """

    source: Path
    tokens: list[str]
    ids: dict[str, int]
    display: dict[str, str]
    order: int
    uni_prob: np.ndarray
    uni_bow: np.ndarray
    bigrams: tuple[np.ndarray, np.ndarray]
    bigram_bows: tuple[np.ndarray, np.ndarray]
    trigrams: tuple[np.ndarray, np.ndarray]
    declared: dict[int, int]
    warnings: list[str] = field(default_factory=list)
    spilled_rows: int = 0

    def token_id(self, token: str) -> int | None:
        """The provisional id of a word as the file writes it, or None if the file lacks it."""
        return self.ids.get(token)


def open_lines(path: Path) -> Iterator[bytes]:
    """The raw lines of a plain or gzip file (gzip recognised by its magic bytes)."""
    try:
        with path.open("rb") as probe:
            magic = probe.read(2)
        handle = gzip.open(path, "rb") if magic == b"\x1f\x8b" else path.open("rb")
    except FileNotFoundError:
        raise ModelFileError(f"{path}: no such file") from None
    except IsADirectoryError:
        raise ModelFileError(f"{path}: is a folder, not an ARPA file") from None
    except OSError as error:
        raise ModelFileError(f"{path}: cannot read ({error.strerror or error})") from None
    with handle:
        try:
            yield from handle
        except (OSError, EOFError) as error:
            raise ModelFileError(f"{path}: cannot read: {error}") from None


class _Parser:
    """The state of one pass over an ARPA file."""

    def __init__(self, path: Path, rows: int, spill_dir: str | os.PathLike[str] | None) -> None:
        self.path = path
        self.ids: dict[str, int] = {}
        self.tokens: list[str] = []
        self.uni_prob: list[float] = []
        self.uni_bow: list[float] = []
        self.display: dict[str, str] = {}
        self.declared: dict[int, int] = {}
        self.listed: dict[int, int] = {}
        self.warnings: list[str] = []
        self.ignored_bows = 0
        self._spill_dir = spill_dir
        self._folder: SpillFolder | None = None
        share = max(16, rows // 3)
        self.tables = {2: NgramTable(share, self._spill_folder), 3: NgramTable(share, self._spill_folder)}
        self.bows = NgramTable(share, self._spill_folder, weights=True)

    def _spill_folder(self) -> SpillFolder:
        if self._folder is None:
            try:
                self._folder = SpillFolder(self._spill_dir)
            except OSError as error:
                where = self._spill_dir or "the temporary folder"
                raise ModelFileError(f"{where}: cannot hold n-grams that outgrow memory ({error.strerror or error})") from None
        return self._folder

    def close(self) -> None:
        if self._folder is not None:
            self._folder.close()

    def fail(self, number: int, what: str) -> ModelFileError:
        return ModelFileError(f"{self.path} line {number}: {what}")

    def word_id(self, token: str, number: int) -> int:
        found = self.ids.get(token)
        if found is None:
            if "\x00" in token:
                raise self.fail(number, "a word holds a NUL character")
            found = len(self.tokens)
            if found > MAX_WORDS:
                raise CapacityError(f"{self.path}: more than {MAX_WORDS:,} distinct words, beyond what foretype's model files hold")
            self.ids[token] = found
            self.tokens.append(token)
            self.uni_prob.append(math.nan)
            self.uni_bow.append(math.nan)
        return found

    def lines(self) -> Iterator[tuple[int, str]]:
        """(line number, text) of every line, each checked to be UTF-8."""
        for number, raw in enumerate(open_lines(self.path), start=1):
            try:
                yield number, raw.decode("utf-8")
            except UnicodeDecodeError:
                raise self.fail(number, "not valid UTF-8") from None

    def preamble(self, lines: Iterator[tuple[int, str]]) -> None:
        """Read up to the ``\\data\\`` line, keeping foretype's display comments."""
        seen = 0
        for number, line in lines:
            seen = number
            stripped = line.strip()
            if stripped == "\\data\\":
                return
            if stripped.startswith("#"):
                found = parse_display_line(line)
                if found is not None:
                    self.display[found[0]] = found[1]
        raise ModelFileError(f"{self.path}: no \\data\\ line in {seen:,} lines: not an ARPA file")

    def parse(self) -> int:
        """Read the whole file; returns the highest order that had a section."""
        lines = self.lines()
        self.preamble(lines)
        order = 0
        fast = self._fast_entry(2)
        ended = False
        for number, line in lines:
            fields = line.split()
            if not fields:
                continue
            if fields[0].startswith("\\"):
                if fields[0] == "\\end\\" and len(fields) == 1:
                    ended = True
                    break
                order = self.section(fields, order, number)
                fast = self._fast_entry(order) if order > 1 else fast
            elif order == 0:
                self.count(fields, number)
            elif order == 1 or not fast(fields, number):
                self.entry(fields, order, number)
        if order == 0:
            raise ModelFileError(f"{self.path}: no \\1-grams: section")
        if not ended:
            self.warnings.append("no \\end\\ line: the file may be cut short; read what it holds")
        return order

    def section(self, fields: list[str], order: int, number: int) -> int:
        """The order a section header line starts (it must be the next one)."""
        match = _SECTION_RE.fullmatch(fields[0])
        if match is None:
            raise self.fail(number, f"{fields[0]} is not a section header such as \\1-grams:")
        if len(fields) != 1:
            raise self.fail(number, f"unexpected text after {fields[0]}")
        section = int(match.group(1))
        if section > MAX_ORDER:
            raise CapacityError(
                f"{self.path} line {number}: a {section}-gram section; foretype models orders 1 to {MAX_ORDER}, "
                "and cutting a back-off model to a lower order would change its probabilities"
            )
        if section != order + 1:
            raise self.fail(number, f"\\{section}-grams: where \\{order + 1}-grams: was expected")
        self.listed[section] = 0
        return section

    def count(self, fields: list[str], number: int) -> None:
        """One ``ngram N=count`` line of the header."""
        match = _COUNT_RE.fullmatch(" ".join(fields).replace(" =", "=").replace("= ", "="))
        if match is None:
            raise self.fail(number, f"expected 'ngram N=count' or a section header, found {' '.join(fields)[:60]!r}")
        declared_order, count = int(match.group(1)), int(match.group(2))
        if declared_order > MAX_ORDER and count > 0:
            raise CapacityError(
                f"{self.path} line {number}: a model of order {declared_order}; foretype models orders 1 to {MAX_ORDER}, "
                "and cutting a back-off model to a lower order would change its probabilities"
            )
        self.declared[declared_order] = count

    def entry(self, fields: list[str], order: int, number: int) -> None:
        """Read one n-gram line in full, reporting anything malformed."""
        prob, log_bow = self.values(fields, order, number)
        self.listed[order] += 1
        ids = [self.word_id(token, number) for token in fields[1 : order + 1]]
        if order == 1:
            word = ids[0]
            if not math.isnan(self.uni_prob[word]):
                raise self.fail(number, f"the 1-gram {fields[1]!r} is listed twice")
            self.uni_prob[word] = 0.0 if prob <= LOG_ZERO else 10.0 ** min(prob, 0.0)
            if log_bow is not None:
                self.uni_bow[word] = 0.0 if log_bow <= LOG_ZERO else 10.0**log_bow
            return
        if order == 2:
            key = ids[0] << ID_BITS | ids[1]
            if log_bow is not None:
                self.bows.add(key, log_bow)
        else:
            key = (ids[0] << ID_BITS | ids[1]) << ID_BITS | ids[2]
        self.tables[order].add(key, prob)

    def values(self, fields: list[str], order: int, number: int) -> tuple[float, float | None]:
        """The log10 probability and log10 back-off weight (None: none, or ignored) of a line."""
        width = len(fields)
        needs = f"a {order}-gram line needs a log10 probability, {order} word{'s' if order > 1 else ''} and an optional back-off weight"
        if width not in (order + 1, order + 2):
            raise self.fail(number, f"{needs}; found {width} fields")
        log_bow = None
        if width == order + 2:
            try:
                log_bow = float(fields[-1])
            except ValueError:
                raise self.fail(number, f"{needs}; found {width} fields, the last of them no number") from None
            log_bow = self.number(fields[-1], number, "log10 back-off weight")
            if log_bow > _MAX_LOG_WEIGHT:
                raise self.fail(number, f"back-off weight {fields[-1]} is too large")
            if order == MAX_ORDER:
                self.ignored_bows += 1
                log_bow = None
        prob = self.number(fields[0], number, "log10 probability")
        if prob > _POSITIVE_SLACK:
            raise self.fail(number, f"log10 probability {fields[0]} is above 0 (a probability above 1)")
        return prob, log_bow

    def _fast_entry(self, order: int) -> Callable[[list[str], int], bool]:
        """A reader of the common 2-gram or 3-gram line: known words, plain numbers.

        It returns False, having changed nothing, for any line it is unsure of,
        which :meth:`entry` then reads (and reports if malformed).
        """
        return _bigram_reader(self) if order == 2 else _trigram_reader(self)

    def number(self, text: str, number: int, what: str) -> float:
        try:
            value = float(text)
        except ValueError:
            raise self.fail(number, f"{what} {text[:40]!r} is not a number") from None
        if value != value or value == math.inf:
            raise self.fail(number, f"{what} {text!r} is not a usable number")
        return value

    def finish(self, order: int) -> ParsedArpa:
        for section, count in sorted(self.listed.items()):
            said = self.declared.get(section)
            if said is None:
                self.warnings.append(f"the header gives no count of {section}-grams; the section holds {count:,}")
            elif said != count:
                self.warnings.append(f"the header says {said:,} {section}-grams, the section holds {count:,}; using the section")
        for section, said in sorted(self.declared.items()):
            if section not in self.listed and said > 0:
                self.warnings.append(f"the header says {said:,} {section}-grams but the file has no \\{section}-grams: section")
        if self.ignored_bows:
            self.warnings.append(f"ignored {self.ignored_bows:,} back-off weights on {MAX_ORDER}-grams (the highest order backs off to nothing)")
        bigrams = self.finish_table(self.tables[2], 2)
        trigrams = self.finish_table(self.tables[3], 3)
        bows = self.finish_table(self.bows, 2)
        spilled = sum(table.counter.spilled_rows for table in (self.tables[2], self.tables[3], self.bows))
        return ParsedArpa(
            source=self.path,
            tokens=self.tokens,
            ids=self.ids,
            display=self.display,
            order=order,
            uni_prob=np.array(self.uni_prob, dtype=np.float64),
            uni_bow=np.array(self.uni_bow, dtype=np.float64),
            bigrams=bigrams,
            bigram_bows=bows,
            trigrams=trigrams,
            declared=self.declared,
            warnings=self.warnings,
            spilled_rows=spilled,
        )

    def finish_table(self, table: NgramTable, order: int) -> tuple[np.ndarray, np.ndarray]:
        try:
            return table.finish()
        except DuplicateNgram as duplicate:
            mask = (1 << ID_BITS) - 1
            words = " ".join(self.tokens[duplicate.key >> (ID_BITS * i) & mask] for i in reversed(range(order)))
            raise ModelFileError(f"{self.path}: the {order}-gram {words!r} is listed twice") from None


def _bigram_reader(parser: _Parser) -> Callable[[list[str], int], bool]:
    """The fast reader of a plain 2-gram line (see :meth:`_Parser._fast_entry`)."""
    get = parser.ids.get
    table = parser.tables[2]
    keys, values = table.keys, table.values
    bows = parser.bows
    listed = parser.listed

    def read_bigram(fields: list[str], number: int) -> bool:
        width = len(fields)
        if not 3 <= width <= 4:
            return False
        try:
            prob = float(fields[0])
            weight = float(fields[3]) if width == 4 else 0.0
        except ValueError:
            return False
        a, b = get(fields[1]), get(fields[2])
        if a is None or b is None or not (-math.inf < prob <= _POSITIVE_SLACK and -math.inf < weight <= _MAX_LOG_WEIGHT):
            return False
        key = a << ID_BITS | b
        if width == 4:
            bows.add(key, weight)
        keys.append(key)
        values.append(prob)
        if len(keys) >= table.batch:
            table.flush()
        listed[2] += 1
        return True

    return read_bigram


def _trigram_reader(parser: _Parser) -> Callable[[list[str], int], bool]:
    """The fast reader of a plain 3-gram line (see :meth:`_Parser._fast_entry`)."""
    get = parser.ids.get
    table = parser.tables[3]
    keys, values = table.keys, table.values
    listed = parser.listed

    def read_trigram(fields: list[str], number: int) -> bool:
        if len(fields) != 4:
            return False
        try:
            prob = float(fields[0])
        except ValueError:
            return False
        a, b, c = get(fields[1]), get(fields[2]), get(fields[3])
        if a is None or b is None or c is None or not -math.inf < prob <= _POSITIVE_SLACK:
            return False
        keys.append((a << ID_BITS | b) << ID_BITS | c)
        values.append(prob)
        if len(keys) >= table.batch:
            table.flush()
        listed[3] += 1
        return True

    return read_trigram


def read_arpa(
    path: str | os.PathLike[str],
    *,
    table_rows: int = 1 << 22,
    spill_dir: str | os.PathLike[str] | None = None,
    check_room: Callable[[dict[int, int], int], None] | None = None,
) -> ParsedArpa:
    """Parse an ARPA file of order 1 to 3 (plain or gzip).

    Args:
        path: the file.
        table_rows: rows the n-gram tables may hold in memory before they go to disk.
        spill_dir: where tables that outgrow memory go (None: the system's temporary folder).
        check_room: called with the n-grams listed per order and the number of words
            once the file is read, before the tables are gathered in memory; it
            raises if the model would not fit.

    Returns:
        The parsed tables and the warnings about tolerated irregularities.

    Raises:
        ModelFileError: missing, unreadable or malformed (the message names the line).
        CapacityError: an order above 3, or more words than a model file holds.
    """
    parser = _Parser(Path(path), table_rows, spill_dir)
    try:
        order = parser.parse()
        if check_room is not None:
            check_room(dict(parser.listed), len(parser.tokens))
        return parser.finish(order)
    finally:
        parser.close()
