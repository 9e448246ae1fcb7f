"""speccheck: review a receive-side build plan before it is built."""

__version__ = "0.1.0"
