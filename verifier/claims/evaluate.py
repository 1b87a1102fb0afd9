"""Evaluation of checked claim expressions, exactly and within limits.

:func:`evaluate` walks the node tree built by :func:`verifier.claims.expression.parse`.
Arithmetic is exact (``int``, ``Fraction``, exact matrices and polynomials).  Every
evaluation runs under :class:`Limits`: exponent sizes, result sizes, matrix powers and
orders, the number of steps, and a wall-clock deadline checked between steps; going
past one raises :class:`~verifier.claims.errors.LimitExceeded` naming the limit.  (A
single long library call cannot be interrupted from inside; the runner enforces the
per-case time limit on its worker processes as well.)

The functions called are looked up in a *table* (name -> implementation), by default
the main backend's (:data:`verifier.claims.functions.FUNCTIONS`); the certificate
checker passes the independent backend's table instead.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from fractions import Fraction

from .enclosure import Count, Enclosure, decide_equal, decide_sign
from .errors import ClaimError, EvaluationError, LimitExceeded, Undecided
from .expression import Node
from .values import Indexed, describe_value

__all__ = ["Limits", "Context", "evaluate", "Outcome", "evaluate_claim"]


@dataclass(frozen=True)
class Limits:
    """Size and time limits for one evaluation (one case)."""
    max_exponent: int = 10_000           # |e| in x ** e for numbers
    max_result_bits: int = 1_000_000     # bits of a number raised to a power
    max_matrix_power: int = 64           # |k| in M ** k
    max_matrix_order: int = 20_000       # order of a matrix a function may build
    max_steps: int = 5_000_000           # nodes evaluated, generator items included
    seconds: float | None = 60.0         # wall clock for one case


@dataclass
class Context:
    """State of one evaluation: limits, the function table, the evidence gathered."""
    limits: Limits = field(default_factory=Limits)
    table: dict | None = None
    steps: int = 0
    deadline: float | None = None
    evidence: str = "exact"
    error_bound: Fraction | None = None
    certified: list = field(default_factory=list)   # certified values met, for certificates

    def __post_init__(self):
        if self.table is None:
            from .backend import IMPLEMENTATIONS
            self.table = IMPLEMENTATIONS
        if self.limits.seconds is not None and self.deadline is None:
            self.deadline = time.monotonic() + self.limits.seconds

    def tick(self, node: Node):
        self.steps += 1
        if self.steps > self.limits.max_steps:
            raise LimitExceeded(f"more than {self.limits.max_steps} evaluation steps",
                                "max_steps", node.place())
        if self.deadline is not None and self.steps % 64 == 0 and time.monotonic() > self.deadline:
            raise LimitExceeded(f"evaluation took longer than {self.limits.seconds} s",
                                "seconds", node.place())

    def note_evidence(self, evidence: str, error_bound=None):
        """Record that a sub-result has only ``evidence`` (weakest level wins)."""
        order = ["exact", "certified", "probabilistic", "float"]
        if order.index(evidence) > order.index(self.evidence):
            self.evidence = evidence
        if error_bound is not None:
            self.error_bound = (self.error_bound or 0) + Fraction(error_bound)

    MAX_RECORDED = 64

    def note_certified(self, node: Node, value):
        """Keep the text (with its precision) of a certified value, for the certificate."""
        if len(self.certified) < self.MAX_RECORDED:
            text = value.text() if isinstance(value, Count) else describe_value(value)
            self.certified.append({"at": f"{node.line}:{node.column}",
                                   "function": node.function.name, "value": text})


# ---------------------------------------------------------------- arithmetic
def _is_number(x) -> bool:
    return isinstance(x, (int, Fraction)) and not isinstance(x, bool)


def _normal(x):
    if isinstance(x, Fraction) and x.denominator == 1:
        return int(x.numerator)
    return x


def _unwrap_poly(x):
    """A lazily computed characteristic polynomial (any backend) as a polynomial."""
    return x.poly if hasattr(x, "poly") and hasattr(x, "matrix") else x


def _power(base, exponent, ctx: Context, node: Node):
    limits = ctx.limits
    if not isinstance(exponent, int) or isinstance(exponent, bool):
        raise EvaluationError(f"exponent must be an integer, got {describe_value(exponent)}",
                              node.place())
    if isinstance(base, Enclosure):
        if abs(exponent) > limits.max_matrix_power:
            raise LimitExceeded(f"power {exponent} of a certified number exceeds the limit "
                                f"{limits.max_matrix_power}", "max_matrix_power", node.place())
        return base ** exponent
    if isinstance(base, Indexed):
        if abs(exponent) > limits.max_matrix_power:
            raise LimitExceeded(f"matrix power {exponent} exceeds the limit "
                                f"{limits.max_matrix_power}", "max_matrix_power", node.place())
        try:
            return Indexed(base.matrix ** exponent, base.rows, base.cols)
        except ArithmeticError as error:
            raise EvaluationError(f"matrix power {exponent}: {error}", node.place()) from None
    if _is_number(base):
        if base in (0, 1, -1):
            if base == 0 and exponent < 0:
                raise EvaluationError("0 raised to a negative power", node.place())
            return _normal(Fraction(base) ** exponent)
        if abs(exponent) > limits.max_exponent:
            raise LimitExceeded(f"exponent {exponent} exceeds the limit {limits.max_exponent}",
                                "max_exponent", node.place())
        b = Fraction(base)
        bits = max(abs(b.numerator).bit_length(), b.denominator.bit_length())
        if bits * abs(exponent) > limits.max_result_bits:
            raise LimitExceeded(f"result of the power would exceed {limits.max_result_bits} bits",
                                "max_result_bits", node.place())
        return _normal(b ** exponent)
    poly = _unwrap_poly(base)
    if hasattr(poly, "coeffs"):
        if not 0 <= exponent <= 64:
            raise LimitExceeded("polynomial powers are limited to exponents 0..64",
                                "max_exponent", node.place())
        return poly ** exponent
    raise EvaluationError(f"cannot raise {describe_value(base)} to a power", node.place())


def _binop(op, a, b, ctx, node):
    if op == "**":
        return _power(a, b, ctx, node)
    if op in ("&", "|"):
        if isinstance(a, frozenset) and isinstance(b, frozenset):
            return a & b if op == "&" else a | b
        raise EvaluationError(f"'{op}' combines two sets of simplices", node.place())
    if isinstance(a, Enclosure) or isinstance(b, Enclosure):
        if op in ("+", "-", "*", "/") and all(_is_number(x) or isinstance(x, Enclosure)
                                              for x in (a, b)):
            return {"+": lambda: a + b, "-": lambda: a - b, "*": lambda: a * b,
                    "/": lambda: a / b}[op]()
        raise EvaluationError(f"operator '{op}' does not apply to {_kind(a)} and {_kind(b)}",
                              node.place())
    if op in ("%", "//"):
        if not all(isinstance(x, int) and not isinstance(x, bool) for x in (a, b)):
            raise EvaluationError(f"'{op}' needs integers", node.place())
        if b == 0:
            raise EvaluationError("division by zero", node.place())
        return a % b if op == "%" else a // b
    if _is_number(a) and _is_number(b):
        if op == "+":
            return a + b
        if op == "-":
            return a - b
        if op == "*":
            return a * b
        if op == "/":
            if b == 0:
                raise EvaluationError("division by zero", node.place())
            return _normal(Fraction(a) / b)
        raise EvaluationError(f"operator '{op}' needs matrices", node.place())
    if isinstance(a, Indexed) and isinstance(b, Indexed):
        rows, cols = a.same_keys(b)
        try:
            if op == "+":
                return Indexed(a.matrix + b.matrix, rows, cols)
            if op == "-":
                return Indexed(a.matrix - b.matrix, rows, cols)
            if op in ("*", "@"):
                return Indexed(a.matrix @ b.matrix, a.rows, b.cols)
        except ArithmeticError as error:
            raise EvaluationError(f"matrix {op}: {error}", node.place()) from None
    if isinstance(a, Indexed) and _is_number(b) and op in ("*", "/"):
        if op == "/" and b == 0:
            raise EvaluationError("division by zero", node.place())
        return Indexed(a.matrix.scale(Fraction(b) if op == "*" else 1 / Fraction(b)), a.rows, a.cols)
    if _is_number(a) and isinstance(b, Indexed) and op == "*":
        return Indexed(b.matrix.scale(a), b.rows, b.cols)
    pa, pb = _unwrap_poly(a), _unwrap_poly(b)
    if hasattr(pa, "coeffs") or hasattr(pb, "coeffs"):
        if op == "+":
            return pa + pb
        if op == "-":
            return pa - pb
        if op == "*":
            return pa * pb
        if op == "/" and _is_number(pb):
            return pa * Fraction(1, 1) * (Fraction(1) / pb)
    raise EvaluationError(f"operator '{op}' does not apply to {_kind(a)} and {_kind(b)}",
                          node.place())


def _kind(x) -> str:
    from .values import type_of
    return type_of(x)


def _equal(a, b) -> bool:
    if isinstance(a, Enclosure) or isinstance(b, Enclosure):
        if all(_is_number(x) or isinstance(x, Enclosure) for x in (a, b)):
            return decide_equal(a, b)
        return False
    if isinstance(a, Indexed) and isinstance(b, Indexed):
        return a.matrix == b.matrix
    pa, pb = _unwrap_poly(a), _unwrap_poly(b)
    if hasattr(pa, "coeffs") or hasattr(pb, "coeffs"):
        return pa == pb
    if isinstance(a, tuple) and isinstance(b, tuple):
        return len(a) == len(b) and _all_of(lambda pair: _equal(*pair), zip(a, b))
    return a == b


def _all_of(test, items) -> bool:
    """Kleene conjunction: False if some item is certainly false, else True if every item
    is certainly true, else the first :class:`Undecided` is raised."""
    pending = None
    for item in items:
        try:
            if not test(item):
                return False
        except Undecided as error:
            pending = pending or error
    if pending is not None:
        raise pending
    return True


def _any_of(test, items) -> bool:
    """Kleene disjunction (see :func:`_all_of`)."""
    return not _all_of(lambda item: not test(item), items)


def _compare(op, a, b, node):
    if op == "==":
        return _equal(a, b)
    if op == "!=":
        return not _equal(a, b)
    if op in ("in", "not in"):
        from ..complex import Complex
        key = tuple(a) if isinstance(a, (tuple, list)) else a
        if isinstance(b, Complex):
            try:
                b.simplex_of(key)
                found = True
            except (KeyError, TypeError):
                found = False
        elif isinstance(b, frozenset):
            found = key in b
        else:
            found = any(_equal(key, x) for x in b)
        return found if op == "in" else not found
    if isinstance(a, Enclosure) or isinstance(b, Enclosure):
        if all(_is_number(x) or isinstance(x, Enclosure) for x in (a, b)):
            sign = decide_sign(a - b)
            return {"<": sign < 0, "<=": sign <= 0, ">": sign > 0, ">=": sign >= 0}[op]
    if not (_is_number(a) and _is_number(b)):
        raise EvaluationError(f"'{op}' compares numbers, got {_kind(a)} and {_kind(b)}",
                              node.place())
    return {"<": a < b, "<=": a <= b, ">": a > b, ">=": a >= b}[op]


def _iterate(value, node):
    from ..complex import Complex
    if isinstance(value, Complex):
        return [value.label_of(s) for s in value.simplices]
    if isinstance(value, frozenset):
        return sorted(value, key=lambda s: (len(s), repr(s)))
    if isinstance(value, (tuple, list)):
        return value
    raise EvaluationError(f"cannot iterate over {_kind(value)}", node.place())


# ------------------------------------------------------------------- evaluate
def evaluate(node: Node, env: dict, ctx: Context):
    """The exact value of a checked node in the environment ``env`` (name -> value)."""
    ctx.tick(node)
    kind = node.kind
    if kind == "const":
        return node.value
    if kind == "var":
        return env[node.value]
    if kind == "call":
        args = [evaluate(a, env, ctx) for a in node.args]
        implementation = ctx.table[node.function.name]
        _guard_size(node, args, ctx)
        try:
            if node.function.name == "is_reciprocal":
                return implementation(*args, ctx=ctx)
            result = implementation(*args)
            if node.function.evidence != "exact" and (
                    node.function.returns != "number|ball" or isinstance(result, Enclosure)):
                ctx.note_evidence(node.function.evidence)
                if node.function.evidence == "certified":
                    ctx.note_certified(node, result)
            return result
        except ClaimError as error:
            raise error.at(node.place()) if error.place is None else error
        except (ArithmeticError, ValueError, KeyError, TypeError) as error:
            text = _message(error)
            if not text.startswith(f"{node.function.name}:"):
                text = f"{node.function.name}: {text}"
            raise EvaluationError(text, node.place()) from None
    if kind == "binop":
        a = evaluate(node.args[0], env, ctx)
        b = evaluate(node.args[1], env, ctx)
        return _binop(node.value, a, b, ctx, node)
    if kind == "unary":
        value = evaluate(node.args[0], env, ctx)
        if node.value == "not":
            return not value
        if node.value == "+":
            return value
        if isinstance(value, Indexed):
            return Indexed(-value.matrix, value.rows, value.cols)
        if isinstance(value, Enclosure):
            return -value
        return -_unwrap_poly(value) if not _is_number(value) else -value
    if kind == "boolop":
        test = lambda a: evaluate(a, env, ctx)  # noqa: E731
        return (_all_of if node.value == "and" else _any_of)(test, node.args)
    if kind == "compare":
        values = [evaluate(node.args[0], env, ctx)]
        links = []
        for op, right_node in zip(node.value, node.args[1:]):
            values.append(evaluate(right_node, env, ctx))
            links.append((op, values[-2], values[-1]))
        return _all_of(lambda link: _compare(link[0], link[1], link[2], node), links)
    if kind == "ifelse":
        return evaluate(node.args[1] if evaluate(node.args[0], env, ctx) else node.args[2],
                        env, ctx)
    if kind == "index":
        target = evaluate(node.args[0], env, ctx)
        keys = [evaluate(k, env, ctx) for k in node.args[1:]]
        try:
            if isinstance(target, Indexed):
                return target.matrix[target.position(keys[0], 0), target.position(keys[1], 1)]
            if isinstance(target, tuple):
                i = keys[0]
                if not isinstance(i, int) or isinstance(i, bool) or not -len(target) <= i < len(target):
                    raise KeyError(f"index {describe_value(i)} outside 0..{len(target) - 1}")
                return target[i]
        except KeyError as error:
            raise EvaluationError(_message(error), node.place()) from None
        raise EvaluationError(f"cannot index {_kind(target)}", node.place())
    if kind == "list":
        return tuple(evaluate(a, env, ctx) for a in node.args)
    if kind == "quant":
        return _quantifier(node, env, ctx)
    raise AssertionError(f"unknown node kind {kind}")  # our bug, not the user's


def _message(error: Exception) -> str:
    text = str(error.args[0]) if error.args else type(error).__name__
    return text


def _guard_size(node: Node, args, ctx: Context):
    from ..complex import Complex
    for a in args:
        if isinstance(a, Complex) and len(a.simplices) > ctx.limits.max_matrix_order \
                and node.function.returns == "matrix":
            raise LimitExceeded(f"{node.function.name}: {len(a.simplices)} simplices exceed the "
                                f"matrix order limit {ctx.limits.max_matrix_order}",
                                "max_matrix_order", node.place())


def _bindings(loops, env, ctx, index=0):
    """All environments produced by the generator clauses, lazily."""
    if index == len(loops):
        yield env
        return
    variable, iterable, conditions = loops[index]
    for item in _iterate(evaluate(iterable, env, ctx), iterable):
        inner = dict(env)
        inner[variable] = item
        if all(evaluate(c, inner, ctx) for c in conditions):
            yield from _bindings(loops, inner, ctx, index + 1)


def _quantifier(node: Node, env: dict, ctx: Context):
    name = node.value
    if not node.loops:  # sum of a list or of a matrix
        value = evaluate(node.args[0], env, ctx)
        if isinstance(value, Indexed):
            return value.matrix.total()
        total = 0
        for item in _iterate(value, node):
            if not _is_number(item):
                raise EvaluationError(f"sum of a list with {_kind(item)} items", node.place())
            total += item
        return _normal(total)
    element = node.args[0]
    if name in ("all", "any"):
        wanted = name == "any"           # the value that decides the quantifier
        pending = None
        for inner in _bindings(node.loops, env, ctx):
            try:
                value = bool(evaluate(element, inner, ctx))
            except Undecided as error:   # Kleene logic: a later item may still decide
                pending = pending or error
                continue
            if value == wanted:
                ctx_witness(ctx, inner, env)
                return wanted
        if pending is not None:
            raise pending
        return not wanted
    if name == "sum":
        total = 0
        for inner in _bindings(node.loops, env, ctx):
            total += evaluate(element, inner, ctx)
        return _normal(total)
    count = 0
    for inner in _bindings(node.loops, env, ctx):
        value = evaluate(element, inner, ctx)
        count += 1 if (value is True or (value is not False and value is not None)) else 0
    return count


def _first_difference(a: Indexed, b: Indexed) -> dict | None:
    """The first entry (in row order) where two matrices differ, named by simplices."""
    if a.matrix.shape != b.matrix.shape:
        return {"shapes": f"{a.matrix.shape} and {b.matrix.shape}"}
    for i, (row_a, row_b) in enumerate(zip(a.matrix.rows(), b.matrix.rows())):
        for j, (x, y) in enumerate(zip(row_a, row_b)):
            if x != y:
                name_i = list(a.rows[i]) if a.rows else i
                name_j = list(a.cols[j]) if a.cols else j
                return {"entry": (name_i, name_j), "left": x, "right": y}
    return None


def ctx_witness(ctx: Context, inner: dict, outer: dict):
    """Remember the first binding that decided an all/any (for counterexample reports)."""
    if not hasattr(ctx, "witness") or ctx.witness is None:
        ctx.witness = {k: v for k, v in inner.items() if k not in outer}


# --------------------------------------------------------------------- claims
@dataclass
class Outcome:
    """The result of evaluating a claim's statement on one case."""
    holds: bool
    sides: list[str]                  # exact texts of the two sides of a top comparison,
                                      # or of the statement's value when it is no comparison
    witness: dict | None              # the binding that decided a quantifier, as texts
    evidence: str
    error_bound: Fraction | None
    certified: list = field(default_factory=list)   # certified values with their precision


