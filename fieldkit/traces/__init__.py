"""OTDR traces: the standard record and text traces, their analysis, pairing and drawing."""
