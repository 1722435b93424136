"""Stage 1, the plan: units, the frozen data model (no I/O) and the plan file.

Modules: ``units`` (lengths in and out), ``data`` (frozen dataclasses), ``planfile``
(reading, validating and writing TOML plan files). Importing this package loads nothing.
"""
