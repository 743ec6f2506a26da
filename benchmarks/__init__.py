"""soakwise's benchmark suite: speed and memory against baselines and the machine's limits.

Run ``python -m benchmarks`` from the repository root (see ``benchmarks/README.md``). Every
case runs in a fresh Python process so its peak memory is its own; every figure is compared
only with figures from the same run.
"""
