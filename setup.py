"""Build hook: the compiled query core, the combined model's merge, the build's tokeniser and prefix index, where a C compiler exists (the numpy path answers otherwise).

Everything else about the package is declared in pyproject.toml.
"""

import os

from setuptools import Extension, setup


def extensions():
    """The optional extensions: a failed compile leaves the install to the numpy path."""
    try:
        from Cython.Build import cythonize
    except ImportError:
        return []
    # Multiply-then-add must round twice, as numpy does: no fused multiply-add.
    flags = [] if os.name == "nt" else ["-O2", "-ffp-contract=off"]
    core = Extension("foretype.query._core", ["predictor/query/_core.pyx"], extra_compile_args=flags, optional=True)
    merge = Extension("foretype.adapt._merge", ["predictor/adapt/_merge.pyx"], extra_compile_args=flags, optional=True)
    tokenise = Extension("foretype.counting._tokenise", ["predictor/counting/_tokenise.pyx"], extra_compile_args=flags, optional=True)
    trigrams = Extension("foretype.counting._trigrams", ["predictor/counting/_trigrams.pyx"], extra_compile_args=flags, optional=True)
    estimate = Extension("foretype.estimate._estimate", ["predictor/estimate/_estimate.pyx"], extra_compile_args=flags, optional=True)
    prefixes = Extension("foretype.query._prefixes", ["predictor/query/_prefixes.pyx"], extra_compile_args=flags, optional=True)
    checks = Extension("foretype.modelfile._checks", ["predictor/modelfile/_checks.pyx"], extra_compile_args=flags, optional=True)
    return cythonize([core, merge, tokenise, trigrams, estimate, prefixes, checks], quiet=True, compiler_directives={"language_level": "3"})


setup(ext_modules=extensions())
