"""The engine: pure physics and geometry in SI units.

No Textual, no file formats, no printing; numpy/scipy/pyproj only, imported by the
modules that need them. Nothing is imported here so that each command pays only for
what it uses.
"""
