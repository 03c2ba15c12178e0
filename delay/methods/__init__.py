"""The published delay-analysis methods, one module each.

- :mod:`delay.methods.windows` — windows (time slice) analysis with half-steps;
  AACE RP 29R-03 MIP 3.3 / 3.4, SCL Protocol (2017) time slice windows analysis.
- :mod:`delay.methods.asbuilt` — as-planned versus as-built; AACE RP 29R-03 MIP 3.1 / 3.2,
  SCL Protocol (2017) as-planned versus as-built windows analysis.
- :mod:`delay.methods.impacted` — impacted as-planned; AACE RP 29R-03 MIP 3.6, SCL Protocol
  (2017) impacted as-planned analysis.
- :mod:`delay.methods.tia` — time impact analysis; AACE RP 29R-03 MIP 3.7, SCL
  Protocol (2017) time impact analysis.
- :mod:`delay.methods.collapsed` — collapsed as-built (but-for); AACE RP 29R-03 MIP 3.8, SCL
  Protocol (2017) collapsed as-built analysis.

Each entry function takes a loaded :class:`delay.model.Case` and returns a frozen
dataclass of DataFrames; none reads a file.
"""

__all__ = ["windows", "asbuilt", "impacted", "tia", "collapsed", "METHOD_TITLES"]

#: Each method by its one-word name (command, module, JSON ``method``) and in words.
METHOD_TITLES: dict[str, str] = {
    "windows": "windows analysis",
    "asbuilt": "as-planned versus as-built",
    "impacted": "impacted as-planned",
    "tia": "time impact analysis",
    "collapsed": "collapsed as-built",
}
