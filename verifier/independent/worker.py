"""Worker process of the independent backend: ``python -m verifier.independent.worker``.

Reads one JSON request on standard input::

    {"tasks": [{"facets": [[1, 2, 3], [3, 4]], "compute": ["green", "det", "betti_mod_2"]}]}

and writes one JSON answer on standard output, either::

    {"results": [{...}, ...], "report": {...}}

or, when something went wrong, ``{"error": "...", "kind": "input" | "internal"}`` with exit
status 2 (bad request) or 1 (anything else).

Exact numbers are written as decimal strings ("-3", "2/5"); counts (Betti numbers,
signature, Euler and Wu characteristics, f-vector) as JSON integers.

Independence from python-flint: the worker sets ``SYMPY_GROUND_TYPES=python`` before sympy
can be imported (if the parent did not already), installs an import hook that refuses to
load ``flint``, and at the end checks that ``flint`` is not in ``sys.modules``.  The report
states what sympy actually used, so the caller can verify it.
"""

from __future__ import annotations

import os
import sys

_BLOCKED: list[str] = []


class _RefuseFlint:
    """Import hook: any attempt to import python-flint fails and is recorded."""

    def find_spec(self, name, path=None, target=None):
        if name == "flint" or name.startswith("flint."):
            _BLOCKED.append(name)
            raise ImportError(f"the independent backend does not load {name!r}")
        return None


def _prepare() -> str | None:
    """Make sympy start with python ground types; a message if that is impossible."""
    if "flint" in sys.modules:
        return ("python-flint was already imported when the worker started "
                "(probably by verifier/__init__.py); the independent check cannot run")
    if "sympy" in sys.modules and os.environ.get("SYMPY_GROUND_TYPES") != "python":
        return "sympy was imported before the worker could set SYMPY_GROUND_TYPES=python"
    os.environ["SYMPY_GROUND_TYPES"] = "python"
    sys.meta_path.insert(0, _RefuseFlint())
    return None


def _encode_number(x) -> str:
    return str(x)        # int -> "12", Fraction -> "3/4"


def _encode(name: str, value):
    if name in ("green", "connection"):
        return [[_encode_number(e) for e in row] for row in value]
    if name in ("det",):
        return _encode_number(value)
    if name == "charpoly":
        return [_encode_number(c) for c in value]
    if name == "simplices":
        return [list(s) for s in value]
    if isinstance(value, tuple):
        return list(value)
    return value


def _report(started: float) -> dict:
    import platform
    import time

    report = {
        "flint_in_sys_modules": "flint" in sys.modules,
        "flint_imports_refused": list(_BLOCKED),
        "sympy_loaded": "sympy" in sys.modules,
        "sympy_ground_types": None,
        "sympy_version": None,
        "python_version": platform.python_version(),
        "seconds": round(time.perf_counter() - started, 6),
    }
    if "sympy" in sys.modules:
        import sympy
        from sympy.external.gmpy import GROUND_TYPES
        report["sympy_ground_types"] = GROUND_TYPES
        report["sympy_version"] = sympy.__version__
    return report


def _fail(message: str, kind: str) -> int:
    import json
    sys.stdout.write(json.dumps({"error": message, "kind": kind}) + "\n")
    return 2 if kind == "input" else 1


def main() -> int:
    """Run one request from standard input; return the exit status."""
    import json
    import time
    import traceback

    started = time.perf_counter()
    problem = _prepare()
    if problem:
        return _fail(problem, "internal")
    from . import compute

    try:
        request = json.loads(sys.stdin.read())
    except json.JSONDecodeError as error:
        return _fail(f"request is not valid JSON: {error}", "input")
    if not isinstance(request, dict) or not isinstance(request.get("tasks"), list):
        return _fail("request must be an object with a list 'tasks'", "input")
    try:
        tasks = [compute.validate_task(task, f"task {i}")
                 for i, task in enumerate(request["tasks"])]
    except compute.IndependentInputError as error:
        return _fail(str(error), "input")

    results, timings = [], []
    for i, (facets, names) in enumerate(tasks):
        t0 = time.perf_counter()
        try:
            values = compute.compute_task(facets, names)
        except Exception as error:  # report which task failed, with the worker's trace
            detail = traceback.format_exc(limit=4)
            return _fail(f"task {i}: {type(error).__name__}: {error}\n{detail}", "internal")
        results.append({name: _encode(name, value) for name, value in values.items()})
        timings.append(round(time.perf_counter() - t0, 6))

    report = _report(started)
    report["task_seconds"] = timings
    if report["flint_in_sys_modules"]:
        return _fail("python-flint was imported during the independent computation", "internal")
    sys.stdout.write(json.dumps({"results": results, "report": report}) + "\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
