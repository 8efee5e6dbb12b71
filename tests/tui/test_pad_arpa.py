"""The pad on a model imported from an ARPA file (the hand-worked model of tests/arpa/test_arpa_import.py)."""

from __future__ import annotations

import math
import sys
from pathlib import Path

from pilot_steps import paste

from foretype.arpa import model_from_arpa

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "arpa"))
from test_arpa_import import HAND  # noqa: E402


async def test_the_pad_offers_the_imported_models_words_in_the_files_order(make_app, tmp_path) -> None:
    source = tmp_path / "hand.arpa"
    source.write_text(HAND, encoding="utf-8")
    model, _ = model_from_arpa(source)
    app = make_app(model=model)
    async with app.run_test(size=(80, 24)) as pilot:
        offer = app.session.offer
        # After <s>: "<s> a" 10^-0.30103, "<s> b" 10^-0.69897, c backs off: 10^-0.30103 * 10^-0.69897 (by hand).
        assert [s.word for s in offer.suggestions] == ["A", "B", "C"]
        assert [round(math.log10(s.prob), 4) for s in offer.suggestions] == [-0.3010, -0.699, -1.0]
        await paste(pilot, "a ")
        # After "<s> a": b listed (10^-0.17609); c = bow(<s> a) P(c | a) = 10^(-0.09691 - 0.52288);
        # a = bow(<s> a) bow(a) P(a) = 10^(-0.09691 - 0.17609 - 0.52288).
        offer = app.session.offer
        assert [s.word for s in offer.suggestions] == ["b", "c", "a"]
        assert [round(math.log10(s.prob), 4) for s in offer.suggestions] == [-0.1761, -0.6198, -0.7959]
