"""Exports of a review: traffic-light table, summary plot, supporting table."""
