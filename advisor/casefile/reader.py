"""The TOML table reader: tables that remember their key paths, which keys were read, and the
lines they were written on, so that every error names the key path, the line and, for a
misspelt key or choice, the nearest valid one.
"""

from __future__ import annotations

import difflib
import re
import reprlib
from dataclasses import dataclass
from pathlib import Path

from ..errors import AdvisorError
from .units import UnitError, quantity

MISSING = object()  # "no default": the key is required
ECHO = 80  # characters of a value or key shown in a message
LONGEST_MESSAGE = 600  # characters; a longer message keeps its start and its end
DEEPEST = 16  # tables and arrays inside one another; the deepest key of the format is ~6
_CONTROL = re.compile(r"[\x00-\x1f\x7f-\x9f]")


class CaseError(AdvisorError):
    """A case file that cannot be run: the message starts with the file, line and key path.

    The message is bounded (:data:`LONGEST_MESSAGE` characters): a value echoed whole from a
    huge input would bury what is wrong with it.
    """

    def __init__(self, message: str, *, argument: str | None = None) -> None:
        super().__init__(clipped(str(message), LONGEST_MESSAGE), argument=argument)


_SHOWN = reprlib.Repr()
_SHOWN.maxlevel, _SHOWN.maxstring, _SHOWN.maxother = 3, ECHO, ECHO
_SHOWN.maxlist = _SHOWN.maxtuple = _SHOWN.maxdict = 6


def clipped(text: str, limit: int = ECHO) -> str:
    """``text`` cut to ``limit`` characters, the middle given up for " ... "."""
    if len(text) <= limit:
        return text
    keep = limit - 5
    return f"{text[: keep - keep // 3]} ... {text[len(text) - keep // 3 :]}"


def echo(value) -> str:
    """``repr(value)`` for a message: at most :data:`ECHO` characters, deep or long values
    shortened (the repr of a 2 MB array or of arrays nested a thousand deep is never built)."""
    return clipped(_SHOWN.repr(value))


def control_character(text: str) -> str | None:
    """The first control character (NUL, escape, newline, ...) of ``text`` as ``U+XXXX``."""
    found = _CONTROL.search(text)
    return None if found is None else f"U+{ord(found.group()):04X}"


@dataclass(frozen=True)
class Context:
    """The case file being read: its name for messages, its lines for line numbers, and the
    folder that relative paths in it start from.

    Parameters
    ----------
    name : str
        The file name shown at the start of every message.
    lines : tuple of str
        The file's text, one entry a line (empty when the case was not read from text).
    folder : Path
        Where relative file paths in the case are looked up.
    """

    name: str
    lines: tuple[str, ...]
    folder: Path

    def fail(self, key_path: str, message: str):
        """Raise a :class:`CaseError` naming the file, the line of ``key_path`` and the key."""
        line = line_of(self.lines, key_path)
        where = self.name + (f", line {line}" if line else "")
        raise CaseError(f"{where}: {shown_path(key_path)}: {message}")


def shown_path(key_path: str) -> str:
    """A key path for a message: each key at most :data:`ECHO` characters, control
    characters written as escapes."""
    parts = (clipped(part) for part in key_path.split("."))
    return ".".join(part if control_character(part) is None else echo(part) for part in parts)


_HEADER = re.compile(r"^(\[\[?)\s*([^\]]+?)\s*\]\]?")


def _table_blocks(lines) -> list[tuple[str, int, int]]:
    """The file cut at its table headers: (key path, first line, last line) of each block,
    ``[[a.b]]`` headers numbered in order as ``a.b[0]``, ``a.b[1]``."""
    blocks = [("", 1, len(lines))]
    counts: dict[str, int] = {}
    for number, text in enumerate(lines, start=1):
        match = _HEADER.match(text.strip())
        if not match:
            continue
        name = match.group(2).replace(" ", "")
        if match.group(1) == "[[":
            counts[name] = counts.get(name, -1) + 1
            name = f"{name}[{counts[name]}]"
        path, start, _ = blocks[-1]
        blocks[-1] = (path, start, number - 1)
        blocks.append((name, number, len(lines)))
    return blocks


