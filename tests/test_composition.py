"""Compositions and oxidants typed as text (tablegen.core.composition, tablegen.calc.burn).

Identities and refusals: percentages and fractions of the same analysis give the
same doubles and the same results everywhere a composition is typed; the former
':' spelling is refused with one line that spells the same composition in the
current form.
"""

import json

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import tablegen
from tablegen.calc import oxidants
from tablegen.cli import main
from tablegen.core.composition import colon_form_fix, parse, write
from tablegen.core.errors import TablegenError

FRACTIONS = "CH4=0.9,C2H6=0.06,N2=0.04"
PERCENT = "CH4=90%,C2H6=6%,N2=4%"


def run(capsys, *argv):
    code = main(list(argv))
    out = capsys.readouterr()
    return code, out.out, out.err


# ------------------------------------------------------------------ the reader
def test_fractions_and_percentages_read_as_the_same_doubles():
    """Percentages are read by moving the decimal point (exact), so 6% is the double of 0.06."""
    a, b = parse(FRACTIONS), parse(PERCENT)
    assert a.basis == b.basis == "mole" and not a.percent and b.percent
    assert list(a.fractions) == list(b.fractions)
    for k in a.fractions:
        assert a.fractions[k].hex() == b.fractions[k].hex()      # same bits, no tolerance needed
    assert parse("CH4=33.3333%,N2=66.6667%").fractions["CH4"].hex() == (0.333333).hex()


def test_mass_basis_prefix():
    c = parse("basis=mass,CH4=0.8,N2=0.2")
    assert c.basis == "mass" and c.fractions == {"CH4": 0.8, "N2": 0.2}
    assert parse("basis=mole,CH4=1").basis == "mole"


def test_species_names_with_commas_are_read_whole():
    """NASA names such as 'C3H6,propylene': a name runs from one comma to the next '='."""
    c = parse("C3H6,propylene=0.5,2,2-dimethylpropane=0.25,N2=0.25")
    assert list(c.fractions) == ["C3H6,propylene", "2,2-dimethylpropane", "N2"]


@pytest.mark.parametrize("text,expect", [
    ("CH4:0.9,N2:0.1", "write CH4=0.9,N2=0.1"),
    ("CH4:90,C2H6:6,N2:4", "write CH4=90%,C2H6=6%,N2=4%"),
    ("CH4=90,C2H6=6,N2=4", "write CH4=90%,C2H6=6%,N2=4%"),
    ("CH4=90%,N2=0.1", "every part in % or none"),
    ("CH4=0.5,N2=0.4", "sum to 0.9"),
    ("CH4=95%,N2=4%", "sum to 99 %"),
    ("CH4=0.9,N2", "'N2' has no '='"),
    ("CH4=0.9,CH4=0.1", "given twice"),
    ("CH4=abc,N2=0.1", "not a number"),
    ("CH4=-0.1,N2=1.1", ">= 0"),
    ("CH4=0.9,basis=mass,N2=0.1", "the basis comes first"),
    ("basis=volume,CH4=1", "allowed: basis=mole, basis=mass"),
    ("mass:CH4=0.8,N2=0.2", "write basis=mass,CH4=0.8,N2=0.2"),
    ("=0.5,N2=0.5", "no name"),
    ("CH4=,N2=1", "no value"),
])
def test_refusals_name_what_is_wrong(text, expect):
    with pytest.raises(TablegenError) as e:
        parse(text, "fuel")
    assert expect in str(e.value) and "\n" not in str(e.value)


def test_sum_tolerance_is_the_same_for_fractions_and_percentages():
    """1e-6 relative either way (the mixture builder's tolerance)."""
    parse("CH4=0.9000005,N2=0.1")
    parse("CH4=90.00005%,N2=10%")
    for bad in ("CH4=0.900002,N2=0.1", "CH4=90.0002%,N2=10%"):
        with pytest.raises(TablegenError):
            parse(bad)


@settings(max_examples=80, deadline=None)
@given(st.lists(st.floats(0.001, 1.0), min_size=1, max_size=6), st.booleans())
def test_write_then_parse_round_trips(weights, percent):
    """Identity (hypothesis): the text written for fractions reads back as the same fractions."""
    names = ["CH4", "C2H6", "C3H8", "N2", "CO2", "H2"][:len(weights)]
    tot = sum(weights)
    fr = {n: w / tot for n, w in zip(names, weights)}
    if percent:
        text = write({k: v * 100 for k, v in fr.items()}, percent=True)
    else:
        text = write(fr)
    back = parse(text).fractions
    for k, v in fr.items():
        assert abs(back[k] - v) <= 4e-16 * max(1.0, v)     # one rounding of the ×100 at most


