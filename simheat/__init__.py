"""simheat: warm-up and flow-split simulation of radiator heating layouts."""

__version__ = "0.1.0"
