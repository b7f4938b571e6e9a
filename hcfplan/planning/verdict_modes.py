"""The verdict's check of a multimode run (``fiber.modes`` > 1): how much of the exit energy
is left in EH11, the part the compressor, THz and limit models describe."""

from __future__ import annotations

from hcfplan.planning.mode_run import EH11_FRACTION_FLOOR
from hcfplan.planning.verdict_reasons import Reason, number


def check_eh11_fraction(flat: dict, measured: dict) -> list[Reason]:
    """``eh11_fraction_low`` when ``output.eh11_fraction`` is below
    :data:`~hcfplan.planning.mode_run.EH11_FRACTION_FLOOR` (a single-mode run has no such key).

    References
    ----------
    none: the floor is common practice, no source.
    """
    fraction = number(flat, "output.eh11_fraction")
    if fraction is None or fraction >= EH11_FRACTION_FLOOR:
        return []
    return [Reason("eh11_fraction_low",
                   f"EH11 holds {fraction:.1%} of the exit energy (below "
                   f"{EH11_FRACTION_FLOOR:.0%}): the compressed and THz numbers describe the "
                   "EH11 part only; compressed.beam_* give the whole beam")]
