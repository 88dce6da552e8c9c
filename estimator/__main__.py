"""Run the command line as ``python -m estimator``."""

from estimator.cli import main

main()
