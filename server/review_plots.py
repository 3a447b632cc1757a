"""One small plot per probed deck: its numbers with its own basis against
the augmented counterpart, drawn from the probe findings' evidence.

A dot plot (one row per quantity, one marker per basis, a line between
them) shows at a glance how far a value moves when diffuse functions are
added, and whether it changes sign.  Rows come from:

- ``probe-basis-sensitivity``: delta-SCF value and orbital estimate, deck
  basis and augmented basis (two markers a row);
- ``probe-koopmans-relaxation`` and ``probe-unbound-anion``: orbital and
  delta-SCF numbers with the deck's basis (one marker a row).

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
_NAMES = {"electron_affinity": "EA", "ionization_energy": "IE"}


@dataclass(frozen=True)
class Row:
    label: str
    deck_value: float
    augmented_value: Optional[float]
    deck_basis: str
    augmented_basis: str = ""


@dataclass(frozen=True)
class Plot:
    svg: str
    alt: str  # the same numbers in one or two sentences


def rows_from(findings: list[Finding], name_of=lambda f: "") -> list[Row]:
    """Plot rows from the evidence of probe findings (``name_of(finding)``
    gives the derived quantity's name for the label).  The same number
    reported by two probes, or for two derived quantities of the same
    states, is one row naming both."""
    found: dict[tuple, list[str]] = {}

    def add(name: str, kind: str, deck: float, aug: Optional[float], basis: str, aug_basis: str = "") -> None:
        key = (kind, round(deck, 4), None if aug is None else round(aug, 4), basis, aug_basis)
        names = found.setdefault(key, [])
        if name and name not in names:
            names.append(name)

    for f in findings:
        ev = dict(f.evidence)
        name = name_of(f) or ""
        try:
            basis = str(ev.get("basis", ""))
            if f.rule == "probe-basis-sensitivity" and "delta_scf_augmented_ev" in ev:
                q = _NAMES.get(ev.get("quantity", ""), "value")
                aug_basis = str(ev.get("augmented_basis", ""))
                add(name, f"{q}, delta-SCF", float(ev["delta_scf_ev"]), float(ev["delta_scf_augmented_ev"]),
                    basis, aug_basis)
                if "orbital_estimate_ev" in ev and "orbital_estimate_augmented_ev" in ev:
                    add(name, f"{q}, orbital estimate", float(ev["orbital_estimate_ev"]),
                        float(ev["orbital_estimate_augmented_ev"]), basis, aug_basis)
            elif f.rule == "probe-koopmans-relaxation" and "orbital_ie_ev" in ev:
                add(name, "IE, -e(HOMO)", float(ev["orbital_ie_ev"]), None, basis)
                add(name, "IE, delta-SCF", float(ev["delta_scf_ie_ev"]), None, basis)
            elif f.rule == "probe-unbound-anion" and "delta_scf_ev" in ev:
                if not any(k[0] == "EA, delta-SCF" and k[1] == round(float(ev["delta_scf_ev"]), 4) and k[3] == basis
                           for k in found):
                    add(name, "EA, delta-SCF", float(ev["delta_scf_ev"]), None, basis)
                if "anion_homo_ev" in ev:
                    add(name, "anion e(HOMO)", float(ev["anion_homo_ev"]), None, basis)
        except (KeyError, TypeError, ValueError):
            continue  # evidence of another shape: shown in the table, not plotted
    rows = []
    for (kind, deck, aug, basis, aug_basis), names in found.items():
        label = f"{', '.join(names)}: {kind}" if names else kind
        rows.append(Row(label, deck, aug, basis, aug_basis))
    return rows


def describe(rows: list[Row]) -> str:
    parts = []
    for r in rows:
        if r.augmented_value is None:
            parts.append(f"{r.label}: {r.deck_value:+.2f} eV with {r.deck_basis}")
        else:
            parts.append(f"{r.label}: {r.deck_value:+.2f} eV with {r.deck_basis}, "
                         f"{r.augmented_value:+.2f} eV with {r.augmented_basis}")
    return "; ".join(parts) + "."


def plot_rows(rows: list[Row], title: str, uid: str) -> Optional[Plot]:
    """An inline SVG of the rows; ``uid`` keeps the SVG's internal ids
    unique when several plots share one page."""
    if not rows:
        return None
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    with matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": uid, "font.size": 9,
                                "font.family": "sans-serif"}):
        fig = Figure(figsize=(6.0, 0.55 * len(rows) + 1.1))
        ax = fig.add_subplot()
        ys = list(range(len(rows)))[::-1]
        for y, r in zip(ys, rows):
            if r.augmented_value is not None:
                ax.annotate("", xy=(r.augmented_value, y), xytext=(r.deck_value, y),
                            arrowprops={"arrowstyle": "->", "color": "#7a8594", "lw": 1.2,
                                        "shrinkA": 5, "shrinkB": 6})
        ax.plot([r.deck_value for r in rows], ys, marker="o", markersize=7, linestyle="none", color=DECK_COLOUR,
                label="deck's basis")
        aug = [(r.augmented_value, y) for y, r in zip(ys, rows) if r.augmented_value is not None]
        if aug:
            ax.plot([a for a, _ in aug], [y for _, y in aug], marker="D", markersize=7, linestyle="none",
                    markerfacecolor="white", markeredgecolor=AUGMENTED_COLOUR, markeredgewidth=1.8,
                    label="augmented counterpart")
        values = [v for r in rows for v in (r.deck_value, r.augmented_value) if v is not None]
        lo, hi = min(values + [0.0]), max(values + [0.0])
        pad = max(0.25, 0.12 * (hi - lo))
        ax.set_xlim(lo - pad, hi + pad)
        ax.set_ylim(-0.7, len(rows) - 0.3)
        ax.axvline(0.0, color="#b8bec7", lw=0.8, zorder=0)
        ax.set_yticks(ys, [r.label for r in rows])
        ax.set_xlabel("eV")
        if title:
            ax.set_title(title, fontsize=9, loc="left")
        for side in ("top", "right"):
            ax.spines[side].set_visible(False)
        ax.grid(axis="x", color="#e3e6ea", lw=0.6)
        ax.set_axisbelow(True)
        ax.legend(loc="lower left", bbox_to_anchor=(0.0, 1.0), ncol=2, frameon=False, fontsize=8,
                  borderaxespad=0.2, handletextpad=0.3)
        fig.tight_layout()
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
