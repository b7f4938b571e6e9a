"""The parts every ``report.html`` shares: the page with its style sheet, escaped tables,
figures embedded from the folder's PNG files, the cautions, data sources and provenance.

A report is one self-contained file: no script, no external style sheet, font or image (the
figures are the PNG files already in the folder, embedded as base64, not drawn again). It reads
on a laptop screen (one column, at most 72 rem wide) and prints (figures kept whole on a page,
links and backgrounds not needed).
"""

from __future__ import annotations

import base64
import dataclasses
import datetime as dt
import html
import math
from pathlib import Path
from typing import Any

#: The page's style sheet (screen and print). Colours: ours; layout: common practice.
STYLE = """
:root { --ink: #1b1f24; --muted: #57606a; --rule: #d0d7de; --bg: #ffffff;
  --valid: #1a7f37; --caution: #9a6700; --invalid: #cf222e; }
* { box-sizing: border-box; }
body { font: 15px/1.45 system-ui, -apple-system, "Segoe UI", Roboto, sans-serif;
  color: var(--ink); background: var(--bg); margin: 0; }
main { max-width: 72rem; margin: 0 auto; padding: 1.2rem 1.5rem 3rem; }
h1 { font-size: 1.45rem; margin: 0.2rem 0 0.3rem; }
h2 { font-size: 1.15rem; margin: 1.8rem 0 0.5rem; border-bottom: 1px solid var(--rule);
  padding-bottom: 0.2rem; }
h3 { font-size: 1rem; margin: 1.1rem 0 0.4rem; }
p.job { font-size: 1.05rem; margin: 0 0 0.6rem; }
p.meta, .muted { color: var(--muted); font-size: 0.9rem; }
table { border-collapse: collapse; margin: 0.4rem 0 0.8rem; font-size: 0.9rem; }
th, td { border-bottom: 1px solid var(--rule); padding: 0.25rem 0.6rem; text-align: left;
  vertical-align: top; }
th { background: #f6f8fa; font-weight: 600; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
.wide { overflow-x: auto; }
.sections { display: grid; grid-template-columns: repeat(auto-fill, minmax(21rem, 1fr));
  gap: 0 1.5rem; }
.sections h3 { margin-bottom: 0; }
.badge { display: inline-block; padding: 0.1rem 0.55rem; border-radius: 0.8rem; color: #fff;
  font-weight: 600; font-size: 0.9rem; }
.valid { background: var(--valid); } .caution { background: var(--caution); }
.invalid { background: var(--invalid); }
.exceeds { color: var(--invalid); font-weight: 600; }
ul.cautions li { margin-bottom: 0.35rem; }
figure { margin: 1rem 0 1.4rem; break-inside: avoid; page-break-inside: avoid; }
figure img { display: block; max-width: 100%; height: auto; border: 1px solid var(--rule); }
figcaption { color: var(--muted); font-size: 0.85rem; margin-top: 0.25rem; }
code { font-family: ui-monospace, SFMono-Regular, Menlo, Consolas, monospace;
  font-size: 0.85em; }
@media print {
  body { font-size: 10.5pt; }
  main { max-width: none; padding: 0; }
  h2 { break-after: avoid; page-break-after: avoid; }
  table { break-inside: auto; } tr { break-inside: avoid; }
  .wide { overflow: visible; }
  .badge { border: 1px solid #000; color: #000; background: none; }
}
"""

#: Note at the foot of every report (the house rule on estimates and cautions).
ESTIMATES_NOTE = ("hcfplan's numbers are model estimates, not approvals: the cell maker's "
                  "rating, local codes and licensed practice come first.")


def esc(value: Any) -> str:
    """HTML-escaped text of ``value``."""
    return html.escape(str(value), quote=True)


def number(value: Any, scale: float = 1.0, digits: int = 4) -> str:
    """A number divided by ``scale`` with ``digits`` significant digits; "-" for none."""
    if value is None or isinstance(value, bool):
        return "-" if value is None else ("yes" if value else "no")
    if isinstance(value, (int, float)):
        x = value / scale
        if not math.isfinite(x):
            return "-"
        if isinstance(value, int) and scale == 1.0:
            return str(value)
        return f"{x:.{digits}g}"
    return str(value)


