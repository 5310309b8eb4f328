"""Plots of a budget: the power along the chain, the margin over the wavelengths, a margin histogram.

Plots read the typed result (its rows, powers and margins) and compute no physics. matplotlib is
an optional extra (``pip install "linkbudget[plot]"``), imported only when a plot is drawn; a
missing extra raises :class:`PlotsUnavailable` with the one-line message the command line prints.
Figures are built as :class:`matplotlib.figure.Figure` objects drawn by the Agg canvas, never
through pyplot, so no window, display or global state is involved.

Every plot is readable in greyscale and by colour-blind readers: the nominal and worst-case lines
differ by line style and marker, the limits by their own styles, a second result by hollow
markers and thinner lines, and the colours come from the Okabe-Ito palette chosen for colour-blind
readers (M. Okabe and K. Ito, "Color Universal Design (CUD): how to make figures and presentations
that are friendly to colorblind people", 2008; the hex values from memory).

Each drawing function takes an axes and one or more results, so a comparison of two revisions
draws both on one diagram: :func:`run_panels` gives the diagrams of one run,
:func:`comparison_panels` those of two; :func:`figure` stacks panels into one figure and
:func:`plot_bytes` / :func:`inline_svg` write it.
"""

import difflib
import io
import re
from dataclasses import dataclass, replace

import numpy as np

from linkbudget.text import escaped, nm

#: The message for a plot asked for without matplotlib.
MISSING_EXTRA = 'plots need matplotlib: pip install "linkbudget[plot]"'

#: The file types ``--plot`` writes, by suffix.
PLOT_SUFFIXES = (".png", ".svg")

#: Okabe-Ito colours: blue and vermillion for the budget cases, black and reddish purple for limits.
_CASE_STYLE = {
    "typ": {"color": "#0072B2", "linestyle": "-", "marker": "o", "label": "nominal (typ)"},
    "worst": {"color": "#D55E00", "linestyle": "--", "marker": "s", "label": "worst case"},
}
_REQUIRED_STYLE = {"color": "black", "linestyle": ":", "linewidth": 1.5}
_OVERLOAD_STYLE = {"color": "#CC79A7", "linestyle": "-.", "linewidth": 1.5}
_BLOCKED_STYLE = {"color": "0.3", "linestyle": (0, (1, 4)), "linewidth": 2.0}
#: A second revision's lines: hollow markers and a thinner line, so two revisions differ in grey too.
_SECOND_TRACE = {"markerfacecolor": "white", "linewidth": 1.0, "alpha": 0.9}
#: Most markers drawn on one line of a sweep, so a long band stays legible.
_MAX_MARKERS = 25


class PlotsUnavailable(Exception):
    """matplotlib (the ``plot`` extra) is not installed."""

    def __init__(self):
        super().__init__(MISSING_EXTRA)


def _figure_class():
    try:
        from matplotlib.figure import Figure
    except ImportError:
        raise PlotsUnavailable() from None
    return Figure


def require_matplotlib():
    """Raise :class:`PlotsUnavailable` now, before any work, when the extra is missing."""
    _figure_class()


def plot_text(text):
    """User text for a plot: one line (:func:`linkbudget.text.escaped`), ``$`` escaped so that
    matplotlib never reads a name as mathematical markup."""
    return escaped(text).replace("$", r"\$")


@dataclass(frozen=True)
class Trace:
    """One result as a power-level diagram draws it: the power after each point of the chain at
    the result's tightest wavelength (least worst-case margin), and the limits it is held to.

    ``label`` names the result on a diagram holding more than one (``"old"``, ``"new"``); empty for one.
    """

    label: str
    names: tuple
    power_dbm: dict
    wavelength_m: float
    floor_dbm: float
    overload_dbm: float | None

    @classmethod
    def of(cls, result, label=""):
        """The trace of a :class:`~linkbudget.engine.LinkResult`: the source, then every row."""
        index = result.governing_index
        power = {case: np.concatenate(([result.source_dbm[case][index]], result.power_after_dbm[case][:, index]))
                 for case in _CASE_STYLE}
        return cls(label, ("source", *(row.name for row in result.rows)), power,
                   float(result.wavelength_m[index]), result.sensitivity_dbm + result.required_margin_db,
                   result.overload_dbm)


