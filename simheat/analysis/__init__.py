"""Answers built on the library calls, each verified by a re-solve or re-simulation.

- :mod:`~simheat.analysis.flows`: steady flow split per emitter (``simheat flows``);
- :mod:`~simheat.analysis.layouts`: every scheme's design figures (``simheat layouts``);
- :mod:`~simheat.analysis.compare`: schemes side by side, ranked (``simheat compare``);
- :mod:`~simheat.analysis.throttle`: one valve turned down (``simheat throttle``);
- :mod:`~simheat.analysis.pressure`: pressure along supply and return at the design
  point (the ``pressure`` figure).

Analyses return result objects in SI units; text and JSON are in
:mod:`simheat.report`, figures in :mod:`simheat.plots`. No analysis imports either.
"""
