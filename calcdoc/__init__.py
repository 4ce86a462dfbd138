"""calcdoc: calculation sheets in YAML, evaluated with units checked, issued as HTML and PDF."""

__version__ = "0.1.0"
__all__ = ["__version__"]
