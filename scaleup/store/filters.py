"""Safe filter expressions for runs: ``vessel = 'V-300' and speed_rps > 5``.

The text is parsed into a small allowed grammar and turned into SQL with every literal bound as
a parameter; nothing typed is ever pasted into SQL. Allowed:

* columns of the runs view (``run_view``) and a few plain aliases (``speed``, ``kla``, ...);
* comparisons ``= == != <> < <= > >=``, ``between a and b``, ``in (a, b)``, ``like 'x%'``,
  ``is null``, ``is not null``;
* ``and``, ``or``, ``not`` and parentheses;
* literals: numbers, 'quoted text', and numbers with a unit (``speed > 300 rpm``,
  ``temperature >= 30 degC``), converted to the column's SI unit.

Anything else (semicolons, function calls, subqueries, ``attach``, pragmas) is refused with a
message that says what was not understood and where. The SQL produced is then run under the
store's read-only authorizer (:func:`scaleup.store.db.guarded_reads`) as a second line of
defence.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from scaleup.errors import InputError

COLUMNS: dict[str, str | None] = {
    # column -> units kind of its SI value (None: text or plain number)
    "id": None, "ref": None, "vessel": None, "medium": None, "coalescence": None, "run_at": None,
    "speed_rps": "speed", "gas_flow_mol_s": "gas_flow", "gas_flow_vvm": None,
    "o2_fraction_in": "fraction",
    "temperature_k": "temperature", "head_pressure_pa": "pressure",
    "power_measured_w": "power", "kla_per_s": "kla", "kla_stderr_per_s": "kla",
    "kla_method": None, "gas_holdup": "fraction", "tank_diameter_m": "length",
    "working_volume_m3": "volume", "vessel_id": None, "medium_id": None, "notes": None,
    "n_curves": None,
}
ALIASES = {
    "speed": "speed_rps", "n": "speed_rps", "gas_flow": "gas_flow_mol_s", "vvm": "gas_flow_vvm",
    "temperature": "temperature_k", "temp": "temperature_k", "kla": "kla_per_s",
    "volume": "working_volume_m3", "date": "run_at", "tank_diameter": "tank_diameter_m",
    "pressure": "head_pressure_pa", "method": "kla_method", "holdup": "gas_holdup",
}
_TOKEN = re.compile(r"""
    (?P<ws>\s+)
  | (?P<string>'(?:[^']|'')*'|"(?:[^"]|"")*")
  | (?P<number>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)
  | (?P<op><=|>=|!=|<>|==|=|<|>)
  | (?P<paren>[(),])
  | (?P<word>[A-Za-z_%/°][A-Za-z0-9_%/°*^.]*)
  | (?P<bad>.)
