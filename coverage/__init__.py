"""lobeplan: plan a phased array of HF verticals against goal regions."""
from .errors import LobeplanError, SiteError

__all__ = ["LobeplanError", "SiteError", "__version__"]
__version__ = "0.1.0"
