"""Benchmarks: the placement model against a simulated-annealing baseline, on generated flats
and the sample plans. Run ``python -m roomfit.bench --help``; see ``docs/benchmarks.md``."""

__all__: list[str] = []
