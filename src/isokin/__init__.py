"""isokin: isothermal transformation diagrams from nucleation and growth kinetics."""

__version__ = "0.1.0"
