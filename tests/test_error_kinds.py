"""The kind of each refusal, as a Python caller sees it, and the same refusals at the command line.

The kinds and when each is raised are the table in tablegen/core/errors.py; every kind is a
TablegenError, so a caller that catches the family still catches all of them, and the
command line still prints one line and exits 2.
"""

import pytest

import tablegen
from tablegen.cli import main
from tablegen.core.errors import (DataRangeError, InputError, NameLookupError, RangeError, TablegenError,
                             UnitError)

CASES = [
    # (call, expected kind, fragment of the message)
    (lambda: tablegen.substance("unobtainium"), NameLookupError, "unknown substance"),
    (lambda: tablegen.process("air", 300.0, 1e5, "squash", P2_Pa=5e5), NameLookupError, "unknown process step"),
    # the NASA Glenn coefficients for CO2 end at 6000 K
    (lambda: tablegen.substance("CO2").properties(7000.0), DataRangeError, "outside the data range"),
    (lambda: tablegen.combustion("CH4", "air,rh=60,T=25C", excess_air=10), UnitError, "rh=60%"),
    (lambda: tablegen.combustion("CH4=0.9;N2=0.1", excess_air=10), InputError, "separated by commas"),
    (lambda: tablegen.combustion("CH4=0.9,N2=0.2", excess_air=10), InputError, "sum to"),
    (lambda: tablegen.mixture({"CH4": 0.5, "N2": 0.4}), InputError, "sum to"),
    (lambda: tablegen.combustion("CH4"), InputError, "exactly one amount of oxidant"),
    (lambda: tablegen.combustion("CH4", excess_air=-50), RangeError, "too small"),
    (lambda: tablegen.combustion("CH4", air_ratio=0.8), RangeError, "below 1"),
    (lambda: tablegen.process("air", 300.0, 1e5, "compress", P2_Pa=5e5, eta=1.5), RangeError, "eta"),
]


@pytest.mark.parametrize("call,kind,fragment", CASES)
def test_an_api_refusal_has_the_kind_a_caller_expects(call, kind, fragment):
    with pytest.raises(kind) as info:
        call()
    assert isinstance(info.value, TablegenError)
    assert fragment in str(info.value)


def test_a_bad_argument_is_also_a_value_error():
    with pytest.raises(ValueError):
        tablegen.combustion("CH4=0.9;N2=0.1", excess_air=10)


def test_a_temperature_outside_the_data_is_a_range_error_not_a_name_error():
    with pytest.raises(RangeError) as info:
        tablegen.substance("CO2").properties(7000.0)
    assert not isinstance(info.value, (NameLookupError, UnitError, InputError))


@pytest.mark.parametrize("argv,fragment", [
    (["state", "unobtainium", "--T", "300K"], "unknown substance"),
    (["state", "CO2", "--T", "7000K"], "outside the data range"),
    (["combust", "--fuel", "CH4", "--oxidant", "air,rh=60,T=25C", "--excess-air", "10"], "rh=60%"),
    (["combust", "--fuel", "CH4=0.9;N2=0.1", "--excess-air", "10"], "separated by commas"),
    (["combust", "--fuel", "CH4", "--excess-air", "-50"], "too small"),
    (["combust", "--fuel", "CH4", "--lambda", "0.8"], "below 1"),
])
def test_the_same_refusals_exit_2_with_one_line(capsys, argv, fragment):
    code = main(argv)
    out, err = capsys.readouterr()
    assert code == 2 and out == ""
    assert err.startswith("tablegen: ") and err.count("\n") == 1 and fragment in err
