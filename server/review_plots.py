"""One small plot per probed deck: its numbers with its own basis against
the augmented counterpart, drawn from the probe findings' evidence.

A dot plot (one row per quantity, one marker per basis, a line between
them) shows at a glance how far a value moves when diffuse functions are
added, and whether it changes sign.  Rows come from:

- ``probe-basis-sensitivity``: delta-SCF value and orbital estimate, deck
  basis and augmented basis (two markers a row);
- ``probe-koopmans-relaxation`` and ``probe-unbound-anion``: orbital and
  delta-SCF numbers with the deck's basis (one marker a row).

Each row has its own axis, so a 0.1 eV shift is visible beside a 13 eV
ionization energy; the experimental value, when the evidence carries one,
is a dashed line.

The SVG is inline (matplotlib, Agg backend, text kept as text so it scales
and can be read by assistive tools); every figure also gets a sentence of
text saying the same numbers.  matplotlib is imported only when a deck has
probe numbers.
"""
from __future__ import annotations

import io
import re
from dataclasses import dataclass
from typing import Optional

from deckward.grammar.findings import Finding

# Our palette (also in review.css): deck basis in ink blue, augmented in teal.
DECK_COLOUR = "#2b4c7e"
AUGMENTED_COLOUR = "#0f766e"
EXPERIMENT_COLOUR = "#9a3412"
_NAMES = {"electron_affinity": "EA", "ionization_energy": "IE"}


@dataclass(frozen=True)
class Row:
    label: str
    deck_value: float
    augmented_value: Optional[float]
    deck_basis: str
    augmented_basis: str = ""
    experiment: Optional[float] = None  # the tabulated (or deck-given) experimental value, eV


@dataclass(frozen=True)
class Plot:
    svg: str
    alt: str  # the same numbers in one or two sentences


def _kinds(quantity: str) -> tuple[str, str]:
    """Row names of a quantity's delta-SCF value and its orbital estimate."""
    if quantity == "IE":
        return "IE, delta-SCF", "IE, -e(HOMO)"
    return f"{quantity}, delta-SCF", f"{quantity}, -e(LUMO)"


def rows_from(findings: list[Finding], name_of=lambda f: "") -> list[Row]:
    """Plot rows from the evidence of probe findings (``name_of(finding)``
    gives the derived quantity's name for the label).

    One row per quantity: the same number reported by two probes (the
    delta-SCF EA by the basis-sensitivity and the unbound-anion probes, the
    delta-SCF IE by the basis-sensitivity and the Koopmans probes) is one
    row, the one comparing two bases winning, labelled with the first
    derive that reported it.  Only EAs and IEs are plotted: the anion's
    HOMO energy is not an EA and stays in the evidence table."""
    found: dict[tuple, Row] = {}

    def add(name: str, kind: str, deck: float, aug: Optional[float], basis: str, aug_basis: str = "",
            experiment: Optional[float] = None) -> None:
        key = (kind, basis, round(deck, 4))
        label = f"{name}: {kind}" if name else kind
        old = found.get(key)
        if old is None:
            found[key] = Row(label, deck, aug, basis, aug_basis, experiment)
        elif old.augmented_value is None and aug is not None:
            found[key] = Row(old.label, deck, aug, basis, aug_basis, old.experiment if experiment is None else experiment)

    for f in findings:
        ev = dict(f.evidence)
        name = name_of(f) or ""
        try:
            basis = str(ev.get("basis", ""))
            exp = float(ev["experimental_ev"]) if ev.get("experimental_ev") is not None else None
            if f.rule == "probe-basis-sensitivity" and "delta_scf_augmented_ev" in ev:
                delta_kind, orbital_kind = _kinds(_NAMES.get(ev.get("quantity", ""), "value"))
                aug_basis = str(ev.get("augmented_basis", ""))
                add(name, delta_kind, float(ev["delta_scf_ev"]), float(ev["delta_scf_augmented_ev"]),
                    basis, aug_basis, exp)
                if "orbital_estimate_ev" in ev and "orbital_estimate_augmented_ev" in ev:
                    add(name, orbital_kind, float(ev["orbital_estimate_ev"]),
                        float(ev["orbital_estimate_augmented_ev"]), basis, aug_basis, exp)
            elif f.rule == "probe-koopmans-relaxation" and "orbital_ie_ev" in ev:
                delta_kind, orbital_kind = _kinds("IE")
                add(name, orbital_kind, float(ev["orbital_ie_ev"]), None, basis, experiment=exp)
                add(name, delta_kind, float(ev["delta_scf_ie_ev"]), None, basis, experiment=exp)
            elif f.rule == "probe-unbound-anion" and "delta_scf_ev" in ev:
                add(name, _kinds("EA")[0], float(ev["delta_scf_ev"]), None, basis, experiment=exp)
        except (KeyError, TypeError, ValueError):
            continue  # evidence of another shape: shown in the table, not plotted
    return list(found.values())


