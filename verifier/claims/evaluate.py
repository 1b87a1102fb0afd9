"""Evaluation of checked claim expressions, exactly and within limits.

:func:`evaluate` walks the node tree built by :func:`verifier.claims.expression.parse`.
Arithmetic is exact (``int``, ``Fraction``, exact matrices and polynomials).  Every
evaluation runs under :class:`Limits`: exponent sizes, result sizes, matrix powers and
orders, the number of steps, and a wall-clock deadline checked between steps; going
past one raises :class:`~verifier.claims.errors.LimitExceeded` naming the limit.  Sizes
are predicted before anything is built (complexes from operations, matrix orders,
polynomial degrees, bits of numbers), and in the main thread of a process an interval
timer stops a long library call at the deadline (:func:`time_limit`); a call inside
compiled code is stopped when it returns, and the runner's watchdog stops the worker
process if it never does.  Any other failure of a computation becomes an
:class:`~verifier.claims.errors.EvaluationError` naming the place (:func:`translate`):
no exception of Python's own leaves :func:`evaluate` or :func:`evaluate_claim`.

The functions called are looked up in a *table* (name -> implementation), by default
the main backend's (:data:`verifier.claims.functions.FUNCTIONS`); the certificate
checker passes the independent backend's table instead.
"""

from __future__ import annotations

import signal
import threading
import time
from contextlib import contextmanager
from dataclasses import dataclass, field
from fractions import Fraction

from .enclosure import Count, Enclosure, decide_equal, decide_sign
from .errors import ClaimError, EvaluationError, LimitExceeded, Undecided
from .expression import Node
from .values import Indexed, describe_value

__all__ = ["Limits", "Context", "evaluate", "Outcome", "evaluate_claim", "time_limit",
           "translate"]


@dataclass(frozen=True)
class Limits:
    """Size and time limits for one evaluation (one case)."""
    max_exponent: int = 10_000           # |e| in x ** e for numbers
    max_result_bits: int = 1_000_000     # bits of a number raised to a power
    max_matrix_power: int = 64           # |k| in M ** k
    max_matrix_order: int = 20_000       # order of a matrix a function may build
    max_steps: int = 5_000_000           # nodes evaluated, generator items included
    seconds: float | None = 60.0         # wall clock for one case
    max_poly_degree: int = 20_000        # degree of a polynomial built by * and **
    max_simplices: int = 2_000_000       # simplices of a complex an operation may build
    memory: int | None = None            # megabytes one case may add (the cap in force,
                                         # set by the engine; named in 'memory' reasons)


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
            if _order(base) >= STOPPABLE_ORDER:
                return Indexed(stoppable(pow, (base.matrix, exponent), ctx), base.rows,
                               base.cols)
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
        degree, bits = _poly_size(poly)
        _check_poly(degree * exponent, bits * exponent, ctx, node, "polynomial power")
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
        _check_bits(a, b, op, ctx, node)
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
                if max(_order(a), _order(b)) >= STOPPABLE_ORDER:
                    import operator
                    return Indexed(stoppable(operator.matmul, (a.matrix, b.matrix), ctx),
                                   a.rows, b.cols)
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
            if hasattr(pa, "coeffs") and hasattr(pb, "coeffs"):
                (da, ba), (db, bb) = _poly_size(pa), _poly_size(pb)
                _check_poly(da + db, ba + bb, ctx, node, "polynomial product")
            return pa * pb
        if op == "/" and _is_number(pb):
            if pb == 0:
                raise EvaluationError("division by zero", node.place())
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
class _TimeUp(BaseException):
    """Raised by the interval timer; a BaseException, so that no ``except Exception`` in
    library code swallows it.  Turned into LimitExceeded where the timer was set."""


_TIMER = {"depth": 0}
RING_AGAIN = 0.5      # seconds between rings once the deadline has passed


