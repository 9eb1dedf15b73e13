"""File formats and file-system work: atomic writes, the XSD, our XML, CSV, airframe TOML, export; the only lxml importer."""