def test_colon_fix_leaves_other_colons_alone():
    for text in ("sensible:0C", "C:/fuels/oil.toml", "water.toml:brine", "T=278K:323K", "CH4"):
        assert colon_form_fix(text) is None


# ------------------------------------------------------------------ identical results everywhere
def _without(obj, keys):
    if isinstance(obj, dict):
        return {k: _without(v, keys) for k, v in obj.items() if k not in keys}
    if isinstance(obj, list):
        return [_without(v, keys) for v in obj]
    return obj


@pytest.mark.parametrize("argv,ignore", [
    # "input" echoes the text as typed (the one place the two spellings differ)
    (["state", "{}", "--T", "60F,500K,1500K", "--P", "2bar", "--json", "--h-datum", "sensible:0C"],
     {"substance", "input"}),
    (["combust", "--fuel", "{}", "--excess-air", "15", "--json"],
     {"products_substance", "id", "name", "input", "in_percent", "text"}),
    (["process", "{}", "--from", "T=300K,P=1bar", "--compress-ratio", "8", "--eta", "0.85", "--json"],
     {"substance", "substance_name", "input"}),
    (["state", "flue@{}@excess-air=15@air,rh=60%,T=25C", "--T", "400K,1500K", "--json"], {"substance", "input"}),
])
def test_percent_and_fraction_give_identical_results(capsys, argv, ignore):
    """The same analysis in % and as fractions: every printed number the same (compared as text)."""
    outs = []
    for comp in (PERCENT, FRACTIONS):
        code, out, err = run(capsys, *[a.replace("{}", comp) for a in argv])
        assert code == 0, err
        outs.append(_without(json.loads(out), ignore))
    assert json.dumps(outs[0], sort_keys=True) == json.dumps(outs[1], sort_keys=True)


def test_mass_basis_mixture_equals_its_mole_fractions():
    """basis=mass converts with the molar masses: the same mixture as its mole fractions."""
    m = tablegen.substance("basis=mass,CH4=0.5,N2=0.5")
    y = {c.id: c.mole_fraction for c in m.components}
    n = tablegen.substance(write(y))
    T = [300.0, 1000.0, 2000.0]
    a, b = m.properties(T), n.properties(T)
    for k in ("cp", "h", "s0"):
        assert max(abs(x - z) / abs(z) for x, z in zip(a[k], b[k])) <= 1e-13    # round-off of y


# ------------------------------------------------------------------ refusals of the ':' form
COLON = "CH4:0.9,C2H6:0.06,N2:0.04"


@pytest.mark.parametrize("argv", [
    ["state", COLON, "--T", "300K"],
    ["process", COLON, "--from", "T=300K,P=1bar", "--compress-ratio", "4"],
    ["chart", COLON, "--format", "pdf"],
    ["export", COLON, "--format", "toml"],
    ["compare", COLON, "reference.csv"],
    ["combust", "--fuel", COLON, "--excess-air", "15"],
    ["combust", "--fuel", "CH4", "--excess-air", "15", "--oxidant", "O2:0.3,N2:0.7"],
    ["state", f"flue@{COLON}@excess-air=15", "--T", "400K"],
])
def test_colon_form_is_refused_with_the_new_form(capsys, tmp_path, monkeypatch, argv):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "reference.csv").write_text("T [K],cp [kJ/(kg K)]\n300,2.0\n", encoding="utf-8")
    code, out, err = run(capsys, *argv, "--out", str(tmp_path / "o")) if argv[0] == "chart" \
        else run(capsys, *argv)
    assert code == 2 and out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("tablegen: "), err
    assert "uses ':'" in lines[0]
    assert ("CH4=0.9,C2H6=0.06,N2=0.04" in lines[0]) or ("O2=0.3,N2=0.7" in lines[0])
    assert not (tmp_path / "o").exists()


def test_colon_form_in_a_spec_string_is_refused(capsys, tmp_path):
    spec = tmp_path / "s.toml"
    spec.write_text('[document]\ntitle = "t"\nnumber = "N-1"\nrevision = "A"\nissue_date = 2026-01-01\n\n'
                    '[[tables]]\nname = "a"\nsubstance = "CH4:0.9,N2:0.1"\n'
                    'grid = { start = "300 K", stop = "400 K", step = "50 K" }\n', encoding="utf-8")
    code, out, err = run(capsys, "build", str(spec), "--out", str(tmp_path / "o"))
    assert code == 2 and len(err.strip().splitlines()) == 1
    assert "tables[0].substance" in err and "write CH4=0.9,N2=0.1" in err
    assert not (tmp_path / "o").exists()


