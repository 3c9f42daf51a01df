"""lobeplan: plan a phased array of HF verticals against goal regions."""
import os as _os

# The moment method solves dense systems of a few hundred unknowns, which one
# BLAS thread does fastest; a BLAS that starts a thread per core makes them
# up to 20 times slower on a busy machine. Only a default: set the variable
# to override it. (It must be set before numpy is first imported.)
for _name in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    _os.environ.setdefault(_name, "1")
from .errors import LobeplanError, SiteError

__all__ = ["LobeplanError", "SiteError", "__version__"]
__version__ = "0.1.0"
