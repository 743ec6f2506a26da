"""The histories plot's legend stays inside its axes and off the curves when its labels are
long (a time constant that changes with temperature), as in the heated-conductor starter."""

from __future__ import annotations

import matplotlib

matplotlib.use("Agg")

from advisor.casefile import load_case  # noqa: E402
from advisor.casefile.starters import starter_text  # noqa: E402
from advisor.pipeline import run_case  # noqa: E402
from advisor.writers.history_plots import history_figure  # noqa: E402
from advisor.writers.plot_style import lay_out  # noqa: E402


def test_a_legend_of_long_labels_stays_inside_the_axes_and_off_the_curves(tmp_path):
    case = tmp_path / "conductor.toml"
    case.write_text(starter_text("heated-conductor"), encoding="utf-8")
    figure = history_figure(run_case(load_case(case)).assessment)
    renderer = lay_out(figure)  # as the picture is saved
    axes = figure.axes[0]
    legend = axes.get_legend()
    labels = [text.get_text() for text in legend.get_texts()]
    assert any("changes with temperature" in label for label in labels), labels
    box, frame = legend.get_window_extent(renderer), axes.get_window_extent(renderer)
    assert frame.x0 <= box.x0 and box.x1 <= frame.x1, (box, frame)
    assert frame.y0 <= box.y0 and box.y1 <= frame.y1, (box, frame)
    for line in axes.get_lines():  # no point of any curve under the legend
        points = line.get_transform().transform(line.get_xydata())
        assert not any(box.contains(x, y) for x, y in points), line.get_label()
