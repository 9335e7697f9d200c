"""Design-review reports of a saved study: one self-contained HTML page, or Markdown.

``write_report(campaign, study, path)`` gathers the study, its fit and runs through the
service layer, builds the sections (:mod:`scaleup.report.sections`) and writes them whole
(a half-written report never appears under the real name).
"""

from __future__ import annotations

from pathlib import Path

FORMATS = ("html", "md")


def render(data: dict, fmt: str = "html") -> str:
    """The report text of gathered study data (see :func:`scaleup.report.content.gather`)."""
    from scaleup.report.sections import build

    if fmt not in FORMATS:
        raise ValueError(f"unknown report format {fmt!r}; choose html or md")
    study = data["study"]
    title = f"Scale-up design review: {study['name']}"
    subtitle = (f"{study['kind']} study {study['id']} of {data['campaign']}; report made "
                f"{data['generated_at']}. Projections are estimates: read the cautions.")
    sections = build(data)
    if fmt == "md":
        from scaleup.report.markdown import render_markdown

        return render_markdown(title, subtitle, sections)
    from scaleup.report.html import render_html

    return render_html(title, subtitle, sections)


def write_report(campaign, study: str | int, path: str | Path, fmt: str | None = None) -> dict:
    """Write the report of ``study`` to ``path``; the format follows ``fmt`` or the suffix.

    Returns ``{"path", "format", "study_id", "sections", "warnings", "cautions"}``.
    """
    from scaleup.report.content import gather
    from scaleup.report.sections import TITLES, collect_warnings
    from scaleup.store.files import write_atomically

    path = Path(path)
    fmt = fmt or ("md" if path.suffix.lower() in (".md", ".markdown") else "html")
    data = gather(campaign, study)
    text = render(data, fmt)
    write_atomically(path, lambda tmp: tmp.write_text(text, encoding="utf-8"))
    return {"path": str(path), "format": fmt, "study_id": data["study"]["id"],
            "sections": list(TITLES), "warnings": collect_warnings(data),
            "cautions": list(data["study"]["results"].get("cautions") or [])}
