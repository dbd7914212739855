"""Calculations over grids, no I/O: the isothermal diagram (``ttt``) and its grids (``grid``)."""
