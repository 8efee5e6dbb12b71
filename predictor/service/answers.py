"""The engine's answers as JSON objects, shared by the HTTP routes and the WebSocket session.

Every suggestion list is the engine's own exact top k (``suggest_text`` or
``suggest`` of the model, or of the combined model of a profile), shaped as
``foretype suggest --json`` prints it.  The limits that depend on the
settings (text length, k, context words) are checked here.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

import numpy as np

from ..adapt import AdaptedModel
from ..errors import OptionError
from ..query.model import LanguageModel
from ..query.passed_over import suggest_without
from ..query.vocabulary import END
from ..text import capitalise, iter_sentences, model_form
from .catalogue import ServedModel
from .problems import ApiError
from .settings import Limits

EVENTS = ("typed", "taken", "sentence_end")
"""Learning events: a word finished by typing, a word taken from the list, a sentence ended."""


# ------------------------------------------------------------------ checks
def check_k(k: int, limits: Limits) -> int:
    """Refuse a k outside 1 .. max_k (422 ``bad_k``)."""
    if isinstance(k, bool) or not isinstance(k, int) or not 1 <= k <= limits.max_k:
        raise ApiError(422, "bad_k", f"k must be a whole number from 1 to {limits.max_k}, not {k!r}")
    return k


def check_text(what: str, text: str, limits: Limits) -> str:
    """Refuse a text longer than max_text_chars (422 ``text_too_long``)."""
    if len(text) > limits.max_text_chars:
        raise ApiError(422, "text_too_long", f"{what} holds {len(text):,} characters; the limit is {limits.max_text_chars:,}")
    return text


def check_context(context: Sequence[str], limits: Limits) -> list[str]:
    """Refuse a context of too many words, or with a word longer than the text limit."""
    if len(context) > limits.max_context_words:
        raise ApiError(422, "bad_request", f"context lists {len(context)} words; the limit is {limits.max_context_words} (only the last two are used)")
    for word in context:
        check_text("a context word", word, limits)
    return list(context)


MAX_LEAVE_OUT = 1000
"""Most words one suggest request may leave out."""


def check_leave_out(words: Sequence[str] | None, limits: Limits) -> set[str]:
    """The model forms of the words to leave out; refuses more than :data:`MAX_LEAVE_OUT` or an over-long word (422)."""
    if not words:
        return set()
    if not isinstance(words, list) or not all(isinstance(word, str) for word in words):
        raise ApiError(422, "bad_leave_out", "leave_out must be a list of words")
    if len(words) > MAX_LEAVE_OUT:
        raise ApiError(422, "bad_leave_out", f"leave_out may hold at most {MAX_LEAVE_OUT:,} words, not {len(words):,}")
    return {model_form(check_text("a word left out", word, limits)) for word in words}


# -------------------------------------------------------------- suggestions
def suggest(
    served: ServedModel,
    source: LanguageModel | AdaptedModel,
    limits: Limits,
    *,
    text: str | None = None,
    context: Sequence[str] | None = None,
    prefix: str | None = None,
    k: int = 5,
    profile: str | None = None,
    leave_out: Sequence[str] | None = None,
) -> dict[str, Any]:
    """The suggestions object for the text before the cursor, or for context words and a prefix.

    Args:
        served: the model asked.
        source: the model itself, or the combined model of a profile's learned store.
        limits: the service's limits.
        text: everything before the cursor (not with ``context`` or ``prefix``).
        context, prefix: the preceding words and the partial word.
        k: how many suggestions.
        profile: the profile's name, when ``source`` is its combined model.
        leave_out: words left out before the top k is taken, as the typing pad leaves
            out the words passed over within a word (``query.passed_over``).

    Raises:
        ApiError: k, a text, the context or the words left out outside the limits, or text given with context or prefix.
    """
    check_k(k, limits)
    passed = check_leave_out(leave_out, limits)
    if text is not None and (context is not None or prefix is not None):
        raise ApiError(422, "bad_request", "give text, or context and prefix, not both")
    if context is not None or prefix is not None:
        words = check_context(context or [], limits)[-2:]
        typed = check_text("prefix", prefix or "", limits)
        found = source.suggest(words, typed, k) if not passed else suggest_without(source, *source.context_ids(words), typed, k, passed)
    else:
        before = check_text("text", text or "", limits)
        words, typed = source.parse_cursor_text(before)
        if not passed:
            found = source.suggest_text(before, k)
        else:
            found = suggest_without(source, *source.context_ids(words), typed, k, passed)
            if not words:
                found = [s._replace(word=capitalise(s.word)) for s in found]  # as suggest_text writes a sentence's first word
    adapted = source if isinstance(source, AdaptedModel) else None
    rows = [{"word": s.word, "prob": s.prob, "order": s.order, "learned": bool(s.learned), "new_word": bool(s.new_word)} for s in found]
    return {
        "model": served.name,
        "profile": profile,
        "context": list(words),
        "prefix": typed,
        "suggestions": rows,
        "user_share": adapted.share(words) if adapted is not None else None,
    }


# ------------------------------------------------------------ probabilities
def probability(
    served: ServedModel,
    source: LanguageModel | AdaptedModel,
    limits: Limits,
    *,
    word: str | None,
    context: Sequence[str],
    sentence: str | None,
    profile: str | None = None,
) -> dict[str, Any]:
    """The probability of a word after a context, or of one sentence with its end symbol.

    Raises:
        ApiError: both or neither of word and sentence, a text beyond the limits,
            a sentence that is not exactly one sentence with words.
    """
    if (word is None) == (sentence is None):
        raise ApiError(422, "bad_request", "give word (with context) or sentence, one of them")
    head = {"model": served.name, "profile": profile}
    if word is not None:
        check_text("word", word, limits)
        words = check_context(context, limits)
        try:
            p = source.prob(word, words)
        except OptionError as error:
            raise ApiError(422, "bad_request", str(error)) from None
        return {**head, "word": word, "context": words, "prob": p}
    assert sentence is not None
    if context:
        raise ApiError(422, "bad_request", "context goes with word, not with sentence")
    check_text("sentence", sentence, limits)
    found = list(iter_sentences(sentence))
    if len(found) != 1:
        raise ApiError(422, "bad_request", f"sentence must hold exactly one sentence with words; it holds {len(found)}")
    words = found[0]
    log2 = _sentence_log2(source, words)
    tokens = len(words) + 1
    finite = math.isfinite(log2)
    return {
        **head,
        "sentence": sentence,
        "words": words,
        "tokens": tokens,
        "log2_prob": log2 if finite else None,
        "prob": 2.0**log2 if finite else 0.0,
        "perplexity": 2.0 ** (-log2 / tokens) if finite else None,
    }


def _sentence_log2(source: LanguageModel | AdaptedModel, words: list[str]) -> float:
    """log2 P(sentence): the engine's own ``logprob`` for a model; the chain of ``prob`` for a combined one."""
    if isinstance(source, LanguageModel):
        with np.errstate(divide="ignore"):  # a zero probability is -inf, reported as null
            return source.logprob(words)
    total = 0.0
    history: list[str] = []
    for token in [*words, END]:
        p = source.prob(token, history[-2:])
        if p <= 0.0:
            return -math.inf
        total += math.log2(p)
        history.append(token)
    return total


