"""Simulation for the demo, tests and benchmarks: the forward model, seeded scenarios and their scoring, the invented demo field."""
