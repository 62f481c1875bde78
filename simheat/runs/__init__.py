"""runs."""

from simheat.runs.store import load_run, save_run

load = load_run

__all__ = ["load", "load_run", "save_run"]
