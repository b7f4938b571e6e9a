"""Accuracy of the default run: each headline number against a converged run of the same case.

For every demo config and for the cases below, the default run (the grid hcfplan chooses, with
its refinement) is compared with a converged run: four times the points over twice the time
window of the default run's final grid (half the time step, twice the frequency window) and
the step tolerance divided by 100. Each headline number must agree within 1 %:

    compressed FWHM, transform limit, compressed peak power, fiber transmission,
    THz peak frequency and cutoff, peak ionisation fraction.

Numbers that the verdict marks void in both runs are compared as void; a number void in one run
only is a failure. Usage (prints a Markdown table for the README's validation section)::

    PYTHONPATH=. python bench/accuracy.py            # all cases
    PYTHONPATH=. python bench/accuracy.py tisa_ne    # one case by name

The cases are invented planning scenarios (not measured setups), apart from the Taylor-fiber
supercontinuum benchmark of J. M. Dudley, G. Genty and S. Coen, Rev. Mod. Phys. 78, 1135 (2006)
(configs/taylor_pcf_check.toml).
"""

from __future__ import annotations

import copy
import math
import sys
import time
import warnings
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
TOLERANCE = 0.01

#: summary key -> column title
QUANTITIES = {
    "compressed.fwhm_s": "compressed FWHM",
    "compressed.transform_limit_fwhm_s": "transform limit",
    "compressed.peak_power_w": "compressed peak power",
    "fiber.transmission": "transmission",
    "thz.peak_hz": "THz peak",
    "thz.cutoff_hz": "THz cutoff",
    "output.max_ionization_fraction": "peak ionisation",
}
#: Below this the ionisation fraction is compared in absolute terms (a run with no ionisation
#: gives 1e-30-level numbers whose relative difference means nothing).
IONIZATION_FLOOR = 1e-6

_CAPILLARY_CELL = {"rated_pressure_bar": 10.0, "window_material": "fused_silica",
                   "window_thickness_mm": 3.0, "window_clear_aperture_mm": 10.0}

