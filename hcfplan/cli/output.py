"""Terminal output of the command line: tables, JSON, warnings, cautions, progress bars.

Used by :mod:`hcfplan.cli.app` and :mod:`hcfplan.cli.workflows`; only these modules write to the
terminal. This module imports nothing else of the command line.
"""

from __future__ import annotations

import json
import math
import sys
from pathlib import Path

import typer


def echo(text: str = "") -> None:
    """Write one line of report text to stdout."""
    typer.echo(text)


def _json_default(value):
    import numpy as np

    if isinstance(value, np.ndarray):
        return value.tolist()
    if isinstance(value, (np.floating, np.integer, np.bool_)):
        return value.item()
    if isinstance(value, Path):
        return str(value)
    raise TypeError(f"not JSON serialisable: {type(value).__name__}")


def _clean(value):
    """Replace non-finite floats by None (JSON has no NaN)."""
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if isinstance(value, dict):
        return {k: _clean(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_clean(v) for v in value]
    return value


def print_json(data) -> None:
    """Print ``data`` as indented JSON (numpy values as Python values, NaN and inf as null)."""
    typer.echo(json.dumps(_clean(data), indent=2, default=_json_default))


def fmt(value, scale: float = 1.0, digits: int = 4) -> str:
    """``value / scale`` with ``digits`` significant digits; "-" for None, "n/a" if not finite."""
    if value is None:
        return "-"
    if isinstance(value, float) and not math.isfinite(value):
        return "n/a"
    return f"{value / scale:.{digits}g}"


def print_rows(rows: list[tuple[str, str, str]]) -> None:
    """Print (label, value, note) rows with the labels in one column."""
    width = max(len(r[0]) for r in rows)
    for label, value, note in rows:
        echo(f"  {label:<{width}}  {value}{('   ' + note) if note else ''}")


def print_table(header: list[str], rows: list[list[str]]) -> None:
    """Print a table with a header line, each column as wide as its widest cell."""
    widths = [max(len(h), *(len(r[i]) for r in rows)) for i, h in enumerate(header)]
    echo("  " + "  ".join(h.ljust(w) for h, w in zip(header, widths, strict=True)))
    for row in rows:
        echo("  " + "  ".join(v.ljust(w) for v, w in zip(row, widths, strict=True)))


def print_cautions(topics=("estimates", "pressure", "laser", "gas")) -> None:
    """Print the caution lines of ``topics`` (see :func:`hcfplan.limits.cautions.caution_lines`)."""
    from hcfplan.limits.cautions import caution_lines

    echo()
    echo("Cautions:")
    for line in caution_lines(topics):
        echo(f"  ! {line}")


def print_warnings(warnings) -> None:
    """Print the model warnings of a report, if any."""
    if warnings:
        echo()
        echo("Warnings:")
        for w in warnings:
            echo(f"  - {w}")


def print_gas(r: dict) -> None:
    echo(f"{r['gas']} at {r['pressure_pa'] / 1e5:g} bar, {r['temperature_k']:g} K "
         f"(density model: {r['equation_of_state']})")
    rows = [
        ("number density", f"{r['number_density_per_m3']:.5g} m^-3",
         f"real gas {r['number_density_real_per_m3']:.5g}, ideal "
         f"{r['number_density_ideal_per_m3']:.5g}, Z = {r['compressibility_factor']:.4f}"),
        ("n2 (Kerr)", f"{r['n2_m2_per_w']:.4g} m^2/W", "electronic, scaled by density"),
        ("ionisation potential", f"{r['ionization_potential_ev']:.6g} eV", ""),
    ]
    print_rows(rows)
    echo()
    echo("  wavelength   n - 1         group index - 1   GVD (fs^2/m)   P_cr (GW)")
    for w in r["wavelengths"]:
        echo(f"  {w['wavelength_m'] * 1e9:7.1f} nm  {w['n_minus_1']:.6e}  "
             f"{w['group_index'] - 1:.6e}      {w['gvd_s2_per_m'] * 1e30:10.4g}   "
             f"{w['critical_power_w'] / 1e9:.4g}")
    echo()
    echo("Sources:")
    for key, text in r["sources"].items():
        echo(f"  {key}: {text}")
    print_warnings(r["warnings"])
    print_cautions(("estimates", "pressure", "gas"))


def print_fiber(r: dict) -> None:
    zdw = ", ".join(f"{z * 1e9:.0f} nm" for z in r["fiber.zdw_m"]) or "none in 200-3000 nm"
    rows = [
        ("fiber", r["fiber.kind"], f"length {r['fiber.length_m']:g} m"),
        ("loss", f"{fmt(r['fiber.power_loss_db_per_m'])} dB/m",
         f"transmission {r['fiber.transmission']:.3f} ({r['fiber.loss_convention']})"),
        ("beta2 at pump", f"{fmt(r['fiber.beta2_s2_per_m'], 1e-27)} fs^2/mm",
         f"{r['fiber.regime']} dispersion"),
        ("beta3 at pump", f"{fmt(r['fiber.beta3_s3_per_m'], 1e-42)} fs^3/mm", ""),
        ("zero-dispersion wavelength", zdw, ""),
        ("gamma", f"{fmt(r['fiber.gamma_per_w_per_m'])} 1/(W m)",
         f"A_eff {fmt(r['fiber.effective_area_m2'], 1e-12)} um^2"),
        ("coupling", f"{fmt(r['coupling.efficiency'], 0.01, 3)} %",
         "" if r["coupling.beam_waist_m"] is None else
         f"waist {fmt(r['coupling.beam_waist_m'], 1e-6, 3)} um (optimum "
         f"{fmt(r['coupling.optimum_beam_waist_m'], 1e-6, 3)} um)"
         + (f"; EH11-EH1{len(r['coupling.mode_fractions'])} share " + " / ".join(
             f"{100 * f:.3g}" for f in r["coupling.mode_fractions"])
            + f" %, lost {100 * r['coupling.lost_fraction']:.3g} %"
            if r.get("coupling.mode_fractions") else "")),
        ("coupled energy", f"{fmt(r['input.coupled_energy_j'], 1e-6)} uJ",
         f"peak power {fmt(r['input.peak_power_w'], 1e9)} GW"),
        ("dispersion length L_D", f"{fmt(r['fiber.dispersion_length_m'])} m", ""),
        ("nonlinear length L_NL", f"{fmt(r['fiber.nonlinear_length_m'])} m", ""),
        ("soliton order N", fmt(r["fiber.soliton_order"]), ""),
        ("fission length L_D/N", "-" if r["fiber.fission_length_m"] is None else
         f"{fmt(r['fiber.fission_length_m'])} m", ""),
        ("nonlinear phase", f"{fmt(r['estimate.nonlinear_phase_rad'])} rad",
         f"SPM broadening x{fmt(r['estimate.spm_broadening_factor'], 1, 3)} (SPM-only "
         "estimate, Gaussian rms)"),
        ("est. output bandwidth", f"{fmt(r['estimate.output_bandwidth_hz'], 1e12)} THz",
         "SPM-only estimate (dispersion neglected)"),
    ]
    if "fiber.resonance_wavelengths_m" in r:
        res = ", ".join(f"{x * 1e9:.0f}" for x in r["fiber.resonance_wavelengths_m"])
        rows.append(("resonance bands (nm)", res,
                     "PUMP IN A RESONANCE BAND" if r["fiber.pump_in_resonance_band"] else ""))
    if "gas.pressure_pa" in r:
        comps = " + ".join(f"{frac:g} {name}" for name, frac in r["gas.components"])
        fill = f"{comps} at {r['gas.pressure_pa'] / 1e5:g} bar"
        if r.get("gas.fill") == "gradient":
            fill = (f"{comps}, gradient {r['gas.entrance_pressure_pa'] / 1e5:g} -> "
                    f"{r['gas.exit_pressure_pa'] / 1e5:g} bar (mean "
                    f"{r['gas.pressure_pa'] / 1e5:.4g} bar, used by the numbers below)")
        rows.insert(1, ("gas", fill,
                        f"{r['gas.temperature_k']:g} K, n2 {r['gas.n2_m2_per_w']:.3g} m^2/W"))
    print_rows(rows)
    echo(f"  note: {r['estimate.note']}")
    if "figure" in r:
        echo(f"\nFigure written: {r['figure']}")
    print_warnings(r["warnings"])
    print_cautions()


class TerminalBar:
    """A one-line progress bar on stderr, drawn only when stderr is a terminal."""

    WIDTH = 30

    def __init__(self, enabled: bool, label: str):
        self.enabled = enabled and sys.stderr.isatty()
        self.label = label
        self.last = -1

    def draw(self, fraction: float, tail: str) -> None:
        permille = int(1000 * min(max(fraction, 0.0), 1.0))
        if not self.enabled or permille == self.last:
            return
        self.last = permille
        done = self.WIDTH * permille // 1000
        sys.stderr.write(f"\r  {self.label} [{'#' * done}{'.' * (self.WIDTH - done)}] {tail}")
        sys.stderr.flush()

    def close(self) -> None:
        if self.enabled:
            sys.stderr.write("\n")
            sys.stderr.flush()


def print_spread(s: dict) -> None:
    spread = s.get("spread")
    if not spread:
        return
    echo()
    inputs = ", ".join(f"{k} +-{v:.0%}" for k, v in spread["inputs"].items())
    echo(f"Spread over {spread['runs']} corner runs ({inputs}):")
    scale = {"fwhm_s": (1e-15, "fs"), "peak_power_w": (1e9, "GW"), "cutoff_hz": (1e12, "THz"),
             "peak_field_v_per_m": (1e5, "kV/cm")}
    rows = []
    for key, r in spread["ranges"].items():
        factor, unit = scale.get(key.split(".")[-1], (1.0, ""))
        void = r.get("void_corners") or 0
        rows.append((key, f"{fmt(r['low'], factor)} ... {fmt(r['high'], factor)} {unit}",
                     f"nominal {fmt(r['nominal'], factor)}"
                     + (f"; {void} corner{'s' if void > 1 else ''} void, left out" if void
                        else "")))
    if rows:
        print_rows(rows)
    corners = spread.get("corners", [])
    if corners:
        counts = {status: sum(1 for c in corners if c["verdict"] == status)
                  for status in ("valid", "caution", "invalid")}
        echo("  corner verdicts: " + ", ".join(f"{n} {status}" for status, n in counts.items()))
    for corner in corners:
        if corner["verdict"] == "invalid":
            codes = ", ".join(x["code"] for x in corner["verdict_reasons"])
            echo(f"  invalid corner {corner['values']}: {codes}")
    lim = s.get("limits", {})
    if "worst_case.status" in lim:
        from hcfplan.limits.margins import margin_text

        echo(f"  worst corner vs the limits: {lim['worst_case.status']}")
        sf = lim.get("worst_case.self_focusing_margin")
        if sf is not None:
            required = lim.get("worst_case.self_focusing_required_margin", 1.0)
            echo("    " + margin_text("self-focusing margin", sf, required, "P_cr/P"))
        fraction = lim.get("worst_case.ionization_fraction")
        if fraction is not None:
            echo(f"    ionisation fraction {fmt(fraction)}; "
                 + margin_text("margin", lim.get("worst_case.ionization_margin"), 1.0,
                               "limit/fraction", met=True if fraction == 0 else None))
    for failure in spread["failed"]:
        echo(f"  corner run failed: {failure}")


def stage_rows(s: dict) -> list[tuple[str, str, str]]:
    """One row per stage of a run with cascaded stages (the rows above are the final stage's):
    energy in, compressed FWHM and energy, verdict."""
    rows = []
    for index, part in sorted(s.get("stages", {}).items(), key=lambda kv: int(kv[0])):
        comp = part.get("compressed", {})
        rows.append((f"stage {index}", f"in {fmt(part['input']['energy_j'], 1e-6)} uJ, "
                     f"compressed {fmt(comp.get('fwhm_s'), 1e-15)} fs",
                     f"{fmt(comp.get('energy_j'), 1e-6)} uJ, verdict "
                     f"{part.get('verdict', {}).get('status')}"))
    return rows


def print_simulation(s: dict, out_dir: Path) -> None:
    """The headline of a run: every result number, or "void (code: message)" where the
    verdict voids it; the verdict with its reasons; one block of warnings; limits; cautions."""
    from hcfplan.planning.verdict import stored_verdict

    verdict = stored_verdict(s)
    inp, fib, outp = s["input"], s["fiber"], s["output"]

    def shown(key: str, text: str, row_code: str | None = None) -> str:
        return void_text(verdict, key, text, row_code)

    def code(key: str) -> str | None:
        reason = verdict.void_reason(key)
        return reason.code if reason else None

    width = code("output.bandwidth_hz")
    rows = [
        ("input", f"{fmt(inp['energy_j'], 1e-6)} uJ, FWHM {fmt(inp['fwhm_s'], 1e-15)} fs",
         f"launched {fmt(inp['launched_energy_j'], 1e-6)} uJ (coupling "
         f"{fmt(inp['coupling_efficiency'], 0.01, 3)} %), peak {fmt(inp['peak_power_w'], 1e9)} "
         "GW"),
        ("fiber", f"{fib['kind']}, {fib['length_m']:g} m",
         f"transmission {fmt(fib['transmission'], 0.01, 3)} %, {fib['regime']} dispersion, "
         f"soliton order {fmt(fib['soliton_order'], 1, 3)}"),
        ("output spectrum", shown("output.bandwidth_hz",
                                  f"{fmt(outp['bandwidth_hz'], 1e12)} THz at -20 dB"),
         "transform limit " + shown("output.transform_limit_fwhm_s",
                                    f"{fmt(outp['transform_limit_fwhm_s'], 1e-15)} fs", width)),
        ("peak intensity in fiber", f"{fmt(outp['max_peak_intensity_w_per_m2'], 1e4)} W/cm^2",
         f"max ionisation fraction {fmt(outp['max_ionization_fraction'], 1, 3)}"),
        ("solver", f"{s['solver']['steps']} steps ({s['solver']['rejected_steps']} rejected)",
         f"grid {s['grid']['points']} points"),
    ]
    comp = s.get("compressed")
    if comp:
        row = code("compressed.fwhm_s")
        rows.append(("compressed FWHM", shown("compressed.fwhm_s",
                                              f"{fmt(comp['fwhm_s'], 1e-15)} fs"),
                     "TL " + shown("compressed.transform_limit_fwhm_s",
                                   f"{fmt(comp['transform_limit_fwhm_s'], 1e-15)} fs", row)
                     + ", main lobe " + shown("compressed.main_lobe_energy_fraction",
                                              f"{fmt(comp['main_lobe_energy_fraction'], 0.01, 3)}"
                                              " %", row)))
        row = code("compressed.peak_power_w")
        rows.append(("compressed peak power",
                     shown("compressed.peak_power_w", f"{fmt(comp['peak_power_w'], 1e9)} GW"),
                     "bounces " + shown("compressed.bounces", f"{comp['bounces']}", row)
                     + ", total GDD " + shown("compressed.gdd_s2",
                                              f"{fmt(comp['gdd_s2'], 1e-30)} fs^2", row)))
    thz = s.get("thz")
    if thz:
        rows.append(("THz peak", thz_shown(verdict, thz, "peak_hz"),
                     f"{thz['crystal']} {thz['thickness_m'] * 1e3:g} mm"))
        cutoff = thz_shown(verdict, thz, "cutoff_hz")
        rows.append(("THz cutoff", cutoff, "" if cutoff.startswith(("void", "above"))
                     else f"cutoff = {thz['cutoff_definition']}"))
        if "detected_cutoff_hz" in thz:
            rows.append(("detected THz cutoff", thz_shown(verdict, thz, "detected_cutoff_hz"),
                         "EO detection"))
        rows += thz_absolute_rows(thz)
    from hcfplan.cli.output_modes import mode_rows

    rows += mode_rows(s, verdict, fmt) + stage_rows(s)
    print_rows(rows)
    grid = s["grid"]
    if grid.get("refinements"):
        echo(f"grid refined {grid['refinements']}x ({'; then '.join(grid['refinement_reasons'])})")
    print_verdict(verdict)
    written = ["summary.json", "fields.npz"]
    if (out_dir / "compressed_field.csv").exists():
        written.append("compressed_field.csv")
    figures = len(list(out_dir.glob("*.png")))
    if figures:
        written.append(f"{figures} figure{'s' if figures > 1 else ''}")
    if (out_dir / "report.html").exists():
        written.append("report.html")
    echo(f"\nWritten to {out_dir}/: {', '.join(written)}")
    print_spread(s)
    limits = _flat_limits(s["limits"]) if "limits" in s else None
    if limits is not None:
        echo()
        print_limits(limits, warnings=False)
    print_warnings(unlisted_warnings(
        list(s["warnings"]) + list((limits or {}).get("limits.warnings", [])), verdict))
    print_cautions()


def print_thz_report(report: dict, detector_crystal: str | None = None) -> None:
    """The ``thz`` command's text: pump energy, crystal, THz numbers (void ones with their
    reason), the verdict, one block of warnings and the cautions."""
    from hcfplan.planning.verdict import verdict_of_thz_report

    verdict = verdict_of_thz_report(report, detector=detector_crystal is not None)
    rows = [
        ("pump energy", f"{fmt(report['pump_energy_j'], 1e-6)} uJ",
         "on the crystal (--energy-uj; default 1 uJ)"),
        ("crystal", f"{report['crystal']} {report['thickness_m'] * 1e3:g} mm", ""),
        ("THz peak", thz_shown(verdict, report, "peak_hz"), ""),
        ("THz cutoff", thz_shown(verdict, report, "cutoff_hz"), report["cutoff_definition"]),
        ("-3 dB / -10 dB width", f"{fmt(report['bandwidth_3db_hz'], 1e12)} / "
         f"{fmt(report['bandwidth_10db_hz'], 1e12)} THz", ""),
        ("relative efficiency", f"{report['relative_efficiency']:.3g}",
         "for d_eff = 1 pm/V and 1 mm^2: compares spectra, not an absolute yield"),
    ]
    if detector_crystal is not None:
        rows.append(("detected cutoff", thz_shown(verdict, report, "detected_cutoff_hz"),
                     f"EO detection in {detector_crystal}"))
    rows += thz_absolute_rows(report)
    print_rows(rows)
    print_verdict(verdict)
    if "figure" in report:
        echo(f"\nFigure written: {report['figure']}"
             + (f" and {report['waveform_figure']}" if "waveform_figure" in report else ""))
    print_warnings(unlisted_warnings(report["warnings"], verdict))
    print_cautions(("estimates", "laser"))


def thz_absolute_rows(thz: dict) -> list[tuple[str, str, str]]:
    """Rows of the absolute THz figures of a summary's ``thz`` section or a ``thz`` report:
    geometry and tilt, energy, efficiency, average power, peak field, crystal fluence limit."""
    rows = []
    if thz.get("geometry") == "tilted_front":
        rows.append(("tilted front", f"{fmt(thz.get('tilt_angle_deg'), 1, 4)} deg",
                     f"interaction length {fmt(thz.get('interaction_length_m'), 1e-3)} mm; "
                     "grating and imaging not modelled"))
    if thz.get("efficiency") is not None:
        energy = thz.get("energy_estimate_j")
        rows.append(("THz energy", f"{fmt(energy, 1e-9)} nJ",
                     f"efficiency {thz['efficiency']:.3g}"
                     + (f", average power {fmt(thz['average_power_w'], 1e-3)} mW"
                        if thz.get("average_power_w") is not None else "")))
    if thz.get("peak_field_v_per_m") is not None:
        rows.append(("THz peak field", f"{fmt(thz['peak_field_v_per_m'], 1e5)} kV/cm",
                     f"at an f/{thz['focus_f_number']:g} focus (exit face "
                     f"{fmt(thz['peak_field_exit_v_per_m'], 1e5)} kV/cm)"))
    if thz.get("binding_limit") is not None:
        margin = thz.get("crystal_fluence_margin")
        rows.append(("crystal fluence", f"{fmt(thz['pump_fluence_j_per_m2'], 1e4)} J/cm^2",
                     f"binding limit {thz['binding_limit']}: margin limit/fluence = "
                     f"{margin:.3g} (required >= 1): {'met' if margin >= 1 else 'not met'}"))
    if thz.get("absolute_assumptions"):
        rows.append(("THz assumptions", "", thz["absolute_assumptions"]))
    return rows


def unlisted_warnings(warnings, verdict) -> list[str]:
    """``warnings`` without repeats and without those a verdict reason already states."""
    said = [r.message for r in verdict.reasons]
    return [w for w in dict.fromkeys(warnings) if not any(w in m for m in said)]


def thz_cutoff_text(thz: dict, key: str = "cutoff_hz") -> str:
    """"6.61 THz", or "above the model's range (> 4.5 THz)" when the THz summary's ``key`` is
    null because the spectrum reaches beyond the crystal model (``model_limit_hz``)."""
    value = thz.get(key)
    if value is not None:
        return f"{fmt(value, 1e12)} THz"
    limit = thz.get("model_limit_hz")
    if limit is None:
        return "-"
    from hcfplan.planning.thz_range import beyond_model_text

    return beyond_model_text(limit)


#: The verdict code of a THz number left out because it lies beyond the crystal model.
BEYOND_MODEL = "thz_beyond_crystal_model"


def thz_shown(verdict, thz: dict, key: str) -> str:
    """A THz number of a summary or report (unprefixed ``key``, e.g. ``cutoff_hz``) as printed:
    the value; "void (code: message)" when a reason voids it; or, when it is null because it
    lies beyond the crystal model and nothing else voids it, "above the model's range
    (> 20 THz; thz_beyond_crystal_model)"."""
    reason = verdict.void_reason(f"thz.{key}")
    beyond = thz.get(key) is None and thz.get("model_limit_hz") is not None
    if beyond and (reason is None or reason.code == BEYOND_MODEL):
        return f"{thz_cutoff_text(thz, key)[:-1]}; {BEYOND_MODEL})"
    return void_text(verdict, f"thz.{key}", thz_cutoff_text(thz, key))


def void_text(verdict, key: str, text: str, row_code: str | None = None) -> str:
    """``text``, or "void (code: message)" when the verdict voids the flat summary key ``key``
    (the message up to its first ": "); "void (code)" when ``row_code`` names the same code,
    i.e. the same line already gives that reason in full."""
    reason = verdict.void_reason(key)
    if reason is None:
        return text
    if reason.code == row_code:
        return f"void ({reason.code})"
    return f"void ({reason.code}: {reason.short})"


#: The verdict line's text after "Verdict: <status>".
_VERDICT_HEAD = {"valid": "", "caution": " (read the reasons below)",
                 "invalid": " (the numbers marked void are not results)"}


def verdict_lines(verdict, indent: str = "") -> list[str]:
    """"Verdict: <status> (...)" and one "! <status>  <code>: <message>" line per reason."""
    from hcfplan.planning.verdict import CODES

    lines = [f"{indent}Verdict: {verdict.status}{_VERDICT_HEAD[verdict.status]}"]
    lines += [f"{indent}  ! {CODES[r.code].status:<7}  {r.code}: {r.message}"
              for r in verdict.reasons]
    return lines


def print_void_legend(codes) -> None:
    """Under a table: each verdict code of its "void (code)" cells once, with its meaning."""
    from hcfplan.planning.verdict import CODES

    codes = list(dict.fromkeys(codes))
    if not codes:
        return
    echo("  void (code): the number is not a result; the codes:")
    for code in codes:
        echo(f"    {code} ({CODES[code].status}): {CODES[code].meaning}")


def print_verdict(verdict) -> None:
    """The verdict line and one line per reason (see :mod:`hcfplan.planning.verdict`)."""
    echo()
    for line in verdict_lines(verdict):
        echo(line)
    if verdict.void_fields:
        echo("  (the JSON keeps the void numbers; verdict.void_fields lists them)")


def _flat_limits(nested: dict) -> dict:
    return {f"limits.{k}": v for k, v in nested.items()}


def _fmt_check_value(value, unit: str) -> str:
    if value is None:
        return "-"
    if isinstance(value, str):
        return value
    scale = {"Pa": (1e5, "bar"), "W": (1e9, "GW"), "W/m^2": (1e4, "W/cm^2"), "m": (1e-3, "mm"),
             "J/m^2": (1e4, "J/cm^2"), "m^3": (1.0, "m^3")}.get(unit)
    if scale is None:
        return f"{value:.4g} {unit}".rstrip()
    return f"{value / scale[0]:.4g} {scale[1]}"


def print_limits(report: dict, warnings: bool = True) -> None:
    """The limit checks with their margins; ``warnings``: also the limits' warnings."""
    from hcfplan.limits.margins import margin_text

    echo("Limits (estimates; margin = limit/value or value/limit, met when >= required):")
    rows = []
    for check in report["limits.checks"]:
        unit = check.get("unit", "")
        rows.append((check["name"],
                     f"{_fmt_check_value(check.get('value'), unit)} vs "
                     f"{_fmt_check_value(check.get('limit'), unit)}",
                     margin_text("margin", check.get("margin"), check.get("required", 1.0),
                                 check.get("ratio", ""), met=check.get("met"))
                     + (" (warning only)" if check.get("severity") == "warning" else "")))
    print_rows(rows)
    echo()
    echo(f"  {report['limits.acceptable_note']}")
    if warnings:
        print_warnings(report.get("limits.warnings", []))


def _print_envelope_check(check, result=None) -> None:
    from hcfplan.planning.envelope_check import UNCHECKED_NOTE, point_phrases
    from hcfplan.planning.thz_range import estimate_cutoff_text

    limit = math.inf if result is None else result.thz_model_limit

    echo()
    if check is None:
        echo(f"GNLSE check: none. {UNCHECKED_NOTE}")
        return
    echo(f"GNLSE check of the SPM-only estimates (ratio = chain / estimate, flagged outside "
         f"[1/{check.factor:g}, {check.factor:g}]); sweet spot: {check.sweet_spot}:")
    for note in check.notes:
        echo(f"  {note}")
    for pt in check.points:
        echo(f"  {pt.energy * 1e6:.4g} uJ, {pt.pressure / 1e5:.4g} bar: compressed FWHM "
             f"{fmt(pt.estimate_duration, 1e-15, 3)} fs estimated, "
             f"{_void_or(pt.void_code, fmt(pt.gnlse_duration, 1e-15, 3) + ' fs')} GNLSE "
             f"(ratio {_void_or(pt.void_code, fmt(pt.ratio, 1, 2))}); "
             f"THz cutoff {estimate_cutoff_text(pt.estimate_cutoff, limit)} estimated, "
             f"{_void_or(pt.cutoff_void_code, estimate_cutoff_text(pt.gnlse_cutoff, limit))} chain "
             f"(ratio {_void_or(pt.cutoff_void_code, fmt(pt.cutoff_ratio, 1, 2))})")
        for phrase in point_phrases(pt, check.factor):
            echo(f"    ! {phrase}")
        if pt.note:
            echo(f"    {pt.note}")


def _void_or(code: str, text: str) -> str:
    """``text``, or "void (code)" when a verdict code voids the number."""
    return f"void ({code})" if code else text


def _dispersion_regime(beta2, zdp: float) -> str:
    """Where the pump sees anomalous and normal dispersion on the map's pressure axis."""
    import numpy as np

    beta2 = np.asarray(beta2, dtype=float)
    if np.isfinite(zdp):
        return "anomalous below, normal above"
    if np.all(beta2 < 0):
        return "anomalous dispersion at the pump over the whole map"
    if np.all(beta2 > 0):
        return "normal dispersion at the pump over the whole map"
    return "no sign change of beta2 found on the map"


def print_envelope(result, plot: Path | None, check=None) -> None:
    import numpy as np

    p = result.pressures
    k = int(np.argmin(np.abs(p - result.config_pressure)))
    zdp = result.zero_dispersion_pressure
    rows = [
        ("configured point", f"{result.config_energy * 1e6:.4g} uJ at "
         f"{result.config_pressure / 1e5:.4g} bar", result.pressure_axis),
        ("self-focusing limit", f"{result.self_focusing_max_energy[k] * 1e6:.4g} uJ at this "
         "pressure", f"where P_cr/P = {result.self_focusing_margin:g} (the required margin)"),
        ("ionisation limit", f"{result.ionization_max_energy[k] * 1e6:.4g} uJ",
         f"fraction {result.ionization_fraction_limit:g}"),
        ("zero-dispersion pressure", "none on the map" if not np.isfinite(zdp)
         else f"{zdp / 1e5:.4g} bar", _dispersion_regime(result.beta2, zdp)),
        ("cell rating", "not given" if result.rated_pressure is None
         else f"{result.rated_pressure / 1e5:.4g} bar", ""),
        ("map", f"{len(result.energies)} energies x {len(p)} pressures",
         f"{p[0] / 1e5:.3g}-{p[-1] / 1e5:.3g} bar"),
    ]
    print_rows(rows)
    for note in result.notes:
        echo(f"  note: {note}")
    _print_envelope_check(check, result)
    if plot is not None:
        echo(f"\nFigure written: {plot}")
    print_cautions()
