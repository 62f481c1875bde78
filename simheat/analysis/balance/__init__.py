"""Balancing: presets, circuit valves and pump settings for every design flow."""
