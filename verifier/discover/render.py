"""The "Discoveries" section of ``verifier report`` (Markdown and HTML), read from the
store's ``discoveries`` table (:mod:`verifier.discover.record`) and nothing else."""

from __future__ import annotations

from html import escape

from .record import load_all

__all__ = ["discoveries_markdown", "discoveries_html"]

TITLE = "Discoveries"
NOTE = ("Relations and hypotheses proposed by `verifier discover`: each relation was checked "
        "exactly on every case listed; each hypothesis selects no failing case of its run. "
        "Beyond those cases they are conjectures, tested further where shown.")


def _relation_rows(record: dict) -> list[tuple[str, str]]:
    rows = [(f"[{i}] {r['text']}", f"proved on {r['cases']:,} cases")
            for i, r in enumerate(record.get("relations", []), 1)]
    for i, (name, o) in enumerate(sorted((record.get("further_outcomes") or {}).items()), 1):
        rows.append((f"claim {name}", f"further: {o['verdict']} ({o['holds']:,} hold, "
                                      f"{o['fails']:,} fail)"))
    for r in record.get("rejected", []):
        rows.append((f"rejected {r['text']}", f"fails on {r['fails_on']}"))
    return rows


def discoveries_markdown(store) -> str:
    """The section as Markdown ('' when the store holds no discovery)."""
    records = load_all(store)
    if not records:
        return ""
    lines = ["", f"## {TITLE}", "", NOTE.replace("`", "`")]
    for record in records:
        if record["kind"] == "relations":
            lines += ["", f"### Relations: {record['name']} ({record['cases']:,} cases, "
                          f"degree {record['degree']})", ""]
            lines += [f"- {a}: {b}" for a, b in _relation_rows(record)]
            if record.get("constants"):
                lines.append("- constant: " + ", ".join(f"{c['name']} = {c['value']}"
                                                       for c in record["constants"]))
        else:
            lines += ["", f"### Hypotheses: {record['name']}", ""]
            lines += [f"- {line.strip()}" for line in record.get("lines", [])]
    return "\n".join(lines) + "\n"


def discoveries_html(store) -> str:
    """The section as HTML ('' when the store holds no discovery)."""
    records = load_all(store)
    if not records:
        return ""
    out = [f'<h2 id="discoveries">{TITLE}</h2>', f"<p>{escape(NOTE)}</p>"]
    for record in records:
        if record["kind"] == "relations":
            out.append(f"<h3>Relations: {escape(record['name'])} ({record['cases']:,} cases, "
                       f"degree {record['degree']})</h3>")
            out.append("<table><tbody>" + "".join(
                f"<tr><td><code>{escape(a)}</code></td><td>{escape(b)}</td></tr>"
                for a, b in _relation_rows(record)) + "</tbody></table>")
            if record.get("constants"):
                out.append("<p>constant: " + escape(", ".join(
                    f"{c['name']} = {c['value']}" for c in record["constants"])) + "</p>")
        else:
            out.append(f"<h3>Hypotheses: {escape(record['name'])}</h3>")
            out.append("<ul>" + "".join(f"<li>{escape(line.strip())}</li>"
                                        for line in record.get("lines", [])) + "</ul>")
    return "\n".join(out) + "\n"
