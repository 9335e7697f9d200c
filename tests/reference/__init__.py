"""Checks against published sources (standards, handbook tables, worked examples), one file per area."""
