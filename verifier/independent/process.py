"""Running a flint-free module of this package in a separate Python process.

sympy switches its ground types to python-flint whenever python-flint is installed, unless
``SYMPY_GROUND_TYPES=python`` is set before sympy is first imported; a process of our own
is the only reliable way to guarantee that, and that python-flint is never loaded.  Both
the invariant worker and the claim re-check use :func:`call`.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

__all__ = ["call"]

_PACKAGE_ROOT = Path(__file__).resolve().parent.parent.parent


def call(module: str, payload: dict, timeout: float | None, error, what: str) -> dict:
    """Send ``payload`` as JSON to ``python -m module``; return its JSON answer.

    ``error`` is the exception class raised when the process fails, times out, answers
    with an error, or reports that python-flint was loaded or that sympy ran with other
    ground types than 'python'; ``what`` names the process in those messages.
    """
    env = dict(os.environ)
    env["SYMPY_GROUND_TYPES"] = "python"
    env["PYTHONPATH"] = os.pathsep.join(
        [str(_PACKAGE_ROOT)] + [p for p in env.get("PYTHONPATH", "").split(os.pathsep) if p])
    count = len(payload.get("tasks", []))
    try:
        completed = subprocess.run([sys.executable, "-m", module], input=json.dumps(payload),
                                   capture_output=True, text=True, env=env,
                                   cwd=str(_PACKAGE_ROOT), timeout=timeout)
    except subprocess.TimeoutExpired:
        raise error(f"{what} exceeded {timeout} s on a batch of {count} task(s)") from None
    try:
        answer = json.loads(completed.stdout)
    except json.JSONDecodeError:
        tail = (completed.stderr or completed.stdout or "").strip().splitlines()[-5:]
        raise error(f"{what} exited with status {completed.returncode} without an answer: "
                    f"{' | '.join(tail) or 'no output'}") from None
    if "error" in answer:
        raise error(f"{what}: {answer['error']}")
    report = answer.get("report", {})
    if report.get("flint_in_sys_modules") or report.get("flint_imports_refused"):
        raise error(f"{what} saw python-flint; its results are not independent")
    if report.get("sympy_loaded") and report.get("sympy_ground_types") != "python":
        raise error(f"{what} ran sympy with ground types "
                    f"{report.get('sympy_ground_types')!r}, not 'python'")
    return answer
