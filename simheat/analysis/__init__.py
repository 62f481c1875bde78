"""Analyses built on the library calls: steady flow split, and more to come."""
