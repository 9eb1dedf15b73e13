"""Check values from outside the project (published, closed forms, reference libraries) with their sources.

``check_values.md`` is the readable list with sources and status; ``values.py`` holds the same numbers for tests.
"""
