"""The claim expression language: parsing and static checking.

Syntax is a small subset of Python's expression syntax, parsed with :mod:`ast` and then
rebuilt as a tree of our own nodes after a whitelist check; nothing is ever handed to
``eval`` or ``exec``.  Allowed:

* integer and boolean literals (``1/3`` is an exact rational, never a float);
* names: the bound variables of the claim and the functions of the registry
  (:mod:`verifier.claims.functions`), plus the quantifiers ``all any sum count prod min
  max``;
* ``+ - * / ** @`` (``*`` and ``@`` multiply matrices), ``%`` and ``//`` on integers,
  ``&`` and ``|`` (intersection and union of sets of simplices), ``== != < <= > >=``, ``and or not``, ``in``, ``not in``,
  ``a if c else b``, indexing ``M[x, y]`` / ``v[i]``, lists and tuples;
* generators inside the quantifiers: ``all(P(x) for x in simplices(K) if Q(x))``, nested.

Not allowed (each refused with a message naming line and column): attribute access,
keywords, starred arguments, lambdas, comprehensions outside quantifiers, floats,
strings, names outside the registry and the bound variables, and anything else.

Static checking infers a type for every node (see :mod:`verifier.claims.values`) and
checks arity and argument types before anything runs.
"""

from __future__ import annotations

import ast
import difflib
import warnings
from dataclasses import dataclass, field

from .errors import ExpressionError, Place
from .functions import FUNCTIONS, QUANTIFIERS, REQUIRED, SAME, Function
from .values import EMPTY, compatible, element_type, list_type, tuple_items, unify

__all__ = ["Node", "parse", "parse_condition", "MAX_LENGTH", "MAX_DEPTH"]

MAX_LENGTH = 4000       # characters in one expression
MAX_DEPTH = 40          # nesting depth of the expression tree


@dataclass
class Node:
    """A checked expression node.  ``kind`` is one of: const, var, call, quant, binop,
    unary, compare, boolop, ifelse, index, list.  ``type`` is its static type."""
    kind: str
    line: int
    column: int
    type: str = "bool"
    value: object = None                 # const: the value; var: the name; op names
    args: list = field(default_factory=list)
    function: Function | None = None     # call
    loops: list = field(default_factory=list)   # quant: [(name, iterable, [conditions])]

    def place(self) -> Place:
        return Place(None, self.line, self.column)


_BINOPS = {ast.Add: "+", ast.Sub: "-", ast.Mult: "*", ast.Div: "/", ast.Pow: "**",
           ast.MatMult: "@", ast.Mod: "%", ast.FloorDiv: "//", ast.BitAnd: "&", ast.BitOr: "|"}
_UNARY = {ast.USub: "-", ast.UAdd: "+", ast.Not: "not"}
_COMPARE = {ast.Eq: "==", ast.NotEq: "!=", ast.Lt: "<", ast.LtE: "<=", ast.Gt: ">",
            ast.GtE: ">=", ast.In: "in", ast.NotIn: "not in"}


def _suggest(name: str, candidates) -> str:
    close = difflib.get_close_matches(name, list(candidates), n=1, cutoff=0.6)
    return f"; did you mean '{close[0]}'?" if close else ""


