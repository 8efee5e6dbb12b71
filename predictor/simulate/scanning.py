"""A single-switch scanning typist: row-column scanning of a letter grid and of the suggestion list.

The interface highlights the rows of a grid one after another; the person
presses the switch when the row holding the wanted cell is lit, then the cells
of that row are lit one after another and a second press selects the cell.
Scanning then restarts at the top.  Counting as in MacKenzie's model of
single-switch scanning (ICCHP 2012, "Modeling text input for single-switch
scanning"; the counting rule restated in /work/shared/REFERENCES.md, from
memory): the cell in row r and column c (counted from 1) costs r + c scan
steps and two switch presses.

With prediction the suggestion list is one more row, scanned first or after
the letter rows (``list_position``).  That row is always part of the scan,
even while the list is empty, so with the list first every letter costs one
step more; picking the suggestion at rank j costs the list row's number plus
j steps and two presses.  The typist picks the intended word when it is offered
and picking costs no more time than typing the rest of the word (ties go to the
pick), the scanning counterpart of the keystroke typist's rule.

What follows a word costs what :mod:`foretype.simulate.editing` says, counted
in cells: after a pick with automatic spacing a character that attaches to the
word replaces the automatic space, and any other character after a picked word
first costs the delete cell.  A capital letter is selected with its lower-case
cell (the interface capitalises), as the keystroke typist counts one keystroke
for it.

Time: each scan step lasts ``scan_interval`` seconds and each press adds
``press_dwell`` seconds (the longer first highlight after a selection, which
gives the person time to react).  With ``press_dwell`` 0, words per minute are
60 / (steps per character x scan interval x 5), the entry rate of the same
model.  These are estimates that compare designs, not an assessment of what any
person needs: choices for a person who scans belong with qualified clinicians.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable, Mapping
from dataclasses import asdict, dataclass, field
from itertools import accumulate
from typing import Any

import numpy as np

from ..errors import OptionError
from ..query.model import LanguageModel
from ..query.source import SuggestionSource
from ..text import capitalise, model_form
from .editing import replaces_automatic_space
from .entry_rate import words_per_minute
from .passage import Passage, PassageWord, read_passage
from .typist import TypistSettings

LIST_POSITIONS = ("first", "last")
"""Where the suggestion row sits in the scan: before or after the letter rows."""

DELETE = "\b"
"""The delete cell's character (it removes an automatic space)."""

CELL_NAMES = {"space": " ", "enter": "\n", "delete": DELETE}
"""Names a layout file uses for cells that have no printable character."""

DEFAULT_MARKS = (",", "?", "!", "'", '"', "-", ":", ";")
"""Marks the default grid adds after its letters, in this order, then Enter and delete."""


