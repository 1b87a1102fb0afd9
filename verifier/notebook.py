"""Claims from a notebook: :func:`check` runs a statement with no claim file.

The statement, ``where`` and families are written into a claim (the same TOML a file
would hold, so the loader applies the same rules and a certificate records the same
claim), run in this process by the runner (``inline`` engine), and recorded in a store.
"""

from __future__ import annotations

import json
import re
import tempfile
from pathlib import Path

__all__ = ["check"]

_NAME = re.compile(r"[a-z0-9-]+")


def _toml_value(value) -> str:
    """A TOML value for the plain data a family table holds."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return repr(value)
    if isinstance(value, str):
        return json.dumps(value)        # a JSON string is a valid TOML basic string
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    if isinstance(value, dict):
        return "{ " + ", ".join(f"{_toml_key(k)} = {_toml_value(v)}"
                                for k, v in value.items()) + " }"
    raise TypeError(f"a family parameter must be a number, string, list or table, got "
                    f"{type(value).__name__}")


def _toml_key(key) -> str:
    if not isinstance(key, str):
        raise TypeError(f"a family parameter's name must be a string, got {key!r}")
    return key if re.fullmatch(r"[A-Za-z0-9_-]+", key) else json.dumps(key)


def claim_text(statement: str, over: list[dict], where: str | None = None,
               expect: str = "holds", evidence: str = "exact", name: str = "notebook",
               source: str = "conjecture") -> str:
    """The claim file :func:`check` runs (TOML text)."""
    if not isinstance(over, (list, tuple)) or not over or \
            not all(isinstance(f, dict) for f in over):
        raise TypeError("over must be a non-empty list of family tables, e.g. "
                        "[{'family': 'all-complexes', 'max_vertices': 4}]")
    lines = ["[[claim]]", f"name = {_toml_value(name)}", f"title = {_toml_value(statement)}",
             f"statement = {_toml_value(statement)}"]
    if where is not None:
        lines.append(f"where = {_toml_value(where)}")
    lines += [f"expect = {_toml_value(expect)}", f"evidence = {_toml_value(evidence)}",
              f"source = {_toml_value(source)}"]
    for family in over:
        lines.append("[[claim.over]]")
        lines += [f"{_toml_key(k)} = {_toml_value(v)}" for k, v in family.items()]
    return "\n".join(lines) + "\n"


def check(statement: str, over: list[dict], where: str | None = None, expect: str = "holds",
          evidence: str = "exact", name: str = "notebook", source: str = "conjecture",
          store: str | Path | None = None, certificates: str | Path | None = None,
          max_cases: int | None = None, case_timeout: float = 60.0):
    """Test a statement of the claim language over families, in this process.

    Definition: the claim ``statement`` (with precondition ``where`` and expectation
    ``expect``, "holds" or "fails") is evaluated exactly on every case of the union of the
    families ``over`` (tables as in ``[[claim.over]]``), a failure is shrunk to a minimal
    counterexample, and the cases go to a store, as ``verifier run`` does.

    Parameters: statement, where -- claim-language text; over -- a list of dicts such as
    ``{"family": "all-complexes", "max_vertices": 4}``; name -- the claim's name
    (``[a-z0-9-]``); store -- SQLite store (default: a new one in a temporary folder);
    certificates -- a folder to write the certificate to (default: none written);
    max_cases, case_timeout -- as the options of ``verifier run``.

    Returns: the run's results (:class:`verifier.run.runner.RunResult`: ``.ok``,
    ``.claims[0].verdict``, ``.counts``, ``.counterexample``, ``.run_id``); in Jupyter it
    shows itself as a table with each counterexample drawn.  ``.certificates`` lists the
    certificate files written.  Mistakes in the claim raise
    :class:`verifier.claims.errors.ClaimError` naming line and column of the claim text
    (:func:`claim_text`).

    >>> result = check("sum(green(K)) == euler(K)",
    ...                over=[{"family": "all-complexes", "max_vertices": 3}])
    >>> result.ok, result.claims[0].verdict, result.claims[0].cases
    (True, 'holds', 8)
    """
    from .certificates import write_certificates
    from .run.runner import RunOptions, run

    if not isinstance(name, str) or not _NAME.fullmatch(name):
        raise ValueError(f"name must be made of a-z, 0-9 and '-', got {name!r}")
    text = claim_text(statement, over, where, expect, evidence, name, source)
    folder = Path(tempfile.mkdtemp(prefix="verifier-check-"))
    path = folder / f"{name}.toml"
    path.write_text(text, encoding="utf-8")
    options = RunOptions(store=str(store or folder / "verifier.sqlite"), engine="inline",
                         max_cases=max_cases, case_timeout=case_timeout,
                         command=f"verifier.check({statement!r}, over={over!r}"
                                 + (f", where={where!r}" if where is not None else "")
                                 + f", expect={expect!r})")
    result = run([str(path)], options)
    result.certificates = ([str(p) for p in write_certificates(result, certificates)]
                           if certificates is not None else [])
    return result
