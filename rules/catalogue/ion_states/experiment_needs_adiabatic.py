"""experiment-needs-adiabatic: a comparison with experiment that needs adiabatic, ZPE-corrected numbers."""
from __future__ import annotations

from deckward.grammar.findings import Related, RuleInfo, Severity

from deckward.rules.engine.context import Context
from .derives import EA, ion_derives, energy_states

_CN = "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
_REST = (
    "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
    "state radical { geometry = optimize(cn) level = hf_adz charge = 0 multiplicity = 2 frequencies = true }\n"
    "state anion { geometry = optimize(cn) level = hf_adz charge = -1 multiplicity = 1 frequencies = true }\n"
    "derive ea = energy(radical) - energy(anion) in ev\n"
)

INFO = RuleInfo(
    id="experiment-needs-adiabatic",
    severity=Severity.INFO,
    category="ion-states",
    title="Comparison with experiment needs adiabatic, zero-point corrected values",
    why=(
        "Photodetachment experiments measure the adiabatic electron affinity: the 0-0 transition "
        "between the relaxed anion and the relaxed neutral, each in its vibrational ground state "
        "(NO2, for example, 2.273 eV; Ervin, Ho, Lineberger 1988); a vertical electron affinity is "
        "not measured as such. Photoelectron spectra give ionization energies both ways, the "
        "adiabatic one from the 0-0 band and the vertical one from the band maximum, and tables "
        "mostly list the adiabatic value, so compare like with like. An adiabatic number without "
        "the zero-point energy of each state (frequencies = true) is not the 0-0 quantity the "
        "experiment reports. Single atoms have neither relaxation nor zero-point energy and are not "
        "reported."
    ),
    references=(
        "J. C. Rienstra-Kiracofe, G. S. Tschumper, H. F. Schaefer III, S. Nandi, G. B. Ellison, "
        "Chem. Rev. 102, 231-282 (2002) (photoelectron experiments give adiabatic electron "
        "affinities; zero-point corrections in theory)",
        "D. W. Turner, C. Baker, A. D. Baker, C. R. Brundle, Molecular Photoelectron Spectroscopy "
        "(Wiley 1970) (adiabatic and vertical ionization energies from one band)",  # from memory
        "K. M. Ervin, J. Ho, W. C. Lineberger, J. Phys. Chem. 92, 5405 (1988) (adiabatic EA of NO2)",
    ),
    bad_example=(
        'study "cn-screening" { goal = electron_affinity kind = vertical compare = experiment }\n'
        + _CN
        + _REST.replace("optimize(cn)", "cn").replace(" frequencies = true", "")
    ),
    fires_at="vertical",
    good_example='study "cn-screening" { goal = electron_affinity kind = adiabatic compare = experiment }\n'
    + _CN
    + _REST,
)


def _molecular(states) -> bool:
    return any(rs.geometry is not None and sum(1 for a in rs.geometry.atoms if not a.ghost) > 1 for rs in states)


def check(ctx: Context):
    ws = ctx.workspace
    study = ws.study
    if study is None or study.compare is None or study.compare.value != "experiment" or study.kind is None:
        return
    derives = ion_derives(ws)
    if study.kind.value == "vertical":
        ea = [d for d in derives if d.quantity == EA]
        if not ea and not (study.goal is not None and study.goal.value == EA):
            return
        states = [rs for d in ea for rs in energy_states(ws, d.derive)] if ea else list(ws.states.values())
        if states and not _molecular(states):
            return  # for an atom the vertical and adiabatic values coincide
        yield ctx.finding(
            study.kind.span,
            "the study compares with experiment but asks for vertical electron affinities: photodetachment "
            "experiments measure the adiabatic electron affinity (relaxed neutral and anion, 0-0 transition); "
            "use kind = adiabatic with frequencies = true on both states",
            related=(Related(study.compare.span, "compared with experiment here"),),
        )
        return
    seen = set()
    for d in derives:
        for rs in energy_states(ws, d.derive):
            if rs.name in seen or (rs.state.frequencies is not None and rs.state.frequencies.value):
                continue
            if not _molecular([rs]):
                continue  # an atom has no vibrations
            seen.add(rs.name)
            span = rs.state.frequencies.span if rs.state.frequencies is not None else rs.state.name.span
            yield ctx.finding(
                span,
                f"the study compares adiabatic energies with experiment, but `{rs.name}` in `{d.name}` has no "
                f"frequencies = true: adiabatic measured values are 0-0 transitions, which include the zero-point "
                f"energy of each state, and that needs a frequency calculation",
                related=(Related(study.compare.span, "compared with experiment here"),),
            )
