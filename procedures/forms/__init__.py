"""Forms for procedure records (forms/wps.py: WPS and PQR) and welders (forms/welders.py), one module per area."""