class _Builder:
    def __init__(self, variables: dict[str, str]):
        self.scopes = [dict(variables)]

    # ------------------------------------------------------------ helpers
    def fail(self, message: str, node) -> ExpressionError:
        return ExpressionError(message, Place(None, getattr(node, "lineno", 1),
                                              getattr(node, "col_offset", 0) + 1))

    def lookup(self, name: str):
        for scope in reversed(self.scopes):
            if name in scope:
                return scope[name]
        return None

    def known_names(self):
        names = set(FUNCTIONS) | set(QUANTIFIERS)
        for scope in self.scopes:
            names |= set(scope)
        return names

    def new(self, kind, source, **fields) -> Node:
        return Node(kind, getattr(source, "lineno", 1), getattr(source, "col_offset", 0) + 1,
                    **fields)

    # ------------------------------------------------------------- build
    def build(self, node, depth: int = 0) -> Node:
        if depth > MAX_DEPTH:
            raise self.fail(f"expression nested more than {MAX_DEPTH} levels deep", node)
        method = getattr(self, "build_" + type(node).__name__, None)
        if method is None:
            raise self.fail(_refusal(node), node)
        return method(node, depth + 1)

    def build_Constant(self, node, depth):
        value = node.value
        if isinstance(value, bool):
            return self.new("const", node, type="bool", value=value)
        if isinstance(value, int):
            return self.new("const", node, type="number", value=value)
        if isinstance(value, float):
            raise self.fail(f"{value!r} is a floating-point number; write exact rationals "
                            "such as 3/2", node)
        raise self.fail(f"literal {value!r} is not allowed; only integers and True/False", node)

    def build_Name(self, node, depth):
        name = node.id
        if name in ("True", "False"):
            return self.new("const", node, type="bool", value=name == "True")
        kind = self.lookup(name)
        if kind is not None:
            return self.new("var", node, type=kind, value=name)
        if name in FUNCTIONS or name in QUANTIFIERS:
            raise self.fail(f"'{name}' is a function; call it with arguments", node)
        raise self.fail(f"unknown name '{name}'{_suggest(name, self.known_names())}", node)

    def build_BinOp(self, node, depth):
        op = _BINOPS.get(type(node.op))
        if op is None:
            raise self.fail(f"operator {type(node.op).__name__} is not allowed", node)
        left, right = self.build(node.left, depth), self.build(node.right, depth)
        return self.new("binop", node, type=_binop_type(op, left, right, self, node), value=op,
                        args=[left, right])

    def build_UnaryOp(self, node, depth):
        op = _UNARY[type(node.op)] if type(node.op) in _UNARY else None
        if op is None:
            raise self.fail("operator ~ is not allowed", node)
        operand = self.build(node.operand, depth)
        if op == "not":
            self.expect(operand, ("bool",), "'not'")
            kind = "bool"
        else:
            self.expect(operand, ("number", "ball", "matrix", "poly"), f"unary {op}")
            kind = operand.type
        return self.new("unary", node, type=kind, value=op, args=[operand])

    def build_BoolOp(self, node, depth):
        op = "and" if isinstance(node.op, ast.And) else "or"
        values = [self.build(v, depth) for v in node.values]
        for v in values:
            self.expect(v, ("bool",), f"'{op}'")
        return self.new("boolop", node, type="bool", value=op, args=values)

    def build_Compare(self, node, depth):
        ops = [_COMPARE.get(type(op)) for op in node.ops]
        if None in ops:
            raise self.fail("'is' comparisons are not allowed; use == or !=", node)
        operands = [self.build(node.left, depth)] + [self.build(c, depth) for c in node.comparators]
        for op, a, b in zip(ops, operands, operands[1:]):
            if op in ("<", "<=", ">", ">="):
                self.expect(a, ("number", "ball"), f"'{op}'")
                self.expect(b, ("number", "ball"), f"'{op}'")
            if op in ("in", "not in"):
                item = element_type(b.type)
                if item is None:
                    raise ExpressionError(f"'{op}' needs a set, list or complex on its right, "
                                          f"got {b.type}", b.place())
                if unify(a.type, item) is None:
                    raise ExpressionError(f"'{op}': the items of a {b.type} are {item}, but "
                                          f"its left side is a {a.type}", a.place())
            if op in ("==", "!=") and unify(a.type, b.type) is None:
                raise ExpressionError(f"'{op}' compares values of one type, got {a.type} "
                                      f"and {b.type}", b.place())
        return self.new("compare", node, type="bool", value=ops, args=operands)

    def build_IfExp(self, node, depth):
        test = self.build(node.test, depth)
        self.expect(test, ("bool",), "the condition of 'if'")
        a, b = self.build(node.body, depth), self.build(node.orelse, depth)
        kind = unify(a.type, b.type)
        if kind is None:
            raise self.fail(f"the two branches of 'if ... else' must have one type, got "
                            f"{a.type} and {b.type}", node)
        return self.new("ifelse", node, type=kind, args=[test, a, b])

    def build_Subscript(self, node, depth):
        target = self.build(node.value, depth)
        keys_node = node.slice
        if isinstance(keys_node, ast.Slice):
            raise self.fail("slices are not allowed; index by integers or simplices", node)
        keys = [self.build(k, depth) for k in
                (keys_node.elts if isinstance(keys_node, ast.Tuple) else [keys_node])]
        if target.type == "matrix":
            if len(keys) != 2:
                raise self.fail(f"a matrix takes two indices M[x, y], got {len(keys)}", node)
            for k in keys:
                self.expect(k, ("number", "simplex"), "a matrix index")
            kind = "number"
        elif target.type.startswith(("list[", "tuple[")):
            if len(keys) != 1:
                raise self.fail(f"a list takes one index v[i], got {len(keys)}", node)
            self.expect(keys[0], ("number",), "a list index")
            kind = self.item_type(target, keys[0], node)
        else:
            raise self.fail(f"a {target.type} cannot be indexed", node)
        return self.new("index", node, type=kind, args=[target] + keys)

    def item_type(self, target: Node, key: Node, node) -> str:
        """The type of ``target[key]`` for a list: its item type, or for a list whose items
        differ in type the type at the position a literal integer names."""
        if target.type == EMPTY:
            raise self.fail("an empty list cannot be indexed", node)
        items = tuple_items(target.type)
        position = _literal_integer(key)
        if items is not None and position is not None:
            if not -len(items) <= position < len(items):
                raise ExpressionError(f"index {position} is outside 0..{len(items) - 1} for "
                                      f"a list of {len(items)} items", key.place())
            return items[position]
        kind = element_type(target.type)
        if kind is None:
            raise ExpressionError(f"the items of a {target.type} differ in type: index it "
                                  "by a literal integer", key.place())
        return kind

    def build_Tuple(self, node, depth):
        items = [self.build(e, depth) for e in node.elts]
        return self.new("list", node, type=list_type([i.type for i in items]), args=items)

    build_List = build_Tuple

    def build_Call(self, node, depth):
        if not isinstance(node.func, ast.Name):
            raise self.fail(_refusal(node.func) if not isinstance(node.func, ast.Attribute)
                            else "attribute access is not allowed", node)
        name = node.func.id
        if node.keywords:
            raise self.fail(f"{name}: keyword arguments are not allowed", node)
        if any(isinstance(a, ast.Starred) for a in node.args):
            raise self.fail(f"{name}: starred arguments are not allowed", node)
        if name in QUANTIFIERS:
            return self.build_quantifier(name, node, depth)
        function = FUNCTIONS.get(name)
        if function is None:
            if self.lookup(name) is not None:
                raise self.fail(f"'{name}' is a variable, not a function", node)
            raise self.fail(f"unknown function '{name}'{_suggest(name, set(FUNCTIONS) | set(QUANTIFIERS))}",
                            node)
        required = sum(1 for p in function.params if p.default is REQUIRED)
        if not required <= len(node.args) <= len(function.params):
            count = (f"{required}" if required == len(function.params)
                     else f"{required} to {len(function.params)}")
            raise self.fail(f"{name} takes {count} argument{'s' if len(function.params) != 1 else ''}"
                            f", got {len(node.args)}: {function.signature()}", node)
        args = [self.build(a, depth) for a in node.args]
        for param, arg in zip(function.params, args):
            if not compatible(arg.type, param.types):
                raise ExpressionError(
                    f"{name}: argument '{param.name}' must be {' or '.join(param.types)}, "
                    f"got {arg.type}", arg.place())
        kind = function.result_type(len(args))
        if kind == SAME:
            kind = _static(args[0].type)
            for param, arg in zip(function.params[1:], args[1:]):
                if arg.type != kind:
                    raise ExpressionError(
                        f"{name}: argument '{param.name}' must have the type of "
                        f"'{function.params[0].name}' ({kind}), got {arg.type}", arg.place())
        return self.new("call", node, type=_static(kind), function=function, args=args)

    def build_quantifier(self, name, node, depth):
        if len(node.args) != 1:
            raise self.fail(f"{name} takes one argument (a generator or, for sum, a list or "
                            "matrix)", node)
        arg = node.args[0]
        if not isinstance(arg, ast.GeneratorExp):
            if name in ("prod", "min", "max"):
                inner = self.build(arg, depth)
                item = element_type(inner.type) if inner.type.startswith(("list[", "tuple[")) \
                    else None
                if item != "number" and inner.type != EMPTY:
                    raise ExpressionError(f"{name} of a {inner.type}: give a generator or a "
                                          "list of numbers", inner.place())
                return self.new("quant", node, type="number", value=name, args=[inner])
            if name == "sum":
                inner = self.build(arg, depth)
                if inner.type == "matrix" or inner.type == EMPTY:
                    return self.new("quant", node, type="number", value="sum", args=[inner])
                item = element_type(inner.type) if inner.type.startswith(("list[", "tuple[")) \
                    else None
                if item not in ("number", "ball"):
                    raise ExpressionError(f"sum of a {inner.type}: give a generator, a list "
                                          "of numbers or a matrix", inner.place())
                return self.new("quant", node, type=item, value="sum", args=[inner])
            raise self.fail(f"{name} needs a generator: {name}(... for x in ...)", node)
        loops = []
        self.scopes.append({})
        try:
            for comp in arg.generators:
                if comp.is_async or not isinstance(comp.target, ast.Name):
                    raise self.fail("a generator variable must be a single name", comp.target)
                iterable = self.build(comp.iter, depth)
                item = element_type(iterable.type)
                if item is None:
                    raise ExpressionError(f"cannot iterate over a {iterable.type}; iterate "
                                          "over a complex, a set or a list whose items have "
                                          "one type", iterable.place())
                variable = comp.target.id
                if variable in FUNCTIONS or variable in QUANTIFIERS:
                    raise self.fail(f"'{variable}' names a function; choose another variable",
                                    comp.target)
                self.scopes[-1][variable] = item
                conditions = [self.build(c, depth) for c in comp.ifs]
                for c in conditions:
                    self.expect(c, ("bool",), "an 'if' filter")
                loops.append((variable, iterable, conditions))
            element = self.build(arg.elt, depth)
        finally:
            self.scopes.pop()
        if name in ("all", "any"):
            self.expect(element, ("bool",), name)
            kind = "bool"
        elif name == "sum":
            self.expect(element, ("number", "ball"), "sum")
            kind = element.type if element.type == "ball" else "number"
        elif name in ("prod", "min", "max"):
            self.expect(element, ("number",), name)
            kind = "number"
        else:
            kind = "number"
        return self.new("quant", node, type=kind, value=name, args=[element], loops=loops)

    def expect(self, node: Node, types: tuple[str, ...], where: str):
        if not compatible(node.type, types):
            raise ExpressionError(f"{where} needs {' or '.join(types)}, got {node.type}",
                                  node.place())