# ------------------------------------------------------------------ oxidants
def _same_oxidant(a, b):
    assert a.composition.keys() == b.composition.keys()
    for k in a.composition:
        assert abs(a.composition[k] - b.composition[k]) <= 1e-15
    assert abs(a.humidity_ratio - b.humidity_ratio) <= 1e-15


def test_oxidant_text_means_what_the_keywords_mean():
    """Each text form equals make_oxidant with the keywords it stands for."""
    _same_oxidant(oxidants.oxidant_from_text("air,rh=60%,T=25C"),
                  oxidants.make_oxidant(relative_humidity=60, temperature_K=298.15))
    _same_oxidant(oxidants.oxidant_from_text("air,rh=60%,T=25C,P=1atm"),
                  oxidants.make_oxidant(relative_humidity=60, temperature_K=298.15, pressure_Pa=101325.0))
    _same_oxidant(oxidants.oxidant_from_text("air,w=8g/kg"), oxidants.make_oxidant(humidity_ratio=0.008))
    _same_oxidant(oxidants.oxidant_from_text("air,w=0.008kg/kg"), oxidants.make_oxidant(humidity_ratio=0.008))
    _same_oxidant(oxidants.oxidant_from_text("air,O2=30%"), oxidants.make_oxidant(o2_percent=30))
    _same_oxidant(oxidants.oxidant_from_text("air,O2=0.3"), oxidants.make_oxidant(o2_percent=30))
    _same_oxidant(oxidants.oxidant_from_text("O2=30%,N2=70%"), oxidants.make_oxidant(composition={"O2": 0.3, "N2": 0.7}))
    _same_oxidant(oxidants.oxidant_from_text("oxygen"), oxidants.make_oxidant(base="oxygen"))


@pytest.mark.parametrize("text,expect", [
    ("air:rh=60,T=25C,P=1atm", "write air,rh=60%,T=25C,P=1atm"),
    ("air:o2=30", "write air,O2=30%"),
    ("air:w=0.008", "write air,w=0.008kg/kg"),
    ("O2:0.3,N2:0.7", "write O2=0.3,N2=0.7"),
    ("air,rh=60,T=25C", "write rh=60%"),
    ("air,w=0.008", "w=0.008kg/kg or w=8g/kg"),
    ("air,O2=30", "(O2=0.3) or with its sign (O2=30%)"),
    ("air,P=2bar", "give it with rh, w or dew"),
    ("air,rh=60%", "needs the air temperature"),
    ("air,dew=20C,T=15C", "above the air temperature"),
    ("air,rh=120%,T=15C", "outside 0 to 100 %"),
    ("air,rh=-5%,T=15C", "outside 0 to 100 %"),
    ("air,w=-1g/kg", "is negative"),
    ("air,w=30g/kg,T=15C", "above saturation"),
    ("air,dew=-5C", "below 0 °C"),
    ("air,rh=60%,w=8g/kg,T=15C", "relative humidity and humidity ratio are both given"),
    ("air,rh=60%,rh=50%,T=25C", "given twice"),
    ("air,colour=red", "allowed: O2"),
    ("basis=mass,O2=0.3,N2=0.7", "remove basis=mass"),
    ("steam", "allowed: air, oxygen"),
])
def test_oxidant_refusals(text, expect):
    with pytest.raises(TablegenError) as e:
        oxidants.oxidant_from_text(text)
    assert expect in str(e.value) and "\n" not in str(e.value)


def test_flue_name_in_the_former_spelling_is_refused_with_the_whole_new_name(capsys):
    code, out, err = run(capsys, "state", "flue@CH4:0.9,N2:0.1@excess-air=15@air:rh=60,T=25C@dry", "--T", "400K")
    assert code == 2 and out == "" and len(err.strip().splitlines()) == 1
    assert "write flue@CH4=0.9,N2=0.1@excess-air=15@air,rh=60%,T=25C@dry" in err




def test_flue_names_name_the_oxidant_in_its_own_text():
    """combust prints a name that state reads back to the same gas."""
    r = tablegen.combustion("CH4=0.9,N2=0.1", "air,rh=60%,T=25C", excess_air=15)
    assert r.products.id == "flue@CH4=0.9,N2=0.1@excess-air=15@air,rh=60%,T=25C"
    again = tablegen.substance(r.products.id)
    assert [c.id for c in again.components] == [c.id for c in r.products.components]
    for a, b in zip(again.components, r.products.components):
        assert abs(a.mole_fraction - b.mole_fraction) <= 1e-15
    ox = oxidants.make_oxidant(relative_humidity=60, temperature_K=298.15, o2_percent=25)
    assert ox.spec == "air,O2=25%,rh=60%,T=298.15K,P=101325Pa"
    _same_oxidant(oxidants.oxidant_from_text(ox.spec), ox)
