"""``report.html`` of a ``simulate`` run folder, from its ``summary.json`` and PNG figures."""

from __future__ import annotations

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

#: Headline results: (label, flat summary key, display scale, display unit).
HEADLINES = (
    ("coupled input energy", "input.launched_energy_j", 1e-6, "uJ"),
    ("input peak power", "input.peak_power_w", 1e9, "GW"),
    ("fiber transmission", "fiber.transmission", 1e-2, "%"),
    ("output bandwidth", "output.bandwidth_hz", 1e12, "THz"),
    ("output transform limit (FWHM)", "output.transform_limit_fwhm_s", 1e-15, "fs"),
    ("compressed FWHM", "compressed.fwhm_s", 1e-15, "fs"),
    ("compressed peak power", "compressed.peak_power_w", 1e9, "GW"),
    ("chirped-mirror bounces", "compressed.bounces", 1.0, ""),
    ("energy in the main lobe", "compressed.main_lobe_energy_fraction", 1e-2, "%"),
    ("EH11 share of the exit energy", "output.eh11_fraction", 1e-2, "%"),
    ("compressed FWHM, whole beam", "compressed.beam_fwhm_s", 1e-15, "fs"),
    ("compressed peak power, whole beam", "compressed.beam_peak_power_w", 1e9, "GW"),
    ("THz peak", "thz.peak_hz", 1e12, "THz"),
    ("THz cutoff", "thz.cutoff_hz", 1e12, "THz"),
    ("THz relative efficiency", "thz.relative_efficiency", 1.0, ""),
)

#: What each figure of a run shows (file stem -> caption).
CAPTIONS = {
    "thz_spectrum": "THz spectrum with the cutoff, coherence length, driving spectrum and "
                    "phase-matching map",
    "compressed_pulse": "Compressed pulse against its transform limit (linear, log) and the "
                        "residual phase",
    "spectral_evolution": "Spectral evolution along the fiber",
    "energy_ionization": "Energy and ionisation along the fiber",
    "temporal_in_out": "Temporal power before and after the fiber (uncompressed)",
    "spectrum_in_out": "Spectrum before and after the fiber",
    "bounces": "Peak power against the number of chirped-mirror bounces",
    "spread": "Prediction band over the input uncertainty",
    "mode_energy": "Energy per mode EH1m along the fiber (multimode run)",
    "mode_spectra": "Exit spectrum of each mode and of the whole beam (multimode run)",
}


def flat(summary: dict) -> dict:
    from hcfplan.planning.verdict import flat_summary

    return flat_summary(summary)


def verdict_section(summary: dict) -> str:
    """The verdict, its reasons (code and message) and the void numbers."""
    from hcfplan.planning.verdict import stored_verdict

    verdict = stored_verdict(summary)
    out = f"<h2>Verdict</h2><p>{badge(verdict.status).text} "
    out += {"valid": "converged and within the models' ranges (a statement about the numbers, "
                     "not an approval of the setup; the limits and cautions below still apply)",
            "caution": "the numbers stand, with the cautions listed",
            "invalid": "some numbers are not results (listed as void)"}.get(verdict.status, "")
    out += "</p>"
    if verdict.reasons:
        out += table(["code", "reason"], [[Markup(f"<code>{esc(r.code)}</code>"), r.message]
                                           for r in verdict.reasons])
    if verdict.void_fields:
        out += ("<p>Void numbers (kept in summary.json, not results): "
                + ", ".join(f"<code>{esc(k)}</code>" for k in verdict.void_fields) + "</p>")
    return out


def headline_section(summary: dict) -> str:
    from hcfplan.planning.verdict import stored_verdict

    values, verdict = flat(summary), stored_verdict(summary)
    rows = []
    for label, key, scale, unit in HEADLINES:
        if key not in values:
            continue
        value = values[key]
        reason = verdict.void_reason(key)
        shown = (f"void ({reason.code})" if reason is not None
                 and (value is not None or key in verdict.void_fields) else number(value, scale))
        rows.append([label, shown, unit])
    return "<h2>Headline results</h2>" + table(["quantity", "value", "unit"], rows, {1})


