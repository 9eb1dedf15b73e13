"""The local motor catalog: curve files (the truth), an SQLite index beside them (a cache), tags and queries."""

from .store import AddResult, Catalog, CatalogFilter, motor_id_for

__all__ = ["AddResult", "Catalog", "CatalogFilter", "motor_id_for"]
