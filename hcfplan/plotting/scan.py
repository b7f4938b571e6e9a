"""Figures of a scan, drawn from the point records (:mod:`hcfplan.planning.scan`).

1D scans: the output spectrum of every point as an image against the varied key (log colour
scale) and the main results against the key (compressed FWHM, compressed peak power, THz
cutoff, self-focusing margin, ionisation margin), with the points beyond a modelled limit
shaded. 2D scans: maps of the same results, points beyond a limit crossed out.
A result that a point's verdict voids (:mod:`hcfplan.planning.verdict`: every result of an
invalid point, and e.g. the THz cutoff beyond the crystal model) is not drawn as a result: it
appears as a hollow grey marker off the line (1D: at its value, or at the foot of the panel
when there is no number, e.g. a cutoff left out) or as a blank cell with a grey circle (2D),
and the title says in words how many points are void and why (each code with its meaning).
Margins are always drawn.
Nothing here recomputes physics.
"""

from __future__ import annotations

import textwrap

import numpy as np

from hcfplan.constants import c
from hcfplan.plotting.layout import key_label, legend_beside, plain_log_ticks

#: (figure label, summary/margins path, display scale, log axis)
QUANTITIES = (
    ("Compressed FWHM (fs)", ("summary", "compressed", "fwhm_s"), 1e-15, False),
    ("Compressed peak power (GW)", ("summary", "compressed", "peak_power_w"), 1e9, False),
    ("THz cutoff (THz)", ("summary", "thz", "cutoff_hz"), 1e12, False),
    ("Self-focusing margin P_cr/P", ("margins", "self_focusing"), 1.0, True),
    ("Ionisation margin (limit/fraction)", ("margins", "ionization_margin"), 1.0, True),
)
_SPECTRUM_FLOOR = 1e-5
_SPECTRUM_BINS = 400


def _value(record: dict, path: tuple[str, ...]) -> float:
    node = record
    for part in path:
        node = node.get(part) if isinstance(node, dict) else None
    return float(node) if isinstance(node, (int, float)) and not isinstance(node, bool) \
        else np.nan


def _axis(values: tuple):
    """Numeric positions and tick labels of a varied key (categorical for strings)."""
    if all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in values):
        return np.asarray(values, dtype=float), None
    return np.arange(len(values), dtype=float), [str(v) for v in values]


def _void(record: dict, path: tuple[str, ...]) -> bool:
    """Whether the point's verdict voids the summary value at ``path`` (margins never)."""
    return _void_code(record, path) is not None


def _void_code(record: dict, path: tuple[str, ...], verdict=None) -> str | None:
    """The verdict code that voids the summary value at ``path``: its own reason, or for an
    invalid point whose reasons do not name this value, the first invalid code (every result
    of an invalid point is void); None where it stands (margins always)."""
    from hcfplan.planning.verdict import CODES, verdict_of_record

    if path[0] != "summary":
        return None
    verdict = verdict if verdict is not None else verdict_of_record(record)
    reason = verdict.void_reason(".".join(path[1:]))
    if reason is not None:
        return reason.code
    if verdict.invalid:
        return next(r.code for r in verdict.reasons if CODES[r.code].status == "invalid")
    return None


def void_note(records) -> str:
    """How many points have void results and why, in plain words, e.g. "hollow grey: void;
    2 of 5 points void: 2 thz_beyond_crystal_model (THz cutoff or band beyond the crystal
    model's validity)". Each code is counted once per point; "" when nothing is void."""
    from hcfplan.planning.verdict import CODES, verdict_of_record

    counts: dict[str, int] = {}
    void_points = 0
    for record in records:
        verdict = verdict_of_record(record)
        codes = dict.fromkeys(code for _, path, _, _ in QUANTITIES
                              if (code := _void_code(record, path, verdict)) is not None)
        void_points += bool(codes)
        for code in codes:
            counts[code] = counts.get(code, 0) + 1
    if not counts:
        return ""
    whys = [f"{n} {code} ({CODES[code].meaning})" if len(counts) > 1 or n != void_points
            else f"{code} ({CODES[code].meaning})" for code, n in counts.items()]
    point_word = "point" if len(records) == 1 else "points"
    return (f"hollow grey: void; {void_points} of {len(records)} {point_word} void:\n"
            + ";\n".join(whys))


def _outside(record: dict) -> str:
    return record.get("margins", {}).get("binding", "") or (
        "run failed" if record.get("status") != "ok" else "")


def _wavelength_image(records):
    """Common wavelength axis [nm] and each point's spectral density per wavelength."""
    spectra = []
    for r in records:
        spec = r.get("spectrum") or {}
        freq = np.asarray(spec.get("frequency_hz", []), dtype=float)
        dens = np.asarray(spec.get("energy_density_j_per_hz", []), dtype=float)
        keep = freq > 0
        spectra.append((freq[keep], dens[keep]))
    found = [f for f, _ in spectra if f.size]
    if not found:
        return None, None
    lo, hi = min(f.min() for f in found), max(f.max() for f in found)
    wl = np.linspace(c / hi, c / lo, _SPECTRUM_BINS)
    image = np.full((len(records), wl.size), np.nan)
    for i, (freq, dens) in enumerate(spectra):
        if freq.size:
            per_m = dens * freq**2 / c  # J/Hz -> J/m (|d nu / d lambda| = c / lambda^2)
            image[i] = np.interp(c / wl, freq, per_m, left=np.nan, right=np.nan)
    return wl * 1e9, image


