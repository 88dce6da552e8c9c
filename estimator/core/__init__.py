"""Portable physics core: imports only ``math`` and its own modules.

Every module here runs unchanged on CPython and MicroPython (no dataclasses,
no runtime typing, no f-string ``=``). SI units inside, always.
"""
