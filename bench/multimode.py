"""Cost of the multimode capillary solver against the single-mode one (prints figures; not a
test).

On the demo capillary config ``configs/tisa_capillary_neon.toml`` (800 nm, 40 fs, 0.6 mJ into
1 m of 250 um capillary with 2 bar neon, PPT photoionisation), with the grid, input field,
tolerance, record count and solver options the chain uses (taken from one chain run), it
times side by side, alternating, the single-mode ``propagate()`` and ``propagate_modes()`` for
N = 1, 2, 4, 6 modes (the chain's field launched into EH11, the planner's optimally coupled
Gaussian puts ~98 % there; here 2 % of it is put into EH12 so the modes interact from the
start). Each timing is the median of ``REPEATS`` runs; the ratio to single mode and the steps
are printed. Target: N = 4 at most 6x the single-mode time. Then the peak memory of N = 6
(tracemalloc during the run, and the process high-water mark).

Then the floor: the ratio of the times is (steps ratio) x (cost of one evaluation of the
nonlinear terms, ratio). The N modes need N times the transforms of one mode (N forward, N or
2N backward with plasma), so (steps ratio) x N is what the multimode run costs at the very
least, even with every other part of an evaluation free. The bench prints that floor, a
micro-profile of one N = 4 evaluation (transforms against the pass over the radial nodes) and
the steps of an EH11-only launch (no EH12 at the input: the beat is then driven by the Kerr
effect of EH11 alone).

Run: PYTHONPATH=. python bench/multimode.py [repeats]
"""

from __future__ import annotations

import dataclasses
import pathlib
import resource
import statistics
import sys
import time
import tracemalloc
import warnings

import numpy as np

from hcfplan.errors import ValidityWarning
from hcfplan.io.config import load_config
from hcfplan.planning.build import build_fill_segments, rate_model
from hcfplan.planning.chain import run_chain
from hcfplan.planning.fiber_run import fiber_setup
from hcfplan.propagation.ionizing import ionizing_gas
from hcfplan.propagation.multimode import propagate_modes
from hcfplan.propagation.multimode_terms import ModeCoupling, mode_linear_terms
from hcfplan.propagation.operators import delayed_response
from hcfplan.propagation.options import SolverOptions
from hcfplan.propagation.solve import propagate

CONFIG = pathlib.Path(__file__).resolve().parents[1] / "configs" / "tisa_capillary_neon.toml"
REPEATS = 3
MODES = (1, 2, 4, 6)
EH12_SHARE = 0.02


def _case():
    config = load_config(CONFIG)
    chain = run_chain(config)  # the chain's grid and launched field (and warm caches)
    setup = fiber_setup(config)
    if build_fill_segments(config, setup.omega0) is not None:
        raise SystemExit("the demo config has a gradient fill; this bench expects a static one")
    options = SolverOptions(rtol=config.grid.rtol, z_samples=config.grid.z_samples,
                            ionization_model=rate_model(config) if config.gas else None,
                            stop_ionization_fraction=config.grid.stop_ionization_fraction)
    return config, chain.grid, chain.propagation.field_in_t, setup, options


def _launch(field, n: int) -> np.ndarray:
    fields = np.zeros((n, field.size), complex)
    fields[0] = field if n == 1 else np.sqrt(1 - EH12_SHARE) * field
    if n > 1:
        fields[1] = np.sqrt(EH12_SHARE) * field
    return fields


def _runs(grid, field, setup, options):
    fiber = setup.waveguide
    calls = {"single": lambda: propagate(field, grid, fiber, gas=setup.medium,
                                         options=options)}
    for n in MODES:
        guides = [dataclasses.replace(fiber, mode=(1, m)) for m in range(1, n + 1)]
        fields = _launch(field, n)
        calls[f"N={n}"] = (lambda g=guides, f=fields: propagate_modes(
            f, grid, g, gas=setup.medium, options=options))
    return calls


def _floor(results, times, base, grid, field, setup, options) -> None:
    """The floor analysis (module docstring): steps ratio x transforms ratio, the micro-profile
    of one N = 4 evaluation and the steps of an EH11-only launch."""
    single = results["single"]
    print(f"floor (steps ratio x transforms ratio N; the single-mode run takes "
          f"{single.n_steps} steps, one per record interval of {options.z_samples} records):")
    for n in MODES:
        r = results[f"N={n}"]
        steps = r.n_steps / single.n_steps
        evaluation = (statistics.median(times[f"N={n}"]) / max(r.n_rhs_evals, 1)) \
            / (base / max(single.n_rhs_evals, 1))
        print(f"  N={n}: steps ratio {steps:4.2f} x transforms ratio {n} = floor "
              f"{steps * n:5.2f}x; measured {statistics.median(times[f'N={n}']) / base:5.2f}x "
              f"(time per evaluation {evaluation:4.2f}x the single mode's)")
    _profile(grid, field, setup, options, 4)
    guides = [dataclasses.replace(setup.waveguide, mode=(1, m)) for m in range(1, 5)]
    only = np.zeros((4, field.size), complex)
    only[0] = field
    r = propagate_modes(only, grid, guides, gas=setup.medium, options=options)
    print(f"  N=4, EH11-only launch: {r.n_steps} steps (+{r.n_rejected} rejected), steps ratio "
          f"{r.n_steps / single.n_steps:.2f}, floor {4 * r.n_steps / single.n_steps:.2f}x")