@contextmanager
def time_limit(deadline: float | None, seconds: float | None):
    """Stop what runs inside at the monotonic ``deadline`` with LimitExceeded("seconds").

    Uses an interval timer (SIGALRM) in the main thread of the process, restoring any
    timer and handler that were there; elsewhere (worker threads) only the evaluator's
    own checks between steps apply.  Nested uses keep the outer timer (one timer can
    serve several steps, e.g. building a case and judging it), and each use turns a
    ring inside it into LimitExceeded itself.
    """
    usable = (deadline is not None and hasattr(signal, "setitimer")
              and threading.current_thread() is threading.main_thread())
    if not usable or _TIMER["depth"]:
        if usable:
            _TIMER["depth"] += 1
        try:
            yield
        except _TimeUp:      # the outer timer rang: stopped here, in this use's words
            if not usable:
                raise
            raise LimitExceeded(f"evaluation took longer than {seconds} s", "seconds") from None
        finally:
            if usable:
                _TIMER["depth"] -= 1
        return
    remaining = deadline - time.monotonic()
    if remaining <= 0:
        raise LimitExceeded(f"evaluation took longer than {seconds} s", "seconds")

    armed = [True]

    def ring(signum, frame):
        if armed[0]:
            raise _TimeUp()

    started = time.monotonic()
    previous_handler = signal.signal(signal.SIGALRM, ring)
    # rings again every half second: an exception raised where Python ignores it (a
    # garbage-collector callback, a destructor) must not cancel the limit
    previous_timer = signal.setitimer(signal.ITIMER_REAL, remaining, RING_AGAIN)
    _TIMER["depth"] = 1
    try:
        yield
    except _TimeUp:
        armed[0] = False
        raise LimitExceeded(f"evaluation took longer than {seconds} s", "seconds") from None
    finally:
        armed[0] = False
        _TIMER["depth"] = 0
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous_handler)
        if previous_timer[0] > 0:    # someone else's timer: give it back what is left
            left = previous_timer[0] - (time.monotonic() - started)
            signal.setitimer(signal.ITIMER_REAL, max(left, 0.001), previous_timer[1])


STOPPABLE_ORDER = 400   # matrices of this order or more are worked on in a child process


def _order(value) -> int:
    """The order of the matrix (or of the complex's matrices) a call would work on."""
    from ..complex import Complex
    if isinstance(value, Indexed):
        return max(value.matrix.shape)
    if hasattr(value, "matrix") and hasattr(value.matrix, "shape"):   # a lazy charpoly
        return max(value.matrix.shape)
    if isinstance(value, Complex):
        return len(value.simplices)
    return 0


def stoppable(function, args: tuple, ctx: Context):
    """``function(*args)``, in a forked child process when the evaluation is under the
    interval timer, so that a long call inside compiled code (exact linear algebra of a
    large matrix) is stopped at the deadline like anything else: the timer interrupts
    the wait, and the child is killed.  Elsewhere, a plain call."""
    import os
    import pickle
    if not _TIMER["depth"] or not hasattr(os, "fork"):
        return function(*args)
    read_end, write_end = os.pipe()
    try:
        pid = os.fork()
    except (OSError, MemoryError):       # no memory left under the cap to start it
        os.close(read_end)
        os.close(write_end)
        raise MemoryError() from None
    if pid == 0:                                            # the child
        code = 0
        try:
            signal.signal(signal.SIGALRM, signal.SIG_IGN)
            os.close(read_end)
            try:
                payload = pickle.dumps(("ok", function(*args)))
            except BaseException as error:   # noqa: BLE001 - handed to the parent
                try:
                    payload = pickle.dumps(("raised", error))
                except Exception:            # noqa: BLE001 - an error that does not pickle
                    payload = pickle.dumps(("raised", EvaluationError(_message(error))))
            with os.fdopen(write_end, "wb") as out:
                out.write(payload)
        except BaseException:                # noqa: BLE001 - nothing may escape a child
            code = 1
        finally:
            os._exit(code)
    os.close(write_end)
    try:
        with os.fdopen(read_end, "rb") as source:
            data = source.read()
    finally:
        try:
            os.kill(pid, signal.SIGKILL)
        except ProcessLookupError:
            pass
        os.waitpid(pid, 0)
    if not data:
        raise LimitExceeded("the computation ran out of memory"
                            + (f" ({ctx.limits.memory} MB one case may use)"
                               if ctx.limits.memory else ""), "memory")
    status, value = pickle.loads(data)
    if status == "raised":
        raise value
    return value


def _what(node: Node) -> str:
    if node.kind == "call":
        return node.function.name
    if node.kind in ("binop", "unary"):
        return f"operator '{node.value}'"
    if node.kind == "index":
        return "indexing"
    if node.kind == "quant":
        return node.value
    if node.kind == "compare":
        return "comparison"
    return "the expression"


