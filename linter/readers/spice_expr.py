"""A small arithmetic evaluator for SPICE parameter expressions (``{r1*2}``, ``.param``).

Arithmetic only: numbers (with SPICE scale suffixes, read by
:func:`linter.readers.spice_numbers.read_spice_number`), parameter names, ``+ - * /``,
``**`` and ``^`` (power, right-associative, binding tighter than unary minus), parentheses,
unary minus and plus, and the functions in :data:`FUNCTIONS`. It never calls Python's
``eval``; the parser is a shunting-yard loop with explicit stacks (no recursion), and the
expression length is bounded by :data:`MAX_EXPRESSION_LENGTH`.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Callable, Mapping

from linter.readers.spice_numbers import SpiceNumberError, read_spice_number

__all__ = ["ExpressionError", "FUNCTIONS", "MAX_EXPRESSION_LENGTH", "evaluate", "strip_braces"]

MAX_EXPRESSION_LENGTH = 10_000
"""Characters; a longer expression is refused rather than evaluated."""


def _checked_min(*args: float) -> float:
    return min(args)


def _checked_max(*args: float) -> float:
    return max(args)


FUNCTIONS: dict[str, tuple[Callable[..., float], int, int]] = {
    "sqrt": (math.sqrt, 1, 1), "abs": (abs, 1, 1), "exp": (math.exp, 1, 1),
    "ln": (math.log, 1, 1), "log": (math.log, 1, 1), "log10": (math.log10, 1, 1),
    "min": (_checked_min, 2, 64), "max": (_checked_max, 2, 64), "pow": (math.pow, 2, 2),
    "floor": (math.floor, 1, 1), "ceil": (math.ceil, 1, 1),
}
"""Function name → (function, fewest arguments, most arguments). ``log`` is natural, as in ngspice."""


class ExpressionError(ValueError):
    """An expression that cannot be evaluated; ``offset`` is the 0-based character where it failed."""

    def __init__(self, message: str, offset: int = 0) -> None:
        super().__init__(message, offset)
        self.message = message
        self.offset = offset

    def __str__(self) -> str:
        return self.message


@dataclass(frozen=True, slots=True)
class _Token:
    kind: str  # "num", "name", "op", "(", ")", ","
    text: str
    offset: int
    value: float = 0.0


_TOKEN = re.compile(
    r"\s*(?:(?P<num>(?:\d+\.?\d*|\.\d+)(?:[eEdD][+-]?\d+)?[A-Za-zµμ]*)"
    r"|(?P<name>[A-Za-z_][A-Za-z0-9_.]*)|(?P<op>\*\*|[-+*/^])|(?P<punct>[(),]))"
)
_BINARY = {"+": (1, "left"), "-": (1, "left"), "*": (2, "left"), "/": (2, "left"),
           "^": (4, "right"), "**": (4, "right")}
_UNARY_PRECEDENCE = 3


def _tokens(text: str) -> list[_Token]:
    found: list[_Token] = []
    position = 0
    while position < len(text):
        if text[position:].strip() == "":
            break
        match = _TOKEN.match(text, position)
        if match is None or match.end() == position:
            offset = len(text[position:]) - len(text[position:].lstrip()) + position
            raise ExpressionError(f"unexpected {text[offset]!r} in expression", offset)
        start = match.start(match.lastgroup or 0)
        piece = match.group(match.lastgroup or 0)
        if match.lastgroup == "num":
            try:
                found.append(_Token("num", piece, start, read_spice_number(piece)))
            except SpiceNumberError:
                raise ExpressionError(f"cannot read {piece!r} as a SPICE number", start) from None
        elif match.lastgroup == "punct":
            found.append(_Token(piece, piece, start))
        else:
            found.append(_Token(match.lastgroup or "", piece, start))
        position = match.end()
    return found


def _apply(operator: str, stack: list[float], offset: int) -> None:
    if operator in ("neg", "pos"):
        if not stack:
            raise ExpressionError("operator without an operand", offset)
        stack.append(-stack.pop() if operator == "neg" else stack.pop())
        return
    if len(stack) < 2:
        raise ExpressionError(f"operator {operator!r} needs two operands", offset)
    right, left = stack.pop(), stack.pop()
    try:
        if operator == "+":
            stack.append(left + right)
        elif operator == "-":
            stack.append(left - right)
        elif operator == "*":
            stack.append(left * right)
        elif operator == "/":
            stack.append(left / right)
        else:
            stack.append(math.pow(left, right))
    except ZeroDivisionError:
        raise ExpressionError("division by zero", offset) from None
    except (OverflowError, ValueError):
        raise ExpressionError(f"{operator!r} has no real result here", offset) from None


def _call(name: str, count: int, stack: list[float], offset: int) -> None:
    function, fewest, most = FUNCTIONS[name]
    if not fewest <= count <= most or len(stack) < count:
        raise ExpressionError(f"{name}() takes {fewest if fewest == most else f'{fewest} or more'} "
                              f"argument{'s' if most > 1 else ''}, given {count}", offset)
    args = stack[len(stack) - count:]
    del stack[len(stack) - count:]
    try:
        stack.append(float(function(*args)))
    except (ValueError, OverflowError):
        raise ExpressionError(f"{name}() has no real result for these arguments", offset) from None


@dataclass
class _Frame:
    """An open parenthesis: a function call (with its argument count) or plain grouping."""

    function: str | None
    offset: int
    arguments: int = 0
    operator_mark: int = 0


def evaluate(text: str, names: Mapping[str, float]) -> float:
    """Evaluate an arithmetic expression; ``names`` maps lower-case parameter names to values.

    >>> evaluate("2*r + 1k", {"r": 500.0})
    2000.0
    >>> evaluate("-2**2", {})
    -4.0
    >>> evaluate("max(1, sqrt(16), 3)", {})
    4.0
    """
    if len(text) > MAX_EXPRESSION_LENGTH:
        raise ExpressionError(f"expression longer than {MAX_EXPRESSION_LENGTH} characters")
    return _Evaluator(names).run(_tokens(text), len(text))


class _Evaluator:
    """Shunting-yard evaluation: operands and operators on explicit stacks."""

    def __init__(self, names: Mapping[str, float]) -> None:
        self.names = names
        self.values: list[float] = []
        self.operators: list[tuple[str, int]] = []  # (operator, offset)
        self.frames: list[_Frame] = []
        self._skip_paren = False

    def run(self, tokens: list[_Token], end: int) -> float:
        expect_operand = True
        self._skip_paren = False
        for index, token in enumerate(tokens):
            if self._skip_paren:  # the "(" of a function call, already opened
                self._skip_paren = False
                continue
            following = tokens[index + 1] if index + 1 < len(tokens) else None
            expect_operand = self._step(token, following, expect_operand)
        if expect_operand:
            raise ExpressionError("expression ends where a value is expected", end)
        if self.frames:
            raise ExpressionError("'(' is never closed", self.frames[-1].offset)
        self._reduce_to(0)
        if len(self.values) != 1:
            raise ExpressionError("not a single value", 0)
        result = self.values[0]
        if not math.isfinite(result):
            raise ExpressionError("the result is not a finite number", 0)
        return result

    def _step(self, token: _Token, following: _Token | None, expect_operand: bool) -> bool:
        if expect_operand:
            return self._operand(token, following)
        if token.kind == "op":
            self._binary(token)
            return True
        if token.kind == ")":
            self._close(token)
            return False
        if token.kind == ",":
            self._comma(token)
            return True
        raise ExpressionError(f"expected an operator before {token.text!r}", token.offset)

    def _operand(self, token: _Token, following: _Token | None) -> bool:
        if token.kind == "num":
            self.values.append(token.value)
            return False
        if token.kind == "op" and token.text in "+-":
            self.operators.append(("neg" if token.text == "-" else "pos", token.offset))
            return True
        if token.kind == "(":
            self.frames.append(_Frame(None, token.offset, operator_mark=len(self.operators)))
            return True
        if token.kind == "name" and following is not None and following.kind == "(":
            return self._open_call(token)
        if token.kind == "name":
            value = self.names.get(token.text.casefold())
            if value is None:
                raise ExpressionError(f"unknown parameter {token.text!r}", token.offset)
            self.values.append(value)
            return False
        raise ExpressionError(f"expected a value, found {token.text!r}", token.offset)

    def _open_call(self, token: _Token) -> bool:
        name = token.text.casefold()
        if name not in FUNCTIONS:
            raise ExpressionError(f"unknown function {token.text!r}", token.offset)
        self.frames.append(_Frame(name, token.offset, operator_mark=len(self.operators)))
        self._skip_paren = True
        return True

    def _binary(self, token: _Token) -> None:
        precedence, side = _BINARY[token.text]
        mark = self.frames[-1].operator_mark if self.frames else 0
        while len(self.operators) > mark:
            top, offset = self.operators[-1]
            top_precedence = _UNARY_PRECEDENCE if top in ("neg", "pos") else _BINARY[top][0]
            if top_precedence > precedence or (top_precedence == precedence and side == "left"):
                self.operators.pop()
                _apply(top, self.values, offset)
            else:
                break
        self.operators.append((token.text, token.offset))

    def _reduce_to(self, mark: int) -> None:
        while len(self.operators) > mark:
            operator, offset = self.operators.pop()
            _apply(operator, self.values, offset)

    def _comma(self, token: _Token) -> None:
        if not self.frames or self.frames[-1].function is None:
            raise ExpressionError("',' outside a function call", token.offset)
        self._reduce_to(self.frames[-1].operator_mark)
        self.frames[-1].arguments += 1

    def _close(self, token: _Token) -> None:
        if not self.frames:
            raise ExpressionError("')' without '('", token.offset)
        frame = self.frames.pop()
        self._reduce_to(frame.operator_mark)
        if frame.function is not None:
            _call(frame.function, frame.arguments + 1, self.values, frame.offset)


def strip_braces(text: str) -> str | None:
    """The expression inside ``{...}`` or ``'...'``, or None when ``text`` is not braced.

    >>> strip_braces("{r*2}"), strip_braces("'a+b'"), strip_braces("4k7")
    ('r*2', 'a+b', None)
    """
    if len(text) >= 2 and ((text[0] == "{" and text[-1] == "}") or (text[0] == text[-1] == "'")):
        return text[1:-1]
    return None
