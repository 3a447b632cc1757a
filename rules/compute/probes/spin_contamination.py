"""probe-spin-contamination: <S^2> of unrestricted states against S(S+1).

Runs every open-shell state that uses an unrestricted reference at UHF
with the deck's basis and compares <S^2> with the exact S(S+1); reports a
deviation above 10 % of S(S+1).
"""
from __future__ import annotations

from deckward.grammar.findings import RuleInfo, Severity

from .common import ProbeContext, ProbeSkipped, finding, skipped

# Common practice: flag <S^2> more than 10 % above S(S+1) (D. Young,
# Computational Chemistry: A Practical Guide, Wiley 2001) [from memory].
RELATIVE_THRESHOLD = 0.10

INFO = RuleInfo(
    id="probe-spin-contamination",
    severity=Severity.WARNING,
    category="probe",
    title="Unrestricted state with a spin-contaminated reference",
    why=(
        "An unrestricted determinant is not an eigenfunction of S^2; when <S^2> lies well above S(S+1), "
        "higher spin states are mixed in and the energy, and any EA or IE taken from it, is biased. A "
        "restricted open-shell reference, or a method less sensitive to the reference, is then safer."
    ),
    references=(
        "A. Szabo, N. S. Ostlund, Modern Quantum Chemistry (Dover 1996), section 3.8",  # from memory
        "D. Young, Computational Chemistry: A Practical Guide (Wiley 2001)",  # from memory
    ),
    bad_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level hf_dz { method = hf basis = cc-pvdz reference = unrestricted }\n"
        "state radical { geometry = cn level = hf_dz charge = 0 multiplicity = 2 }\n"
    ),
    fires_at="radical",
    good_example=(
        "geometry oh {\n  O 0 0 0\n  H 0 0 0.97\n}\n"
        "level hf_dz { method = hf basis = cc-pvdz reference = unrestricted }\n"
        "state radical { geometry = oh level = hf_dz charge = 0 multiplicity = 2 }\n"
    ),
    threshold_note="deviation above 10 % of S(S+1) (common practice; D. Young 2001)",  # Young: from memory
)


def probe(ctx: ProbeContext):
    for name in ctx.ws.states:
        plan = ctx.plan(name)
        if plan is None or plan.reference != "unrestricted" or plan.spin == 0:
            continue
        span = ctx.state_span(name)
        try:
            result = ctx.hf(plan)
        except ProbeSkipped as e:
            yield skipped(INFO, span, str(e))
            continue
        s2, exact = result["s2"], result["s2_expected"]
        deviation = (s2 - exact) / exact
        if deviation <= RELATIVE_THRESHOLD:
            continue
        yield finding(INFO, span, (
            f"UHF/{plan.basis_label} <S^2> = {s2:.4f} for `{name}`, against S(S+1) = {exact:.4f} "
            f"({100 * deviation:.0f} % above; threshold {100 * RELATIVE_THRESHOLD:.0f} %): "
            "the unrestricted reference mixes in higher spin states"), {
            "basis": plan.basis_label,
            "s2": round(s2, 6),
            "s2_exact": exact,
            "relative_deviation": round(deviation, 6),
        })
