"""report.md: the report as Markdown, images referenced by their path relative to the report.

Text is escaped for Markdown: HTML's ``<``, ``>`` and ``&`` become entities and the characters
that Markdown reads as markup (emphasis, code, links, table bars; a leading ``#``, ``+``,
``-`` or ``>``) are backslash-escaped, so a name like ``*core*`` or ``a|b`` stays text.
"""

from __future__ import annotations

import html
import re
from pathlib import Path
from urllib.parse import quote

from .atomic import write_text
from .report_document import (
    Block,
    Bullets,
    Callout,
    Facts,
    Listing,
    Paragraph,
    Picture,
    Report,
    Table,
)

_MARKUP = re.compile(r"([\\`*_\[\]|~])")


def escape_markdown(text: str) -> str:
    """``text`` safe to place in Markdown prose or a table cell."""
    escaped = _MARKUP.sub(r"\\\1", html.escape(str(text), quote=False)).replace("\n", " ")
    return "\\" + escaped if escaped[:1] in ("#", "+", "-", ">") else escaped


def _block(block: Block) -> str:
    e = escape_markdown
    if isinstance(block, Paragraph):
        return e(block.text)
    if isinstance(block, Facts):
        return "\n".join(f"- **{e(k)}:** {e(v)}" for k, v in block.pairs)
    if isinstance(block, Table):
        lines = [f"*{e(block.caption)}*", ""] if block.caption else []
        lines.append("| " + " | ".join(e(c) for c in block.columns) + " |")
        lines.append("|" + "|".join(" --- " for _ in block.columns) + "|")
        lines += ["| " + " | ".join(e(cell) for cell in row) + " |" for row in block.rows]
        return "\n".join(lines)
    if isinstance(block, Bullets):
        lead = [e(block.lead), ""] if block.lead else []
        return "\n".join(lead + [f"- {e(item)}" for item in block.items])
    if isinstance(block, Listing):
        lead = [e(block.lead), ""] if block.lead else []
        return "\n".join([*lead, "```toml", block.text.rstrip("\n"), "```"])
    if isinstance(block, Picture):
        title = e(block.title)
        return f"![{title}]({quote(block.path)})\n\n**{title}.** {e(block.caption)}"
    if isinstance(block, Callout):
        return f"> **{e(block.title.upper())}** — {e(block.text)}"
    raise TypeError(f"no Markdown for a {type(block).__name__} block")


def render_markdown(report: Report) -> str:
    """The report as a Markdown string."""
    out = [f"# {escape_markdown(report.title)}", "", escape_markdown(report.lede), ""]
    out += [
        "Contents: "
        + " · ".join(f"[{escape_markdown(p.heading)}](#{p.anchor})" for p in report.parts),
        "",
    ]
    for part in report.parts:
        out += [f'<a id="{part.anchor}"></a>', "", f"## {escape_markdown(part.heading)}", ""]
        for block in part.blocks:
            out += [_block(block), ""]
    return "\n".join(out).rstrip() + "\n"


def write_markdown_report(report: Report, path: Path) -> None:
    """Write ``report`` to ``path`` as Markdown, atomically."""
    write_text(Path(path), render_markdown(report))
