"""Widgets of the workbench."""
