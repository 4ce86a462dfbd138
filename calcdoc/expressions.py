"""The expression language of formula steps, shared by the formula kind and the view layer.

Expressions are parsed with Python's ``ast`` and walked against a whitelist (numbers, names,
``+ - * / **``, parentheses, the functions sqrt, exp, log, log10, sin, cos, tan, abs, min, max and
the constants pi and sigma); they are never passed to ``eval``. Every calculation step of every
kind is written in this language over named operands, so that the report can typeset it with
the numbers substituted and a checker (or a test) can evaluate it again from the printed
numbers: :func:`to_latex` typesets a tree, :func:`evaluate_float` evaluates it on SI floats, and
:func:`absolute_in_product` tells which operands an absolute temperature enters a product in.
"""

from __future__ import annotations

import ast
import math

from scipy.constants import Stefan_Boltzmann

from calcdoc.errors import CalcdocError

__all__ = ["parse_expression", "ExpressionError", "to_latex", "symbol_latex", "number_latex",
           "evaluate_float", "names_in", "FUNCTIONS", "CONSTANTS", "MAX_EXPONENT",
           "MAX_MAGNITUDE", "MAX_EXPRESSION_CHARS", "MAX_EXPRESSION_DEPTH", "absolute_in_product"]

MAX_EXPONENT = 100.0
MAX_MAGNITUDE = 1e100
FUNCTIONS = ("sqrt", "exp", "log", "log10", "sin", "cos", "tan", "abs", "min", "max")
CONSTANTS = {"pi": (math.pi, "1", r"\pi"),
             "sigma": (Stefan_Boltzmann, "W/(m^2*K^4)", r"\sigma")}
_GREEK = {"alpha", "beta", "gamma", "delta", "epsilon", "varepsilon", "zeta", "eta", "theta",
          "vartheta", "iota", "kappa", "lambda", "mu", "nu", "xi", "rho", "tau", "upsilon", "phi",
          "varphi", "chi", "psi", "omega", "Gamma", "Delta", "Theta", "Lambda", "Xi", "Phi",
          "Psi", "Omega", "Sigma", "Pi"}


MAX_EXPRESSION_CHARS = 500
"""Longest expression accepted; a long working is several steps, which the report can show."""

MAX_EXPRESSION_DEPTH = 40
"""Deepest nesting of operations and brackets in one expression."""

_OPERATOR_HINTS = {ast.BitXor: "write ** for a power, e.g. 'x ** 2'",
                   ast.FloorDiv: "write / for a division", ast.Mod: None, ast.MatMult: None}


class ExpressionError(CalcdocError, ValueError):
    """An expression that is not allowed; ``offset`` is the character it concerns."""

    def __init__(self, what: str, expected: str, got: str, offset: int = 0,
                 hint: str | None = None):
        self.what, self.expected, self.got, self.offset, self.hint = what, expected, got, \
            offset, hint
        super().__init__(what)


def _depth(tree: ast.AST) -> int:
    """Return the nesting depth of a tree, counted without recursion."""
    deepest, stack = 0, [(tree, 1)]
    while stack:
        node, depth = stack.pop()
        deepest = max(deepest, depth)
        stack.extend((child, depth + 1) for child in ast.iter_child_nodes(node))
    return deepest


def _bracket_depth(text: str) -> int:
    depth = deepest = 0
    for ch in text:
        depth += ch == "("
        deepest = max(deepest, depth)
        depth -= ch == ")"
    return deepest


