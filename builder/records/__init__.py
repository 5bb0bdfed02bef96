"""YAML records -> schema -> typed builder.model objects, every problem located (path:line:col).

Public API: load_shop, load_rules, load_catalogue, load_build_file, validate_paths,
validate_and_load, locate, known_families; parse_rules, parse_catalogue, parse_build for texts not in files.
Fields and ranges: builder.fields (the schemas in <repo>/schema are written from it).
"""
from builder.records._load import (known_families, load_build_file, load_catalogue, load_rules, load_shop, locate,
                                   parse_build, parse_catalogue, parse_rules, validate_and_load,
                                   validate_paths)

__all__ = ["known_families", "load_build_file", "load_catalogue", "load_rules", "load_shop", "locate", "parse_build",
           "parse_catalogue", "parse_rules", "validate_and_load", "validate_paths"]
