"""Summaries, tables and files made from an assessment."""
