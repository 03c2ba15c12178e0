"""Forensic delay analysis of construction programmes.

The pipeline runs one way (see DEVELOPERS.md): ``delay.case`` loads and validates a case,
``delay.calendars`` and ``delay.network`` compile it to arrays, ``delay.cpm`` schedules it,
``delay.methods`` apply the published delay-analysis methods and ``delay.causation`` turns
their results into delay days per event and party and into entitlement.
"""

__version__ = "0.1.0"
