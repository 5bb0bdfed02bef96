"""Build records, sizing engine, shop history and published fitment reference."""