#: Cases of our own beside the demo configs (invented scenarios, chosen to cover the regimes
#: the planner must get right).
EXTRA_CASES = {
    # few-cycle Ti:sapphire broadening in neon (capillary)
    "tisa_ne": {
        "laser": {"wavelength_nm": 800.0, "fwhm_fs": 30.0, "shape": "gaussian",
                  "energy_uj": 1000.0},
        "fiber": {"kind": "capillary", "core_diameter_um": 250.0, "length_m": 1.0},
        "gas": {"species": "Ne", "pressure_bar": 1.5},
        "cell": _CAPILLARY_CELL,
        "compressor": {"mirror_gdd_fs2": -40.0, "mirror_band_nm": [450.0, 1100.0],
                       "max_bounces": 30},
        "thz": {"crystal": "GaP", "thickness_mm": 0.1},
    },
    # few-cycle Ti:sapphire broadening in argon (capillary)
    "tisa_ar": {
        "laser": {"wavelength_nm": 800.0, "fwhm_fs": 30.0, "shape": "gaussian",
                  "energy_uj": 400.0},
        "fiber": {"kind": "capillary", "core_diameter_um": 250.0, "length_m": 1.0},
        "gas": {"species": "Ar", "pressure_bar": 0.6},
        "cell": _CAPILLARY_CELL,
        "compressor": {"mirror_gdd_fs2": -40.0, "mirror_band_nm": [450.0, 1100.0],
                       "max_bounces": 30},
        "thz": {"crystal": "GaP", "thickness_mm": 0.1},
    },
    # Yb at the mJ level in argon (capillary)
    "yb_mj_ar": {
        "laser": {"wavelength_nm": 1030.0, "fwhm_fs": 250.0, "shape": "sech2",
                  "energy_uj": 1000.0},
        "fiber": {"kind": "capillary", "core_diameter_um": 400.0, "length_m": 1.5},
        "gas": {"species": "Ar", "pressure_bar": 1.0},
        "cell": _CAPILLARY_CELL,
        "compressor": {"mirror_gdd_fs2": -200.0, "mirror_band_nm": [850.0, 1250.0],
                       "max_bounces": 30},
        "thz": {"crystal": "GaP", "thickness_mm": 0.5},
    },
    # soliton self-compression in an anti-resonant fiber, with a UV dispersive wave
    "arf_soliton_uv": {
        "laser": {"wavelength_nm": 800.0, "fwhm_fs": 30.0, "shape": "sech2",
                  "energy_uj": 5.0},
        "fiber": {"kind": "antiresonant", "core_diameter_um": 30.0, "wall_thickness_um": 0.2,
                  "length_m": 0.3},
        "gas": {"species": "Ar", "pressure_bar": 3.0},
        "cell": {"rated_pressure_bar": 20.0, "window_material": "fused_silica",
                 "window_thickness_mm": 3.0, "window_clear_aperture_mm": 10.0},
        "compressor": {"mirror_gdd_fs2": -20.0, "mirror_band_nm": [400.0, 1100.0],
                       "max_bounces": 10},
        "thz": {"crystal": "GaP", "thickness_mm": 0.1},
    },
    # a Raman-active molecular gas at 300 fs (N2, rotational Raman)
    "yb_n2_raman": {
        "laser": {"wavelength_nm": 1030.0, "fwhm_fs": 300.0, "shape": "sech2",
                  "energy_uj": 500.0},
        "fiber": {"kind": "capillary", "core_diameter_um": 300.0, "length_m": 1.0},
        "gas": {"species": "N2", "pressure_bar": 2.0},
        "cell": _CAPILLARY_CELL,
        "compressor": {"mirror_gdd_fs2": -200.0, "mirror_band_nm": [850.0, 1250.0],
                       "max_bounces": 30},
        "thz": {"crystal": "GaP", "thickness_mm": 0.5},
    },
    # a 1.8 um pump at the mJ level (capillary, helium)
    "ir_1800_he": {
        "laser": {"wavelength_nm": 1800.0, "fwhm_fs": 50.0, "shape": "gaussian",
                  "energy_uj": 1000.0},
        "fiber": {"kind": "capillary", "core_diameter_um": 400.0, "length_m": 1.0},
        "gas": {"species": "He", "pressure_bar": 2.0},
        "cell": _CAPILLARY_CELL,
        "compressor": {"mirror_gdd_fs2": -50.0, "mirror_band_nm": [1000.0, 2600.0],
                       "max_bounces": 20},
        "thz": {"crystal": "GaP", "thickness_mm": 0.1},
    },
}


def _cases() -> dict[str, object]:
    """Name -> config path (demo configs) or raw mapping (extra cases)."""
    cases: dict[str, object] = {p.stem: p for p in sorted((ROOT / "configs").glob("*.toml"))}
    cases.update(EXTRA_CASES)
    return cases


def _load(case, overrides: dict | None = None):
    from hcfplan.io.config import config_from_mapping
    from hcfplan.io.tomlio import read_toml

    if isinstance(case, Path):
        raw, base = read_toml(case), case.parent
    else:
        raw, base = copy.deepcopy(case), ROOT
    for section, values in (overrides or {}).items():
        raw.setdefault(section, {}).update(values)
    return config_from_mapping(raw, base_dir=base)


def _run(config) -> tuple[dict, object]:
    from hcfplan.planning.chain import run_chain, summary_dict
    from hcfplan.planning.scan.records import flatten

    chain = run_chain(config)
    return flatten(summary_dict(chain)), chain


def _void_fields(summary: dict) -> set[str]:
    return set(summary.get("verdict.void_fields") or ())


def _difference(key: str, default, converged) -> float | None:
    """Relative difference (None when both are void/absent; inf when only one is)."""
    missing = [v is None or (isinstance(v, float) and not math.isfinite(v))
               for v in (default, converged)]
    if all(missing):
        return None
    if any(missing):
        return math.inf
    if key == "output.max_ionization_fraction" and max(default, converged) < IONIZATION_FLOOR:
        return abs(default - converged)
    scale = max(abs(converged), 1e-300)
    return abs(default - converged) / scale


