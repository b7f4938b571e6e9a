"""Safety cautions shown by every command that reports pressures, energies or limits.

The wording is ours; the practices it points to are the usual ones of laser, pressure and
gas-handling safety (IEC 60825-1:2014 for laser classes; the EU Pressure Equipment Directive
2014/68/EU and ASME BPVC Section VIII for pressure equipment; EIGA Doc. 44 on inert gases and
oxygen depletion). hcfplan never certifies a setup: its limits are estimates.
"""

from __future__ import annotations

#: Short tags -> one caution line each. The order is the order of printing.
CAUTIONS: dict[str, str] = {
    "estimates": (
        "Estimates only, not approvals: the limits hcfplan computes are model estimates. The cell "
        "maker's rating, your institution's safety officers, local codes and licensed practice "
        "come first."
    ),
    "pressure": (
        "Pressurised cells, windows and capillaries can fail violently (brittle fracture). Stay "
        "within the maker's rated pressure of every part (cell, windows, fittings, regulator, "
        "hoses), fit a relief device set at or below the lowest rating, shield the cell, and "
        "follow the local pressure-equipment codes."
    ),
    "laser": (
        "The pump is a Class 4 laser: direct and scattered beams harm eyes and skin and can "
        "ignite materials. Follow local laser-safety rules and standards; eyewear must cover the "
        "whole broadened band, which reaches far beyond the pump wavelength."
    ),
    "gas": (
        "Inert gases (He, Ne, Ar, Kr, Xe, N2) are odourless and displace oxygen in closed rooms: "
        "check the worst-case release of the whole gas inventory against the room volume, "
        "ventilate, and use an oxygen monitor where the check calls for one."
    ),
}


def caution_lines(topics: tuple[str, ...] = ("estimates", "pressure", "laser", "gas")) -> list[str]:
    """The caution texts for ``topics`` (default: all), in printing order."""
    return [CAUTIONS[t] for t in CAUTIONS if t in topics]