def parse_expression(text: str) -> ast.Expression:
    """Return the checked AST of an expression; raise ExpressionError for anything not allowed."""
    text = str(text)
    if len(text) > MAX_EXPRESSION_CHARS:
        raise ExpressionError("expression too long", f"at most {MAX_EXPRESSION_CHARS} "
                              "characters (split it into steps)", f"{len(text)} characters")
    if "\n" in text or "\r" in text:
        raise ExpressionError("an expression is one line", "one line", "a line break")
    if _bracket_depth(text) > MAX_EXPRESSION_DEPTH:
        raise ExpressionError("brackets nested too deeply", f"at most {MAX_EXPRESSION_DEPTH} "
                              "levels", f"{_bracket_depth(text)} levels")
    try:
        tree = ast.parse(text, mode="eval")
    except SyntaxError as exc:
        hint = "write ** for a power, e.g. 'x ** 2'" if "^" in text else None
        raise ExpressionError("not a valid expression", "an expression such as 'U * A * dT'",
                              f"{text!r} ({exc.msg})", max((exc.offset or 1) - 1, 0),
                              hint) from None
    except (ValueError, MemoryError, RecursionError) as exc:
        raise ExpressionError("not a valid expression", "an expression such as 'U * A * dT'",
                              f"{text!r} ({type(exc).__name__})") from None
    if _depth(tree) > MAX_EXPRESSION_DEPTH:
        raise ExpressionError("expression nested too deeply", f"at most {MAX_EXPRESSION_DEPTH} "
                              "levels of operations (split it into steps)",
                              f"{_depth(tree)} levels")
    for node in ast.walk(tree):
        offset = getattr(node, "col_offset", 0) or 0
        if isinstance(node, ast.BinOp) and not isinstance(
                node.op, (ast.Add, ast.Sub, ast.Mult, ast.Div, ast.Pow)):
            symbol = {ast.BitXor: "^", ast.FloorDiv: "//", ast.Mod: "%", ast.MatMult: "@",
                      ast.BitAnd: "&", ast.BitOr: "|", ast.LShift: "<<",
                      ast.RShift: ">>"}.get(type(node.op), type(node.op).__name__)
            op_offset = _operator_offset(text, node, symbol)
            raise ExpressionError("operator not allowed", "+ - * / **", repr(symbol),
                                  op_offset, _OPERATOR_HINTS.get(type(node.op)))
        if isinstance(node, ast.UnaryOp) and not isinstance(node.op, (ast.UAdd, ast.USub)):
            raise ExpressionError("operator not allowed", "unary + or -",
                                  type(node.op).__name__, offset)
        if isinstance(node, (ast.Expression, ast.Load, ast.operator, ast.unaryop, ast.BinOp,
                             ast.UnaryOp, ast.Name)):
            continue
        if isinstance(node, ast.Constant):
            if isinstance(node.value, bool) or not isinstance(node.value, (int, float)):
                raise ExpressionError("only numbers are allowed as literals", "a number",
                                      repr(node.value), offset)
            if not math.isfinite(float(node.value)) or abs(float(node.value)) > MAX_MAGNITUDE:
                raise ExpressionError("number too large", f"a magnitude below "
                                      f"{MAX_MAGNITUDE:g}", ast.get_source_segment(text, node)
                                      or "", offset)
            continue
        if isinstance(node, ast.Call):
            if not isinstance(node.func, ast.Name) or node.func.id not in FUNCTIONS:
                got = node.func.id if isinstance(node.func, ast.Name) else ast.unparse(node.func)
                raise ExpressionError("function not allowed", ", ".join(FUNCTIONS), repr(got),
                                      offset)
            if node.keywords:
                raise ExpressionError("keyword arguments are not allowed",
                                      "positional arguments", ast.unparse(node), offset)
            if any(isinstance(a, ast.Starred) for a in node.args):
                raise ExpressionError("not allowed in an expression", "plain arguments",
                                      ast.unparse(node), offset)
            continue
        if isinstance(node, ast.Attribute):
            raise ExpressionError("attribute access is not allowed",
                                  "names, numbers, operators and functions", ast.unparse(node),
                                  offset)
        raise ExpressionError("not allowed in an expression",
                              "names, numbers, + - * / **, functions", type(node).__name__,
                              offset)
    return tree


def _operator_offset(text: str, node: ast.BinOp, symbol: str) -> int:
    """Return where the operator of ``node`` is written (between its operands)."""
    start = getattr(node.left, "end_col_offset", None)
    if start is None:
        return node.col_offset
    found = text.find(symbol, start)
    return found if found >= 0 else node.col_offset


# ------------------------------------------------------------------------ LaTeX


def symbol_latex(name: str) -> str:
    """Return a name as a math symbol: 'theta_si' → '\\theta_{si}', 'U_w' → 'U_{w}'."""
    base, _, sub = name.partition("_")

    def part(word: str) -> str:
        if word in _GREEK:
            return "\\" + word
        return word if len(word) == 1 else r"\mathit{" + word + "}"

    text = part(base)
    if sub:
        pieces = [("\\" + p if p in _GREEK else p) for p in sub.split("_") if p]
        text += "_{" + ",".join(pieces) + "}"
    return text


_PRECEDENCE = {ast.Add: 1, ast.Sub: 1, ast.Mult: 2, ast.Div: 2, ast.Pow: 4}


def to_latex(tree: ast.AST, leaf) -> str:
    """Return LaTeX for an expression; ``leaf(name)`` renders each name (symbol or value)."""

    def prec(node) -> int:
        if isinstance(node, ast.BinOp):
            return _PRECEDENCE[type(node.op)]
        if isinstance(node, ast.UnaryOp):
            return 3
        return 5

    def wrap(node, limit: int) -> str:
        text = go(node)
        return rf"\left({text}\right)" if prec(node) < limit else text

    def go(node) -> str:
        if isinstance(node, ast.Expression):
            return go(node.body)
        if isinstance(node, ast.Constant):
            return _number_latex(node.value)
        if isinstance(node, ast.Name):
            return leaf(node.id)
        if isinstance(node, ast.UnaryOp):
            sign = "-" if isinstance(node.op, ast.USub) else "+"
            return sign + wrap(node.operand, 3)
        if isinstance(node, ast.BinOp):
            op = type(node.op)
            if op is ast.Div:
                return rf"\frac{{{go(node.left)}}}{{{go(node.right)}}}"
            if op is ast.Pow:
                base = go(node.left)
                if prec(node.left) <= 4 or "\\," in base:
                    base = rf"\left({base}\right)"
                return f"{{{base}}}^{{{go(node.right)}}}"
            symbol = {ast.Add: " + ", ast.Sub: " - ", ast.Mult: r" \cdot "}[op]
            right_limit = _PRECEDENCE[op] + (1 if op is ast.Sub else 0)
            return wrap(node.left, _PRECEDENCE[op]) + symbol + wrap(node.right, right_limit)
        if isinstance(node, ast.Call):
            name = node.func.id
            args = [go(a) for a in node.args]
            if name == "sqrt":
                return rf"\sqrt{{{args[0]}}}"
            if name == "abs":
                return rf"\left|{args[0]}\right|"
            if name in ("exp", "log", "sin", "cos", "tan", "min", "max"):
                return rf"\{name}\left({', '.join(args)}\right)"
            if name == "log10":
                return rf"\log_{{10}}\left({args[0]}\right)"
        raise ValueError(type(node).__name__)  # pragma: no cover - parse_expression guards

    return go(tree)


