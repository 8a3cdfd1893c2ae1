"""Property data against independent references.

Water and steam: the engine uses CoolProp's IF97 backend; the reference is the
independent `iapws` package (IAPWS-IF97) and the printed verification tables of
the IAPWS-IF97 release.
"""
import hashlib

import pytest
from iapws import IAPWS97

from heatbalance.errors import InputError, PropertyRangeError
from heatbalance.materials import SOLIDS_FILE, catalogue, get_material, solid_table

KJ = 1000.0
WATER = get_material("water")


# IAPWS-IF97 release (2007), Table 5 (region 1) and Table 15 (region 2): h in kJ/kg, from memory.
IF97_VERIFICATION = [
    pytest.param(3e6, 300.0, 115.331273, id="IF97-T5-region1-300K-3MPa"),
    pytest.param(80e6, 300.0, 184.142828, id="IF97-T5-region1-300K-80MPa"),
    pytest.param(3e6, 500.0, 975.542239, id="IF97-T5-region1-500K-3MPa"),
    pytest.param(3500.0, 300.0, 2549.91145, id="IF97-T15-region2-300K-3.5kPa"),
    pytest.param(3500.0, 700.0, 3335.68375, id="IF97-T15-region2-700K-3.5kPa"),
    pytest.param(30e6, 700.0, 2631.49474, id="IF97-T15-region2-700K-30MPa"),
]


@pytest.mark.parametrize("P, T, h_table", IF97_VERIFICATION)
def test_water_enthalpy_matches_if97_verification_table(P, T, h_table):
    assert WATER.enthalpy(T, P) / KJ == pytest.approx(h_table, rel=1e-8)


# Subcooled, compressed, superheated and near-critical states; reference: IAPWS-IF97 via iapws.
STATES = [
    pytest.param(0.101325e6, 293.15, id="subcooled-20C-1atm"),
    pytest.param(0.5e6, 423.15, id="subcooled-150C-5bar"),
    pytest.param(10e6, 400.0, id="compressed-400K-100bar"),
    pytest.param(1.0e6, 473.15, id="superheated-200C-10bar"),
    pytest.param(3.0e6, 573.15, id="superheated-300C-30bar"),
    pytest.param(0.101325e6, 773.15, id="superheated-500C-1atm"),
    pytest.param(25e6, 650.0, id="region3-650K-250bar"),
]


@pytest.mark.parametrize("P, T", STATES)
def test_water_enthalpy_matches_iapws(P, T):
    reference = IAPWS97(P=P / 1e6, T=T).h  # IAPWS-IF97 via iapws, kJ/kg
    assert WATER.enthalpy(T, P) / KJ == pytest.approx(reference, rel=1e-6)


@pytest.mark.parametrize("P", [0.101325e6, 0.5e6, 1.0e6, 4.0e6, 15e6])
def test_water_saturation_matches_iapws(P):
    liquid, vapour = IAPWS97(P=P / 1e6, x=0), IAPWS97(P=P / 1e6, x=1)  # IAPWS-IF97 via iapws
    (boiling,) = WATER.transitions(P)
    assert boiling.T == pytest.approx(liquid.T, abs=1e-6)
    assert boiling.h_lower / KJ == pytest.approx(liquid.h, rel=1e-7)
    assert boiling.h_upper / KJ == pytest.approx(vapour.h, rel=1e-7)
    assert boiling.latent / KJ == pytest.approx(vapour.h - liquid.h, rel=1e-7)


def test_latent_heat_of_water_at_one_atmosphere():
    (boiling,) = WATER.transitions(101325.0)
    assert boiling.T - 273.15 == pytest.approx(99.974, abs=1e-3)  # IAPWS-IF97 via iapws: 373.1243 K
    assert boiling.latent / KJ == pytest.approx(2257, abs=1.0)  # IAPWS-IF97 steam tables at 1 atm: h_fg ≈ 2257 kJ/kg (from memory)


def test_no_boiling_above_the_critical_pressure():
    assert WATER.transitions(25e6) == []  # critical pressure of water 22.064 MPa (IAPWS)
    assert WATER.phase_name(700.0, 25e6) == "supercritical fluid"


