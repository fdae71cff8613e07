"""Readers: report files (PDF, text, Markdown, HTML) into a Document with provenance."""
