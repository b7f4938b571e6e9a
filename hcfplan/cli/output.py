"""Terminal output of the command line: tables, JSON, warnings, cautions, progress bars.

Used by :mod:`hcfplan.cli.app` and :mod:`hcfplan.cli.workflows`; only these modules write to the
terminal.
"""

from __future__ import annotations

import json
import math
import sys
from pathlib import Path

import typer

#: Help texts of options that several commands share.
SET_HELP = "Override one config value, e.g. --set gas.pressure_bar=3 (repeatable)."
JSON_HELP = "Print machine-readable JSON (SI values, unit in the key name)."
SPREAD_WORKERS_HELP = ("Corners of --spread computed at a time, by this process and worker "
                       "processes (default: all cores).")


def _echo(text: str = "") -> None:
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


def _print_json(data) -> None:
    typer.echo(json.dumps(_clean(data), indent=2, default=_json_default))


def _fmt(value, scale: float = 1.0, digits: int = 4) -> str:
    if value is None:
        return "-"
    if isinstance(value, float) and not math.isfinite(value):
        return "n/a"
    return f"{value / scale:.{digits}g}"


def _print_rows(rows: list[tuple[str, str, str]]) -> None:
    width = max(len(r[0]) for r in rows)
    for label, value, note in rows:
        _echo(f"  {label:<{width}}  {value}{('   ' + note) if note else ''}")


def _print_cautions(topics=("estimates", "pressure", "laser", "gas")) -> None:
    from hcfplan.limits.cautions import caution_lines

    _echo()
    _echo("Cautions:")
    for line in caution_lines(topics):
        _echo(f"  ! {line}")


def _print_warnings(warnings) -> None:
    if warnings:
        _echo()
        _echo("Warnings:")
        for w in warnings:
            _echo(f"  - {w}")


def _print_gas(r: dict) -> None:
    _echo(f"{r['gas']} at {r['pressure_pa'] / 1e5:g} bar, {r['temperature_k']:g} K "
          f"(density model: {r['equation_of_state']})")
    rows = [
        ("number density", f"{r['number_density_per_m3']:.5g} m^-3",
         f"real gas {r['number_density_real_per_m3']:.5g}, ideal "
         f"{r['number_density_ideal_per_m3']:.5g}, Z = {r['compressibility_factor']:.4f}"),
        ("n2 (Kerr)", f"{r['n2_m2_per_w']:.4g} m^2/W", "electronic, scaled by density"),
        ("ionisation potential", f"{r['ionization_potential_ev']:.6g} eV", ""),
    ]
    _print_rows(rows)
    _echo()
    _echo("  wavelength   n - 1         group index - 1   GVD (fs^2/m)   P_cr (GW)")
    for w in r["wavelengths"]:
        _echo(f"  {w['wavelength_m'] * 1e9:7.1f} nm  {w['n_minus_1']:.6e}  "
              f"{w['group_index'] - 1:.6e}      {w['gvd_s2_per_m'] * 1e30:10.4g}   "
              f"{w['critical_power_w'] / 1e9:.4g}")
    _echo()
    _echo("Sources:")
    for key, text in r["sources"].items():
        _echo(f"  {key}: {text}")
    _print_warnings(r["warnings"])
    _print_cautions(("estimates", "pressure", "gas"))