@dataclass(frozen=True)
class ScanGrid:
    """A grid of cells for row-column scanning.

    Attributes:
        rows: the cells row by row; a cell is one character (space, Enter and
            delete are " ", "\\n" and "\\b"), or "" for an empty place.
    """

    rows: tuple[tuple[str, ...], ...]
    _places: dict[str, tuple[int, int]] = field(default_factory=dict, init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        if not self.rows or not any(cell for row in self.rows for cell in row):
            raise OptionError("the scanning layout has no cells")
        places: dict[str, tuple[int, int]] = {}
        for r, row in enumerate(self.rows, 1):
            for c, cell in enumerate(row, 1):
                if not cell:
                    continue
                if cell in places:
                    raise OptionError(f"the scanning layout lists {_cell_name(cell)} twice")
                places[cell] = (r, c)
        object.__setattr__(self, "_places", places)

    @property
    def row_count(self) -> int:
        """Rows of letters (the suggestion row not counted)."""
        return len(self.rows)

    def place(self, char: str) -> tuple[int, int] | None:
        """(row, column) of a character's cell, counted from 1, or None; a capital uses its lower-case cell."""
        found = self._places.get(char)
        if found is None and char != char.lower():
            found = self._places.get(char.lower())
        return found

    def steps(self, char: str) -> int:
        """Scan steps to select a character: row + column.

        Raises:
            OptionError: the grid has no cell for it.
        """
        found = self.place(char)
        if found is None:
            raise OptionError(f"the scanning layout has no cell for {_cell_name(char)}")
        return found[0] + found[1]

    def missing(self, chars: Iterable[str]) -> list[str]:
        """The characters of ``chars`` the grid cannot write, each once, in order."""
        return [c for c in dict.fromkeys(chars) if self.place(c) is None]

    def to_text(self) -> str:
        """The grid in the layout file format (see :func:`parse_layout`)."""
        lines = ["# scanning layout: one row per line, cells separated by spaces; space, enter, delete name those cells; _ is an empty place"]
        for row in self.rows:
            lines.append(" ".join(_cell_word(cell) for cell in row))
        return "\n".join(lines) + "\n"

    @staticmethod
    def frequency_ordered(cells: list[str]) -> ScanGrid:
        """Place cells, most frequent first, on the places with the fewest scan steps.

        The grid is as square as the cells allow (columns = ceil(sqrt(n))); the
        places are taken in order of row + column, then row, so the first cell
        lands top left and cells of equal cost fill a diagonal.  By the
        rearrangement inequality this order gives the fewest expected steps
        for those places.

        Args:
            cells: distinct characters in the order of use, most frequent first.
        """
        count = len(cells)
        if count == 0:
            raise OptionError("the scanning layout has no cells")
        columns = math.ceil(math.sqrt(count))
        rows = math.ceil(count / columns)
        places = sorted(((r, c) for r in range(1, rows + 1) for c in range(1, columns + 1)), key=lambda rc: (rc[0] + rc[1], rc[0], rc[1]))
        grid = [[""] * columns for _ in range(rows)]
        for cell, (r, c) in zip(cells, places):
            grid[r - 1][c - 1] = cell
        while grid and not any(grid[-1]):
            grid.pop()
        return ScanGrid(tuple(tuple(_trim(row)) for row in grid))


def _trim(row: list[str]) -> list[str]:
    while row and not row[-1]:
        row = row[:-1]
    return row


def _cell_word(cell: str) -> str:
    if not cell:
        return "_"
    for name, char in CELL_NAMES.items():
        if cell == char:
            return name
    return cell


def _cell_name(char: str) -> str:
    for name, value in CELL_NAMES.items():
        if char == value:
            return name
    return repr(char)


def parse_layout(text: str, name: str = "layout") -> ScanGrid:
    """Read a scanning layout file.

    The format: UTF-8 text, one grid row per line, cells separated by spaces
    or tabs; a cell is one character, or ``space``, ``enter`` or ``delete``,
    or ``_`` for an empty place; blank lines and lines starting with ``#``
    are skipped.  Letters are written in lower case (a capital is selected
    with its lower-case cell).

    Args:
        text: the file's text.
        name: the file's name, for error messages.

    Raises:
        OptionError: a cell is longer than one character and not a name, a cell repeats, or no cells.
    """
    rows: list[tuple[str, ...]] = []
    for number, line in enumerate(text.splitlines(), 1):
        stripped = line.strip()
        if not stripped or stripped.startswith("#"):
            continue
        cells = []
        for word in stripped.split():
            if word in CELL_NAMES:
                cells.append(CELL_NAMES[word])
            elif word == "_":
                cells.append("")
            elif len(word) == 1:
                cells.append(word)
            else:
                raise OptionError(f"{name}, line {number}: {word!r} is not a cell (one character, or space, enter, delete, _)")
        rows.append(tuple(cells))
    if not rows:
        raise OptionError(f"{name}: the scanning layout has no rows")
    try:
        return ScanGrid(tuple(rows))
    except OptionError as error:
        raise OptionError(f"{name}: {error}") from None


def letter_frequencies(model: LanguageModel) -> dict[str, float]:
    """How often the model expects each character: letters weighted by the unigram probability of their words.

    A space follows every word (the whole word mass), and a full stop gets the
    end symbol's mass.

    Returns:
        character -> expected uses per predicted token.
    """
    vocab = model.vocab
    p1 = np.asarray(model.arrays.p1, dtype=np.float64)
    weights: dict[str, float] = {}
    for word_id, word in enumerate(vocab.words()):
        weight = float(p1[word_id])
        for char in word:
            weights[char] = weights.get(char, 0.0) + weight
    weights[" "] = float(p1[: vocab.size].sum())
    weights["."] = weights.get(".", 0.0) + float(p1[vocab.end_id])
    return weights


def default_grid(frequencies: Mapping[str, float], needed: Iterable[str] = ()) -> ScanGrid:
    """The default grid: the model's common characters by frequency, then marks, Enter and delete, then the rare ones.

    The model knows how often it expects each letter but not each mark, so the
    marks (:data:`DEFAULT_MARKS`), Enter and delete come right after every
    character the model expects at least as often as a full stop (once a
    sentence), and before the rarer ones (digits, accented letters).

    Args:
        frequencies: character -> weight (see :func:`letter_frequencies`).
        needed: characters the text needs; any the grid would lack go at its end (sorted).
    """
    ranked = [c for c, _ in sorted(frequencies.items(), key=lambda item: (-item[1], item[0]))]
    stop = frequencies.get(".", 0.0)
    common = [c for c in ranked if frequencies[c] >= stop]
    marks = [c for c in (*DEFAULT_MARKS, "\n", DELETE) if c not in frequencies]
    rare = [c for c in ranked if frequencies[c] < stop]
    cells = [*common, *marks, *rare]
    cells.extend(sorted({c.lower() for c in needed} - set(cells)))
    return ScanGrid.frequency_ordered(list(dict.fromkeys(cells)))


@dataclass(frozen=True)
class ScanningSettings:
    """How the scanning interface works and what its time costs.

    Attributes:
        grid: the letter grid; None for the default frequency-ordered grid built from the model.
        list_position: the suggestion row is scanned ``first`` or ``last`` (after the letter rows).
        scan_interval: seconds each highlight lasts.
        press_dwell: extra seconds after each switch press before scanning moves on.

    Raises:
        OptionError: a value out of range.
    """

    grid: ScanGrid | None = None
    list_position: str = "last"
    scan_interval: float = 1.0
    press_dwell: float = 0.0

    def __post_init__(self) -> None:
        if self.list_position not in LIST_POSITIONS:
            raise OptionError(f"unknown list position {self.list_position!r}; choose one of {', '.join(LIST_POSITIONS)}")
        if not (math.isfinite(self.scan_interval) and self.scan_interval > 0):
            raise OptionError(f"the scan interval must be a positive number of seconds, not {self.scan_interval}")
        if not (math.isfinite(self.press_dwell) and self.press_dwell >= 0):
            raise OptionError(f"the press dwell must be 0 or more seconds, not {self.press_dwell}")

    def to_json(self) -> dict[str, Any]:
        """The settings as a JSON object (the grid as its rows of cell words)."""
        return {
            "list_position": self.list_position,
            "scan_interval": self.scan_interval,
            "press_dwell": self.press_dwell,
            "grid": None if self.grid is None else [[_cell_word(c) for c in row] for row in self.grid.rows],
        }


@dataclass
class ScanningRun:
    """What typing a passage cost a scanning typist, word by word.

    Attributes:
        steps, presses: float64 arrays of shape (words,): with prediction.
        steps_unaided, presses_unaided: float64 arrays of shape (words,): the same grid without a suggestion row.
        picked: words picked from the list.
        ranks: int64 array of shape (words,): the rank of each pick, 0 where typed.
        queries: suggestion queries made.
    """

    steps: np.ndarray
    presses: np.ndarray
    steps_unaided: np.ndarray
    presses_unaided: np.ndarray
    picked: int
    ranks: np.ndarray
    queries: int


def gap_cells(gap: str, *, picked: bool, autospace: bool) -> str:
    """The cells selected for the characters between a word and the next one.

    The same rules as :func:`foretype.simulate.editing.gap_keystrokes`, as
    cells: a delete (``DELETE``) removes an automatic space the next character
    would swallow; its length equals that function's keystrokes.
    """
    if not (picked and autospace) or not gap:
        return gap
    first = gap[0]
    if first == " ":
        if len(gap) > 1 and replaces_automatic_space(gap[1]):
            return DELETE + gap
        return gap[1:]
    if replaces_automatic_space(first):
        return gap
    return DELETE + gap


class ScanningTypist:
    """Types passages on a scanning interface with one suggestion source."""

    def __init__(self, source: SuggestionSource, settings: TypistSettings, scanning: ScanningSettings, grid: ScanGrid) -> None:
        """Prepare a scanning typist.

        Args:
            source: where suggestions come from.
            settings: the typist's settings (k, text mode, automatic space, minimum prefix; the select cost is not used).
            scanning: the scanning settings.
            grid: the letter grid (``scanning.grid`` or the default grid).
        """
        self.source = source
        self.settings = settings
        self.scanning = scanning
        self.grid = grid
        self.letter_offset = 1 if scanning.list_position == "first" else 0
        self.list_row = 1 if scanning.list_position == "first" else grid.row_count + 1

    def _cost(self, cells: str, offset: int) -> tuple[int, int]:
        grid = self.grid
        return sum(grid.steps(c) + offset for c in cells), 2 * len(cells)

    def _seconds(self, steps: float, presses: float) -> float:
        return steps * self.scanning.scan_interval + presses * self.scanning.press_dwell

    def type_passage(self, passage: Passage, *, progress: Callable[[int, int], None] | None = None) -> ScanningRun:
        """Type a whole passage, with and without the suggestion row.

        Raises:
            OptionError: the grid lacks a cell the text needs.
        """
        missing = self.grid.missing(needed_characters(passage))
        if missing:
            shown = ", ".join(_cell_name(c) for c in missing[:8]) + (" ..." if len(missing) > 8 else "")
            raise OptionError(f"the scanning layout has no cell for {shown}")
        count = len(passage.words)
        steps = np.zeros(count)
        presses = np.zeros(count)
        plain_steps = np.zeros(count)
        plain_presses = np.zeros(count)
        ranks = np.zeros(count, dtype=np.int64)
        picked = queries = 0
        lead_aided = self._cost(passage.lead, self.letter_offset)
        lead_plain = self._cost(passage.lead, 0)
        for index, word in enumerate(passage.words):
            gap = word.gap
            plain = self._cost(word.target + gap, 0)
            aided, rank, asked = self._type_word(word, passage.mode == "full")
            queries += asked
            picked += rank > 0
            ranks[index] = rank
            extra_aided = lead_aided if index == 0 else (0, 0)
            extra_plain = lead_plain if index == 0 else (0, 0)
            steps[index] = aided[0] + extra_aided[0]
            presses[index] = aided[1] + extra_aided[1]
            plain_steps[index] = plain[0] + extra_plain[0]
            plain_presses[index] = plain[1] + extra_plain[1]
            if progress is not None and (index % 512 == 511 or index + 1 == count):
                progress(index + 1, count)
        return ScanningRun(steps, presses, plain_steps, plain_presses, picked, ranks, queries)

    def _type_word(self, word: PassageWord, full: bool) -> tuple[tuple[int, int], int, int]:
        """((steps, presses), rank picked or 0, queries) for one word and what follows it."""
        settings = self.settings
        autospace = settings.autospace
        target = word.target
        length = len(target)
        offset = self.letter_offset
        letter_steps = [self.grid.steps(c) + offset for c in target]
        rest = list(accumulate(reversed(letter_steps), initial=0))[::-1]  # rest[p]: steps of letters p.. to the end
        typed_gap = self._cost(gap_cells(word.gap, picked=False, autospace=autospace), offset)
        picked_gap = self._cost(gap_cells(word.gap, picked=True, autospace=autospace), offset)
        typed_cost = (rest[0] + typed_gap[0], 2 * length + typed_gap[1])
        capital = full and word.sentence_start
        queries = 0
        u = v = -1
        for step in range(settings.min_prefix, length):
            typing_rest = self._seconds(rest[step] + typed_gap[0], 2 * (length - step) + typed_gap[1])
            if self._seconds(self.list_row + 1 + picked_gap[0], 2 + picked_gap[1]) > typing_rest:
                break  # not even the first suggestion could pay from here on
            if queries == 0:
                u, v = self.source.context_ids(word.context)
            found = self.source.suggest_ids(u, v, target[:step], settings.k)
            queries += 1
            if not found:
                break
            forms = [capitalise(s.word) if capital else s.word for s in found]
            if full:
                place = forms.index(target) + 1 if target in forms else 0
            else:
                place = next((i + 1 for i, form in enumerate(forms) if model_form(form) == target), 0)
            if place:
                pick = (self.list_row + place + picked_gap[0], 2 + picked_gap[1])
                if self._seconds(*pick) <= typing_rest:
                    before = sum(letter_steps[:step])
                    return (before + pick[0], 2 * step + pick[1]), place, queries
        return typed_cost, 0, queries


@dataclass(frozen=True)
class ScanningReport:
    """What a scanning typist spent on a text, with prediction and without.

    Attributes:
        words, characters: the text (characters in the chosen text mode).
        steps, presses: scan steps and switch presses with prediction.
        steps_unaided, presses_unaided: the same grid without a suggestion row.
        picked: words picked from the list.
        queries: suggestion queries made.
        grid: the grid used.
        settings: the typist's settings as a JSON object.
        scanning: the scanning settings as a JSON object.
        run: the per-word counts.
    """

    words: int
    characters: int
    steps: float
    presses: float
    steps_unaided: float
    presses_unaided: float
    picked: int
    queries: int
    grid: ScanGrid
    settings: dict[str, Any]
    scanning: dict[str, Any]
    run: ScanningRun

    def seconds(self, *, aided: bool = True) -> float:
        """Estimated seconds to enter the text."""
        interval = float(self.scanning["scan_interval"])
        dwell = float(self.scanning["press_dwell"])
        if aided:
            return self.steps * interval + self.presses * dwell
        return self.steps_unaided * interval + self.presses_unaided * dwell

    def to_json(self) -> dict[str, Any]:
        """The report as a JSON object (README "Scanning" lists the keys)."""
        with_time = self.seconds()
        without_time = self.seconds(aided=False)
        return {
            "access": "scanning",
            "words": self.words,
            "characters": self.characters,
            "scan_steps": self.steps,
            "presses": self.presses,
            "scan_steps_per_char": self.steps / self.characters,
            "presses_per_char": self.presses / self.characters,
            "seconds": with_time,
            "wpm": words_per_minute(self.characters, with_time),
            "scan_steps_unaided": self.steps_unaided,
            "presses_unaided": self.presses_unaided,
            "scan_steps_per_char_unaided": self.steps_unaided / self.characters,
            "presses_per_char_unaided": self.presses_unaided / self.characters,
            "seconds_unaided": without_time,
            "wpm_unaided": words_per_minute(self.characters, without_time),
            "speedup": without_time / with_time if with_time > 0 else None,
            "picked": self.picked,
            "queries": self.queries,
            "settings": self.settings,
            "scanning": {**self.scanning, "grid": [[_cell_word(c) for c in row] for row in self.grid.rows]},
            "note": SCANNING_NOTE,
        }


SCANNING_NOTE = (
    "Simulated scanning figures compare designs; they are no assessment of what any person needs. "
    "Choices of scanning settings and layouts for a person belong with qualified clinicians."
)
"""Said beside every scanning figure we print."""


def grid_for(model: LanguageModel, scanning: ScanningSettings, passage: Passage) -> ScanGrid:
    """The grid a run uses: the settings' grid, or the default grid from the model's letter frequencies."""
    if scanning.grid is not None:
        return scanning.grid
    return default_grid(letter_frequencies(model), needed_characters(passage))


def needed_characters(passage: Passage) -> str:
    """Every character the passage makes the typist write (in words mode: the words and spaces)."""
    if passage.mode == "words":
        return "".join(w.target + " " for w in passage.words)
    return passage.lead + "".join(w.target + w.gap for w in passage.words)


def simulate_scanning(
    model: LanguageModel,
    text: str,
    settings: TypistSettings,
    scanning: ScanningSettings,
    progress: Callable[[int, int], None] | None = None,
    *,
    source: SuggestionSource | None = None,
) -> ScanningReport:
    """Simulate a scanning typist entering a text, with the model's suggestions and without.

    Args:
        model: the model (its letter frequencies make the default grid).
        text: the text to enter exactly.
        settings: k, text mode, automatic space, minimum prefix, wrapped.
        scanning: the interface and its timing.
        progress: called with (words done, words in all) now and then.
        source: where suggestions come from instead of ``model``.

    Returns:
        The report.

    Raises:
        CorpusError: the text holds no words.
        OptionError: the grid lacks a cell the text needs.
    """
    passage = read_passage(text, settings.text_mode, wrapped=settings.wrapped)
    grid = grid_for(model, scanning, passage)
    run = ScanningTypist(source if source is not None else model, settings, scanning, grid).type_passage(passage, progress=progress)
    return ScanningReport(
        words=len(passage.words),
        characters=passage.characters,
        steps=float(run.steps.sum()),
        presses=float(run.presses.sum()),
        steps_unaided=float(run.steps_unaided.sum()),
        presses_unaided=float(run.presses_unaided.sum()),
        picked=run.picked,
        queries=run.queries,
        grid=grid,
        settings=asdict(settings),
        scanning=scanning.to_json(),
        run=run,
    )


def format_scanning_report(report: ScanningReport) -> str:
    """The report as text: with and without prediction side by side."""
    data = report.to_json()
    scanning = report.scanning
    settings = report.settings

    def wpm(value: float | None) -> str:
        return "n/a" if value is None else f"{value:.2f}"

    grid_lines = ["  " + " ".join(f"{_cell_word(c):>5}" for c in row) for row in report.grid.rows]
    speedup = data["speedup"]
    lines = [
        f"text: {report.words:,} words, {report.characters:,} characters ({settings.get('text_mode', 'full')} mode)",
        f"scanning: row-column, suggestion row {scanning['list_position']} (k={settings.get('k')}), "
        f"{scanning['scan_interval']:g} s per step, {scanning['press_dwell']:g} s dwell per press; grid ({report.grid.row_count} rows):",
        *grid_lines,
        "",
        f"{'':26}{'with prediction':>18}{'without':>12}",
        f"{'scan steps per character':26}{data['scan_steps_per_char']:>18.3f}{data['scan_steps_per_char_unaided']:>12.3f}",
        f"{'presses per character':26}{data['presses_per_char']:>18.3f}{data['presses_per_char_unaided']:>12.3f}",
        f"{'estimated entry rate, wpm':26}{wpm(data['wpm']):>18}{wpm(data['wpm_unaided']):>12}",
        f"{'estimated time, min':26}{data['seconds'] / 60:>18,.1f}{data['seconds_unaided'] / 60:>12,.1f}",
        "",
        f"picked {report.picked:,} of {report.words:,} words from the list; "
        + ("speed-up n/a" if speedup is None else f"speed-up x{speedup:.2f}" + (" (slower: scanning past the list costs more than it saves)" if speedup < 1 else "")),
        "",
        SCANNING_NOTE,
    ]
    return "\n".join(lines)
