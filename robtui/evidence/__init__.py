"""The evidence ranker: for each signalling question, the report's sentences best first."""
