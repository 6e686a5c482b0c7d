"""Files in and out: reading networks and nodes files (load), writing the per-member
tables and the summary (export, spreadsheet), the all-or-nothing output folder (output,
manifest), name forms (names), removal lists (namelist) and pseudonyms (privacy)."""
