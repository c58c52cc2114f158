"""Benchmarks: the synthetic board generator (:mod:`bench.gen_board`) and the harness (``run.py``)."""