def draw_spectrum_map(fig, key: str, values: tuple, records):
    """Output spectrum (per wavelength, relative to the overall peak) vs the varied key."""
    from matplotlib.colors import LogNorm

    ax = fig.subplots()
    wl, image = _wavelength_image(records)
    y, labels = _axis(values)
    if image is None:
        ax.set_title("No output spectra")
        return ax
    peak = np.nanmax(image)
    shown = np.clip(np.nan_to_num(image / peak, nan=0.0), _SPECTRUM_FLOOR, 1.0)
    mesh = ax.pcolormesh(wl, y, shown, shading="nearest",
                         norm=LogNorm(vmin=_SPECTRUM_FLOOR, vmax=1.0))
    fig.colorbar(mesh, ax=ax,
                 label="Spectral energy density per nm\n(rel. highest peak of the scan)")
    if labels:
        ax.set_yticks(y, labels)
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel(key_label(key))
    ax.set_title("Fiber output spectrum")
    return ax


def draw_results_1d(fig, key: str, values: tuple, records):
    """The main results vs the varied key; points beyond a modelled limit shaded."""
    x, labels = _axis(values)
    axes = fig.subplots(len(QUANTITIES), 1, sharex=True)
    fig.set_size_inches(6.4, 2.0 * len(QUANTITIES))
    half = (np.min(np.diff(x)) / 2 if x.size > 1 else 0.5)
    for ax, (label, path, scale, log) in zip(axes, QUANTITIES, strict=True):
        y = np.array([_value(r, path) for r in records]) / scale
        void = np.array([_void(r, path) for r in records], dtype=bool)
        ax.plot(x[~void], y[~void], "o-", color="C0")
        if np.any(void):
            # a void number is drawn where it lies, a void point without a number (a cutoff
            # left out, a failed run) at the foot of the panel: never left out silently
            at = void & np.isfinite(y)
            ax.plot(x[at], y[at], "o", mfc="none", color="0.6", label="void")
            if np.any(void & ~at):
                ax.plot(x[void & ~at], np.full(int(np.sum(void & ~at)), 0.04), "o",
                        mfc="none", color="0.6", transform=ax.get_xaxis_transform(),
                        clip_on=False)
        if log and np.any(y > 0):
            ax.set_yscale("log")
            plain_log_ticks(ax.yaxis)
        ax.set_ylabel(textwrap.fill(label, 18), fontsize="small")
        for xi, r in zip(x, records, strict=True):
            if _outside(r):
                ax.axvspan(xi - half, xi + half, color="C3", alpha=0.15, lw=0)
    required = records[0].get("margins", {}).get("self_focusing_required") if records else None
    if required:
        axes[3].axhline(required, color="C3", ls="--", lw=1,
                        label=f"required margin\nP_cr/P >= {required:g}")
        legend_beside(axes[3])
    axes[4].axhline(1.0, color="C3", ls="--", lw=1, label="required margin\n>= 1")
    legend_beside(axes[4])
    if labels:
        axes[-1].set_xticks(x, labels)
    axes[-1].set_xlabel(key_label(key))
    note = void_note(records)
    axes[0].set_title("Scan results (shaded: beyond a modelled limit)"
                      + (f"\n{note}" if note else ""), fontsize="small" if note else None)
    return axes


def draw_results_2d(fig, keys: tuple[str, str], values: tuple[tuple, tuple], records):
    """Maps of the main results over two keys; points beyond a modelled limit marked x."""
    x, xlabels = _axis(values[0])
    y, ylabels = _axis(values[1])
    n = len(QUANTITIES)
    axes = np.atleast_1d(fig.subplots(n, 1))
    fig.set_size_inches(6.4, 2.8 * n)
    fig.subplots_adjust(hspace=0.35)
    outside = np.array([bool(_outside(r)) for r in records]).reshape(x.size, y.size)
    gx, gy = np.meshgrid(x, y, indexing="ij")
    for ax, (label, path, scale, log) in zip(axes, QUANTITIES, strict=True):
        z = np.array([_value(r, path) for r in records]).reshape(x.size, y.size) / scale
        void = np.array([_void(r, path) for r in records], dtype=bool).reshape(x.size, y.size)
        z = np.where(void, np.nan, z)
        if log:
            z = np.log10(np.where(z > 0, z, np.nan))
            label = f"log10 {label}"
        mesh = ax.pcolormesh(x, y, z.T, shading="nearest")
        fig.colorbar(mesh, ax=ax, label=textwrap.fill(label, 20))
        ax.plot(gx[outside], gy[outside], "x", color="C3", ms=8)
        ax.plot(gx[void], gy[void], "o", mfc="none", color="0.6", ms=8)
        if xlabels:
            ax.set_xticks(x, xlabels)
        if ylabels:
            ax.set_yticks(y, ylabels)
        ax.set_ylabel(key_label(keys[1]))
    axes[-1].set_xlabel(key_label(keys[0]))
    note = void_note(records)
    axes[0].set_title("Scan results (x: beyond a modelled limit)"
                      + (f"\n{note}" if note else ""), fontsize="small" if note else None)
    return axes