def line_of(lines, key_path: str) -> int | None:
    """The line of a key, or None when it is not written out (a wrong line is worse than none).

    The key is looked up in the table whose path is the longest prefix of ``key_path``, on a
    line that assigns the next part of the path and, for keys inside an inline table, holds the
    rest of it.
    """
    inside = [
        block
        for block in _table_blocks(lines)
        if block[0] == "" or key_path == block[0] or key_path.startswith(block[0] + ".")
    ]
    path, start, end = max(inside, key=lambda block: len(block[0]))
    rest = key_path[len(path) + 1 :] if path else key_path
    if not rest:
        return start
    parts = rest.split(".")
    for number in range(start, end + 1):
        text = lines[number - 1].split("#", 1)[0]
        if "=" not in text or text.strip().startswith("["):
            continue
        head = text.split("=", 1)[0].strip().replace(" ", "")
        if head == rest:
            return number
        if head == parts[0] and all(re.search(rf"\b{re.escape(p)}\s*=", text) for p in parts[1:]):
            return number
    return None


def suggest(name, choices) -> str:
    """ "; did you mean 'x'?" for the choice nearest ``name``, or nothing."""
    if len(str(name)) > 4 * ECHO:  # nothing of the format is that long; spare the comparison
        return ""
    close = difflib.get_close_matches(str(name), [str(c) for c in choices], n=1, cutoff=0.6)
    return f"; did you mean {close[0]!r}?" if close else ""


class Table:
    """One table of the case file, remembering which keys were read.

    Parameters
    ----------
    data : dict
        The table's values as TOML gave them.
    path : str
        Its key path (``""`` for the file itself).
    context : Context
        The file, for messages.
    """

    def __init__(self, data: dict, path: str, context: Context):
        self.data, self.path, self.context = data, path, context
        self.read: set[str] = set()
        self.known: set[str] = set()  # keys this table accepts, read or not

    def key(self, name: str) -> str:
        """The key path of ``name`` in this table."""
        return f"{self.path}.{name}" if self.path else name

    def fail(self, name: str, message: str):
        """Raise a :class:`CaseError` for key ``name`` of this table."""
        self.context.fail(self.key(name), message)

    def has(self, name: str) -> bool:
        """Whether ``name`` is given; the key counts as one this table accepts."""
        self.known.add(name)
        return name in self.data

    def raw(self, name: str, default=MISSING):
        """The value as TOML gave it; a missing required key is reported as the misspelling
        nearest to it, where there is one, rather than as absent."""
        self.read.add(name)
        self.known.add(name)
        if name in self.data:
            return self.data[name]
        if default is MISSING:
            misspelt = [
                k
                for k in self.data
                if k not in self.known
                and len(str(k)) <= 4 * ECHO
                and difflib.get_close_matches(name, [str(k)], n=1, cutoff=0.6)
            ]
            if misspelt:
                self.fail(misspelt[0], f"is not a known key; did you mean {name!r}?")
            self.fail(name, "is missing")
        return default

    def get(self, name: str, kind: str, default=MISSING):
        """A quantity of ``kind`` (see :mod:`advisor.casefile.units`) in its SI unit."""
        value = self.raw(name, default)
        if value is default and default is not MISSING:
            return default
        return self.quantity(name, value, kind)

    def quantity(self, name: str, value, kind: str) -> float:
        """``value``, written under key ``name``, as a quantity of ``kind``."""
        try:
            return quantity(value, kind)
        except UnitError as error:
            self.fail(name, str(error))

    def point(self, name: str, default=MISSING):
        """A point [x, y] of two lengths, in m."""
        value = self.raw(name, default)
        if value is default and default is not MISSING:
            return default
        if not (isinstance(value, list) and len(value) == 2):
            self.fail(name, f"expected a point [x, y] of two lengths, got {echo(value)}")
        return (self.quantity(name, value[0], "length"), self.quantity(name, value[1], "length"))

    def text(self, name: str, default=MISSING, choices=None) -> str:
        """A name; with ``choices``, one of them."""
        value = self.raw(name, default)
        if value is default and default is not MISSING:
            return default
        if not isinstance(value, str) or not value.strip():
            self.fail(name, f"expected a name (text), got {echo(value)}")
        if choices is not None and value not in choices:
            wanted = f"must be one of {list(choices)}, got {echo(value)}"
            self.fail(name, wanted + suggest(value, choices))
        return value

    def flag(self, name: str, default: bool) -> bool:
        """true or false."""
        value = self.raw(name, default)
        if not isinstance(value, bool):
            self.fail(name, f"expected true or false, got {echo(value)}")
        return value

    def table(self, name: str, default=MISSING) -> Table | None:
        """The sub-table ``name``."""
        value = self.raw(name, default)
        if value is default and default is not MISSING:
            return default
        if not isinstance(value, dict):
            self.fail(name, f"expected a table, got {echo(value)}")
        return Table(value, self.key(name), self.context)

    def tables(self, name: str) -> list[Table]:
        """The array of tables ``[[name]]`` (a single table counts as one)."""
        value = self.raw(name, [])
        if isinstance(value, dict):
            value = [value]
        if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
            self.fail(name, "expected a list of tables ([[...]])")
        return [Table(v, f"{self.key(name)}[{i}]", self.context) for i, v in enumerate(value)]

    def done(self) -> None:
        """Refuse the first key that was never read, naming the keys this table accepts."""
        unknown = [k for k in self.data if k not in self.read]
        if unknown:
            name = unknown[0]
            known = sorted(self.known | self.read)
            self.fail(
                name,
                "is not a known key"
                + suggest(name, known)
                + (f" (keys here: {', '.join(known)})" if known else ""),
            )


