"""The report as one Markdown file: the same sections as the HTML page, tables as pipe
tables and plots as embedded SVG images (data URIs), so the file stands alone too."""

from __future__ import annotations

import base64

from scaleup.report.document import Code, Figure, Items, Paragraph, Section, Table


def _escape(text: str) -> str:
    """Pipe-table and inline safe: pipes escaped, line breaks flattened."""
    return " ".join(str(text).split()).replace("|", "\\|")


def _table(table: Table) -> str:
    lines = ["| " + " | ".join(_escape(h) for h in table.headers) + " |",
             "| " + " | ".join("---" for _ in table.headers) + " |"]
    lines += ["| " + " | ".join(_escape(c.text) for c in row) + " |" for row in table.rows]
    if table.caption:
        lines += ["", f"*{_escape(table.caption)}*"]
    return "\n".join(lines)


def _block(block) -> str:
    if isinstance(block, Paragraph):
        return block.text
    if isinstance(block, Table):
        return _table(block)
    if isinstance(block, Figure):
        data = base64.b64encode(block.svg.encode("utf-8")).decode("ascii")
        return f"![{_escape(block.caption)}](data:image/svg+xml;base64,{data})"
    if isinstance(block, Items):
        mark = {"warning": "**warning:** ", "caution": "**caution:** "}.get(block.kind, "")
        return "\n".join(f"- {mark}{_escape(e)}" for e in block.entries)
    if isinstance(block, Code):
        return f"{block.summary}:\n\n```json\n{block.text}\n```"
    raise TypeError(f"cannot render {type(block).__name__}")


def render_markdown(title: str, subtitle: str, sections: list[Section]) -> str:
    parts = [f"# {title}", f"*{subtitle}*"]
    for s in sections:
        parts.append(f'<a id="{s.id}"></a>\n\n## {s.title}')
        parts += [_block(b) for b in s.blocks]
    return "\n\n".join(parts) + "\n"