def chain_positions(name_lists):
    """One x position per name over several chains (two revisions of one link): names in the
    order they appear, a name only one chain has placed where it stood in it. Returns the names
    along the axis and, for each chain, the positions of its names."""
    axis = list(name_lists[0])
    for names in name_lists[1:]:
        merged = []
        for tag, i1, i2, j1, j2 in difflib.SequenceMatcher(a=axis, b=list(names), autojunk=False).get_opcodes():
            merged += axis[i1:i2] if tag == "equal" else axis[i1:i2] + [n for n in names[j1:j2] if n not in axis]
        axis = merged
    where = {name: position for position, name in enumerate(axis)}
    return axis, [np.array([where[name] for name in names]) for names in name_lists]


def _prefixed(label, text):
    """A legend entry, preceded by the name of its result where a diagram holds several."""
    return f"{plot_text(label)}: {text}" if label else text


def _limit_lines(axes, name, values, labels, style, words, unit):
    """Horizontal lines at a limit of each result (``None``: the result has none), named ``words``;
    one unnamed line where every result has the same limit, else one per result under its label."""
    shared = len(set(values)) == 1
    for number, (value, label) in enumerate(zip(values, labels, strict=True)):
        if value is None or (shared and number):
            continue
        axes.axhline(value, **{**style, **(_SECOND_TRACE if number else {})}, gid=f"{name}-{number}",
                     label=(words if shared else _prefixed(label, words)) + f" ({value:.2f} {unit})")


def draw_power_levels(axes, traces):
    """The power after each point of the chain, nominal and worst case, of one or more traces,
    with the sensitivity plus the required margin and the overload as horizontal lines."""
    axis_names, positions = chain_positions([trace.names for trace in traces])
    labels = [trace.label for trace in traces]
    for number, (trace, x) in enumerate(zip(traces, positions, strict=True)):
        extra = _SECOND_TRACE if number else {}
        for case, style in _CASE_STYLE.items():
            axes.plot(x, trace.power_dbm[case], **{**style, **extra, "label": _prefixed(trace.label, style["label"])},
                      gid=f"power-{number}-{case}")
        blocked = np.flatnonzero(np.isneginf(trace.power_dbm["typ"]))
        if blocked.size:  # the only non-finite power: none past a total internal reflection
            axes.axvline(x[blocked[0]], **_BLOCKED_STYLE, gid=f"blocked-{number}", label=_prefixed(
                trace.label, f"total internal reflection at {plot_text(trace.names[blocked[0]])}: no light past it"))
    _limit_lines(axes, "floor", [trace.floor_dbm for trace in traces], labels, _REQUIRED_STYLE,
                 "sensitivity + required margin", "dBm")
    _limit_lines(axes, "overload", [trace.overload_dbm for trace in traces], labels, _OVERLOAD_STYLE,
                 "receiver overload", "dBm")
    axes.set_xticks(range(len(axis_names)), [plot_text(name) for name in axis_names], rotation=35, ha="right")
    axes.set_xlabel("point along the chain (power after each row)")
    axes.set_ylabel("optical power [dBm]")
    wavelengths = sorted({nm(trace.wavelength_m) for trace in traces})
    axes.set_title(f"Power along the chain at {', '.join(wavelengths)} (least worst-case margin)")
    axes.grid(True, color="0.85")
    axes.legend(fontsize="small")


