"""The convergence plot of ``deckward converge --plot FILE.svg``: each
derived quantity (in eV) against the basis cardinal number, one line per
quantity, the complete-basis estimate as an open marker at the right, and
the measured value as a band (its uncertainty, drawn at least 0.02 eV wide
so that it can be seen) when one is known.  matplotlib is imported here
only, when a plot is asked for."""
from __future__ import annotations

import io

from deckward.rules.knowledge import units

MIN_BAND_EV = 0.01  # half-width drawn for a very precise measurement (display only, no source)


def plot_svg(conv) -> str:
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    with matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": "converge", "font.size": 9}):
        fig = Figure(figsize=(6.0, 4.0))
        ax = fig.add_subplot()
        xs = [s.cardinal for s in conv.steps]
        cbs_x = xs[-1] + 1
        for i, d in enumerate(conv.steps[0].derived):
            ys = [None if s.derived[i].value_hartree is None else units.from_hartree(s.derived[i].value_hartree, "ev")
                  for s in conv.steps]
            line, = ax.plot(xs, [float("nan") if y is None else y for y in ys], marker="o", label=d.name)
            c = conv.cbs[i]
            if c.value_hartree is not None:
                ax.plot([cbs_x], [units.from_hartree(c.value_hartree, "ev")], marker="s", markerfacecolor="white",
                        color=line.get_color(), linestyle="none")
            e = conv.experiment.get(d.name)
            if e is not None:
                half = max(e.uncertainty_ev or 0.0, MIN_BAND_EV)
                ax.axhspan(e.value_ev - half, e.value_ev + half, color=line.get_color(), alpha=0.18, lw=0,
                           label=f"{d.name}: experiment {e.value_ev:.3f} eV")
        ax.set_xticks(xs + [cbs_x], [f"{s.cardinal}\n{s.basis}" for s in conv.steps] + ["CBS"])
        ax.set_xlabel("basis cardinal number X")
        ax.set_ylabel("eV")
        ax.set_title(f"{conv.deck}: {conv.ladder.family}", fontsize=9, loc="left")
        ax.grid(color="#e3e6ea", lw=0.6)
        ax.legend(frameon=False, fontsize=8)
        fig.tight_layout()
        buf = io.StringIO()
        fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": None})
    return buf.getvalue()
