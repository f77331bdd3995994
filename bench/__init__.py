"""Mountsmith benchmarks: ``python -m bench`` (``--quick`` for a short run).

Every figure is measured side by side with its comparison in the same run and
printed with the ratio; results go to ``bench/results.json`` with the machine
they ran on. Targets are printed beside the figures, never asserted in tests.
See ``docs/benchmarks.md`` for the recorded results.
"""
