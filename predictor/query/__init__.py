"""The query stage: a loaded model answering probabilities and exact top-k suggestions.

``scoring`` is the arithmetic every query shares; ``vocabulary`` the word ids
and the prefix trie; ``ranked`` the ranked continuation lists of large
contexts; ``model`` the :class:`LanguageModel` that combines them; ``verify``
the full check of a model file.
"""