def check_tree(data: dict, context: Context) -> None:
    """Refuse, before anything is read, tables or arrays nested more than :data:`DEEPEST`
    deep and keys or text holding control characters (NUL, escape, line breaks ...), which
    would end up raw in reports, tables and file names.

    The walk keeps its own stack, so no depth of nesting exhausts Python's.
    """
    stack: list[tuple[str, object, int]] = [("", data, 0)]
    while stack:
        path, value, depth = stack.pop()
        if isinstance(value, str):
            bad = control_character(value)
            if bad is not None:
                context.fail(path, f"holds the control character {bad} in {echo(value)}")
            continue
        if not isinstance(value, dict | list):
            continue
        if depth >= DEEPEST:
            context.fail(path, f"is nested more than {DEEPEST} tables or arrays deep")
        items = value.items() if isinstance(value, dict) else enumerate(value)
        for key, item in items:
            if isinstance(value, dict):
                bad = control_character(str(key))
                here = f"{path}.{key}" if path else str(key)
                if bad is not None:
                    context.fail(path or here, f"the key {echo(key)} holds the character {bad}")
            else:
                here = f"{path}[{key}]"
            stack.append((here, item, depth + 1))


def nesting_key(text: str, deepest: int = DEEPEST) -> tuple[int, str] | None:
    """The line and key path where brackets and braces, outside strings and comments, first
    open more than ``deepest`` deep (for a file too deeply nested for the TOML parser)."""
    line = _nesting_line(text, deepest)
    if line is None:
        return None
    lines = text.splitlines()
    table = [path for path, start, end in _table_blocks(lines) if start <= line <= end][-1]
    key = lines[line - 1].split("=", 1)[0].strip().strip("\"'") if line <= len(lines) else ""
    return line, ".".join(part for part in (table, key) if part) or "(top)"


def _nesting_line(text: str, deepest: int) -> int | None:
    depth, quote, line = 0, "", 1
    previous = ""
    for character in text:
        if character == "\n":
            line += 1
            if quote in ("#", '"', "'"):  # a comment or a one-line string ends here
                quote = ""
        elif quote == "#":
            pass
        elif quote:
            if character == quote and previous != "\\":
                quote = ""
        elif character in "\"'#":
            quote = character
        elif character in "[{":
            depth += 1
            if depth > deepest:
                return line
        elif character in "]}":
            depth -= 1
        previous = character
    return None