def _binop_type(op, left: Node, right: Node, builder: _Builder, node) -> str:
    a, b = left.type, right.type
    if op == "**":
        builder.expect(right, ("number",), "an exponent")
        if a in ("number", "ball", "matrix", "poly"):
            return a
    elif op in ("&", "|"):
        if a == b == "set":
            return "set"
    elif op in ("%", "//"):
        if a == b == "number":
            return "number"
    elif a == b == "number":
        return "number"
    elif op in ("+", "-", "*", "/") and {a, b} <= {"number", "ball"}:
        return "ball"
    elif op in ("+", "-") and a == b and a in ("matrix", "poly"):
        return a
    elif op in ("*", "@") and a == b == "matrix":
        return "matrix"
    elif op == "*" and {a, b} in ({"number", "matrix"}, {"number", "poly"}):
        return a if a != "number" else b
    elif op == "*" and a == b == "poly":
        return "poly"
    elif op == "/" and a in ("matrix", "poly") and b == "number":
        return a
    raise builder.fail(f"operator '{op}' does not apply to {a} and {b}", node)


def _static(returns: str) -> str:
    """The static type of a call: ``number|ball`` (exact where it can be, an enclosure
    otherwise) is checked as ``ball``, which accepts exact numbers too."""
    return "ball" if returns == "number|ball" else returns


