"""Argument parsing shared by commands (not a command itself: cli.py skips '_' modules)."""

from __future__ import annotations

import argparse


class IntermixedParser(argparse.ArgumentParser):
    """Lets positional arguments come before, between or after the options."""

    _inside = False

    def parse_known_args(self, args=None, namespace=None):
        if self._inside:  # parse_known_intermixed_args calls back into this method
            return super().parse_known_args(args, namespace)
        self._inside = True
        try:
            return self.parse_known_intermixed_args(args, namespace)
        finally:
            self._inside = False
