# mypy: ignore-errors
# manifest.py: freeze the liftcal power watch into a MicroPython firmware build
# (FROZEN_MANIFEST=path/to/manifest.py); frozen bytecode stays in flash, not in the heap.
# liftcal firmware copies this file into the bundle beside the modules it names.
module("liftwatch.py")
module("liftwatch_config.py")
module("liftwatch_layout.py")
module("liftwatch_load.py")
