"""One function per published relation, numpy only.

- ``driving_force``: Turnbull's linear form, Hoffman's form, a tabulated dGm(T).
- ``nucleation``: critical radius and barrier, the spherical-cap shape factor, Turnbull-Fisher.
- ``growth``: Arrhenius diffusion and the diffusion-limited growth velocity.
- ``jmak``: Johnson-Mehl-Avrami-Kolmogorov kinetics and its closed-form inverse.
- ``composition``: steel compositions (one heat or a batch), the input of the steel relations.
- ``steel_critical``: Ae1, Ae3, Ms, Bs, Koistinen-Marburger.
- ``li_reaction``: the reaction term S(X) of Li et al. (1998), its derivative and inverse.
"""
