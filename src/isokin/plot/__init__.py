"""Figures. Every drawing function takes ``ax=`` and returns it; nothing here computes physics."""
