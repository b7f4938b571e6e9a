"""Small, fast invented configs shared by the workflow tests (not a test module).

Both are test scenarios of our own, not measured setups: they keep the chain cheap (short
fibers, small fixed grids) so the command tests run in seconds.
"""

from __future__ import annotations

from pathlib import Path

FAST_CONFIG = """
# Test scenario (invented): 1030 nm, 200 fs into a 20 cm, 150 um argon capillary.
[laser]
wavelength_nm = 1030.0
fwhm_fs = 200.0
shape = "gaussian"
energy_uj = {energy_uj}

[fiber]
kind = "capillary"
core_diameter_um = 150.0
length_m = 0.2

[gas]
species = "Ar"
pressure_bar = 2.0
ionization_model = "adk"

[cell]
rated_pressure_bar = {rated_bar}

[compressor]
mirror_gdd_fs2 = -100.0
max_bounces = 30

[thz]
crystal = "GaP"
thickness_mm = 0.1

[limits]
ionization_fraction_limit = 0.01

[grid]
points = 1024
z_samples = 10
"""


def write_fast_config(folder: Path, name: str = "fast.toml", energy_uj: float = 200.0,
                      rated_bar: float = 20.0) -> Path:
    """The fast test config (shared by the workflow test files)."""
    path = Path(folder) / name
    path.write_text(FAST_CONFIG.format(energy_uj=energy_uj, rated_bar=rated_bar),
                    encoding="utf-8")
    return path


#: A fast Ti:sapphire capillary config (text) for the simulate and spread tests.
FAST = """
[laser]
wavelength_nm = 800.0
fwhm_fs = 60.0
shape = "gaussian"
energy_uj = 300.0

[fiber]
kind = "capillary"
core_diameter_um = 250.0
length_m = 0.3

[gas]
species = "Ar"
pressure_bar = 0.6

[cell]
window_material = "fused_silica"
window_thickness_mm = 1.0

[compressor]
air_path_m = 0.5
mirror_gdd_fs2 = -40.0
max_bounces = 16
bounces_in_pairs = true

[thz]
crystal = "ZnTe"
thickness_mm = 0.1
detector_crystal = "ZnTe"
detector_thickness_mm = 0.2

[grid]
points = 2048
z_samples = 12
"""

#: An invented scenario that runs in well under a second (interrupt, --force and writing
#: checks).
TINY = """
[laser]
wavelength_nm = 800.0
fwhm_fs = 60.0
shape = "gaussian"
energy_uj = 50.0

[fiber]
kind = "capillary"
core_diameter_um = 250.0
length_m = 0.1

[gas]
species = "Ar"
pressure_bar = 0.5

[grid]
points = 1024
z_samples = 5
"""


def two_stage_text(one: str, second: str) -> str:
    """``one`` with its stage sections moved into a first [[stage]], and ``second`` added."""
    shared, stage, current = [], [], None
    for line in one.splitlines():
        if line.startswith("["):
            current = line.strip("[]")
        target = stage if current in ("fiber", "gas", "cell", "compressor") else shared
        target.append(line.replace(f"[{current}]", f"[stage.{current}]")
                      if line.startswith("[") and target is stage else line)
    return "\n".join(shared) + "\n[[stage]]\n" + "\n".join(stage) + "\n" + second


#: An invented multimode scenario (three capillary modes, a focus below the EH11 optimum so
#: that EH12 and EH13 carry a visible share), as small as TINY: the multimode tests.
MULTIMODE = """
[laser]
wavelength_nm = 800.0
fwhm_fs = 60.0
shape = "gaussian"
energy_uj = {energy_uj}
beam_waist_um = {waist_um}

[fiber]
kind = "capillary"
core_diameter_um = 250.0
length_m = 0.1
modes = {modes}

[gas]
species = "Ar"
pressure_bar = 0.5

[cell]
rated_pressure_bar = 5.0

[compressor]
mirror_gdd_fs2 = -40.0
max_bounces = 10

[grid]
points = 1024
z_samples = 5
"""


def write_multimode_config(folder: Path, name: str = "multimode.toml", modes: int = 3,
                           energy_uj: float = 50.0, waist_um: float = 60.0) -> Path:
    """The fast multimode test config (``fiber.modes = modes``)."""
    path = Path(folder) / name
    path.write_text(MULTIMODE.format(modes=modes, energy_uj=energy_uj, waist_um=waist_um),
                    encoding="utf-8")
    return path
