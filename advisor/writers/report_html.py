"""report.html: the report as one self-contained page.

Images are embedded as base64 data URIs and the style sheet is inline, so the file can be
mailed or archived alone and opens without a network. Every piece of text goes through
:func:`html.escape`.
"""

from __future__ import annotations

import base64
import html
from pathlib import Path

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
from .version import soakwise_version

TONES = ("adequate", "marginal", "inadequate", "caution")
MEDIA_TYPES = {".png": "image/png", ".svg": "image/svg+xml", ".gif": "image/gif"}

STYLE = """
:root { --ink: #1d3557; --muted: #5c5c5c; --line: #d5dde6; --pale: #f3f6f9;
  --adequate: #6b8f23; --marginal: #b8860b; --inadequate: #c8553d; --caution: #8e6c8a; }
* { box-sizing: border-box; }
body { margin: 0; color: #1f2328; background: #fff;
  font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "DejaVu Sans", sans-serif; }
header { background: var(--ink); color: #fff; padding: 1.6rem 2rem 1.2rem; }
header .brand { margin: 0; letter-spacing: .2em; font-size: .75rem; text-transform: uppercase;
  opacity: .8; }
header h1 { margin: .2rem 0 .4rem; font-size: 1.7rem; font-weight: 600; }
header .lede { margin: 0; max-width: 60rem; opacity: .92; }
nav { border-bottom: 1px solid var(--line); padding: .6rem 2rem; background: var(--pale); }
nav ol { margin: 0; padding: 0; list-style: none; display: flex; flex-wrap: wrap;
  gap: .3rem 1.2rem; }
nav a { color: var(--ink); text-decoration: none; font-size: .9rem; }
nav a:hover { text-decoration: underline; }
main { padding: 0 2rem 2rem; max-width: 72rem; }
section { margin-top: 2rem; }
h2 { color: var(--ink); font-size: 1.25rem; border-bottom: 2px solid var(--ink);
  padding-bottom: .2rem; }
dl.facts { display: grid; grid-template-columns: minmax(12rem, 22rem) 1fr; gap: .25rem 1rem; }
dl.facts dt { color: var(--muted); }
dl.facts dd { margin: 0; }
.scroll { overflow-x: auto; }
table { border-collapse: collapse; margin: .6rem 0 1.2rem; font-size: .9rem; }
caption { text-align: left; font-weight: 600; color: var(--ink); padding-bottom: .3rem; }
th, td { border-bottom: 1px solid var(--line); padding: .3rem .7rem .3rem 0; text-align: left;
  vertical-align: top; }
th { color: var(--muted); font-weight: 600; }
td:not(:last-child) { white-space: nowrap; }
figure { margin: 1rem 0 1.6rem; }
figure img { max-width: 100%; height: auto; border: 1px solid var(--line); }
figcaption { color: var(--muted); font-size: .88rem; max-width: 60rem; }
.callout { border-left: 6px solid var(--caution); background: var(--pale);
  padding: .6rem 1rem; margin: .8rem 0; max-width: 60rem; }
.callout .title { margin: 0; font-weight: 700; text-transform: uppercase; letter-spacing: .06em; }
.callout p { margin: .2rem 0; }
.tone-adequate { border-color: var(--adequate); } .tone-adequate .title { color: var(--adequate); }
.tone-marginal { border-color: var(--marginal); } .tone-marginal .title { color: var(--marginal); }
.tone-inadequate { border-color: var(--inadequate); }
.tone-inadequate .title { color: var(--inadequate); }
.tone-caution .title { color: var(--caution); }
footer { color: var(--muted); font-size: .8rem; padding: 1rem 2rem 2rem;
  border-top: 1px solid var(--line); }
p, li, dd, dt, figcaption, h1 { overflow-wrap: anywhere; }
.scroll { max-width: 100%; -webkit-overflow-scrolling: touch; }
@media (max-width: 600px) {
  header, nav, footer { padding-left: 1rem; padding-right: 1rem; }
  main { padding: 0 1rem 1.5rem; }
  header h1 { font-size: 1.35rem; }
  dl.facts { grid-template-columns: 1fr; gap: 0; }
  dl.facts dt { margin-top: .5rem; font-weight: 600; }
}
"""