# Specific heat at a reference temperature, kJ/(kg·K). Since issue 13 the metals have cp(T) from sourced tables,
# so cp at the table's printed point is checked (a centred difference of ±0.5 K) to the digits printed there.
# Before, each row was a constant and these were 25 °C values pinned to 1e-9: aluminium 0.897, copper 0.385,
# iron 0.449 (CRC Handbook, from memory) and 0.50 for the generic austenitic grade (common practice, no source).
METALS = [
    # NIST-JANAF tables (Chase 1998), Al cr at 298.15 K: Cp = 24.209 J/(mol·K), M = 26.9815 g/mol (5 digits)
    pytest.param("aluminium", 298.15, 24.209 / 26.981538, 1e-4, id="Al-JANAF-298K"),
    # NIST-JANAF tables (Chase 1998), Cu cr at 298.15 K: Cp = 24.442 J/(mol·K), M = 63.546 g/mol (5 digits)
    pytest.param("copper", 298.15, 24.442 / 63.546, 1e-4, id="Cu-JANAF-298K"),
    # Incropera & DeWitt Table A.1, pure iron at 300 K: 447 J/(kg·K) (3 digits, from memory; CRC's 0.449 at 25 °C
    # is 0.5 % higher)
    pytest.param("iron", 300.0, 0.447, 1e-3, id="Fe-Incropera-300K"),
    # Incropera & DeWitt Table A.1, AISI 304 at 300 K: 477 J/(kg·K) (3 digits, from memory): the generic
    # austenitic grade now takes AISI 304's cp(T)
    pytest.param("austenitic stainless steel (generic)", 300.0, 0.477, 1e-3, id="SS-generic-as-304-Incropera-300K"),
]


@pytest.mark.parametrize("name, T, cp, rel", METALS)
def test_metal_heat_capacity(name, T, cp, rel):
    metal = get_material(name)
    rise = metal.enthalpy(T + 0.5, 101325.0) - metal.enthalpy(T - 0.5, 101325.0)
    assert rise / KJ == pytest.approx(cp, rel=rel)


def test_ice_fusion_and_sensible_heat():
    ice = get_material("ice (melting to water)")
    (melting,) = ice.transitions(101325.0)
    assert melting.kind == "melting"
    assert melting.T == pytest.approx(273.15)  # 0 °C at 1 atm, CRC Handbook
    assert melting.latent / KJ == pytest.approx(333.55)  # CRC Handbook, from memory
    # hand calculation: 1 kg from -10 °C ice to 10 °C water = 2.05·10 + 333.55 + 4.18·10 kJ
    dh = ice.enthalpy(283.15, 101325.0) - ice.enthalpy(263.15, 101325.0)
    assert dh / KJ == pytest.approx(2.05 * 10 + 333.55 + 4.18 * 10)


def test_glycol_solution_heat_capacity_is_plausible():
    glycol = get_material("ethylene glycol (aq)", 0.3)
    cp = (glycol.enthalpy(298.15 + 0.5, 3e5) - glycol.enthalpy(298.15 - 0.5, 3e5)) / KJ
    # 30 % w/w ethylene glycol: cp ≈ 3.7 kJ/(kg·K) near 25 °C (ASHRAE Handbook Fundamentals, from memory)
    assert cp == pytest.approx(3.7, abs=0.1)
    assert glycol.t_min - 273.15 == pytest.approx(-15.4, abs=1.5)  # freezing point of 30 % MEG ≈ -15 °C (ASHRAE, from memory)


def test_solid_table_is_pinned():
    """A silent edit of the shipped table fails here: update the checksum only with a reviewed change."""
    rows = solid_table()
    assert len(rows) == 18 and len(rows[0]) == 10
    assert all(row["source"].strip() for row in rows)
    cp_column = ",".join(row["cp_low_kJ_kgK"] for row in rows)
    assert hashlib.sha256(cp_column.encode()).hexdigest()[:16] == CP_CHECKSUM, SOLIDS_FILE


CP_CHECKSUM = "af2bb83867de1686"  # concrete 0.88 -> 0.90 (EN 1992-1-2) and its two moist variants added; before: fireclay 0.96 -> 0.759, borosilicate 0.83 -> 0.783, glass fibre 0.795 -> 0.820 (25 °C of the Neumann-Kopp cp(T) rows); issue 13: four rows added (glass-lined steel, magnesia, fireclay brick, glass fibre), generic austenitic 0.50 -> 0.477 (AISI 304)


def test_catalogue_lists_generic_names_only():
    names = [m.name for m in catalogue()]
    assert "water" in names and "ethylene glycol (aq)" in names and "carbon steel" in names
    assert len(names) == len(set(names))


def test_unknown_material_lists_the_choices():
    with pytest.raises(InputError, match=r"unknown material 'unobtainium'; choose one of: water, air"):
        get_material("unobtainium", where="stream X")


def test_solution_needs_a_fraction_in_range():
    with pytest.raises(InputError, match=r"needs a mass fraction \(0 to 0\.6\)"):
        get_material("ethylene glycol (aq)")
    with pytest.raises(InputError, match=r"mass fraction 0\.9 of ethylene glycol \(aq\) must be between 0 and 0\.6"):
        get_material("ethylene glycol (aq)", 0.9)


def test_temperature_outside_the_data_is_refused_with_the_range():
    # issue 13: water now reaches 2000 °C (IAPWS-IF97 region 5); before, 1200 °C was refused at an 800 °C limit
    with pytest.raises(PropertyRangeError, match=r"^streams\[S\]\.outlet\.temperature: temperature 2100\.00 °C is "
                                                 r"outside the property data of water \(0\.00 °C to 2000\.00 °C\)"):
        WATER.check_range(2373.15, "streams[S].outlet.temperature")