def _literal_integer(node: Node) -> int | None:
    """The value of an integer literal (possibly negated), or None."""
    if node.kind == "const" and node.type == "number":
        return node.value
    if node.kind == "unary" and node.value in ("-", "+") and node.args[0].kind == "const" \
            and node.args[0].type == "number":
        return -node.args[0].value if node.value == "-" else node.args[0].value
    return None


def _refusal(node) -> str:
    if isinstance(node, ast.Attribute):
        return "attribute access is not allowed"
    if isinstance(node, (ast.ListComp, ast.SetComp, ast.DictComp, ast.GeneratorExp)):
        return "generators are allowed only inside all(), any(), sum() and count()"
    if isinstance(node, ast.Lambda):
        return "lambda is not allowed"
    if isinstance(node, (ast.Dict, ast.Set)):
        return "dict and set literals are not allowed"
    if isinstance(node, ast.JoinedStr):
        return "strings are not allowed"
    if isinstance(node, ast.NamedExpr):
        return "assignment expressions are not allowed"
    return f"{type(node).__name__} is not allowed in a claim expression"


def _position(text: str, index: int) -> Place:
    line = text.count("\n", 0, index) + 1
    return Place(None, line, index - (text.rfind("\n", 0, index) + 1) + 1)


def _check_characters(text: str) -> None:
    """Refuse what Python's parser would read differently from what a reader sees: a
    comment (``#`` would silently drop the rest of the line) and any character outside
    ASCII (Python folds look-alikes such as full-width letters or the Kelvin sign into
    ASCII names)."""
    for index, char in enumerate(text):
        if char == "#":
            raise ExpressionError("'#' is not allowed: an expression has no comments",
                                  _position(text, index))
        if ord(char) > 127:
            raise ExpressionError(f"character {char!r} (U+{ord(char):04X}) is not allowed: "
                                  "names, numbers and operators are ASCII only",
                                  _position(text, index))


