"""Re-check process of the independent backend: ``python -m verifier.independent.recheck``.

Reads one JSON request on standard input::

    {"tasks": [{"statement": "sum(green(K)) == euler(K)", "where": null,
                "variables": {"K": [[1, 2, 3], [3, 4]]}}]}

evaluates every statement with the independent backend of the claim language
(:data:`verifier.independent.claims.IMPLEMENTATIONS`) and writes one JSON answer on
standard output, either ``{"results": [...], "report": {...}}`` -- one result per task,
as :func:`verifier.independent.claims.run_task` gives it -- or, when the request itself
is unusable, ``{"error": "...", "kind": "input" | "internal"}`` with exit status 2
(bad request) or 1 (anything else).

Independence from python-flint: before anything of ours is imported, the process sets
``SYMPY_GROUND_TYPES=python`` (if the caller did not) and installs an import hook that
refuses to load ``flint``; the report says whether ``flint`` ended up in
``sys.modules``, which imports were refused, whether sympy was loaded and with which
ground types.  The client :func:`verifier.independent.claims.recheck` refuses answers
whose report shows python-flint.
"""

from __future__ import annotations

import os
import sys

_REFUSED: list[str] = []


class _NoFlint:
    """Import hook: every attempt to import python-flint fails and is recorded."""

    def find_spec(self, name, path=None, target=None):
        if name == "flint" or name.startswith("flint."):
            _REFUSED.append(name)
            raise ImportError(f"the independent re-check does not load {name!r}")
        return None


def _guard() -> str | None:
    """Install the guards; a message when independence is already impossible."""
    if "flint" in sys.modules:
        return "python-flint was imported before the re-check process could start"
    if "sympy" in sys.modules and os.environ.get("SYMPY_GROUND_TYPES") != "python":
        return "sympy was imported before SYMPY_GROUND_TYPES=python could be set"
    os.environ["SYMPY_GROUND_TYPES"] = "python"
    sys.meta_path.insert(0, _NoFlint())
    return None


def _report(started: float, task_seconds: list[float]) -> dict:
    import platform
    import time

    report = {
        "flint_in_sys_modules": "flint" in sys.modules,
        "flint_imports_refused": list(_REFUSED),
        "sympy_loaded": "sympy" in sys.modules,
        "sympy_ground_types": None,
        "sympy_ground_types_requested": os.environ.get("SYMPY_GROUND_TYPES"),
        "python_version": platform.python_version(),
        "seconds": round(time.perf_counter() - started, 6),
        "task_seconds": task_seconds,
    }
    if report["sympy_loaded"]:
        from sympy.external.gmpy import GROUND_TYPES
        report["sympy_ground_types"] = GROUND_TYPES
    return report


def _answer(payload: dict) -> None:
    import json
    sys.stdout.write(json.dumps(payload) + "\n")


def main() -> int:
    """Serve one request from standard input; return the exit status."""
    import json
    import time
    import traceback

    started = time.perf_counter()
    problem = _guard()
    if problem:
        _answer({"error": problem, "kind": "internal"})
        return 1
    from .claims import RecheckInputError, run_task, validate_tasks

    try:
        request = json.loads(sys.stdin.read())
    except json.JSONDecodeError as error:
        _answer({"error": f"request is not valid JSON: {error}", "kind": "input"})
        return 2
    if not isinstance(request, dict) or not isinstance(request.get("tasks"), list):
        _answer({"error": "request must be an object with a list 'tasks'", "kind": "input"})
        return 2
    try:
        tasks = validate_tasks(request["tasks"])
    except RecheckInputError as error:
        _answer({"error": str(error), "kind": "input"})
        return 2
    results, seconds = [], []
    for number, task in enumerate(tasks):
        t0 = time.perf_counter()
        try:
            results.append(run_task(task))
        except Exception as error:   # our own bug: say which task, with the trace
            detail = traceback.format_exc(limit=6)
            _answer({"error": f"task {number}: {type(error).__name__}: {error}\n{detail}",
                     "kind": "internal"})
            return 1
        seconds.append(round(time.perf_counter() - t0, 6))
    report = _report(started, seconds)
    if report["flint_in_sys_modules"]:
        _answer({"error": "python-flint was imported during the re-check", "kind": "internal"})
        return 1
    _answer({"results": results, "report": report})
    return 0


if __name__ == "__main__":
    sys.exit(main())
