"""Terminal rows of a multimode run (``fiber.modes`` > 1): the launch on the modes, the
energy shares at the exit and the compressed whole beam beside the EH11 part."""

from __future__ import annotations


def _shown(verdict, key: str, text: str) -> str:
    """``text``, or "void (code)" where the verdict voids ``key``."""
    reason = verdict.void_reason(key)
    return text if reason is None else f"void ({reason.code})"


def _shares(values) -> str:
    return " / ".join(f"{100 * v:.3g}" for v in values) + " %"


def mode_rows(s: dict, verdict, fmt) -> list[tuple[str, str, str]]:
    """(label, value, details) rows for :func:`hcfplan.cli.output.print_rows`; none for a
    single-mode run. A number the verdict voids reads "void (code)"; ``fmt(value, scale,
    digits)`` formats a number (:func:`hcfplan.cli.output.fmt`)."""
    inp, outp = s.get("input", {}), s.get("output", {})
    fractions = inp.get("mode_fractions")
    if not fractions:
        return []
    names = f"EH11-EH1{len(fractions)}"
    rows = [(f"launch on {names}", _shares(fractions),
             f"lost (outside the modes) {fmt(inp.get('lost_fraction'), 0.01, 3)} %, waist "
             f"{fmt(inp.get('beam_waist_m'), 1e-6, 3)} um"),
            ("exit energy per mode", _shares(outp.get("mode_fractions") or []),
             "EH11 share " + _shown(verdict, "output.eh11_fraction",
                                    f"{fmt(outp.get('eh11_fraction'), 0.01, 4)} %"))]
    comp = s.get("compressed") or {}
    if "beam_fwhm_s" in comp:
        rows.append(("compressed, whole beam",
                     _shown(verdict, "compressed.beam_fwhm_s",
                            f"{fmt(comp['beam_fwhm_s'], 1e-15)} fs"),
                     _shown(verdict, "compressed.beam_peak_power_w",
                            f"{fmt(comp['beam_peak_power_w'], 1e9)} GW")
                     + " (the compressed and THz rows above: the EH11 part)"))
    return rows