def _unshift(tree):
    """Undo the opening parenthesis added before parsing: columns on line 1 move back."""
    for node in ast.walk(tree):
        if getattr(node, "lineno", None) == 1 and hasattr(node, "col_offset"):
            node.col_offset = max(node.col_offset - 1, 0)


def parse_condition(text: str, variables: dict[str, str], where: Place | None = None,
                    what: str = "the statement") -> Node:
    """Parse an expression that must be true or false (a statement, a ``where``).

    >>> parse_condition("betti(K)", {"K": "complex"})
    Traceback (most recent call last):
    ...
    verifier.claims.errors.ExpressionError: <expression>:1:1: the statement must be true or false, but it gives a list[number]
    """
    node = parse(text, variables, where)
    if node.type != "bool":
        error = ExpressionError(f"{what} must be true or false, but it gives a {node.type}",
                                Place(None, 1, 1))
        if where is not None:
            error.place = Place(where.file, where.line, where.column)
        raise error
    return node


def parse(text: str, variables: dict[str, str], where: Place | None = None) -> Node:
    """Parse and check an expression; ``variables`` maps bound names to their types.

    Errors are :class:`ExpressionError` located within the expression (line and column
    from 1); ``where`` (the place of the expression's first character in its file)
    shifts them to file coordinates.

    >>> parse("euler(K) == 2", {"K": "complex"}).type
    'bool'
    >>> parse("gren(K)", {"K": "complex"})
    Traceback (most recent call last):
    ...
    verifier.claims.errors.ExpressionError: <expression>:1:1: unknown function 'gren'; did you mean 'green'?
    """
    try:
        if not isinstance(text, str):
            raise ExpressionError(f"an expression must be text, got {type(text).__name__}",
                                  Place(None, 1, 1))
        if len(text) > MAX_LENGTH:
            raise ExpressionError(f"expression longer than {MAX_LENGTH} characters",
                                  Place(None, 1, 1))
        if "\x00" in text:
            raise ExpressionError("expression contains a NUL character", Place(None, 1, 1))
        _check_characters(text)
        try:  # parenthesised, so that a statement may span several lines
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")   # Python's own warnings about odd literals
                tree = ast.parse("(" + text + "\n)", mode="eval")
            _unshift(tree)
        except SyntaxError as error:
            line = error.lineno or 1
            column = (error.offset or 2) - (1 if line == 1 else 0)
            raise ExpressionError(f"syntax error: {error.msg}",
                                  Place(None, line, max(column, 1))) from None
        except (RecursionError, MemoryError, ValueError):
            raise ExpressionError("expression too deeply nested", Place(None, 1, 1)) from None
        try:
            return _Builder(variables).build(tree.body)
        except RecursionError:
            raise ExpressionError("expression too deeply nested", Place(None, 1, 1)) from None
    except ExpressionError as error:
        if where is not None:
            error.place = in_file(error.place, where)
        raise


def in_file(inner: Place | None, where: Place) -> Place:
    """A place inside an expression (line and column from 1) as a place in the file whose
    expression starts at ``where``."""
    inner = inner or Place(None, 1, 1)
    line = (where.line or 1) + (inner.line or 1) - 1
    column = ((where.column or 1) + (inner.column or 1) - 1
              if (inner.line or 1) == 1 else inner.column)
    return Place(where.file, line, column)
