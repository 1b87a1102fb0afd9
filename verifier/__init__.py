"""simplicial-verifier: exact tests of identities about finite simplicial complexes.

Importing ``verifier`` is light: ``Complex`` is loaded on first use, so that the
independent re-checking backend can run in a process that never loads python-flint.
"""

__all__ = ["Complex", "ComplexError", "discover", "check", "__version__"]
__version__ = "0.1.0"


def __getattr__(name):
    if name in ("Complex", "ComplexError"):
        from . import complex as _complex
        return getattr(_complex, name)
    if name == "check":           # verifier.check(statement, over=[...]): claims in Python
        from .notebook import check
        return check
    if name == "discover":        # the package verifier.discover, callable as a function
        import importlib
        return importlib.import_module(".discover", __name__)
    raise AttributeError(f"module 'verifier' has no attribute {name!r}")
