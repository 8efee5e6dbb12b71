"""Text from anywhere: the tokenizer, suggestions and the simulated typist on arbitrary Unicode.

Combining marks, right-to-left scripts, emoji with joiners, control
characters, NUL, a 10 MB line and a 10,000-character prefix: nothing may raise
beyond the documented errors, every suggestion must be a vocabulary word
matching the prefix, exactly the top k of a brute-force ranking, with a finite
probability in (0, 1].  The model is the bundled demo model (kneser-ney, so
every word has a positive probability; plain maximum likelihood gives zeros).
"""

from __future__ import annotations

import math
import unicodedata

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import foretype
from foretype.demo import demo_model
from foretype.simulate import TypistSettings, simulate
from foretype.text import TOKEN_RE, WORD_RE, capitalise, is_sentence_end, model_form, split_before_cursor, tokens

SPECIALS = [
    "\u0301", "\u0308", "\u0327",  # combining acute, diaeresis, cedilla
    "\u05e9", "\u05dc", "\u05d5", "\u05dd", "\u0627", "\u0644", "\u200f", "\u202e",  # Hebrew, Arabic, RLM, RLO
    "\U0001f600", "\U0001f469", "\u200d", "\U0001f4bb", "\ufe0f",  # emoji, zero-width joiner, variation selector
    "\x00", "\x07", "\x1b", "\x7f", "\u0085", "\u2028", "\u2029", "\ufeff", "\r", "\t", "\x0b", "\x0c",
    "\u00df", "\u0130", "\ufb01", "\u1e9e",  # letters whose case mapping changes length: ß, İ, ﬁ, ẞ
    "'", "’", "-", ".", "…", "!", "?", " ", " ", "\n", "1", "7:40",
]


@pytest.fixture(scope="module")
def model() -> foretype.LanguageModel:
    return demo_model()