def inputs_section(config: dict) -> str:
    """The resolved config, one small table per section side by side (defaults filled in;
    unset keys left out)."""
    tables = []
    for section, keys in config.items():
        if not isinstance(keys, dict):
            continue
        rows = []
        for key, value in keys.items():
            if value is None:
                continue
            shown = (", ".join(number(v) for v in value) if isinstance(value, list)
                     else (", ".join(f"{k} {number(v)}" for k, v in value.items())
                           if isinstance(value, dict) else number(value)))
            rows.append([Markup(f"<code>{esc(key)}</code>"), shown])
        tables.append(f"<div><h3>[{esc(section)}]</h3>{table(['key', 'value'], rows)}</div>")
    return "<h2>Inputs</h2><div class=\"sections\">" + "".join(tables) + "</div>"


def limits_section(checks: list[dict], note: str | None) -> str:
    """Every limit check with its value, limit, margin against the required one and status."""
    rows = []
    for c in checks:
        status = c.get("status", "")
        rows.append([
            Markup(f"<code>{esc(c.get('name', ''))}</code>"),
            number(c.get("value")), number(c.get("limit")), c.get("unit", ""),
            number(c.get("margin"), digits=3),
            number(c.get("required"), digits=3),
            Markup(f'<span class="exceeds">{esc(status)}</span>' if status == "exceeds"
                   else esc(status)),
            c.get("source", ""),
        ])
    out = "<h2>Limits and margins</h2>"
    if note:
        out += f"<p>{esc(note)}</p>"
    out += table(["check", "value", "limit", "unit", "margin", "required", "status", "source"],
                 rows, {1, 2, 4, 5})
    return out + ("<p class=\"muted\">Margin = limit / value for a maximum (value / limit for a "
                  "minimum); a check is met when its margin is at least the required one.</p>")


def modes_section(summary: dict) -> str:
    """A multimode run's share of each mode EH1m at the launch and at the exit, the lost
    launch share and what the compressed and THz numbers describe ("" for one mode)."""
    inp, out = summary.get("input") or {}, summary.get("output") or {}
    launch, exit_ = inp.get("mode_fractions"), out.get("mode_fractions") or []
    if not launch:
        return ""
    energies = out.get("mode_energies_j") or []
    rows = [[f"EH1{m + 1}", number(f, 1e-2, 4),
             number(exit_[m] if m < len(exit_) else None, 1e-2, 4),
             number(energies[m] if m < len(energies) else None, 1e-6, 4)]
            for m, f in enumerate(launch)]
    rows.append(["lost at the launch (outside the modes)", number(inp.get("lost_fraction"),
                                                                  1e-2, 3), "", ""])
    part = (summary.get("compressed") or {}).get("part")
    note = (f"<p>Compressed and THz numbers describe the {esc(part)}.</p>" if part else "")
    return ("<h2>Modes</h2>" + table(["mode", "launch share (%)", "exit share (%)",
                                      "exit energy (uJ)"], rows, {1, 2, 3}) + note)


def run_report_html(folder: Path, summary: dict, command: str | None) -> str:
    """The report page of a run folder holding ``summary`` and its figures."""
    config = summary.get("config") or {}
    limits = summary.get("limits") or {}
    checks = limits.get("checks") or []
    figures = summary.get("figures")
    if figures is None:
        figures = sorted(p.name for p in Path(folder).glob("*.png"))
    sources = material_sources(config) + [c.get("source", "") for c in checks]
    body = "".join([
        verdict_section(summary),
        headline_section(summary),
        modes_section(summary),
        inputs_section(config),
        limits_section(checks, limits.get("acceptable_note")),
        cautions_section(summary.get("warnings") or []),
        figures_section(Path(folder), list(figures), CAPTIONS),
        sources_section(sources),
        provenance_section(command, [("config hash", config_hash(config))]),
    ])
    return page("hcfplan simulate report", job_line(config), body)


def write_run_report(folder, summary: dict | None = None, *, command: str | None = None) -> Path:
    """Write ``report.html`` into a ``simulate`` run folder and return its path.

    Parameters
    ----------
    folder : path
        The run folder, with ``summary.json`` and the figures already written.
    summary : dict, optional
        The nested summary that was written (default: read ``summary.json``).
    command : str, optional
        The command (or call) that made the folder, for the provenance.

    References
    ----------
    None: a page of the numbers already computed; no physics.
    """
    from hcfplan.numerics.storage import write_text

    folder = Path(folder)
    if summary is None:
        summary = json.loads((folder / "summary.json").read_text(encoding="utf-8"))
    path = folder / "report.html"
    write_text(path, run_report_html(folder, summary, command))
    return path
