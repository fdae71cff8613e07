"""Benchmarks that print figures: ``robtui bench NAME [options]`` runs ``robtui.benchmarks.NAME``.

Each module defines ``main(argv: list[str]) -> int``. They measure; they never assert speed.
"""