def _converged_run(case, config, grid):
    """The converged run: 4x the points over 2x the time window (half the time step, twice the
    frequency window) about the same window centre, and rtol / 100. Where twice the frequency
    window cannot be placed (it must stay above zero frequency and hold the pump), the widest
    that can: 2x the points over 2x the time window."""
    from hcfplan.constants import c as C_LIGHT
    from hcfplan.errors import ConfigError

    for factor in (4, 2):
        centre_nm = 2 * math.pi * C_LIGHT / grid.omega0 * 1e9
        overrides = {"grid": {"points": factor * grid.points,
                              "time_window_fs": 2 * grid.points * grid.dt * 1e15,
                              "center_wavelength_nm": centre_nm,
                              "rtol": config.grid.rtol / 100}}
        try:
            fine = _load(case, overrides)
        except ConfigError:
            continue
        try:
            return _run(fine)
        except ConfigError:
            continue
    raise RuntimeError("no converged grid could be placed")


def compare_case(name: str, case) -> dict:
    """Default and converged run of one case; the relative differences per quantity."""
    config = _load(case)
    start = time.perf_counter()
    default, chain = _run(config)
    seconds = time.perf_counter() - start
    grid = chain.grid
    converged, fine = _converged_run(case, config, grid)
    row = {"case": name, "points": grid.points, "dt_fs": grid.dt * 1e15,
           "converged_points": fine.grid.points, "converged_dt_fs": fine.grid.dt * 1e15,
           "refinements": default.get("grid.refinements", 0), "seconds": seconds,
           "verdict": default.get("verdict.status", "?"), "diffs": {}}
    void_default, void_converged = _void_fields(default), _void_fields(converged)
    for key in QUANTITIES:
        a = None if key in void_default else default.get(key)
        b = None if key in void_converged else converged.get(key)
        row["diffs"][key] = _difference(key, a, b)
    return row


def _cell(diff: float | None) -> str:
    if diff is None:
        return "void"
    if math.isinf(diff):
        return "**void in one run**"
    text = f"{100 * diff:.2f} %"
    return text if diff <= TOLERANCE else f"**{text}**"


def table(rows: list[dict]) -> str:
    head = ("| case | default grid (points, dt) | converged grid | refinements | verdict | "
            + " | ".join(QUANTITIES.values()) + " |")
    rule = "|" + "---|" * (5 + len(QUANTITIES))
    lines = [head, rule]
    for r in rows:
        cells = " | ".join(_cell(r["diffs"][k]) for k in QUANTITIES)
        lines.append(f"| {r['case']} | {r['points']}, {r['dt_fs']:.3g} fs | "
                     f"{r['converged_points']}, {r['converged_dt_fs']:.3g} fs | {r['refinements']} "
                     f"| {r['verdict']} | {cells} |")
    return "\n".join(lines)


def main(names: list[str]) -> int:
    cases = _cases()
    chosen = names or list(cases)
    unknown = [n for n in chosen if n not in cases]
    if unknown:
        print(f"unknown case(s) {unknown}; known: {sorted(cases)}")
        return 2
    rows = []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for name in chosen:
            row = compare_case(name, cases[name])
            rows.append(row)
            worst = max((d for d in row["diffs"].values() if d is not None), default=0.0)
            print(f"{name}: {row['points']} points, default run {row['seconds']:.1f} s, "
                  f"largest difference {100 * worst:.2f} %", flush=True)
    print()
    print(table(rows))
    failed = [r["case"] for r in rows
              if any(d is not None and d > TOLERANCE for d in r["diffs"].values())]
    print()
    print(f"{len(rows) - len(failed)} passed, {len(failed)} failed"
          + (f": {', '.join(failed)}" if failed else ""))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
