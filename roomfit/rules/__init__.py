"""Stage 2, the rules: rule sets and the furniture catalogue as data, every value with its
source. Modules: ``sets`` (rule sets and the one function that picks a plan's set with its
overrides), ``catalog`` (furniture types, resolving a plan's pieces)."""
