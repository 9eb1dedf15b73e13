"""Presentation: rich tables in display units, matplotlib charts (imported lazily); no click."""