def translate(error: BaseException, node: Node) -> EvaluationError:
    """A failure of Python or a library while evaluating ``node``, in our own words."""
    what = _what(node)
    text = _message(error) if isinstance(error, Exception) else type(error).__name__
    if isinstance(error, ZeroDivisionError):
        return EvaluationError(f"{what}: division by zero", node.place())
    if isinstance(error, ValueError) and "digits" in text and "limit" in text:
        return LimitExceeded(f"{what}: a number has too many digits to be written out",
                             "max_result_bits", node.place())
    if isinstance(error, OverflowError):
        return LimitExceeded(f"{what}: a number is too large for this computation",
                             "max_result_bits", node.place())
    if isinstance(error, IndexError):
        return EvaluationError(f"{what}: an index is out of range", node.place())
    if not text.startswith(f"{what}:"):
        text = f"{what}: {text}"
    if not isinstance(error, (ArithmeticError, ValueError, KeyError, TypeError)):
        text += f" ({type(error).__name__})"
    return EvaluationError(text, node.place())


def evaluate(node: Node, env: dict, ctx: Context):
    """The exact value of a checked node in the environment ``env`` (name -> value).

    Raises only the claim language's errors (:class:`~verifier.claims.errors.ClaimError`
    and its subclasses); the time limit holds also inside long library calls.
    """
    with time_limit(ctx.deadline, ctx.limits.seconds):
        try:
            return _eval(node, env, ctx)
        except RecursionError:
            raise LimitExceeded("recursion too deep", "max_depth", node.place()) from None
        except MemoryError:
            raise LimitExceeded(_memory_text(ctx.limits), "memory", node.place()) from None


def _memory_text(limits: Limits) -> str:
    if limits.memory:
        return (f"the case needed more than the {limits.memory} MB one case may use "
                "(--case-memory)")
    return "the case needed more memory than this process may use"


def _eval(node: Node, env: dict, ctx: Context):
    try:
        return _dispatch(node, env, ctx)
    except (ClaimError, RecursionError, MemoryError):
        raise
    except Exception as error:   # noqa: BLE001 - a library's failure, in our own words
        raise translate(error, node) from None


def _dispatch(node: Node, env: dict, ctx: Context):
    ctx.tick(node)
    kind = node.kind
    if kind == "const":
        return node.value
    if kind == "var":
        return env[node.value]
    if kind == "call":
        args = [_eval(a, env, ctx) for a in node.args]
        implementation = ctx.table[node.function.name]
        _guard_size(node, args, ctx)
        try:
            # exact linear algebra of a large matrix runs in a child the deadline can stop;
            # certified and float values (enclosures that can recompute themselves) stay here
            heavy = not node.function.combinatorial and node.function.evidence == "exact" \
                and max(map(_order, args), default=0) >= STOPPABLE_ORDER
            if node.function.name == "is_reciprocal":
                if not heavy:
                    return implementation(*args, ctx=ctx)
                value, evidence, bound = stoppable(_reciprocal_with_evidence,
                                                   (implementation, args, ctx), ctx)
                ctx.note_evidence(evidence, bound)
                return value
            result = stoppable(implementation, args, ctx) if heavy else implementation(*args)
            if node.function.evidence != "exact" and (
                    node.function.returns != "number|ball" or isinstance(result, Enclosure)):
                ctx.note_evidence(node.function.evidence)
                if node.function.evidence == "certified":
                    ctx.note_certified(node, result)
            return result
        except ClaimError as error:
            raise error.at(node.place()) if error.place is None else error
        except (ArithmeticError, ValueError, KeyError, TypeError) as error:
            raise translate(error, node) from None
    if kind == "binop":
        a = _eval(node.args[0], env, ctx)
        b = _eval(node.args[1], env, ctx)
        return _binop(node.value, a, b, ctx, node)
    if kind == "unary":
        value = _eval(node.args[0], env, ctx)
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
        test = lambda a: _eval(a, env, ctx)  # noqa: E731
        return (_all_of if node.value == "and" else _any_of)(test, node.args)
    if kind == "compare":
        values = [_eval(node.args[0], env, ctx)]
        links = []
        for op, right_node in zip(node.value, node.args[1:]):
            values.append(_eval(right_node, env, ctx))
            links.append((op, values[-2], values[-1]))
        return _all_of(lambda link: _compare(link[0], link[1], link[2], node), links)
    if kind == "ifelse":
        return _eval(node.args[1] if _eval(node.args[0], env, ctx) else node.args[2],
                        env, ctx)
    if kind == "index":
        target = _eval(node.args[0], env, ctx)
        keys = [_eval(k, env, ctx) for k in node.args[1:]]
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
        return tuple(_eval(a, env, ctx) for a in node.args)
    if kind == "quant":
        return _quantifier(node, env, ctx)
    raise AssertionError(f"unknown node kind {kind}")  # our bug, not the user's


