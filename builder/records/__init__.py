"""YAML records -> schema -> typed builder.model objects, every problem located (path:line:col).

Public API: load_shop, load_rules, load_catalogue, load_build_file, validate_paths,
validate_and_load, locate.
Field ranges: builder.records.fields.PLAUSIBLE. Schemas: <repo>/schema/*.schema.json.
"""
from builder.records._load import (load_build_file, load_catalogue, load_rules, load_shop, locate,
                                   validate_and_load, validate_paths)

__all__ = ["load_build_file", "load_catalogue", "load_rules", "load_shop", "locate",
           "validate_and_load", "validate_paths"]
