"""Procedure pages, one module per area: views/wps.py (WPS and PQR), views/welders.py (welders)."""
