"""FLOW 2: bench CSV -> fits -> parameter set -> export | plots."""