def _e(text: str) -> str:
    return html.escape(str(text), quote=True)


def data_uri(path: Path) -> str:
    """The file at ``path`` as a base64 data URI (PNG, SVG or GIF)."""
    path = Path(path)
    media = MEDIA_TYPES.get(path.suffix.lower())
    if media is None:
        raise ValueError(f"cannot embed {path.name}: only {sorted(MEDIA_TYPES)} images")
    return f"data:{media};base64,{base64.b64encode(path.read_bytes()).decode('ascii')}"


def _block(block: Block, root: Path) -> str:
    if isinstance(block, Paragraph):
        return f"<p>{_e(block.text)}</p>"
    if isinstance(block, Facts):
        items = "".join(f"<dt>{_e(k)}</dt><dd>{_e(v)}</dd>" for k, v in block.pairs)
        return f'<dl class="facts">{items}</dl>'
    if isinstance(block, Table):
        caption = f"<caption>{_e(block.caption)}</caption>" if block.caption else ""
        head = "".join(f'<th scope="col">{_e(c)}</th>' for c in block.columns)
        body = "".join(
            "<tr>" + "".join(f"<td>{_e(cell)}</td>" for cell in row) + "</tr>"
            for row in block.rows
        )
        return (
            f'<div class="scroll"><table>{caption}<thead><tr>{head}</tr></thead>'
            f"<tbody>{body}</tbody></table></div>"
        )
    if isinstance(block, Bullets):
        lead = f"<p>{_e(block.lead)}</p>" if block.lead else ""
        items = "".join(f"<li>{_e(item)}</li>" for item in block.items)
        return f"{lead}<ul>{items}</ul>"
    if isinstance(block, Listing):
        lead = f"<p>{_e(block.lead)}</p>" if block.lead else ""
        return f'{lead}<div class="scroll"><pre>{_e(block.text)}</pre></div>'
    if isinstance(block, Picture):
        return (
            f'<figure><img src="{data_uri(root / block.path)}" alt="{_e(block.title)}">'
            f"<figcaption><strong>{_e(block.title)}.</strong> {_e(block.caption)}</figcaption>"
            "</figure>"
        )
    if isinstance(block, Callout):
        tone = block.tone if block.tone in TONES else "caution"
        return (
            f'<div class="callout tone-{tone}"><p class="title">{_e(block.title)}</p>'
            f"<p>{_e(block.text)}</p></div>"
        )
    raise TypeError(f"no HTML for a {type(block).__name__} block")


def render_html(report: Report, picture_root: Path) -> str:
    """The page as a string; pictures are read from ``picture_root / picture.path``."""
    root = Path(picture_root)
    contents = "".join(
        f'<li><a href="#{_e(part.anchor)}">{_e(part.heading)}</a></li>' for part in report.parts
    )
    sections = "\n".join(
        f'<section id="{_e(part.anchor)}">\n<h2>{_e(part.heading)}</h2>\n'
        + "\n".join(_block(block, root) for block in part.blocks)
        + "\n</section>"
        for part in report.parts
    )
    return (
        "<!DOCTYPE html>\n"
        '<html lang="en">\n<head>\n<meta charset="utf-8">\n'
        '<meta name="viewport" content="width=device-width, initial-scale=1">\n'
        '<meta name="generator" content="soakwise">\n'
        f"<title>{_e(report.title)}</title>\n<style>{STYLE}</style>\n</head>\n<body>\n"
        f'<header><p class="brand">soakwise report</p><h1>{_e(report.title)}</h1>'
        f'<p class="lede">{_e(report.lede)}</p></header>\n'
        f'<nav aria-label="Contents"><ol>{contents}</ol></nav>\n'
        f"<main>\n{sections}\n</main>\n"
        f"<footer>Written by soakwise {_e(soakwise_version('(version unknown)'))}. "
        "Engineering estimates from a simplified model: see the caution above.</footer>\n"
        "</body>\n</html>\n"
    )


def write_html_report(report: Report, path: Path, picture_root: Path | None = None) -> None:
    """Write ``report`` to ``path`` atomically, embedding pictures found relative to
    ``picture_root`` (default: the folder of ``path``)."""
    path = Path(path)
    write_text(path, render_html(report, path.parent if picture_root is None else picture_root))
