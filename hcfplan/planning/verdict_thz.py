"""The THz checks of a verdict (:mod:`hcfplan.planning.verdict`): the THz spectrum against the
crystal model's range (``thz_beyond_crystal_model``) and the pump fluence against the crystal's
damage, two-photon and free-carrier limits (``thz_crystal_limit``).

Each check takes the flat summary and the measured extras of :mod:`hcfplan.planning.verdict`
and returns a list of :class:`~hcfplan.planning.verdict_reasons.Reason`. The statuses and what
each code voids are in :data:`hcfplan.planning.verdict.CODES`.
"""

from __future__ import annotations

from hcfplan.planning.verdict_reasons import Reason, first_number, number

#: The summary key of the fluence of each limit of ``thz.binding_limit``
#: (:data:`hcfplan.thz.crystal_limits.LIMIT_NAMES`) and how a message names it.
LIMIT_KEYS = {"damage": ("thz.damage_fluence_j_per_m2", "damage fluence"),
              "two_photon_absorption": ("thz.two_photon_fluence_j_per_m2",
                                        "two-photon absorption limit"),
              "free_carrier_absorption": ("thz.free_carrier_fluence_j_per_m2",
                                          "free-carrier absorption limit")}
#: What exceeding each limit means for the numbers of the THz estimate.
LIMIT_CONSEQUENCES = {
    "damage": "the crystal may be damaged (a screening level: the maker's rating decides); the "
              "THz figures stand as computed",
    "two_photon_absorption": "the pump is depleted by two-photon absorption, which the estimate "
                             "leaves out: THz energy, efficiency and peak field are upper bounds",
    "free_carrier_absorption": "carriers from two-photon absorption absorb the THz, which the "
                               "estimate leaves out: THz energy, efficiency and peak field are "
                               "upper bounds"}


def check_thz_model(flat: dict, measured: dict) -> list[Reason]:
    """``thz_beyond_crystal_model``: the THz peak or cutoff beyond the crystal model's range,
    or a cutoff the estimate already left out for that reason."""
    if "thz.crystal" not in flat:
        return []
    crystal = flat.get("thz.crystal")
    limit_keys = [k for k in flat if k.startswith("thz.") and k.endswith("model_limit_hz")]
    limit = first_number(flat, *limit_keys)
    if limit_keys and "thz.cutoff_hz" in flat and flat["thz.cutoff_hz"] is None:
        shown = f" ({limit / 1e12:.3g} THz)" if limit is not None else ""
        return [Reason("thz_beyond_crystal_model",
                       f"THz cutoff not given: the spectrum reaches beyond the {crystal} model's "
                       f"validity{shown}")]
    if limit is None:
        limit = number(measured, "thz_model_limit_hz")
    if limit is None:
        limit = crystal_model_limit(crystal)
    if limit is None:
        return []
    beyond = [(name, v) for name, v in (("peak", number(flat, "thz.peak_hz")),
                                        ("cutoff", number(flat, "thz.cutoff_hz")))
              if v is not None and v > limit]
    if not beyond:
        return []
    what = " and ".join(f"{name} {value / 1e12:.3g} THz" for name, value in beyond)
    verb = "are" if len(beyond) > 1 else "is"
    return [Reason("thz_beyond_crystal_model",
                   f"THz {what} {verb} beyond the {crystal} model's validity "
                   f"({limit / 1e12:.3g} THz): the cutoff is void")]


def crystal_model_limit(name, search_dirs=()) -> float | None:
    """Upper validity frequency of the THz model of a crystal table (in ``search_dirs``, the
    user's crystal path or the shipped tables), or None when no table of that name loads.
    [Hz]"""
    if not isinstance(name, str):
        return None
    from hcfplan.errors import HcfplanError
    from hcfplan.materials import crystals

    try:
        return float(crystals.load_crystal(name, search_dirs).thz.frequency_max)
    except HcfplanError:
        return None


def check_crystal_limit(flat: dict, measured: dict) -> list[Reason]:
    """``thz_crystal_limit``: the pump's peak fluence on the generation crystal
    (``thz.pump_fluence_j_per_m2``) above the limit that binds (``thz.binding_limit``: damage,
    two-photon or free-carrier absorption; margin ``thz.crystal_fluence_margin`` =
    limit / fluence below 1), with the limit named and what it means for the numbers.

    The limits are those of :mod:`hcfplan.thz.crystal_limits` (its references); this check
    only reads them from the summary.
    """
    binding = flat.get("thz.binding_limit")
    margin = number(flat, "thz.crystal_fluence_margin")
    if binding not in LIMIT_KEYS or margin is None or margin >= 1:
        return []
    key, name = LIMIT_KEYS[binding]
    fluence, limit = number(flat, "thz.pump_fluence_j_per_m2"), number(flat, key)
    crystal = flat.get("thz.crystal") or "the crystal"
    if fluence is not None and limit is not None:
        numbers = (f"pump peak fluence {fluence * 1e-4:.3g} J/cm^2 on {crystal} exceeds its "
                   f"{name} {limit * 1e-4:.3g} J/cm^2 ({1 / margin:.3g}x)")
    else:
        numbers = f"pump fluence on {crystal} is {1 / margin:.3g}x its {name}"
    exceeded = [n for n, (k, _) in LIMIT_KEYS.items()
                if fluence is not None and (v := number(flat, k)) is not None and v < fluence]
    consequences = [LIMIT_CONSEQUENCES[binding]]
    absorption = [n for n in exceeded if n != binding and n != "damage"]
    if binding == "damage" and absorption:  # the figures do not stand: say why
        consequences = [LIMIT_CONSEQUENCES["damage"].split(";")[0],
                        f"also above its {LIMIT_KEYS[absorption[0]][1]}: "
                        + LIMIT_CONSEQUENCES[absorption[0]].split(", which")[0]
                        + ", which the estimate leaves out: THz energy, efficiency and peak "
                        "field are upper bounds"]
    return [Reason("thz_crystal_limit",
                   f"{numbers}, the limit that binds ({binding}): " + "; ".join(consequences))]
