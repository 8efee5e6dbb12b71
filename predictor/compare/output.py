"""A comparison as a text table, a JSON object, and CSV (summary and per sentence)."""

from __future__ import annotations

import csv
import io
from typing import Any

from ..simulate.report import ESTIMATE_NOTE
from ..simulate.scanning import SCANNING_NOTE
from .runner import MEASURES, ComparisonResult

TEST_NAMES = {
    "bootstrap": "paired bootstrap over sentences (Koehn 2004)",
    "randomisation": "approximate randomisation over sentences (Riezler & Maxwell 2005); intervals by the paired bootstrap",
}


def _note(result: ComparisonResult) -> str:
    return SCANNING_NOTE if result.access == "scanning" else ESTIMATE_NOTE


def comparison_json(result: ComparisonResult) -> dict[str, Any]:
    """The comparison as one JSON object (README "Comparing models" lists the keys)."""
    systems = []
    for index, run in enumerate(result.systems):
        entry: dict[str, Any] = {
            "label": run.label,
            "model": run.model_path,
            "method": run.method,
            "settings": run.settings,
            "scanning": run.scanning,
        }
        for name, found in result.measures.items():
            interval = found.intervals[index]
            entry[name] = {"value": found.values[index], "low": None if interval is None else interval[0], "high": None if interval is None else interval[1]}
        systems.append(entry)
    pairs = []
    for name, found in result.measures.items():
        for (i, j), pair in found.pairs.items():
            pairs.append(
                {
                    "measure": name,
                    "first": result.systems[i].label,
                    "second": result.systems[j].label,
                    "difference": pair.difference,
                    "low": None if pair.interval is None else pair.interval[0],
                    "high": None if pair.interval is None else pair.interval[1],
                    "p_value": pair.p_value,
                }
            )
    return {
        "test_file": result.test_name,
        "access": result.access,
        "sentences": result.sentences,
        "words": result.words,
        "characters": result.characters,
        "test": result.test,
        "resamples": result.resamples,
        "seed": result.seed,
        "confidence": result.confidence,
        "systems": systems,
        "pairs": pairs,
        "note": _note(result),
    }


def comparison_csv(result: ComparisonResult) -> str:
    """The summary as CSV: one row per system and measure, then one per pair and measure.

    Columns: ``kind`` (system or pair), ``system``, ``other``, ``measure``,
    ``value``, ``low``, ``high``, ``p_value`` (empty where not applicable).
    """
    table = io.StringIO()
    writer = csv.writer(table, lineterminator="\n")
    writer.writerow(("kind", "system", "other", "measure", "value", "low", "high", "p_value"))

    def cell(value: float | None) -> str:
        return "" if value is None else repr(float(value))

    for name, found in result.measures.items():
        for index, run in enumerate(result.systems):
            interval = found.intervals[index]
            writer.writerow(("system", run.label, "", name, cell(found.values[index]), cell(interval and interval[0]), cell(interval and interval[1]), ""))
    for name, found in result.measures.items():
        for (i, j), pair in found.pairs.items():
            interval = pair.interval
            writer.writerow(
                (
                    "pair",
                    result.systems[i].label,
                    result.systems[j].label,
                    name,
                    cell(pair.difference),
                    cell(interval and interval[0]),
                    cell(interval and interval[1]),
                    cell(pair.p_value),
                )
            )
    return table.getvalue()


def sentences_csv(result: ComparisonResult) -> str:
    """The per-sentence totals as CSV: one row per system and sentence (for other statistics tools)."""
    names = list(result.systems[0].columns)
    table = io.StringIO()
    writer = csv.writer(table, lineterminator="\n")
    writer.writerow(("system", "sentence", *names))
    for run in result.systems:
        for index in range(result.sentences):
            writer.writerow((run.label, index, *(repr(float(run.columns[n][index])) for n in names)))
    return table.getvalue()


def _value(name: str, value: float | None) -> str:
    if value is None:
        return "n/a"
    if MEASURES[name].percent:
        return f"{100 * value:.1f}%"
    return f"{value:.2f}" if abs(value) < 100 else f"{value:,.1f}"


def _difference(name: str, value: float | None) -> str:
    if value is None:
        return "n/a"
    if MEASURES[name].percent:
        return f"{100 * value:+.2f} pts"
    return f"{value:+.3f}" if abs(value) < 100 else f"{value:+,.1f}"


def p_text(value: float | None, resamples: int) -> str:
    """A p-value for people: a p of 0 from B resamples is shown as below 1/B."""
    if value is None:
        return "n/a"
    if value == 0:
        return f"< {1 / resamples:.2g}"
    return f"{value:.4f}" if value >= 0.0001 else f"{value:.1e}"


def _align(rows: list[tuple[str, ...]]) -> list[str]:
    widths = [max(len(row[i]) for row in rows) for i in range(len(rows[0]))]
    return ["  ".join(v.ljust(w) if i == 0 else v.rjust(w) for i, (v, w) in enumerate(zip(row, widths))) for row in rows]


def format_comparison(result: ComparisonResult) -> str:
    """The comparison as text tables: each system with its intervals, then each pair."""
    level = f"{100 * result.confidence:g}%"
    settings = result.systems[0].settings
    lines = [
        f"test: {result.test_name or 'text'}: {result.sentences:,} sentences, {result.words:,} words, {result.characters:,} characters ({settings['text_mode']} mode)",
        f"{TEST_NAMES[result.test]}; {result.resamples:,} resamples, seed {result.seed}; {level} intervals",
        "",
    ]
    names = list(result.measures)
    header = ("system", *(f"{MEASURES[n].title} [{level}]" for n in names))
    rows = [header]
    for index, run in enumerate(result.systems):
        cells = [run.label]
        for name in names:
            found = result.measures[name]
            interval = found.intervals[index]
            span = "" if interval is None else f" [{_value(name, interval[0])}, {_value(name, interval[1])}]"
            cells.append(_value(name, found.values[index]) + span)
        rows.append(tuple(cells))
    lines.extend(_align(rows))
    pair_keys = list(result.measures[names[0]].pairs)
    # A measure no pair differs in (perplexity across list sizes of one model, say) gets one line instead of a column.
    same = [n for n in names if all(p.difference == 0 for p in result.measures[n].pairs.values())]
    names = [n for n in names if n not in same]
    if pair_keys and names:
        lines.extend(["", "differences, first minus second:"])
        header = ("pair", *(f"{MEASURES[n].title} diff [{level}] p" for n in names))
        rows = [header]
        for i, j in pair_keys:
            cells = [f"{result.systems[i].label} - {result.systems[j].label}"]
            for name in names:
                pair = result.measures[name].pairs[(i, j)]
                span = "" if pair.interval is None else f" [{_difference(name, pair.interval[0])}, {_difference(name, pair.interval[1])}]"
                cells.append(f"{_difference(name, pair.difference)}{span} p {p_text(pair.p_value, result.resamples)}")
            rows.append(tuple(cells))
        lines.extend(_align(rows))
    if pair_keys and same:
        lines.extend(["", "the same for every system: " + ", ".join(MEASURES[n].title for n in same)])
    lines.extend(["", _note(result)])
    return "\n".join(lines)