def _reciprocal_with_evidence(implementation, args, ctx):
    """is_reciprocal in a child process: its value and the evidence it noted."""
    value = implementation(*args, ctx=ctx)
    return value, ctx.evidence, ctx.error_bound


def _message(error: Exception) -> str:
    text = str(error.args[0]) if error.args else type(error).__name__
    return text


def _predicted_simplices(name: str, args) -> int | None:
    """Simplices of the complex an operation would build, predicted before building it
    (:mod:`verifier.sizes`), or None when the call builds no larger complex."""
    from ..complex import Complex
    from .. import sizes
    complexes = [a for a in args if isinstance(a, Complex)]
    if name == "refine" and complexes:
        times = args[1] if len(args) > 1 else 1
        if isinstance(times, int) and not isinstance(times, bool) and 0 <= times <= 4:
            return sum(sizes.refined_f_vector(tuple(complexes[0].f_vector), times))
        return None
    if len(complexes) == 2 and name in ("join", "product", "union"):
        A, B = complexes
        if name == "join":
            return sizes.join_size(len(A.simplices), len(B.simplices))
        if name == "product":
            return sizes.product_size(tuple(A.f_vector), tuple(B.f_vector))
        return len(A.simplices) + len(B.simplices)
    if name == "cone" and complexes:
        return 2 * len(complexes[0].simplices) + 1
    if name == "suspension" and complexes:
        return 3 * len(complexes[0].simplices) + 2
    return None


_BUILDERS = frozenset({"refine", "join", "product", "union", "cone", "suspension"})
# the calls whose result size _predicted_simplices predicts (None for every other name)


def _guard_size(node: Node, args, ctx: Context):
    """Refuse, before it starts, a call whose result would pass a size limit."""
    from ..complex import Complex
    limits, name = ctx.limits, node.function.name
    for a in args:
        if isinstance(a, Complex) and len(a.simplices) > limits.max_matrix_order \
                and node.function.returns == "matrix":
            raise LimitExceeded(f"{name}: {len(a.simplices)} simplices exceed the "
                                f"matrix order limit {limits.max_matrix_order}",
                                "max_matrix_order", node.place())
    predicted = _predicted_simplices(name, args) if name in _BUILDERS else None
    if predicted is not None and predicted > limits.max_simplices:
        raise LimitExceeded(f"{name}: the result would have {predicted:,} simplices, more than "
                            f"the limit of {limits.max_simplices:,}", "max_simplices",
                            node.place())
    if name == "identity" and _is_number(args[0]) and args[0] > limits.max_matrix_order:
        raise LimitExceeded(f"identity: order {args[0]} exceeds the matrix order limit "
                            f"{limits.max_matrix_order}", "max_matrix_order", node.place())
    if name == "zeta" and all(_is_number(a) for a in args[1:]):
        s, t = args[1], (args[2] if len(args) > 2 else 0)
        if t == 0 and isinstance(s, int) and abs(s) > limits.max_matrix_power:
            raise LimitExceeded(f"zeta: s = {s} is past the matrix power limit "
                                f"{limits.max_matrix_power} (zeta(A, s) = tr A^-s at an "
                                "integer s)", "max_matrix_power", node.place())
        if max(abs(s), abs(t)) > limits.max_exponent:
            raise LimitExceeded(f"zeta: |s| and |t| may be at most {limits.max_exponent}",
                                "max_exponent", node.place())


def _bits(x) -> int:
    if isinstance(x, Fraction):
        return x.numerator.bit_length() + x.denominator.bit_length()
    return abs(x).bit_length()


def _check_bits(a, b, op: str, ctx: Context, node: Node):
    """Refuse a product or quotient (or a sum of fractions) whose result would pass the
    bit limit, before computing it."""
    if op in ("*", "/") or isinstance(a, Fraction) or isinstance(b, Fraction):
        if _bits(a) + _bits(b) > ctx.limits.max_result_bits:
            raise LimitExceeded(f"operator '{op}': the result would exceed "
                                f"{ctx.limits.max_result_bits} bits", "max_result_bits",
                                node.place())


def _check_poly(degree: int, coefficient_bits: int, ctx: Context, node: Node, what: str):
    limits = ctx.limits
    if degree > limits.max_poly_degree:
        raise LimitExceeded(f"{what}: the result would have degree {degree}, more than the "
                            f"limit {limits.max_poly_degree}", "max_poly_degree", node.place())
    if (degree + 1) * coefficient_bits > 64 * limits.max_result_bits:
        raise LimitExceeded(f"{what}: the coefficients of the result would exceed "
                            f"{64 * limits.max_result_bits} bits", "max_result_bits",
                            node.place())


