"""The model-file layer: the file format, its limits, value encodings and load-time checks.

``format`` reads and writes the preamble, JSON header and aligned arrays;
``model_arrays`` declares every section as a typed field of one frozen
structure; ``blocked`` stores offsets in blocks; ``encoding`` holds the stored
value codes; ``levels`` turns an estimate into
stored levels whose weights are recomputed under the encoding; ``integrity``
checks a file's structure on every load; ``atomic`` replaces files safely.
Nothing here answers queries.
"""
