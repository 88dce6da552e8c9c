"""The board side of the power watch, shipped in the wheel so `liftcal firmware` can copy it.

Nothing here is imported on the desktop except this file's location: the board loop, the
loader, sensor adapters, manifest.py, package.json (for `mip`) and the README template are
copied into the bundle by estimator.watch.bundle.
"""
