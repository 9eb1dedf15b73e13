"""The local motor catalog: curve files (the truth), an SQLite index beside them (a cache), tags and queries.

Modules: :mod:`.store` (the :class:`Catalog` facade, files, lock, adding and removing),
:mod:`.index` (the SQLite cache), :mod:`.query` (filters, rows, DataFrames, samples)
and :mod:`.tags` (tags.json).
"""

from .query import CatalogFilter, parse_class_range
from .store import AddResult, Catalog, motor_id_for

__all__ = ["AddResult", "Catalog", "CatalogFilter", "motor_id_for", "parse_class_range"]
