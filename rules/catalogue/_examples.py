"""Demo decks shared by the examples of several rules (the registry skips
modules whose name starts with an underscore).  Demo structures of the
acceptor-screening scenario, not reference geometries."""

NO2_GEOMETRY = (
    "geometry no2 {\n"
    "  N  0.000000  0.000000  0.000000\n"
    "  O  0.000000  1.098900  0.465300\n"
    "  O  0.000000 -1.098900  0.465300\n"
    "}\n"
)

NO2_NEUTRAL_AND_CATION = (
    NO2_GEOMETRY
    + "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
    "state neutral { geometry = no2 level = hf_adz charge = 0 multiplicity = 2 }\n"
    "state cation { geometry = no2 level = hf_adz charge = 1 multiplicity = 1 }\n"
)

CN_RADICAL = (
    "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
    "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
    "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n"
)