def _profile(grid, field, setup, options, n: int) -> None:
    """Median time of one evaluation of the N-mode nonlinear terms and of its transforms."""
    guides = [dataclasses.replace(setup.waveguide, mode=(1, m)) for m in range(1, n + 1)]
    lin = mode_linear_terms(grid, guides, guides[0].length)
    f_inst, response, _ = delayed_response(grid, guides[0], setup.medium)
    plasma = ionizing_gas(grid, guides[0], setup.medium, options.ionization_model)
    terms = ModeCoupling(grid, guides[0].kerr_n2, lin.valid, guides[0].core_radius,
                         [g.u for g in guides], f_inst, response, plasma.species,
                         options.workers, "radial", options.fft_backend)
    u = np.array([grid.to_spectrum(f) for f in _launch(field, n)]).reshape(-1)
    out = terms.new_work()

    def timed(call, count=200) -> float:
        call()
        runs = []
        for _ in range(5):
            start = time.perf_counter()
            for _ in range(count // 5):
                call()
            runs.append((time.perf_counter() - start) / (count // 5))
        return 1e3 * min(runs)

    terms.input[...] = u
    whole = timed(lambda: terms.evaluate(out))
    forward = timed(terms.fft.forward)
    source = terms.fft.empty()
    backward = timed(lambda: terms.fft.backward(source, out))
    a = terms.fft.forward().copy()
    rates = timed(lambda: terms.ionization_of(a))
    batches = 1 + (2 if plasma.species else 1)  # forward; Kerr (and plasma) backward
    transforms = forward + (batches - 1) * backward
    print(f"  one N={n} evaluation at the input ({terms.fft.name}, {terms.nodes[0].shape[0]} "
          f"radial nodes): {whole:.3f} ms = {batches} batches of {n} transforms "
          f"{transforms:.3f} ms + the pass over the nodes and the rest "
          f"{whole - transforms:.3f} ms (of which the synthesis and the ionisation rates "
          f"alone {rates:.3f} ms)")


def main() -> None:
    repeats = int(sys.argv[1]) if len(sys.argv) > 1 else REPEATS
    warnings.simplefilter("ignore", ValidityWarning)
    config, grid, field, setup, options = _case()
    calls = _runs(grid, field, setup, options)
    for call in calls.values():  # warm: kernels compiled or loaded, tables cached
        call()
    times: dict[str, list[float]] = {name: [] for name in calls}
    results = {}
    for _ in range(repeats):  # alternating, so a load change hits all alike
        for name, call in calls.items():
            start = time.perf_counter()
            results[name] = call()
            times[name].append(time.perf_counter() - start)
    print(f"config {CONFIG.name}: {grid.points} points, dt = {grid.dt * 1e15:.3f} fs, "
          f"rtol = {options.rtol:g}, z_samples = {options.z_samples}, ionisation "
          f"{options.ionization_model}; median of {repeats} alternating runs")
    base = statistics.median(times["single"])
    for name, values in times.items():
        r = results[name]
        median = statistics.median(values)
        extra = ""
        if name != "single":
            fractions = r.mode_energy_z[-1] / r.energy_z[-1]
            extra = f", exit EH11 fraction {fractions[0]:.4f}"
        print(f"  {name:>6}: {median:7.3f} s  ratio {median / base:5.2f}  steps {r.n_steps:5d} "
              f"(+{r.n_rejected} rejected), {r.n_rhs_evals} N evaluations, "
              f"{1e3 * median / max(r.n_rhs_evals, 1):.3f} ms per evaluation, {r.status}"
              f"{extra}")
    four = statistics.median(times["N=4"]) / base
    print(f"N = 4 against single mode: {four:.2f}x")
    _floor(results, times, base, grid, field, setup, options)
    tracemalloc.start()
    largest = calls[f"N={MODES[-1]}"]()
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"N = {MODES[-1]} memory: tracemalloc peak during the run {peak / 2**20:.1f} MB "
          f"(spectrum_z {largest.spectrum_z.nbytes / 2**20:.1f} MB stored), process max RSS "
          f"{rss:.0f} MB")


if __name__ == "__main__":
    main()