def _print_fiber(r: dict) -> None:
    zdw = ", ".join(f"{z * 1e9:.0f} nm" for z in r["fiber.zdw_m"]) or "none in 200-3000 nm"
    rows = [
        ("fiber", r["fiber.kind"], f"length {r['fiber.length_m']:g} m"),
        ("loss", f"{_fmt(r['fiber.power_loss_db_per_m'])} dB/m",
         f"transmission {r['fiber.transmission']:.3f} ({r['fiber.loss_convention']})"),
        ("beta2 at pump", f"{_fmt(r['fiber.beta2_s2_per_m'], 1e-27)} fs^2/mm",
         f"{r['fiber.regime']} dispersion"),
        ("beta3 at pump", f"{_fmt(r['fiber.beta3_s3_per_m'], 1e-42)} fs^3/mm", ""),
        ("zero-dispersion wavelength", zdw, ""),
        ("gamma", f"{_fmt(r['fiber.gamma_per_w_per_m'])} 1/(W m)",
         f"A_eff {_fmt(r['fiber.effective_area_m2'], 1e-12)} um^2"),
        ("coupling", f"{_fmt(r['coupling.efficiency'], 0.01, 3)} %",
         "" if r["coupling.beam_waist_m"] is None else
         f"waist {_fmt(r['coupling.beam_waist_m'], 1e-6, 3)} um (optimum "
         f"{_fmt(r['coupling.optimum_beam_waist_m'], 1e-6, 3)} um)"),
        ("coupled energy", f"{_fmt(r['input.coupled_energy_j'], 1e-6)} uJ",
         f"peak power {_fmt(r['input.peak_power_w'], 1e9)} GW"),
        ("dispersion length L_D", f"{_fmt(r['fiber.dispersion_length_m'])} m", ""),
        ("nonlinear length L_NL", f"{_fmt(r['fiber.nonlinear_length_m'])} m", ""),
        ("soliton order N", _fmt(r["fiber.soliton_order"]), ""),
        ("fission length L_D/N", "-" if r["fiber.fission_length_m"] is None else
         f"{_fmt(r['fiber.fission_length_m'])} m", ""),
        ("nonlinear phase", f"{_fmt(r['estimate.nonlinear_phase_rad'])} rad",
         f"SPM broadening x{_fmt(r['estimate.spm_broadening_factor'], 1, 3)} (Gaussian rms "
         "estimate)"),
        ("est. output bandwidth", f"{_fmt(r['estimate.output_bandwidth_hz'], 1e12)} THz", ""),
    ]
    if "fiber.resonance_wavelengths_m" in r:
        res = ", ".join(f"{x * 1e9:.0f}" for x in r["fiber.resonance_wavelengths_m"])
        rows.append(("resonance bands (nm)", res,
                     "PUMP IN A RESONANCE BAND" if r["fiber.pump_in_resonance_band"] else ""))
    if "gas.pressure_pa" in r:
        comps = " + ".join(f"{frac:g} {name}" for name, frac in r["gas.components"])
        rows.insert(1, ("gas", f"{comps} at {r['gas.pressure_pa'] / 1e5:g} bar",
                        f"{r['gas.temperature_k']:g} K, n2 {r['gas.n2_m2_per_w']:.3g} m^2/W"))
    _print_rows(rows)
    if "figure" in r:
        _echo(f"\nFigure written: {r['figure']}")
    _print_warnings(r["warnings"])
    _print_cautions()


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


def _print_spread(s: dict) -> None:
    spread = s.get("spread")
    if not spread:
        return
    _echo()
    inputs = ", ".join(f"{k} +-{v:.0%}" for k, v in spread["inputs"].items())
    _echo(f"Spread over {spread['runs']} corner runs ({inputs}):")
    scale = {"fwhm_s": (1e-15, "fs"), "peak_power_w": (1e9, "GW"), "cutoff_hz": (1e12, "THz")}
    rows = []
    for key, r in spread["ranges"].items():
        factor, unit = scale.get(key.split(".")[-1], (1.0, ""))
        rows.append((key, f"{_fmt(r['low'], factor)} ... {_fmt(r['high'], factor)} {unit}",
                     f"nominal {_fmt(r['nominal'], factor)}"))
    if rows:
        _print_rows(rows)
    lim = s.get("limits", {})
    if "worst_case.status" in lim:
        _echo(f"  worst corner vs the limits: {lim['worst_case.status']} (self-focusing margin "
              f"{_fmt(lim.get('worst_case.self_focusing_margin'))}, ionisation fraction "
              f"{_fmt(lim.get('worst_case.ionization_fraction'))})")
    for failure in spread["failed"]:
        _echo(f"  corner run failed: {failure}")


