"""Stage 1, the plan: units, the frozen data model (no I/O) and the plan file.

Modules: ``units`` (lengths in and out), ``data`` (frozen dataclasses); the plan file:
``read`` (reading and validating TOML plan files, with ``fields`` for one value and
``openings`` for doors and windows) and ``write``. Importing this package loads nothing.
"""