def _poly_size(poly) -> tuple[int, int]:
    """Degree and bits of the sum of the absolute values of the coefficients."""
    coeffs = list(poly.coeffs)
    return max(len(coeffs) - 1, 0), _bits(sum(abs(Fraction(c)) for c in coeffs)) + 1


def _bindings(loops, env, ctx, index=0):
    """All environments produced by the generator clauses, lazily."""
    if index == len(loops):
        yield env
        return
    variable, iterable, conditions = loops[index]
    for item in _iterate(_eval(iterable, env, ctx), iterable):
        inner = dict(env)
        inner[variable] = item
        if all(_eval(c, inner, ctx) for c in conditions):
            yield from _bindings(loops, inner, ctx, index + 1)


def _quantifier(node: Node, env: dict, ctx: Context):
    name = node.value
    if not node.loops:  # sum, prod, min or max of a list; sum of a matrix
        value = _eval(node.args[0], env, ctx)
        if isinstance(value, Indexed):
            return value.matrix.total()
        if name != "sum":
            return _fold(name, _iterate(value, node), node, ctx)
        total = 0
        for item in _iterate(value, node):
            if not _is_number(item):
                raise EvaluationError(f"sum of a list with {_kind(item)} items", node.place())
            total += item
        return _normal(total)
    element = node.args[0]
    if name in ("prod", "min", "max"):
        return _fold(name, (_eval(element, inner, ctx)
                            for inner in _bindings(node.loops, env, ctx)), node, ctx)
    if name in ("all", "any"):
        wanted = name == "any"           # the value that decides the quantifier
        pending = None
        for inner in _bindings(node.loops, env, ctx):
            try:
                value = bool(_eval(element, inner, ctx))
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
            total += _eval(element, inner, ctx)
        return _normal(total)
    count = 0
    for inner in _bindings(node.loops, env, ctx):
        value = _eval(element, inner, ctx)
        count += 1 if (value is True or (value is not False and value is not None)) else 0
    return count


def _fold(name: str, items, node: Node, ctx: Context):
    """The product, minimum or maximum of exact numbers (the empty product is 1; the
    minimum or maximum of no items is an error); products obey the bit limit."""
    result = None
    for item in items:
        if not _is_number(item):
            raise EvaluationError(f"{name} of {_kind(item)} items: give numbers", node.place())
        if result is None:
            result = item
        elif name == "prod":
            _check_bits(result, item, "*", ctx, node)
            result = result * item
        else:
            result = min(result, item) if name == "min" else max(result, item)
    if result is None:
        if name == "prod":
            return 1
        raise EvaluationError(f"{name} of no items", node.place())
    return _normal(result)


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
    with time_limit(ctx.deadline, ctx.limits.seconds):
        try:
            return _evaluate_claim(statement, env, ctx)
        except ClaimError:
            raise
        except RecursionError:
            raise LimitExceeded("recursion too deep", "max_depth", statement.place()) from None
        except MemoryError:
            raise LimitExceeded(_memory_text(ctx.limits), "memory", statement.place()) from None
        except Exception as error:   # noqa: BLE001 - e.g. writing out a value
            raise translate(error, statement) from None


def _evaluate_claim(statement: Node, env: dict, ctx: Context) -> Outcome:
    ctx.witness = None
    sides: list[str] = []
    if statement.kind == "compare" and len(statement.args) == 2:
        left = _eval(statement.args[0], env, ctx)
        right = _eval(statement.args[1], env, ctx)
        sides = [describe_value(left), describe_value(right)]
        try:
            holds = _compare(statement.value[0], left, right, statement)
        except Undecided as error:      # keep what was computed: the report shows it
            error.sides, error.certified = sides, ctx.certified
            raise error.at(statement.place()) if error.place is None else error
        if not holds and isinstance(left, Indexed) and isinstance(right, Indexed):
            ctx.witness = _first_difference(left, right)
    else:
        value = _eval(statement, env, ctx)
        holds = bool(value)
        sides = [describe_value(value)]
    witness = None
    if ctx.witness:
        witness = {k: str(list(v)) if isinstance(v, tuple) else describe_value(v)
                   for k, v in ctx.witness.items()}
    return Outcome(bool(holds), sides, witness, ctx.evidence, ctx.error_bound, ctx.certified)
