"""The ground floor: units, geometry, findings, errors, configuration, the
drum's directions, the time limit, safe text and atomic files.  It imports
nothing else of dxfcheck."""