def _number_latex(value) -> str:
    text = repr(value) if isinstance(value, float) else str(value)
    if "e" in text:
        mantissa, power = text.split("e")
        return rf"{mantissa} \times 10^{{{int(power)}}}"
    return text




def number_latex(value) -> str:
    """Return a number literal of an expression as LaTeX (powers of ten as \\times 10^{n})."""
    return _number_latex(value)


def names_in(tree: ast.AST) -> list[str]:
    """Return the operand names of an expression in order of first appearance (no constants)."""
    functions = {id(n.func) for n in ast.walk(tree) if isinstance(n, ast.Call)}
    found = sorted((n for n in ast.walk(tree) if isinstance(n, ast.Name)
                    and n.id not in CONSTANTS and id(n) not in functions),
                   key=lambda n: (n.lineno, n.col_offset))
    return list(dict.fromkeys(n.id for n in found))


_FLOAT_FUNCTIONS = {"sqrt": math.sqrt, "exp": math.exp, "log": math.log, "log10": math.log10,
                    "sin": math.sin, "cos": math.cos, "tan": math.tan, "abs": abs}


def evaluate_float(tree: ast.AST, values: dict[str, float]) -> float:
    """Return the value of an expression on plain floats (operands in coherent SI units).

    For the view layer's own arithmetic (how many digits an operand needs so that the printed
    step re-does to its printed result); units were checked when the step was recorded."""

    def go(node) -> float:
        if isinstance(node, ast.Expression):
            return go(node.body)
        if isinstance(node, ast.Constant):
            return float(node.value)
        if isinstance(node, ast.Name):
            if node.id in values:
                return float(values[node.id])
            return CONSTANTS[node.id][0]
        if isinstance(node, ast.UnaryOp):
            value = go(node.operand)
            return -value if isinstance(node.op, ast.USub) else value
        if isinstance(node, ast.BinOp):
            left, right = go(node.left), go(node.right)
            op = type(node.op)
            if op is ast.Add:
                return left + right
            if op is ast.Sub:
                return left - right
            if op is ast.Mult:
                return left * right
            if op is ast.Div:
                return left / right
            return left ** right
        if isinstance(node, ast.Call):
            args = [go(a) for a in node.args]
            if node.func.id == "min":
                return min(args)
            if node.func.id == "max":
                return max(args)
            return _FLOAT_FUNCTIONS[node.func.id](args[0])
        raise ValueError(type(node).__name__)  # pragma: no cover - parse_expression guards

    return go(tree)


def absolute_in_product(tree: ast.AST, absolute: set[str]) -> set[str]:
    """Return the names of absolute temperatures that enter a product, quotient, power or
    function (σT⁴): those print in K; the others (θ_i − θ_e, θ_e + q R) may print in °C.

    The temperature kind of every subexpression is worked out bottom-up as the formula kind
    does: absolute − absolute is a difference, absolute ± difference stays absolute."""
    forced: set[str] = set()

    def leaves(node) -> set[str]:
        return {n.id for n in ast.walk(node) if isinstance(n, ast.Name) and n.id in absolute}

    def kind(node) -> str | None:
        if isinstance(node, ast.Expression):
            return kind(node.body)
        if isinstance(node, ast.Name):
            return "absolute" if node.id in absolute else None
        if isinstance(node, ast.UnaryOp):
            return kind(node.operand)
        if isinstance(node, ast.BinOp):
            left, right = kind(node.left), kind(node.right)
            if isinstance(node.op, ast.Sub) and left == right == "absolute":
                return "difference"
            if isinstance(node.op, (ast.Add, ast.Sub)):
                return "absolute" if "absolute" in (left, right) else None
            for side, side_kind in ((node.left, left), (node.right, right)):
                if side_kind == "absolute":
                    forced.update(leaves(side))
            return None
        if isinstance(node, ast.Call):
            kinds = [kind(a) for a in node.args]
            if node.func.id in ("min", "max", "abs"):
                return "absolute" if "absolute" in kinds else None
            for arg, arg_kind in zip(node.args, kinds):
                if arg_kind == "absolute":
                    forced.update(leaves(arg))
            return None
        return None

    kind(tree)
    return forced
