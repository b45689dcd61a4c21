"""Qt-free assessment of a solved sketch: cautions, meter readings, equivalents, preferred values.

Reads the sketch, its netlist and the solution; never changes them.  The
window and the command line show what these functions return.
"""
from .cautions import DISCLAIMER, HAZARD_VOLTAGE, Caution, assess
from .equivalent import Equivalent, equivalent, equivalent_at
from .eseries import SERIES, Substitution, closest, neighbours, substitutions
from .meters import MeterReading, MeterReport, display_reading, idealised, read_meters

__all__ = [
    "Caution", "assess", "DISCLAIMER", "HAZARD_VOLTAGE",
    "Equivalent", "equivalent", "equivalent_at",
    "SERIES", "Substitution", "closest", "neighbours", "substitutions",
    "MeterReading", "MeterReport", "display_reading", "idealised", "read_meters",
]