def table(header: list[str], rows: list[list[Any]], numeric: set[int] = frozenset()) -> str:
    """An HTML table; cells are escaped unless given as :class:`Markup`; columns in
    ``numeric`` are right-aligned."""
    head = "".join(f"<th>{esc(h)}</th>" for h in header)
    body = []
    for row in rows:
        cells = []
        for i, cell in enumerate(row):
            text = cell.text if isinstance(cell, Markup) else esc(cell)
            cells.append(f'<td class="num">{text}</td>' if i in numeric else f"<td>{text}</td>")
        body.append("<tr>" + "".join(cells) + "</tr>")
    return (f'<div class="wide"><table><thead><tr>{head}</tr></thead><tbody>'
            + "".join(body) + "</tbody></table></div>")


@dataclasses.dataclass(frozen=True)
class Markup:
    """HTML that :func:`table` inserts as it is (already escaped)."""

    text: str


def badge(status: str) -> Markup:
    """The verdict status as a coloured label."""
    kind = status if status in ("valid", "caution", "invalid") else "caution"
    return Markup(f'<span class="badge {kind}">{esc(status)}</span>')


def figure(path: Path, caption: str) -> str:
    """``path`` (a PNG file in the folder) embedded as base64; "" when it is missing or not a
    PNG file."""
    try:
        data = Path(path).read_bytes()
    except OSError:
        return ""
    if not data.startswith(b"\x89PNG\r\n\x1a\n"):
        return ""
    encoded = base64.b64encode(data).decode("ascii")
    return (f'<figure><img src="data:image/png;base64,{encoded}" alt="{esc(caption)}">'
            f"<figcaption>{esc(caption)} (<code>{esc(Path(path).name)}</code>)</figcaption>"
            "</figure>")


def figures_section(folder: Path, names: list[str], captions: dict[str, str]) -> str:
    """The figures ``names`` (PNG file names in ``folder``), in that order."""
    parts = [figure(folder / name, captions.get(Path(name).stem, Path(name).stem))
             for name in names]
    parts = [p for p in parts if p]
    if not parts:
        return "<h2>Figures</h2><p class=\"muted\">No figures in this folder.</p>"
    return "<h2>Figures</h2>" + "".join(parts)


def cautions_section(warnings: list[str] = ()) -> str:
    """The cautions shown by every command that reports pressures, energies or limits, and
    the run's own warnings."""
    from hcfplan.limits.cautions import caution_lines

    items = "".join(f"<li>{esc(line)}</li>" for line in caution_lines())
    out = f'<h2>Cautions</h2><ul class="cautions">{items}</ul>'
    if warnings:
        out += ("<h3>Notes on this result</h3><ul>"
                + "".join(f"<li>{esc(w)}</li>" for w in warnings) + "</ul>")
    return out


def _walk_sources(value: Any, found: dict[str, None], depth: int = 0) -> None:
    if depth > 4 or value is None:
        return
    if dataclasses.is_dataclass(value) and not isinstance(value, type):
        for f in dataclasses.fields(value):
            item = getattr(value, f.name)
            if f.name in ("source", "sources") or f.name.endswith("_source"):
                _collect(item, found)
            else:
                _walk_sources(item, found, depth + 1)
    elif isinstance(value, (list, tuple)):
        for item in value:
            _walk_sources(item, found, depth + 1)


def _collect(item: Any, found: dict[str, None]) -> None:
    if isinstance(item, str) and item.strip():
        found[item.strip()] = None
    elif isinstance(item, (list, tuple)):
        for sub in item:
            _collect(sub[-1] if isinstance(sub, tuple) else sub, found)
    elif isinstance(item, dict):
        for sub in item.values():
            _collect(sub, found)