def describe(rows: list[Row]) -> str:
    parts = []
    for r in rows:
        text = f"{r.label}: {r.deck_value:+.2f} eV with {r.deck_basis}"
        if r.augmented_value is not None:
            text += f", {r.augmented_value:+.2f} eV with {r.augmented_basis}"
        if r.experiment is not None:
            text += f" (experiment {r.experiment:+.2f} eV)"
        parts.append(text)
    return "; ".join(parts) + "."


def axis_limits(row: Row) -> tuple[float, float]:
    """The x range of a row's own axis: its values (and the experiment)
    with a margin of a quarter of their spread, at least 0.05 eV, so that a
    shift of a tenth of an eV is visible next to an IE of 13 eV.  Zero is
    inside the range only when the values straddle it."""
    values = [v for v in (row.deck_value, row.augmented_value, row.experiment) if v is not None]
    lo, hi = min(values), max(values)
    pad = max(0.05, 0.25 * (hi - lo))
    return round(lo - pad, 6), round(hi + pad, 6)


def plot_rows(rows: list[Row], title: str, uid: str) -> Optional[Plot]:
    """An inline SVG of the rows, one small axis per row (each with the
    range that shows its change); ``uid`` keeps the SVG's internal ids
    unique when several plots share one page."""
    if not rows:
        return None
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    with matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": uid, "font.size": 9,
                                "font.family": "sans-serif"}):
        fig = Figure(figsize=(6.0, 0.75 * len(rows) + 0.9))
        axes = fig.subplots(len(rows), 1, squeeze=False)[:, 0]
        for i, (ax, r) in enumerate(zip(axes, rows)):
            lo, hi = axis_limits(r)
            if r.augmented_value is not None:
                ax.annotate("", xy=(r.augmented_value, 0), xytext=(r.deck_value, 0),
                            arrowprops={"arrowstyle": "->", "color": "#7a8594", "lw": 1.2,
                                        "shrinkA": 5, "shrinkB": 6})
            ax.plot([r.deck_value], [0], marker="o", markersize=7, linestyle="none", color=DECK_COLOUR,
                    label="deck's basis")
            if r.augmented_value is not None:
                ax.plot([r.augmented_value], [0], marker="D", markersize=7, linestyle="none",
                        markerfacecolor="white", markeredgecolor=AUGMENTED_COLOUR, markeredgewidth=1.8,
                        label="augmented counterpart")
            if r.experiment is not None:
                ax.axvline(r.experiment, color=EXPERIMENT_COLOUR, lw=1.4, ls="--", label="experiment")
            if lo < 0 < hi:
                ax.axvline(0.0, color="#b8bec7", lw=0.8, zorder=0)
            ax.set_xlim(lo, hi)
            ax.set_ylim(-0.6, 0.6)
            ax.set_yticks([0], [r.label])
            for side in ("top", "right", "left"):
                ax.spines[side].set_visible(False)
            ax.grid(axis="x", color="#e3e6ea", lw=0.6)
            ax.set_axisbelow(True)
            if i == len(rows) - 1:
                ax.set_xlabel("eV (each row on its own scale)")
        handles = {}
        for ax in axes:
            for h, lab in zip(*ax.get_legend_handles_labels()):
                handles.setdefault(lab, h)
        if title:
            axes[0].set_title(title, fontsize=9, loc="left")
        fig.legend(list(handles.values()), list(handles.keys()), loc="upper left", ncol=3, frameon=False,
                   fontsize=8, handletextpad=0.3)
        fig.tight_layout(rect=(0, 0, 1, 1 - 0.3 / (0.75 * len(rows) + 0.9)))
        buf = io.StringIO()
        fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": None})
    return Plot(clean_svg(buf.getvalue()), describe(rows))


def clean_svg(svg: str) -> str:
    """The <svg> element only (no XML declaration, doctype or comments),
    sized by the page rather than in points."""
    svg = svg[svg.index("<svg"):]
    svg = re.sub(r"<!--.*?-->", "", svg, flags=re.S)
    svg = re.sub(r'<svg([^>]*?) width="[^"]*" height="[^"]*"', r"<svg\1", svg, count=1)
    return svg.strip()
