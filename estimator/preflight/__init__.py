"""FLOW 1: vehicle file (+ parameter set) -> hover report -> sheet."""