def _print_simulation(s: dict, out_dir: Path) -> None:
    inp, fib, outp = s["input"], s["fiber"], s["output"]
    rows = [
        ("input", f"{_fmt(inp['energy_j'], 1e-6)} uJ, FWHM {_fmt(inp['fwhm_s'], 1e-15)} fs",
         f"launched {_fmt(inp['launched_energy_j'], 1e-6)} uJ (coupling "
         f"{_fmt(inp['coupling_efficiency'], 0.01, 3)} %), peak {_fmt(inp['peak_power_w'], 1e9)} "
         "GW"),
        ("fiber", f"{fib['kind']}, {fib['length_m']:g} m",
         f"transmission {_fmt(fib['transmission'], 0.01, 3)} %, {fib['regime']} dispersion, "
         f"soliton order {_fmt(fib['soliton_order'], 1, 3)}"),
        ("output spectrum", f"{_fmt(outp['bandwidth_hz'], 1e12)} THz at -20 dB",
         f"transform limit {_fmt(outp['transform_limit_fwhm_s'], 1e-15)} fs"),
        ("peak intensity in fiber", f"{_fmt(outp['max_peak_intensity_w_per_m2'], 1e4)} W/cm^2",
         f"max ionisation fraction {_fmt(outp['max_ionization_fraction'], 1, 3)}"),
        ("solver", f"{s['solver']['steps']} steps ({s['solver']['rejected_steps']} rejected)",
         f"grid {s['grid']['points']} points"),
    ]
    comp = s.get("compressed")
    if comp:
        rows.append(("compressed", f"{_fmt(comp['fwhm_s'], 1e-15)} fs FWHM, "
                     f"{_fmt(comp['peak_power_w'], 1e9)} GW",
                     f"{comp['bounces']} bounces, total GDD {_fmt(comp['gdd_s2'], 1e-30)} fs^2, "
                     f"main lobe {_fmt(comp['main_lobe_energy_fraction'], 0.01, 3)} %, "
                     f"TL {_fmt(comp['transform_limit_fwhm_s'], 1e-15)} fs"))
    thz = s.get("thz")
    if thz:
        rows.append(("THz", f"peak {_fmt(thz['peak_hz'], 1e12)} THz, cutoff "
                     f"{_fmt(thz['cutoff_hz'], 1e12)} THz",
                     f"{thz['crystal']} {thz['thickness_m'] * 1e3:g} mm; cutoff = "
                     f"{thz['cutoff_definition']}"))
    _print_rows(rows)
    _echo(f"\nWritten to {out_dir}/: summary.json, fields.npz"
          + (" and figures" if any(out_dir.glob("*.png")) else ""))
    _print_spread(s)
    _print_warnings(s["warnings"])
    if "limits" in s:
        _echo()
        _print_limits(_flat_limits(s["limits"]))
    _print_cautions()


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


def _print_limits(report: dict) -> None:
    _echo("Limits (estimates):")
    rows = []
    for check in report["limits.checks"]:
        unit = check.get("unit", "")
        margin = check.get("margin")
        rows.append((check["name"],
                     f"{_fmt_check_value(check.get('value'), unit)} vs "
                     f"{_fmt_check_value(check.get('limit'), unit)}",
                     f"{check['status']}" + ("" if margin is None else f", margin {margin:.3g}")
                     + (" (warning only)" if check.get("severity") == "warning" else "")))
    _print_rows(rows)
    _echo()
    _echo(f"  {report['limits.acceptable_note']}")
    _print_warnings(report.get("limits.warnings", []))


def _print_envelope(result, plot: Path | None) -> None:
    import numpy as np

    p = result.pressures
    k = int(np.argmin(np.abs(p - result.config_pressure)))
    zdp = result.zero_dispersion_pressure
    rows = [
        ("configured point", f"{result.config_energy * 1e6:.4g} uJ at "
         f"{result.config_pressure / 1e5:.4g} bar", ""),
        ("self-focusing limit", f"{result.self_focusing_max_energy[k] * 1e6:.4g} uJ at this "
         "pressure", f"margin P_cr/P = {result.self_focusing_margin:g}"),
        ("ionisation limit", f"{result.ionization_max_energy[k] * 1e6:.4g} uJ",
         f"fraction {result.ionization_fraction_limit:g}"),
        ("zero-dispersion pressure", "none on the map" if not np.isfinite(zdp)
         else f"{zdp / 1e5:.4g} bar", "anomalous below, normal above"),
        ("cell rating", "not given" if result.rated_pressure is None
         else f"{result.rated_pressure / 1e5:.4g} bar", ""),
        ("map", f"{len(result.energies)} energies x {len(p)} pressures",
         f"{p[0] / 1e5:.3g}-{p[-1] / 1e5:.3g} bar"),
    ]
    _print_rows(rows)
    for note in result.notes:
        _echo(f"  note: {note}")
    if plot is not None:
        _echo(f"\nFigure written: {plot}")
    _print_cautions()
