"""Input and output: the alloy-file schema and loaders (a registry by model), data tables, exports."""
