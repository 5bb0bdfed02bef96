"""`fitment import FILE --map MAP`: a spreadsheet of past builds -> build records.

Modules, in the order the data flows:
  sheet    reads CSV (delimiter, encoding found) or .xlsx into numbered rows
  mapping  loads the map (its own JSON Schema in schema/import-map.schema.json), located errors
  fields   record_fields(): the one place that says which record fields exist and what they are
  cells    parses cells as people type them (7/8, .875, 22.2mm, 1 1/8", 35#)
  rows     turns one row into record data, or refused cells with row and column
  write    checks each record with the records loader and creates its file exclusively
"""
from builder.importing.problems import CellProblem, MissingExtra
from builder.importing.write import ImportReport, Outcome, import_sheet

__all__ = ["CellProblem", "ImportReport", "MissingExtra", "Outcome", "import_sheet"]
