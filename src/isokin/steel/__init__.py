"""Empirical steel models: composition, critical temperatures and Li et al. (1998) kinetics.

- ``composition``: mass-percent compositions (one steel or a batch), validation and
  validity-range warnings.
- ``critical``: Ae1, Ae3 (Andrews 1965), Ms (Andrews 1965; Steven & Haynes 1956),
  Bs (Steven & Haynes 1956), the eutectoid carbon content, and the martensite fraction
  below Ms (Koistinen & Marburger 1959); all in kelvin.
- ``reaction_integral``: the reaction term S(X) of Li et al. (1998) and its derivative.
- ``li1998``: ferrite, pearlite and bainite products of Li et al. (1998).
"""
