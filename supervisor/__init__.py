"""Pre-dive schedule checks for commercial diving supervisors and chamber operators.

The package checks a proposed dive schedule against bundled reference tables,
regulatory rules and published model limits (Schreiner tissue kinetics,
Bühlmann ZH-L16 with gradient factors, CNS and pulmonary oxygen exposure).
It supports a qualified supervisor's decision; it never makes it.
"""

__version__ = "0.1.0"

__all__ = ["__version__"]
