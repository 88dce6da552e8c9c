"""Run the command line as ``python -m estimator``."""

from estimator.cli import run

run()
