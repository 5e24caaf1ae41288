"""tablegen: print-ready ideal-gas property tables from open polynomial data.

The public API is loaded on first use so that ``tablegen --help`` starts fast:

    import tablegen
    gas = tablegen.substance("CO2")
    mix = tablegen.mixture({"CO2": 0.09, "H2O": 0.18, "N2": 0.71, "O2": 0.02})
"""

__version__ = "0.1.0"

#: public name -> module that defines it (imported on first use)
_API = {
    "substance": "calc.names", "mixture": "calc.names", "Substance": "calc.names", "Datum": "calc.names",
    "Anchor": "calc.names",
    "shipped_mixtures": "calc.names",
    "combustion": "calc.burn",    # fuels, oxidants, combustion products
    "process": "calc.steps",      # state changes and method comparison
}


def __getattr__(name):
    if name in _API:
        import importlib
        return getattr(importlib.import_module(f"{__name__}.{_API[name]}"), name)
    raise AttributeError(f"module 'tablegen' has no attribute {name!r}")


def __dir__():
    return sorted([*globals(), *_API])
