"""The firmware bundle's files, each with what it is: `liftcal firmware --help` lists them
without importing the bundle writer and the CONFIG builder (start-up time of every command)."""

# the bundle's files besides mpy/*.mpy, each with what it is (`liftcal firmware --help` lists them)
FILES = (
    ("liftwatch.py", "the kernel"), ("liftwatch_config.py", "CONFIG, integers only"),
    ("liftwatch_layout.py", "CONFIG's indices and bounds"), ("liftwatch_load.py", "the loader that checks CONFIG"),
    ("board_loop.py", "example loop"), ("README.md", "for the builder"), ("package.json", "for mip"),
    ("manifest.py", "for freezing into a firmware build"),
)
