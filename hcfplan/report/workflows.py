"""``report.html`` of a scan folder and of a compare folder, from the files already in them
(``scan.json``, ``table.csv``, the point records; ``comparison.json``) and their PNG figures.
"""

from __future__ import annotations

import csv
import json
from pathlib import Path

from hcfplan.report.page import (
    Markup,
    badge,
    cautions_section,
    config_hash,
    esc,
    figures_section,
    job_line,
    material_sources,
    number,
    page,
    provenance_section,
    sources_section,
    table,
)
from hcfplan.report.run import headline_section, limits_section, verdict_section

#: Scan table columns shown: (header, column of table.csv, display scale).
SCAN_COLUMNS = (
    ("compressed FWHM (fs)", "compressed.fwhm_s", 1e-15),
    ("compressed peak (GW)", "compressed.peak_power_w", 1e9),
    ("THz cutoff (THz)", "thz.cutoff_hz", 1e12),
    ("SF margin P_cr/P", "margins.self_focusing", 1.0),
    ("required SF margin", "margins.self_focusing_required", 1.0),
    ("ion. fraction", "margins.ionization_fraction", 1.0),
    ("rating margin", "margins.rating_margin", 1.0),
)
#: Columns of multimode scans (``fiber.modes`` > 1), shown when a point has them.
MULTIMODE_COLUMNS = (
    ("EH11 share (%)", "output.eh11_fraction", 1e-2),
    ("compressed FWHM, whole beam (fs)", "compressed.beam_fwhm_s", 1e-15),
)

SCAN_CAPTIONS = {
    "spectrum_map": "Output spectrum of every point against the varied key",
    "results": "Main results and margins against the varied key (points beyond a modelled "
               "limit shaded; void results as hollow grey markers)",
    "results_map": "Maps of the main results over the two varied keys",
    "eh11_fraction": "EH11 share of the exit energy against the varied keys (multimode runs)",
}

COMPARE_CAPTIONS = {
    "compare_spectra": "Fiber output spectra of A and B",
    "compare_pulses": "Compressed pulses of A and B",
    "compare_thz": "Generated THz spectra of A and B",
}


def _float(text: str):
    if text in ("", None):
        return None
    try:
        return float(text)
    except ValueError:
        return text


def _read_table(path: Path) -> list[dict]:
    with open(path, newline="", encoding="utf-8") as handle:
        return list(csv.DictReader(handle))


def _first_record(folder: Path, keys: list[str]) -> dict:
    """The first readable point record (for the config and the data sources)."""
    for key in keys:
        try:
            record = json.loads((folder / "points" / f"{key}.json").read_text(encoding="utf-8"))
        except (OSError, ValueError):
            continue
        if isinstance(record, dict) and isinstance(record.get("summary"), dict):
            return record
    return {}


def scan_report_html(folder: Path, command: str | None) -> str:
    folder = Path(folder)
    state = json.loads((folder / "scan.json").read_text(encoding="utf-8"))
    rows = _read_table(folder / "table.csv")
    varied = [v["key"] for v in state.get("vary", [])]
    record = _first_record(folder, [r.get("key", "") for r in rows])
    first, config = record.get("summary") or {}, record.get("config") or {}
    counts: dict[str, int] = {}
    for r in rows:
        counts[r.get("verdict", "")] = counts.get(r.get("verdict", ""), 0) + 1
    vary_text = "; ".join(f"{v['key']} over {len(v['values'])} values "
                          f"({number(min(v['values']))} to {number(max(v['values']))})"
                          if all(isinstance(x, (int, float)) for x in v["values"])
                          else f"{v['key']} over {', '.join(map(str, v['values']))}"
                          for v in state.get("vary", []))
    job = (job_line(config).replace("Plan:", "Plan (first point):", 1).rstrip(".")
           + f"; scanned: {vary_text}.")
    summary_line = ", ".join(f"{n} {status or 'unknown'}" for status, n in sorted(counts.items()))
    body = [f"<h2>Verdicts</h2><p>{len(rows)} points: {esc(summary_line)}.</p>"]
    reasons = [[Markup(", ".join(f"<code>{esc(r.get(k, ''))}</code>" for k in varied)),
                badge(r.get("verdict", "")), r.get("verdict_reasons", "")]
               for r in rows if r.get("verdict_reasons")]
    if reasons:
        body.append(table(["point", "verdict", "reasons"], reasons))
    columns = SCAN_COLUMNS + tuple(c for c in MULTIMODE_COLUMNS
                                   if any(r.get(c[1]) not in ("", None) for r in rows))
    header = varied + ["status", "verdict"] + [h for h, _, _ in columns] + ["beyond limits"]
    lines = []
    for r in rows:
        line = [r.get(k, "") for k in varied] + [r.get("status", ""), badge(r.get("verdict", ""))]
        line += [number(_float(r.get(col, "")), scale) for _, col, scale in columns]
        binding = r.get("margins.binding") or ("" if r.get("status") == "ok"
                                               else r.get("message", ""))
        line.append(Markup(f'<span class="exceeds">{esc(binding)}</span>') if binding else "-")
        lines.append(line)
    start = len(varied) + 2
    body.append("<h2>Results and limits per point</h2>"
                + table(header, lines, set(range(start, start + len(SCAN_COLUMNS))))
                + "<p class=\"muted\">Every column of every point, SI, is in "
                  "<code>table.csv</code>; margins are limit / value, met when at least the "
                  "required value.</p>")
    body.append("<h2>Inputs</h2><p>Base config <code>" + esc(state.get("config", "")) + "</code>"
                + (", overrides " + ", ".join(f"<code>{esc(o)}</code>"
                                               for o in state.get("overrides", []))
                   if state.get("overrides") else "") + ".</p>")
    from hcfplan.report.run import inputs_section

    if config:
        body.append(inputs_section(config).replace("<h2>Inputs</h2>",
                                                   "<p>The first point, resolved:</p>"))
    body.append(cautions_section())
    figures = [name for stem in SCAN_CAPTIONS if (folder / (name := f"{stem}.png")).exists()]
    body.append(figures_section(folder, figures, SCAN_CAPTIONS))
    checks = ((first.get("limits") or {}).get("checks")) or []
    body.append(sources_section(material_sources(config) + [c.get("source", "") for c in checks]))
    body.append(provenance_section(command, [("scan definition hash",
                                              state.get("definition", "-"))]))
    return page("hcfplan scan report", job, "".join(body))


