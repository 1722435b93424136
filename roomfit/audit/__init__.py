"""Stage 3, the audit: the one judge of an arrangement. Modules: ``geometry`` (shapely shapes
derived from the data model), ``check`` (clearances, doors, turning spaces, circulation),
``routes`` (routine trips on the walkway), ``marks`` (what a drawing should highlight)."""