# ---------------------------------------------------------------- learning
def learn(learned: Any, served: ServedModel, limits: Limits, *, profile: str, event: str, word: str | None, context: Sequence[str]) -> dict[str, Any]:
    """Apply one learning event to an open learned store (a :class:`predictor.adapt.LearnedFile`).

    Raises:
        ApiError: an unknown event, a word missing or given when it should not be,
            or a word that is not a single word.
    """
    if event not in EVENTS:
        raise ApiError(422, "bad_field", f"event must be one of {', '.join(EVENTS)}, not {event!r}")
    words = check_context(context, limits)[-2:]
    try:
        if event == "sentence_end":
            if word is not None:
                raise ApiError(422, "bad_request", "a sentence_end event takes no word (the sentence's words go in context)")
            counted = learned.end_sentence(words)
        else:
            if word is None:
                raise ApiError(422, "bad_request", f"a {event} event needs the word")
            check_text("word", word, limits)
            counted = learned.learn([word], after=words)
    except OptionError as error:
        raise ApiError(422, "bad_field", str(error)) from None
    model = learned.model
    return {
        "model": served.name,
        "profile": profile,
        "event": event,
        "tokens_learned": counted,
        "learning": bool(model.settings.learning),
        "tokens": int(model.user.raw_tokens),
    }