def compare_report_html(folder: Path, command: str | None, configs=None) -> str:
    folder = Path(folder)
    data = json.loads((folder / "comparison.json").read_text(encoding="utf-8"))
    labels = data.get("labels") or ["A", "B"]
    sides = [data.get("a") or {}, data.get("b") or {}]
    if configs is None:
        configs = [(s.get("summary") or {}).get("config") or {} for s in sides]
    job = (f"Comparison. A = {labels[0]}: {job_line(configs[0])} "
           f"B = {labels[1]}: {job_line(configs[1])}")
    rows = []
    for r in data.get("rows") or []:
        scale = r.get("scale") or 1.0
        cells = [f"void ({r[k + '_void']})" if r.get(k + "_void") else number(r.get(k), scale)
                 for k in ("a", "b")]
        rows.append([r.get("label", "") + (f" ({r['unit']})" if r.get("unit") else ""), *cells,
                     number(r.get("difference"), scale), number(r.get("ratio"), digits=3)])
    body = ["<h2>Side by side</h2>"
            + table(["quantity", "A", "B", "B - A", "B / A"], rows, {1, 2, 3, 4})]
    sources: list[str] = []
    for name, label, side, config in zip("AB", labels, sides, configs, strict=True):
        summary = side.get("summary") or {}
        limits = summary.get("limits") or {}
        checks = limits.get("checks") or []
        part = (verdict_section(summary).replace("<h2>Verdict</h2>", "<h3>Verdict</h3>")
                + headline_section(summary).replace("<h2>Headline results</h2>",
                                                    "<h3>Headline results</h3>")
                + limits_section(checks, limits.get("acceptable_note")).replace(
                    "<h2>Limits and margins</h2>", "<h3>Limits and margins</h3>"))
        body.append(f"<h2>{name} = {esc(label)}</h2>{part}")
        sources += material_sources(config) + [c.get("source", "") for c in checks]
    from hcfplan.report.run import inputs_section

    for name, config in zip("AB", configs, strict=True):
        body.append(inputs_section(config).replace("<h2>Inputs</h2>",
                                                   f"<h2>Inputs of {name}</h2>"))
    warnings = [f"{n}: {w}" for n, s in zip("AB", sides, strict=True)
                for w in (s.get("summary") or {}).get("warnings") or []]
    body.append(cautions_section(warnings))
    figures = [name for stem in COMPARE_CAPTIONS
               if (folder / (name := f"{stem}.png")).exists()]
    body.append(figures_section(folder, figures, COMPARE_CAPTIONS))
    body.append(sources_section(sources))
    body.append(provenance_section(command, [(f"config hash {n}", config_hash(c))
                                             for n, c in zip("AB", configs, strict=True)]))
    return page("hcfplan compare report", job, "".join(body))


def write_scan_report(folder, *, command: str | None = None) -> Path:
    """Write ``report.html`` into a finished scan folder (``scan.json``, ``table.csv`` and the
    point records written) and return its path.

    References
    ----------
    None: a page of the numbers already computed; no physics.
    """
    from hcfplan.numerics.storage import write_text

    path = Path(folder) / "report.html"
    write_text(path, scan_report_html(Path(folder), command))
    return path


def write_compare_report(folder, *, configs=None, command: str | None = None) -> Path:
    """Write ``report.html`` into a compare folder (``comparison.json`` and the figures
    written) and return its path. ``configs``: the resolved configs of A and B (default: the
    ``config`` of each side's summary in ``comparison.json``).

    References
    ----------
    None: a page of the numbers already computed; no physics.
    """
    from hcfplan.numerics.storage import write_text

    path = Path(folder) / "report.html"
    write_text(path, compare_report_html(Path(folder), command, configs))
    return path
