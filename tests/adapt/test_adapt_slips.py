"""The slip check for new words: one slip of the finger (Damerau 1964's four kinds, on touching keys) from a known word."""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from simulate.test_typos import damerau_distance

from foretype.adapt.slips import intended_forms, looks_like_slip
from foretype.simulate.typos import misspell

KNOWN = {"harbour", "ferry", "tide", "gorbalt"}


def test_the_four_kinds_of_slip_are_caught_and_real_new_words_are_not():
    known = KNOWN.__contains__
    assert looks_like_slip("harbor", known)  # deletion
    assert looks_like_slip("ferrry", known)  # insertion
    assert looks_like_slip("tdie", known)  # transposition
    assert looks_like_slip("gorbslt", known)  # substitution by a touching key (s beside a on QWERTY)
    assert not looks_like_slip("gorbelt", known)  # e does not touch a: a finger seldom lands there
    assert not looks_like_slip("ferrly", known)  # an added l touches neither r nor y
    assert not looks_like_slip("saltmarrow", known)
    assert not looks_like_slip("harbour", known)  # a known word is no slip of itself
    assert not looks_like_slip("ti", {"to"}.__contains__)  # too short to tell


@settings(max_examples=40, deadline=None)
@given(st.text(alphabet="abcdefghijklmnopqrstuvwxyz'", min_size=1, max_size=8))
def test_the_intended_forms_are_one_edit_away_and_undo_every_slip_the_typo_model_makes(form):
    # Brute force over all strings of length n-1..n+1 would be too large; check both directions instead:
    # every intended form is one edit (Damerau distance) from the typed one, and for every misspelling
    # the typo model (keyboard-neighbour slips) makes of a word, the word is among the intended forms.
    for candidate in set(intended_forms(form)):
        assert damerau_distance(candidate, form) == 1
    if len(form) >= 2 and "'" not in form:
        for seed in range(8):
            typed, _ = misspell(form, np.random.default_rng(seed))
            if typed != form:
                assert form in set(intended_forms(typed))


def test_a_new_word_is_offered_after_one_use_unless_it_may_be_a_slip_on_a_word_already_used():
    from foretype.adapt import AdaptSettings, UserModel
    from foretype.demo import demo_model

    base = demo_model()
    model = UserModel(base.vocab, AdaptSettings())
    assert model.settings.min_uses == 1 and model.settings.hold_slips
    model.learn(["Quillmere", "checked", "the", "nets"], end=True)
    quill = model.id_of("quillmere")
    assert quill is not None and model.ready_learned("quil") == [quill] and model.is_ready(quill)
    # "ntes" is "nets" with two letters swapped, and "nets" was typed: held until a second use.
    model.learn(["the", "ntes"], end=True)
    slip = model.id_of("ntes")
    assert slip is not None and model.ready_learned("nt") == [] and not model.is_ready(slip)
    model.learn(["ntes"], end=True)
    assert model.ready_learned("nt") == [slip] and model.is_ready(slip)
    # Off: every new word after min_uses uses; a rebuild judges once-used words again.
    model.learn(["Quillmeer"], end=True)  # one edit from a new word typed once only: not held
    assert model.is_ready(model.id_of("quillmeer"))
    model.learn(["hte"], end=True)  # "the" was typed: held
    assert not model.is_ready(model.id_of("hte"))
    model.set_settings(model.settings.changed(hold_slips=False))
    assert model.is_ready(model.id_of("hte"))
    model.set_settings(model.settings.changed(hold_slips=True))
    assert not model.is_ready(model.id_of("hte")) and model.ready_learned("ht") == []
