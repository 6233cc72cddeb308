"""partpick: choose and size diodes and Zener diodes across every corner of a design."""

__version__ = "0.1.0"
