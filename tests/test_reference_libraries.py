"""The reference libraries of the test extra are installed: a missing one is a failure.

Every check against an outside source imports its library at module level, so a
missing one already fails collection; this module states the rule in one place and
names the versions in the test log (pytest -v), so a changed reference is visible.
"""

import importlib

import pytest

#: module -> what the checks use it for
REFERENCES = {
    "cantera": "same NASA coefficients, independent code: species, mixtures, flame temperature",
    "CoolProp": "reference equations of state and their ideal-gas parts",
    "janaf": "NIST-JANAF Thermochemical Tables, 4th ed.",
    "iapws": "IAPWS-95 and IAPWS-IF97 (water)",
    "pandas": "reading the CSV files as a dataframe user does",
    "pypdf": "reading the PDF documents back",
    "hypothesis": "property-based identities",
}


@pytest.mark.parametrize("module", sorted(REFERENCES))
def test_reference_library_is_installed(module):
    mod = importlib.import_module(module)
    assert isinstance(mod.__version__, str), module