def material_sources(config: dict) -> list[str]:
    """The sources of the gas and crystal tables a resolved config uses (each table block
    names its source); tables that cannot be read are left out."""
    from hcfplan.errors import HcfplanError

    found: dict[str, None] = {}
    gas = config.get("gas") or {}
    names = list((gas.get("mixture") or {}).keys()) or ([gas["species"]]
                                                        if gas.get("species") else [])
    table_dir = gas.get("table_dir")
    for name in names:
        try:
            from hcfplan.materials.gases import load_gas_table

            _walk_sources(load_gas_table(name, [table_dir] if table_dir else []), found)
        except (HcfplanError, OSError, ValueError):
            continue
    thz = config.get("thz") or {}
    for crystal in (thz.get("crystal"), thz.get("detector_crystal")):
        if crystal:
            try:
                from hcfplan.materials.crystal_tables import load_crystal

                _walk_sources(load_crystal(crystal), found)
            except (HcfplanError, OSError, ValueError):
                continue
    return list(found)


def sources_section(sources: list[str]) -> str:
    """The data sources used, one per line, in order of first use."""
    unique = list(dict.fromkeys(s for s in sources if s))
    if not unique:
        return "<h2>Data sources used</h2><p class=\"muted\">None recorded.</p>"
    return ("<h2>Data sources used</h2><ul>" + "".join(f"<li>{esc(s)}</li>" for s in unique)
            + "</ul>")


def provenance_section(command: str | None, hashes: list[tuple[str, str]],
                       generated: dt.datetime | None = None) -> str:
    """Version, config hash(es), date (UTC) and the command that made the folder."""
    from hcfplan.version import __version__

    when = (generated or dt.datetime.now(dt.timezone.utc)).strftime("%Y-%m-%d %H:%M:%S UTC")
    rows = [["hcfplan version", __version__]]
    rows += [[label, Markup(f"<code>{esc(value)}</code>")] for label, value in hashes]
    rows += [["date", when], ["command", Markup(f"<code>{esc(command or '-')}</code>")]]
    return "<h2>Provenance</h2>" + table(["item", "value"], rows)


def page(title: str, job: str, body: str) -> str:
    """The whole HTML document: title, the job in one line, the sections, the foot note."""
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
            f"<title>{esc(title)}</title><style>{STYLE}</style></head><body><main>"
            f"<h1>{esc(title)}</h1><p class=\"job\">{esc(job)}</p>{body}"
            f"<p class=\"muted\">{esc(ESTIMATES_NOTE)}</p></main></body></html>\n")


def config_hash(resolved: dict) -> str:
    """The config's hash as scan points are keyed (sha256 of the canonical JSON of the
    resolved config, first 16 hex digits)."""
    from hcfplan.planning.scan import config_key

    return config_key(resolved)


def job_line(config: dict) -> str:
    """The job in one line, from a resolved config: pump -> fiber and fill -> THz crystal."""
    laser, fiber = config.get("laser") or {}, config.get("fiber") or {}
    gas, thz = config.get("gas") or {}, config.get("thz") or {}
    pump = (f"{number(laser.get('wavelength_nm'))} nm, {number(laser.get('fwhm_fs'))} fs, "
            f"{number(laser.get('energy_uj'))} uJ pulses")
    parts = [pump]
    kind = fiber.get("kind", "fiber")
    size = fiber.get("core_diameter_um")
    fib = f"{kind} fiber" + (f" ({number(size)} um core" if size else " (")
    fib += f"{', ' if size else ''}{number(fiber.get('length_m'))} m)"
    if gas:
        fill = gas.get("species") or " + ".join(f"{k} {number(v)}" for k, v in
                                                (gas.get("mixture") or {}).items())
        fib += f" filled with {fill} at {number(gas.get('pressure_bar'))} bar"
    parts.append(fib)
    if config.get("compressor"):
        parts.append("chirped-mirror compression")
    if thz:
        parts.append(f"THz in {thz.get('crystal')} ({number(thz.get('thickness_mm'))} mm)")
    return "Plan: " + " -> ".join(parts) + "."
