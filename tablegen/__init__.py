"""tablegen: print-ready ideal-gas property tables from open polynomial data.

The public API is loaded on first use so that ``tablegen --help`` starts fast:

    import tablegen
    gas = tablegen.substance("CO2")
    mix = tablegen.mixture({"CO2": 0.09, "H2O": 0.18, "N2": 0.71, "O2": 0.02})
"""

__version__ = "0.1.0"

_API = {"substance", "mixture", "Substance", "Datum", "Anchor", "shipped_mixtures"}


def __getattr__(name):
    if name in _API:
        from . import api
        return getattr(api, name)
    raise AttributeError(f"module 'tablegen' has no attribute {name!r}")


def __dir__():
    return sorted([*globals(), *_API])
