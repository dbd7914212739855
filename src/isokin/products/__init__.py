"""Transformation products: the interface (``base``) and its implementations.

- ``nucleation_growth``: classical nucleation + diffusion-limited growth + JMAK.
- ``li1998``: ferrite, pearlite and bainite of Li et al. (1998), coefficients as data.
- ``martensite``: athermal martensite below Ms (Koistinen-Marburger).
- ``alloy``: the products of one parent with their critical temperatures.
- ``steel``: a steel (one heat or a batch) from its analysis and grain size.
"""
