"""The report as one self-contained HTML page: styles inline, plots as inline SVG, nothing
fetched from anywhere, readable on screen and when printed to PDF from a browser.

Every section is a ``<section id="...">``; every number cell of a table carries the result
key it shows and its SI value (``data-key``, ``data-si``), so the page can be checked
against the study and copied from without retyping.
"""

from __future__ import annotations

from html import escape

from scaleup.report.document import Code, Figure, Items, Paragraph, Section, Table

STYLE = """
:root { --ink: #1b1f24; --muted: #57606a; --rule: #d0d7de; --warn: #9a6700;
        --warn-bg: #fff8c5; --caution: #82071e; --caution-bg: #ffebe9; }
body { font: 10.5pt/1.45 system-ui, -apple-system, "Segoe UI", sans-serif; color: var(--ink);
       max-width: 60em; margin: 2em auto; padding: 0 1.5em; }
h1 { font-size: 1.6em; margin-bottom: 0.2em; }
h2 { font-size: 1.2em; border-bottom: 1px solid var(--rule); padding-bottom: 0.2em;
     margin-top: 1.8em; }
.subtitle { color: var(--muted); margin-top: 0; }
table { border-collapse: collapse; margin: 0.8em 0; font-size: 0.92em; }
th, td { border: 1px solid var(--rule); padding: 0.25em 0.5em; text-align: left;
         vertical-align: top; }
th { background: #f6f8fa; }
td[data-si] { text-align: right; font-variant-numeric: tabular-nums; }
caption { caption-side: bottom; color: var(--muted); text-align: left; padding-top: 0.3em; }
figure { margin: 1em 0; }
figure svg { max-width: 100%; height: auto; }
figcaption { color: var(--muted); font-size: 0.9em; }
ul.warning li { background: var(--warn-bg); color: var(--warn); margin: 0.2em 0;
                padding: 0.2em 0.5em; list-style: none; }
ul.caution li { background: var(--caution-bg); color: var(--caution); margin: 0.3em 0;
                padding: 0.3em 0.5em; list-style: none; font-weight: 500; }
pre { background: #f6f8fa; padding: 0.8em; overflow-x: auto; font-size: 0.85em; }
nav ol { columns: 2; }
@media print {
  body { max-width: none; margin: 0; font-size: 9.5pt; }
  nav { display: none; }
  section, figure, table { break-inside: avoid; }
  h2 { break-after: avoid; }
  details { display: block; } details > summary { display: none; }
  details pre { white-space: pre-wrap; }
  ul.warning li, ul.caution li, th { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}
@page { size: A4; margin: 16mm 14mm; }
"""


def _table(table: Table) -> str:
    head = "".join(f"<th>{escape(h)}</th>" for h in table.headers)
    body = []
    for row in table.rows:
        cells = []
        for cell in row:
            attrs = ""
            if cell.key is not None:
                attrs += f' data-key="{escape(cell.key)}"'
            if cell.si is not None:
                attrs += f' data-si="{cell.si!r}"'
            cells.append(f"<td{attrs}>{escape(cell.text)}</td>")
        body.append("<tr>" + "".join(cells) + "</tr>")
    caption = f"<caption>{escape(table.caption)}</caption>" if table.caption else ""
    return (f"<table>{caption}<thead><tr>{head}</tr></thead><tbody>" + "".join(body)
            + "</tbody></table>")


def _block(block) -> str:
    if isinstance(block, Paragraph):
        return f"<p>{escape(block.text)}</p>"
    if isinstance(block, Table):
        return _table(block)
    if isinstance(block, Figure):
        # the SVG is matplotlib's own output, inserted as markup on purpose
        return (f'<figure id="figure-{escape(block.name)}">{block.svg}'
                f"<figcaption>{escape(block.caption)}</figcaption></figure>")
    if isinstance(block, Items):
        entries = "".join(f"<li>{escape(e)}</li>" for e in block.entries)
        return f'<ul class="{escape(block.kind)}">{entries}</ul>'
    if isinstance(block, Code):
        return (f"<details open><summary>{escape(block.summary)}</summary>"
                f"<pre>{escape(block.text)}</pre></details>")
    raise TypeError(f"cannot render {type(block).__name__}")


def render_html(title: str, subtitle: str, sections: list[Section]) -> str:
    """The whole page as one string."""
    toc = "".join(f'<li><a href="#{escape(s.id)}">{escape(s.title)}</a></li>' for s in sections)
    body = "".join(f'<section id="{escape(s.id)}"><h2>{escape(s.title)}</h2>'
                   + "".join(_block(b) for b in s.blocks) + "</section>" for s in sections)
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            f"<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
            f"<title>{escape(title)}</title><style>{STYLE}</style></head><body>"
            f"<header><h1>{escape(title)}</h1><p class=\"subtitle\">{escape(subtitle)}</p>"
            f"</header><nav><ol>{toc}</ol></nav>{body}</body></html>\n")
