"""Stage 5, presentation: drawings (``draw``), GeoJSON (``export``), the comparison table
(``compare``) and the client report (``report``). They read results, never recompute them."""
