"""A small corpus that exercises every boundary a count store must get right (shared by the count store tests)."""

from __future__ import annotations

from pathlib import Path

# Lines longer than the tests' 64-byte blocks, so lines cross block boundaries; NFC and
# decomposed accents, Hebrew, emoji, CRLF, a byte order mark, sentence punctuation mid-line.
LINES = (
    "\ufeffThe Saltmarrow ferry leaves the east quay at 7:40 and again at half-past nine, weather permitting.\n"
    "Über den Hafen fährt die Fähre; naïve travellers ask twice. Cafe\u0301 au lait costs 3.50 on board!\n"
    "The ferry is late again… The ferry is late again? the ferry is never late.\r\n"
    "שלום עולם and a wave 👋🏽 from the Saltmarrow dock hands, who don't mind the rain\n"
    "NASA weather reports say the tide turns at noon\n"
)

# Hard-wrapped prose: sentences run across lines, paragraphs end at blank lines, no final line break.
WRAPPED = (
    "The tide tables for the northern crossing were\nprinted on the back of the timetable and nobody\nread them until the\n"
    "ferry ran aground near Gull Rock\n\n"
    "The cooperative met on Thursday. Tamsin asked\nwho had moved the tide tables and the\nroom went quiet for a long while\n"
    "   \n"
    "After that the tables were printed on the front\nin large letters that even the gulls could read"
)


def write_corpus(folder: Path) -> list[Path]:
    """Write the corpus files (several files, one empty) and return them in order."""
    folder.mkdir(parents=True, exist_ok=True)
    files = {
        "a-lines.txt": LINES * 9,
        "b-wrapped.txt": WRAPPED * 3,
        "c-empty.txt": "",
        "d-mixed.txt": (LINES + "\n" + WRAPPED + "\n") * 4,
    }
    paths = []
    for name, text in files.items():
        path = folder / name
        path.write_text(text, encoding="utf-8", newline="")
        paths.append(path)
    return paths
