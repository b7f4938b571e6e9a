"""Regenerate the figures embedded in README.md (docs/figures/*.png) from the demo configs.

Usage (from the repository root, with hcfplan installed):

    python scripts/make_readme_figures.py

Each figure is produced by the same command a user would run; nothing is drawn by hand.
"""

from __future__ import annotations

import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
FIGURES = ROOT / "docs" / "figures"


def run(*args: str) -> None:
    print("+ hcfplan", " ".join(args))
    subprocess.run([sys.executable, "-m", "hcfplan", *args], check=True, cwd=ROOT,
                   stdout=subprocess.DEVNULL)


def main() -> None:
    FIGURES.mkdir(parents=True, exist_ok=True)
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        run("fiber", "configs/yb_capillary_mixture.toml", "--plot", str(FIGURES / "fiber.png"))
        run("simulate", "configs/yb_arf_argon.toml", "--out", str(tmp / "arf"), "--quiet",
            "--spread", "default", "--figures", "all")
        for name in ("spectral_evolution", "compressed_pulse", "thz_spectrum", "spread"):
            shutil.copy(tmp / "arf" / f"{name}.png", FIGURES / f"simulate_{name}.png")
        run("envelope", "configs/yb_capillary_mixture.toml", "--plot",
            str(FIGURES / "envelope.png"))
        run("scan", "configs/yb_arf_argon.toml", "--vary", "gas.pressure_bar=1:5:9", "--out",
            str(tmp / "scan"))
        shutil.copy(tmp / "scan" / "results.png", FIGURES / "scan_results.png")
        shutil.copy(tmp / "scan" / "spectrum_map.png", FIGURES / "scan_spectrum_map.png")
        run("compare", "configs/yb_capillary_mixture.toml", "--set-b", "laser.energy_uj=2500",
            "--out", str(tmp / "compare"))
        shutil.copy(tmp / "compare" / "compare_thz.png", FIGURES / "compare_thz.png")
        run("thz", "configs/demo_broadened_spectrum.csv", "--crystal", "GaP", "--thickness-mm",
            "0.3", "--energy-uj", "10", "--plot", str(FIGURES / "thz_measured.png"))


if __name__ == "__main__":
    main()