def evaluate_claim(statement: Node, env: dict, ctx: Context | None = None) -> Outcome:
    """Evaluate a boolean statement, keeping the values of its two sides when it is a
    comparison, and the deciding binding of a top-level quantifier."""
    ctx = ctx or Context()
    ctx.witness = None
    sides: list[str] = []
    if statement.kind == "compare" and len(statement.args) == 2:
        left = evaluate(statement.args[0], env, ctx)
        right = evaluate(statement.args[1], env, ctx)
        sides = [describe_value(left), describe_value(right)]
        try:
            holds = _compare(statement.value[0], left, right, statement)
        except Undecided as error:      # keep what was computed: the report shows it
            error.sides, error.certified = sides, ctx.certified
            raise error.at(statement.place()) if error.place is None else error
        if not holds and isinstance(left, Indexed) and isinstance(right, Indexed):
            ctx.witness = _first_difference(left, right)
    else:
        value = evaluate(statement, env, ctx)
        holds = bool(value)
        sides = [describe_value(value)]
    witness = None
    if ctx.witness:
        witness = {k: str(list(v)) if isinstance(v, tuple) else describe_value(v)
                   for k, v in ctx.witness.items()}
    return Outcome(bool(holds), sides, witness, ctx.evidence, ctx.error_bound, ctx.certified)