def draw_margin_sweep(axes, results, labels=("",)):
    """Margin against wavelength, nominal and worst case, of one or more results (``labels``
    name them), with the required margin as a horizontal line."""
    for number, (result, label) in enumerate(zip(results, labels, strict=True)):
        wavelength_nm = result.wavelength_m * 1e9
        every = max(1, len(wavelength_nm) // _MAX_MARKERS)
        extra = _SECOND_TRACE if number else {}
        for case, style in _CASE_STYLE.items():
            axes.plot(wavelength_nm, result.margin_db[case], markevery=every, gid=f"margin-{number}-{case}",
                      **{**style, **extra, "label": _prefixed(label, style["label"])})
    _limit_lines(axes, "required", [result.required_margin_db for result in results], labels, _REQUIRED_STYLE,
                 "required margin", "dB")
    axes.set_xlabel("wavelength [nm]")
    axes.set_ylabel("margin above sensitivity [dB]")
    axes.set_title("Margin against wavelength")
    axes.grid(True, color="0.85")
    axes.legend(fontsize="small")


def draw_margin_histogram(axes, margins_db, required_margin_db, *, bins=40):
    """A histogram of margins [dB] (e.g. of statistical draws), the required margin [dB] marked by
    a vertical line. The required margin is a bin edge, so every bar is wholly below it (hatched,
    so it reads as such without colour) or wholly at or above it. ``bins``: a count or the edges."""
    from linkbudget.statistics import margin_histogram

    draw_margin_counts(axes, *margin_histogram(margins_db, required_margin_db, bins=bins), required_margin_db)


def draw_margin_counts(axes, edges, counts, required_margin_db):
    """A histogram drawn from its bin ``edges`` [dB] and ``counts`` (as
    :func:`linkbudget.statistics.margin_histogram` gives them), bars below the required margin hatched."""
    short = edges[:-1] < required_margin_db
    for below, style in ((False, {"color": "#56B4E9", "label": "draws at or above the required margin"}),
                         (True, {"color": "#E69F00", "hatch": "//", "label": "draws below the required margin"})):
        keep = short == below
        if keep.any():
            axes.bar(edges[:-1][keep], counts[keep], width=np.diff(edges)[keep], align="edge",
                     edgecolor="black", linewidth=0.5, gid=f"histogram-{'short' if below else 'met'}", **style)
    axes.axvline(required_margin_db, **_REQUIRED_STYLE, gid="required",
                 label=f"required margin ({required_margin_db:.2f} dB)")
    axes.set_xlabel("margin above sensitivity [dB]")
    axes.set_ylabel("number of draws")
    axes.set_title(f"Margin over {int(np.sum(counts))} draws")
    axes.legend(fontsize="small")


@dataclass(frozen=True)
class Panel:
    """One diagram: a name (for the HTML page's figure caption) and ``draw(axes)``."""

    name: str
    draw: object


def run_panels(result):
    """The diagrams of one run: the power levels; for several wavelengths also the margin sweep."""
    panels = [Panel("power along the chain", lambda axes: draw_power_levels(axes, [Trace.of(result)]))]
    if result.wavelength_m.size > 1:
        panels.append(Panel("margin against wavelength", lambda axes: draw_margin_sweep(axes, [result])))
    return panels


def statistics_panels(result):
    """The margin histogram of a statistical run at its governing wavelength (none without one)."""
    stats = result.statistics
    if stats is None or stats.margin_histogram is None:
        return []
    return [Panel(f"margin of {stats.trials} trials at {nm(result.wavelength_m[stats.governing_index])}",
                  lambda axes: draw_margin_counts(axes, *stats.margin_histogram, result.required_margin_db))]


def comparison_panels(old, new, labels=("old", "new"), renames=None):
    """The diagrams of two results (two revisions of a link) on shared axes: the power levels of
    both, and for several wavelengths the margin sweeps of both. ``renames`` (old row name -> new
    name) puts a renamed segment of the old result at the place of its new name."""
    old_trace = Trace.of(old, labels[0])
    old_trace = replace(old_trace, names=tuple((renames or {}).get(name, name) for name in old_trace.names))
    panels = [Panel("power along the chain", lambda axes: draw_power_levels(
        axes, [old_trace, Trace.of(new, labels[1])]))]
    if old.wavelength_m.size > 1 or new.wavelength_m.size > 1:
        panels.append(Panel("margin against wavelength", lambda axes: draw_margin_sweep(axes, [old, new], labels)))
    return panels


def figure(panels, *, width_in=9.0, height_per_panel_in=5.0):
    """A figure with the panels stacked, each drawn on its own axes."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    shown = _figure_class()(figsize=(width_in, height_per_panel_in * len(panels)), layout="constrained")
    FigureCanvasAgg(shown)
    for axes, panel in zip(shown.subplots(len(panels), 1, squeeze=False)[:, 0], panels, strict=True):
        panel.draw(axes)
    return shown


def plot_bytes(shown, file_format, *, salt="linkbudget"):
    """The figure as PNG or SVG bytes (``file_format`` ``"png"`` or ``"svg"``), reproducibly: no
    date in the metadata, and SVG element ids derived from ``salt`` (give each SVG of one page
    its own salt, so their ids never collide)."""
    from matplotlib import rc_context

    buffer = io.BytesIO()
    metadata = {"Software": None} if file_format == "png" else {"Date": None, "Creator": None}
    with rc_context({"svg.hashsalt": salt, "svg.fonttype": "path"}):
        shown.savefig(buffer, format=file_format, metadata=metadata)
    return buffer.getvalue()


def inline_svg(shown, salt):
    """The figure as an ``<svg>`` element for an HTML page: no XML prolog or doctype, and no
    metadata block (whose licence vocabulary names web addresses). Its text is drawn as paths, so
    no font is loaded and no user text is markup."""
    text = plot_bytes(shown, "svg", salt=salt).decode("utf-8")
    return re.sub(r"\s*<metadata>.*?</metadata>", "", text[text.index("<svg"):], count=1, flags=re.DOTALL)
