"""glidetask: a pre-flight planner for cross-country glider pilots and task setters.

The engine (:mod:`glidetask.engine`) is pure numerical code in SI units; file
formats live in :mod:`glidetask.formats`; the command line in :mod:`glidetask.cli`
and the terminal UI in :mod:`glidetask.tui` are thin layers over both.

Nothing is imported here on purpose: ``import glidetask`` must stay cheap.
"""

__version__ = "0.1.0"
