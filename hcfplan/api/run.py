"""``simulate`` and its :class:`Run`: the chain of one config, its summary, arrays, verdict,
figures and run folder, as the ``simulate`` command computes and writes them.
"""

from __future__ import annotations

import functools
from pathlib import Path
from typing import Any

from hcfplan.api.config import ConfigLike, as_config
from hcfplan.errors import ConfigError


def flat_summary(nested: dict) -> dict:
    """The summary as ``summary.json`` holds it (plain JSON values), with flat dotted keys:
    ``{"compressed": {"fwhm_s": x}}`` -> ``{"compressed.fwhm_s": x}``; lists stay lists."""
    from hcfplan.io.results import json_ready
    from hcfplan.planning.scan import flatten

    return flatten(json_ready(nested))


class _AxesFigure:
    """Stands in for a figure when :meth:`Run.plot` is given axes: ``subplots`` hands out the
    given axes (one, or as many as the figure has panels, in the same layout)."""

    def __init__(self, axes, name: str):
        import numpy as np

        self.axes = np.asarray(axes, dtype=object)
        self.name = name

    def subplots(self, nrows: int = 1, ncols: int = 1, **_):
        import numpy as np

        panels = nrows * ncols
        if self.axes.size != panels:
            raise ConfigError(f"plot {self.name!r}: the figure has {panels} panels "
                              f"({nrows} x {ncols}); pass ax=None or {panels} axes")
        if panels == 1:
            return self.axes.reshape(-1)[0]
        shape = (nrows, ncols) if nrows > 1 and ncols > 1 else (panels,)
        return np.asarray(self.axes.reshape(-1), dtype=object).reshape(shape)

    def set_size_inches(self, *_, **__) -> None:
        """The caller's figure keeps its size."""

    def subplots_adjust(self, *_, **__) -> None:
        """The caller's figure keeps its layout."""

    def tight_layout(self, *_, **__) -> None:
        """The caller's figure keeps its layout."""

    def __getattr__(self, name: str):
        """Anything else (a title, a legend of the figure) goes to the axes' own figure."""
        return getattr(self.axes.reshape(-1)[0].figure, name)


def draw_figure(name: str, jobs, ax=None):
    """Draw the figure job called ``name`` (its file stem) into a new figure, or into ``ax``.

    Returns the new matplotlib Figure (``ax`` None) or the axes it drew into."""
    found = {Path(path).stem: (draw, args) for path, draw, args in jobs}
    if name not in found:
        raise ConfigError(f"plot {name!r}: no such figure for this result (figures: "
                          f"{', '.join(found) or 'none'})")
    draw, args = found[name]
    if ax is not None:
        draw(_AxesFigure(ax, name), *args)
        return ax
    import matplotlib.pyplot as plt

    style = Path(__file__).resolve().parent.parent / "styles" / "hcfplan.mplstyle"
    with plt.style.context(str(style)):
        fig = plt.figure()
        draw(fig, *args)
    return fig


