"""PNG figures drawn once (hcfplan.io.results.save_png): the same image as matplotlib's
``savefig`` with a tight box, also where a legend reaches out of the figure, and the usual
``savefig`` where something reaches beyond the drawn margin.

Contract tests against matplotlib's own tight-box saving; no external source is needed.
"""

from __future__ import annotations

import io
from pathlib import Path

import numpy as np
import pytest

matplotlib = pytest.importorskip("matplotlib")
matplotlib.use("Agg", force=False)
import matplotlib.pyplot as plt  # noqa: E402
from PIL import Image  # noqa: E402

from hcfplan.io import results  # noqa: E402

STYLE = Path(__file__).resolve().parents[2] / "hcfplan" / "styles" / "hcfplan.mplstyle"


def _figure(outside_x: float | None = None):
    """Two panels with data, labels and a legend placed beside the axes (out of the figure);
    ``outside_x``: a text at that x in figure fractions."""
    fig = plt.figure()
    axes = fig.subplots(2, 1)
    x = np.linspace(0, 10, 400)
    for k, ax in enumerate(axes):
        ax.plot(x, np.sin(x + k), label="a long legend entry")
        ax.plot(x, np.cos(x * k), label="another entry")
        ax.set_xlabel("Delay (fs)")
        ax.set_ylabel("Power (GW)")
        ax.legend(loc="upper left", bbox_to_anchor=(1.02, 1.0))
    if outside_x is not None:
        fig.text(outside_x, 0.5, "far out")
    return fig


def _both(fig_maker):
    """(image of savefig with the tight box, image of save_png) as arrays."""
    images = []
    for save in ("savefig", "save_png"):
        with plt.style.context(str(STYLE)):
            fig = fig_maker()
            buffer = io.BytesIO()
            if save == "savefig":
                fig.savefig(buffer, format="png")
            else:
                results.save_png(fig, buffer)
            plt.close(fig)
        images.append(np.asarray(Image.open(io.BytesIO(buffer.getvalue())).convert("RGB"),
                                 dtype=float))
    return images


def test_same_image_as_the_tight_box_with_a_legend_out_of_the_figure():
    reference, once = _both(_figure)
    # the box of the drawn pixels and the box of the artists differ by the pad's rounding
    assert abs(once.shape[0] - reference.shape[0]) <= 8
    assert abs(once.shape[1] - reference.shape[1]) <= 8
    rows, cols = min(once.shape[0], reference.shape[0]), min(once.shape[1], reference.shape[1])
    # the same drawing: the ink of both images, compared over the overlap, agrees closely
    ink_reference = (reference[:rows, :cols] < 128).mean()
    ink_once = (once[:rows, :cols] < 128).mean()
    assert ink_once == pytest.approx(ink_reference, rel=0.1)
    assert reference.shape[1] > 7.5 * 130  # the legend does reach out of the 7.5 in figure


def test_text_across_the_margin_takes_the_usual_way():
    # the drawn margin ends 6 in right of the 7.5 in figure (x = 1.8): a text from x = 1.78
    # reaches across its edge, so the image of the margin cannot hold it
    reference, once = _both(lambda: _figure(outside_x=1.78))
    assert once.shape == reference.shape
    assert reference.shape[1] > 13.4 * 130


def test_opaque_figures_are_saved_without_alpha(tmp_path):
    with plt.style.context(str(STYLE)):
        fig = _figure()
        results.save_png(fig, tmp_path / "a.png")
        plt.close(fig)
    with Image.open(tmp_path / "a.png") as image:
        assert image.mode == "RGB"
        assert image.info["dpi"][0] == pytest.approx(130, abs=0.01)


def test_write_figure_saves_png_through_save_png(tmp_path, monkeypatch):
    calls = []
    monkeypatch.setattr(results, "save_png", lambda fig, path: calls.append(path)
                        or Path(path).write_bytes(b"png"))
    results.write_figure(tmp_path / "f.png", lambda fig: fig.subplots().plot([0, 1]))
    results.write_figure(tmp_path / "f.svg", lambda fig: fig.subplots().plot([0, 1]))
    assert len(calls) == 1
    assert (tmp_path / "f.png").read_bytes() == b"png"
    assert (tmp_path / "f.svg").read_text(encoding="utf-8").lstrip().startswith("<?xml")


@pytest.mark.parametrize(("width", "dpi"), [(6.004, 150), (5.123, 137), (7.5, 130)])
def test_sizes_that_are_not_whole_pixels(tmp_path, width, dpi):
    # the drawn canvas is truncated to whole pixels: the image is still cut from it (one
    # draw, no fallback) and has the size savefig gives within the pad's rounding
    import matplotlib as mpl

    calls = []
    with plt.style.context(str(STYLE)), mpl.rc_context({"savefig.dpi": dpi}):
        fig = _figure()
        fig.set_size_inches(width, 4.8)
        original = fig.savefig
        fig.savefig = lambda *a, **k: calls.append(k.get("format")) or original(*a, **k)
        buffer = io.BytesIO()
        results.save_png(fig, buffer)
        fig.savefig = original
        reference = io.BytesIO()
        fig.savefig(reference, format="png", dpi=dpi)
        plt.close(fig)
    assert calls == ["rgba"]  # drawn once, into memory
    once = Image.open(io.BytesIO(buffer.getvalue()))
    usual = Image.open(io.BytesIO(reference.getvalue()))
    assert abs(once.size[0] - usual.size[0]) <= 8 and abs(once.size[1] - usual.size[1]) <= 8
