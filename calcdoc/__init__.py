"""calcdoc: calculation sheets in YAML, evaluated with units checked, issued as HTML and PDF."""

import os

# Every matrix calcdoc solves is small (tridiagonal, a few hundred cells): BLAS worker threads
# only spin-wait on the other core and slow the optimisers down badly on a busy machine. Set
# before numpy is first imported; a caller's own setting wins.
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")

__version__ = "0.1.0"
__all__ = ["__version__"]