""", re.VERBOSE)
_KEYWORDS = {"and", "or", "not", "between", "in", "like", "is", "null"}
# words that mean someone typed SQL rather than a filter: named in the refusal
_SQL_WORDS = {"select", "drop", "delete", "insert", "update", "attach", "detach", "pragma",
              "create", "alter", "replace", "vacuum", "from", "union", "load_extension",
              "begin", "commit", "rollback", "savepoint", "exists", "with", "case", "cast"}
MAX_LENGTH = 2000
MAX_DEPTH = 40  # nested parentheses / nots: far beyond what a person writes
_SQL_OPS = {"=": "=", "==": "=", "!=": "!=", "<>": "!=", "<": "<", "<=": "<=", ">": ">",
            ">=": ">="}


@dataclass(frozen=True)
class Token:
    kind: str
    text: str
    pos: int


def tokenize(text: str) -> list[Token]:
    out = []
    for m in _TOKEN.finditer(text):
        kind = m.lastgroup
        if kind == "ws":
            continue
        if kind == "bad":
            what = ("a semicolon: a filter is one condition, not SQL statements"
                    if m.group() == ";" else f'"{m.group()}"')
            raise InputError(f"cannot use {what} at position {m.start() + 1} of the "
                             f"filter; {_HELP}", "filter", text)
        out.append(Token(kind, m.group(), m.start()))
    return out


_HELP = ("a filter compares run columns with values, e.g. \"vessel = 'V-300' and speed > 300 "
         "rpm\"; columns: " + ", ".join(sorted(COLUMNS)))


class _Parser:
    def __init__(self, text: str):
        self.text = text
        self.tokens = tokenize(text)
        self.i = 0
        self.depth = 0
        self.params: list = []

    def nest(self) -> None:
        self.depth += 1
        if self.depth > MAX_DEPTH:
            self.fail(f"nested more than {MAX_DEPTH} levels deep")

    def fail(self, what: str):
        pos = self.tokens[self.i].pos + 1 if self.i < len(self.tokens) else len(self.text)
        raise InputError(f"{what} at position {pos}; {_HELP}", "filter", self.text)

    def peek(self) -> Token | None:
        return self.tokens[self.i] if self.i < len(self.tokens) else None

    def word(self, *words: str) -> bool:
        t = self.peek()
        if t is not None and t.kind == "word" and t.text.lower() in words:
            self.i += 1
            return True
        return False

    def expect(self, kind: str, text: str | None = None) -> Token:
        t = self.peek()
        if t is None or t.kind != kind or (text is not None and t.text != text):
            self.fail(f"expected {text or kind}")
        self.i += 1
        return t

    def parse(self) -> str:
        sql = self.expr()
        if self.peek() is not None:
            self.fail(f'did not understand "{self.peek().text}"')
        return sql

    def expr(self) -> str:
        parts = [self.term()]
        while self.word("or"):
            parts.append(self.term())
        return " OR ".join(parts) if len(parts) > 1 else parts[0]

    def term(self) -> str:
        parts = [self.factor()]
        while self.word("and"):
            parts.append(self.factor())
        return "(" + " AND ".join(parts) + ")" if len(parts) > 1 else parts[0]

    def factor(self) -> str:
        if self.word("not"):
            self.nest()
            inner = self.factor()
            self.depth -= 1
            return f"NOT ({inner})"
        t = self.peek()
        if t is not None and t.kind == "paren" and t.text == "(":
            self.i += 1
            self.nest()
            inner = self.expr()
            self.expect("paren", ")")
            self.depth -= 1
            return f"({inner})"
        return self.comparison()

    def column(self) -> str:
        t = self.peek()
        if t is None or t.kind != "word" or t.text.lower() in _KEYWORDS:
            self.fail("expected a column name")
        name = ALIASES.get(t.text.lower(), t.text.lower())
        if name not in COLUMNS:
            self.refuse_sql(t, "a filter only compares columns with values")
            self.fail(f'unknown column "{t.text}"')
        self.i += 1
        return name

    def refuse_sql(self, t: Token, why: str) -> None:
        """Name a function call or an SQL word for what it is (the cursor is on ``t``)."""
        following = self.tokens[self.i + 1] if self.i + 1 < len(self.tokens) else None
        if t.kind == "word" and following is not None and following.text == "(":
            self.fail(f'"{t.text}(...)" is a function call; a filter cannot call functions')
        if t.text.lower() in _SQL_WORDS:
            self.fail(f'"{t.text}" is SQL; {why}')

    def comparison(self) -> str:
        col = self.column()
        if self.word("is"):
            negate = self.word("not")
            if not self.word("null"):
                self.fail("expected null after is")
            return f"{col} IS {'NOT ' if negate else ''}NULL"
        negate = self.word("not")
        if self.word("between"):
            low = self.literal(col)
            if not self.word("and"):
                self.fail("expected and in between")
            high = self.literal(col)
            self.params += [low, high]
            return f"{col} {'NOT ' if negate else ''}BETWEEN ? AND ?"
        if self.word("in"):
            self.expect("paren", "(")
            values = [self.literal(col)]
            while self.peek() is not None and self.peek().text == ",":
                self.i += 1
                values.append(self.literal(col))
            self.expect("paren", ")")
            self.params += values
            return f"{col} {'NOT ' if negate else ''}IN ({', '.join('?' for _ in values)})"
        if self.word("like"):
            t = self.expect("string")
            self.params.append(_unquote(t.text))
            return f"{col} {'NOT ' if negate else ''}LIKE ?"
        if negate:
            self.fail("expected between, in or like after not")
        op = self.expect("op").text
        self.params.append(self.literal(col))
        return f"{col} {_SQL_OPS[op]} ?"

    def literal(self, col: str):
        t = self.peek()
        if t is None:
            self.fail("expected a value")
        self.i += 1
        if t.kind == "string":
            return _unquote(t.text)
        if t.kind != "number":
            self.i -= 1
            self.refuse_sql(t, "a filter compares with plain values, not subqueries")
            self.fail(f'expected a number or a quoted text, not "{t.text}"')
        value = float(t.text)
        unit_words = []
        while self.peek() is not None and self.peek().kind == "word" \
                and self.peek().text.lower() not in _KEYWORDS:
            unit_words.append(self.tokens[self.i].text)
            self.i += 1
        if unit_words:
            kind = COLUMNS[col]
            if kind is None:
                self.fail(f'column "{col}" takes no unit')
            from scaleup import units

            try:
                return units.parse(f"{t.text} {' '.join(unit_words)}", kind, col,
                                   liquid_volume_m3=None)
            except InputError as exc:
                raise InputError(f"{exc} (the value at position {t.pos + 1})", "filter",
                                 self.text) from None
        return value


def _unquote(text: str) -> str:
    quote = text[0]
    return text[1:-1].replace(quote * 2, quote)


def compile_filter(text: str | None) -> tuple[str, list]:
    """Return (SQL condition, parameters) for a filter over ``run_view``; ("1", []) if empty.

    Examples
    --------
    >>> compile_filter("vessel = 'V-300' and speed > 300 rpm")
    ('(vessel = ? AND speed_rps > ?)', ['V-300', 5.0])
    """
    if text is None or not text.strip():
        return "1", []
    if not isinstance(text, str):
        raise InputError(f"expected text, got {type(text).__name__}", "filter", text)
    if len(text) > MAX_LENGTH:
        raise InputError(f"is longer than {MAX_LENGTH} characters", "filter",
                         text[:40] + "...")
    parser = _Parser(text)
    return parser.parse(), parser.params
