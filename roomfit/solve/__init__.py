"""Stage 4, the solver: the CP-SAT placement model (``model``), the search loop and its
outcome vocabulary (``search``), and explanations of why nothing fits (``explain``). It asks
the audit for verdicts and never re-implements one."""
