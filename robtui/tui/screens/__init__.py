"""Screens of the workbench."""