class Run:
    """The result of :func:`simulate`: one run of the chain fiber -> compressor -> THz.

    Attributes
    ----------
    config : PlanConfig
        The validated config that was run.
    chain : ChainResult
        Everything the chain computed (:class:`hcfplan.planning.chain.ChainResult`).
    summary : dict
        Flat dotted keys (``"compressed.fwhm_s"``), SI values with the unit in the key name:
        the content of ``summary.json`` and of ``simulate --json``, flattened (without the
        ``figures`` list, which only a run folder has).
    verdict : Verdict
        ``status`` (valid, caution, invalid), ``reasons`` (each with ``code`` and
        ``message``) and ``void_fields`` (see the README's "Verdicts").
    """

    def __init__(self, config, chain, nested: dict):
        self.config = config
        self.chain = chain
        self._nested = nested
        self.summary = flat_summary(nested)

    def __repr__(self) -> str:
        s = self.summary
        name = self.config.source.name if self.config.source is not None else "mapping"
        return (f"<hcfplan Run of {name}: verdict {s.get('verdict.status')}, compressed FWHM "
                f"{s.get('compressed.fwhm_s')} s>")

    @property
    def verdict(self):
        from hcfplan.planning.verdict import stored_verdict

        return stored_verdict(self._nested)

    @functools.cached_property
    def arrays(self) -> dict[str, Any]:
        """SI numpy arrays, the content of ``fields.npz`` (same names, same values)."""
        from hcfplan.planning.chain import field_arrays

        return field_arrays(self.chain)

    def _jobs(self, folder: Path, names: tuple[str, ...] | None = None):
        """Figure jobs of ``names`` (default: every figure of the registry)."""
        from hcfplan.plotting.report import FIGURES, figure_jobs

        return figure_jobs(Path(folder), self.chain,
                           names=tuple(FIGURES) if names is None else names)

    @property
    def figures(self) -> tuple[str, ...]:
        """Names of the figures of this run (the file stems ``simulate`` writes), the
        arguments :meth:`plot` takes."""
        return tuple(Path(path).stem for path, _, _ in self._jobs(Path(".")))

    def plot(self, name: str, ax=None):
        """Draw one of the run's figures.

        Parameters
        ----------
        name : str
            One of :attr:`figures`, e.g. ``"spectral_evolution"`` or ``"thz_spectrum"``.
        ax : matplotlib Axes or array of Axes, optional
            Draw into these (as many as the figure has panels: e.g. 3 for
            ``"compressed_pulse"``, 2 x 2 for ``"thz_spectrum"``); default a new figure in
            the house style, as the run folder's PNG.

        Returns
        -------
        matplotlib.figure.Figure or Axes
            The new figure, or ``ax``.

        References
        ----------
        The figures of ``hcfplan.plotting.report``; no physics is recomputed.
        """
        return draw_figure(name, self._jobs(Path(".")), ax)

    def save(self, folder, *, figures: bool | str = True, report: bool = True,
             force: bool = False) -> Path:
        """Write the run folder as ``simulate --out folder`` does.

        ``summary.json``, ``fields.npz``, ``config.resolved.toml``, the figures and
        ``report.html`` (unless ``report=False``). ``figures``: True for the default set of
        ``simulate``, False for none, or a ``--figures`` value (``"all"`` or comma-separated
        names). A non-empty folder is refused (ConfigError) unless ``force``. Returns the
        folder.
        """
        from hcfplan.io.results import prepare_output_dir
        from hcfplan.planning.run_folder import write_run
        from hcfplan.plotting.report import select_figures

        out_dir = prepare_output_dir(Path(folder), force=force)
        jobs = None
        if figures is not False:
            names = select_figures(None if figures is True else str(figures))
            jobs = self._jobs(out_dir, names)
        summary = write_run(out_dir, self.chain, figures=jobs)
        if report:
            from hcfplan.report import write_run_report

            write_run_report(out_dir, summary,
                             command=f"hcfplan.simulate(...).save({str(folder)!r})")
        return out_dir


def simulate(config: ConfigLike, overrides=None, *, progress=None) -> Run:
    """Run the chain fiber (GNLSE) -> chirped-mirror compressor -> THz for one config.

    Parameters
    ----------
    config : str, path-like, mapping or PlanConfig
        As for :func:`load_config`.
    overrides : mapping or iterable of str, optional
        ``{"gas.pressure_bar": 4}`` or ``["gas.pressure_bar=4"]``.
    progress : callable, optional
        ``progress(z, length, steps)`` during the propagation.

    Returns
    -------
    Run
        ``summary``, ``arrays``, ``verdict``, ``plot(name)`` and ``save(folder)``. Nothing is
        written until :meth:`Run.save`. A run that stopped on a numerical fault is returned
        all the same: ``summary["solver.success"]`` is False and its verdict invalid.

    Raises
    ------
    ConfigError
        For bad input, naming the key.

    References
    ----------
    The chain of ``hcfplan.planning.chain.run_chain`` (RK4IP GNLSE, Marcatili or
    anti-resonant fiber models, PPT/ADK ionisation); sources are named in those modules.
    """
    from hcfplan.planning.chain import run_chain, summary_dict

    cfg = as_config(config, overrides)
    chain = run_chain(cfg, progress=progress)
    nested = summary_dict(chain)
    nested["config"] = cfg.resolved  # as write_run stores it
    return Run(cfg, chain, nested)