def any_text(words: list[str]) -> st.SearchStrategy[str]:
    """Arbitrary Unicode (no lone surrogates), laced with the hard cases and with real words and prefixes."""
    pieces = st.one_of(
        st.text(st.characters(exclude_categories=("Cs",)), max_size=8),
        st.sampled_from(SPECIALS),
        st.sampled_from(words),
        st.sampled_from(words).map(lambda w: w[: max(1, len(w) // 2)]),
        st.sampled_from(words).map(str.upper),
    )
    return st.lists(pieces, max_size=25).map("".join)


def assert_sound(model: foretype.LanguageModel, context: list[str] | tuple[str, ...], prefix: str, found: list, k: int, *, sentence_start: bool = False) -> None:
    """Every suggestion is a vocabulary word with the prefix, probabilities lie in (0, 1], and the list is the brute-force top k."""
    words = model.vocabulary
    wanted = model_form(prefix)
    assert len(found) <= k and len({s.id for s in found}) == len(found)
    for s in found:
        assert 0 <= s.id < model.vocab_size
        assert words[s.id].startswith(wanted)
        display = model.vocab.display(s.id)
        assert s.word == (capitalise(display) if sentence_start else display)
        assert math.isfinite(s.prob) and 0 < s.prob <= 1
    # Brute force: score every word, keep those with the prefix, sort by probability then id.
    scores = model.distribution(context)[: model.vocab_size]
    ids = np.array([i for i, w in enumerate(words) if w.startswith(wanted)], dtype=np.int64)
    if len(ids):
        ids = ids[np.lexsort((ids, -scores[ids]))][:k]
    assert [s.id for s in found] == ids.tolist()


@settings(max_examples=120, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_suggest_text_on_any_unicode_gives_only_matching_vocabulary_words_with_sound_probabilities(model, data):
    text = data.draw(any_text(model.vocabulary[:3000]))
    k = data.draw(st.integers(1, 12))
    found = model.suggest_text(text, k)
    context, prefix = model.parse_cursor_text(text)
    words, _ = split_before_cursor(text)
    assert_sound(model, context, prefix, found, k, sentence_start=not words)


@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_suggest_with_any_context_words_and_prefix_is_the_exact_top_k(model, data):
    strings = any_text(model.vocabulary[:3000])
    context = data.draw(st.lists(strings, max_size=3))
    prefix = data.draw(strings)
    found = model.suggest(context, prefix, 5)
    assert_sound(model, context[-2:], prefix, found, 5)
    for word in context:
        assert 0 < model.prob(word, context) <= 1


@settings(max_examples=150, deadline=None)
@given(text=st.text(st.one_of(st.characters(exclude_categories=("Cs",)), st.sampled_from([c for c in SPECIALS if len(c) == 1])), max_size=300))
def test_the_tokenizer_yields_only_words_and_sentence_ends_and_the_cursor_split_takes_a_trailing_word(text):
    normal = unicodedata.normalize("NFC", text)
    for token in tokens(text):
        assert token and (is_sentence_end(token) or WORD_RE.fullmatch(token))
        assert token == "\n" or not any(c.isspace() for c in token)
    words, prefix = split_before_cursor(text)
    assert all(WORD_RE.fullmatch(w) for w in words)
    assert prefix == "" or (normal.translate({0x2028: 10, 0x2029: 10, 0x0B: 10, 0x0C: 10}).endswith(prefix) and prefix[0].isalnum())
    for token in TOKEN_RE.findall(prefix):
        assert not is_sentence_end(token)


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_the_simulated_typist_types_any_unicode_text_or_reports_that_it_holds_no_words(model, data):
    text = data.draw(any_text(model.vocabulary[:3000]))
    mode = data.draw(st.sampled_from(["full", "words"]))
    try:
        report = simulate(model, text, TypistSettings(k=3, text_mode=mode), keep_traces=False)
    except foretype.CorpusError:
        assert not [t for t in tokens(text) if not is_sentence_end(t)]
        return
    assert report.words > 0 and report.characters > 0 and report.keystrokes >= 0
    assert math.isfinite(report.ksr) and report.ksr <= 1


def test_a_ten_megabyte_line_is_tokenised_suggested_after_and_counted_like_its_tail(model, tmp_path):
    words = [w for w in model.vocabulary if w.isalpha() and len(w) >= 7][:40]
    count = 10_000_000 // min(len(w) for w in words)
    line = " ".join(words[i % len(words)] for i in range(count))  # over 10 MB, no line break
    assert len(line.encode()) > 10_000_000
    assert len(tokens(line)) == count
    # The context is the last two words of the sentence, however long it is.
    tail = line[-200:].split(" ", 1)[1]
    typed = " " + words[5][:2]
    assert model.suggest_text(line + typed, 5) == model.suggest_text(tail + typed, 5) != []
    corpus = tmp_path / "one-line.txt"
    corpus.write_text(line, encoding="utf-8")
    counts = foretype.count_corpus([corpus])
    assert counts.corpus_tokens == count and counts.sentences == 1


def test_a_ten_thousand_character_prefix_or_context_word_is_answered_not_refused(model):
    assert model.suggest_text("see you at the " + "s" * 10_000, 5) == []
    assert model.suggest(("x" * 10_000, "the"), "", 5) == model.suggest((foretype.UNKNOWN, "the"), "", 5)
    assert 0 < model.prob("y" * 10_000, ("at", "the")) == model.prob(foretype.UNKNOWN, ("at", "the"))


def test_words_holding_lone_surrogates_are_unknown_words():
    model = demo_model()
    assert model.suggest(("\ud800",), "a\udfff", 5) == []
    assert model.prob("\ud800", ()) == model.prob(foretype.UNKNOWN, ())


def test_a_line_longer_than_a_chunk_and_its_extension_is_cut_before_a_word_or_at_a_character(tmp_path):
    from foretype.counting.corpus import LINE_EXTENSION_BYTES, iter_chunks

    spaced = " ".join(["ångström", "fjord", "日本語", "🙂x"] * 150_000) + "\nlast line\n"
    unspaced = "ж" * 1_500_000 + "\n"
    for name, text in (("spaced.txt", spaced), ("unspaced.txt", unspaced)):
        path = tmp_path / name
        path.write_text(text, encoding="utf-8")
        chunks = list(iter_chunks(path, chunk_bytes=65_536))
        assert "".join(chunks) == text  # nothing lost, no character split (each chunk decoded on its own)
        assert len(chunks) > 1 and all(len(c.encode()) <= 65_536 + LINE_EXTENSION_BYTES for c in chunks)
        if name == "spaced.txt":
            assert all(c.endswith((" ", "\n")) for c in chunks)  # cut before a word
