"""The JSON shapes of requests and responses (pydantic models; they make the OpenAPI description).

Requests refuse unknown fields and values of the wrong type (no silent
conversion of ``"5"`` to 5); limits that depend on the service's settings
(text length, k) are checked by :mod:`.answers`.
"""

from __future__ import annotations

from typing import Literal

from pydantic import BaseModel, ConfigDict, Field


class _Request(BaseModel):
    model_config = ConfigDict(extra="forbid", strict=True)


class SuggestRequest(_Request):
    """Suggestions for the text before the cursor, or for context words and a prefix."""

    model: str | None = Field(None, description="a served model's name (default: the service's default model)")
    text: str | None = Field(None, description="everything written before the cursor; not with context or prefix")
    context: list[str] | None = Field(None, description="the preceding words of the sentence, most recent last")
    prefix: str | None = Field(None, description="the partial word typed so far")
    k: int = Field(5, description="how many suggestions (1 to the service's limit)")
    profile: str | None = Field(None, description="combine the model with what this profile learned")
    leave_out: list[str] | None = Field(None, description="words to leave out before the top k is taken (the words shown and passed over while typing this word)")


class SuggestionOut(BaseModel):
    """One suggested word."""

    word: str = Field(description="the word as it would be written")
    prob: float = Field(description="its probability after the context")
    order: int = Field(description="the n-gram order (1, 2 or 3) that supplied most of it")
    learned: bool = Field(description="the profile's user model supplied more of it than the base model")
    new_word: bool = Field(description="the word exists only because the profile learned it")


class SuggestResponse(BaseModel):
    """The exact top-k list, as ``foretype suggest --json`` prints it, plus the model and profile."""

    model: str
    profile: str | None
    context: list[str]
    prefix: str
    suggestions: list[SuggestionOut]
    user_share: float | None = Field(description="the user model's share after the context (null without a profile)")


class ProbabilityRequest(_Request):
    """The probability of a word after a context, or of one sentence."""

    model: str | None = None
    profile: str | None = None
    word: str | None = Field(None, description='a word, or "</s>" for the sentence end')
    context: list[str] = Field(default_factory=list, description="with word: the preceding words, most recent last")
    sentence: str | None = Field(None, description="one sentence, scored with its end symbol")


class WordProbability(BaseModel):
    """P(word | context)."""

    model: str
    profile: str | None
    word: str
    context: list[str]
    prob: float


class SentenceProbability(BaseModel):
    """The probability of a sentence: every word and the end symbol."""

    model: str
    profile: str | None
    sentence: str
    words: list[str]
    tokens: int = Field(description="words + 1 (the end symbol)")
    log2_prob: float | None = Field(description="null when the probability is 0")
    prob: float
    perplexity: float | None = Field(description="2^(-log2_prob / tokens); null when the probability is 0")


class LearnRequest(_Request):
    """One learning event for a profile's learned store."""

    model: str | None = None
    profile: str
    event: Literal["typed", "taken", "sentence_end"]
    word: str | None = Field(None, description="the word as written (not for sentence_end)")
    context: list[str] = Field(default_factory=list, description="the sentence's words before it")


class LearnResponse(BaseModel):
    """What one learning event changed."""

    model: str
    profile: str
    event: str
    tokens_learned: int
    learning: bool = Field(description="false when learning is switched off in this store (nothing learned)")
    tokens: int = Field(description="tokens the store holds now")


class ProfileRequest(_Request):
    """A profile to create."""

    name: str


class ProfileResponse(BaseModel):
    """A profile and whether this request created it."""

    name: str
    created: bool


class ProfilesResponse(BaseModel):
    """The profiles in the profiles folder."""

    profiles: list[str]


class HealthResponse(BaseModel):
    """The service is up."""

    status: Literal["ok"]
    version: str
    models: list[str]
    default_model: str


class ModelFacts(BaseModel):
    """What ``foretype info --json`` reports about a model, plus its name here."""

    model_config = ConfigDict(extra="allow")

    name: str
    method: str
    vocab_size: int
    ngrams: dict[str, int]


class ModelsResponse(BaseModel):
    """Every served model."""

    default_model: str
    models: list[ModelFacts]


class ErrorDetail(BaseModel):
    """What went wrong."""

    code: str = Field(description="a stable name (docs/service.md lists them)")
    message: str


class ErrorResponse(BaseModel):
    """Every error response's body."""

    error: ErrorDetail
