"""The report's document model: a few plain-text block types, its parts and their headings.

The renderers (:mod:`.report_html`, :mod:`.report_markdown`) escape every piece of text, so
names a user gave (materials, regions, edge groups, probes) can never become markup.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Paragraph:
    text: str


@dataclass(frozen=True)
class Facts:
    """Label–value pairs."""

    pairs: tuple[tuple[str, str], ...]


@dataclass(frozen=True)
class Table:
    columns: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    caption: str = ""


@dataclass(frozen=True)
class Bullets:
    items: tuple[str, ...]
    lead: str = ""


@dataclass(frozen=True)
class Listing:
    """Text shown as written, line by line (a file to copy), under an optional lead."""

    text: str
    lead: str = ""


@dataclass(frozen=True)
class Picture:
    """An image file, ``path`` relative to the report (POSIX separators)."""

    path: str
    title: str
    caption: str


@dataclass(frozen=True)
class Callout:
    """A boxed statement; ``tone`` is a rating (``adequate``, ``marginal``, ``inadequate``)
    or ``caution``."""

    title: str
    text: str
    tone: str


Block = Paragraph | Facts | Table | Bullets | Listing | Picture | Callout


@dataclass(frozen=True)
class Part:
    heading: str
    anchor: str
    blocks: tuple[Block, ...]


@dataclass(frozen=True)
class Report:
    title: str
    lede: str
    parts: tuple[Part, ...]


# The report's section headings, in order (tests look for them in the rendered page).
HEADINGS = {
    "verdict": "Can the lumped estimate be trusted here?",
    "target": "When each estimate reaches the target",
    "quench": "Cooling rates and times through temperatures",
    "freezing": "Freezing time: the field beside Plank and Pham",
    "curves": "The surface curves used and the temperatures passed through",
    "histories": "How the run went",
    "inputs": "What was modelled",
    "biot": "Biot numbers and what each one measures",
    "errors": "How far each lumped model strays from the field",
    "models": "Simple models that stand in for the field",
    "checks": "The run's own checks",
    "files": "Files in this results folder",
    "caution": "Before relying on these figures",
}


# Parts present only when the assessment carries their readings (or the model their curves).
PROCESS_PARTS = ("quench", "freezing", "curves")


def part(anchor: str, blocks: tuple[Block, ...] | list[Block]) -> Part:
    """The part of the report at ``anchor`` (a key of :data:`HEADINGS`) with ``blocks``."""
    return Part(HEADINGS[anchor], anchor, tuple(blocks))
