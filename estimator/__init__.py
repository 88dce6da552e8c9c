"""liftcal: hover estimates, bench-sweep fits and an onboard power watch for small multirotors."""

__version__ = "0.1.0"
