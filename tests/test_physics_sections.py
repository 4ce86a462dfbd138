"""Section factors of steel I-sections: EN 1993-1-2:2005 Table 4.2 and eq. (4.26a).

Check values: the catalogue's tabulated area and surface per metre (the section tables named in each
family's `source`, entries `confirmed: false`), surface per tonne from the same tables, and hand
calculations written out beside the assertions.
"""

from __future__ import annotations

import doctest

import pytest

from calcdoc.physics import PhysicsRangeError, sections
from calcdoc.physics.sections import (
    box_perimeter,
    box_section_factor,
    closest_sections,
    i_section_area,
    i_section_factors,
    i_section_perimeter,
    load_section_catalogue,
    rolled_section,
    section_factor,
    shadow_factor,
)

CATALOGUE = load_section_catalogue()
STEEL_DENSITY_T_PER_M3 = 7.85  # EN 1993-1-2:2005 §3.2.2, 7850 kg/m³


def _dimensions(section):
    return (section.height, section.width, section.web_thickness, section.flange_thickness,
            section.root_radius)


# --- the catalogue against the Table 4.2 formulas -------------------------------------------------

def test_catalogue__covers_ipe_hea_heb_80_to_600_and_at_least_15_ub_and_uc():
    names = set(CATALOGUE)
    assert {f"IPE {n}" for n in (80, 100, 120, 140, 160, 180, 200, 220, 240, 270, 300, 330, 360,
                                 400, 450, 500, 550, 600)} <= names
    for family in ("HEA", "HEB"):
        assert {f"{family} {n}" for n in (100, 120, 140, 160, 180, 200, 220, 240, 260, 280, 300,
                                          320, 340, 360, 400, 450, 500, 550, 600)} <= names
    assert sum(s.family == "UB" for s in CATALOGUE.values()) >= 15
    assert sum(s.family == "UC" for s in CATALOGUE.values()) >= 15
    assert {"UB 203x133x25", "UB 610x229x140", "UC 152x152x23", "UC 356x368x202"} <= names


def test_catalogue__every_family_names_its_source_and_no_entry_claims_confirmation():
    for section in CATALOGUE.values():
        assert section.source.strip()
        assert "memory" not in section.source.lower()  # RULES.md: recalled data is flagged as data
        assert section.confirmed is False


@pytest.mark.parametrize("designation", sorted(CATALOGUE))
def test_i_section_area__matches_published_area_within_printed_precision(designation):
    # Published A of each entry (IPE/HE: Euronorm 19-57 / 53-62, EN 10365; UB/UC: BS 4-1, SCI P363),
    # printed to three or four significant figures: 0.5 % covers the rounding.
    section = CATALOGUE[designation]
    assert i_section_area(*_dimensions(section)) == pytest.approx(section.published_area,
                                                                  rel=5e-3)


@pytest.mark.parametrize("designation", sorted(d for d, s in CATALOGUE.items()
                                               if s.published_surface is not None))
def test_i_section_perimeter__matches_published_surface_per_metre(designation):
    # Published painted surface per metre (A_L; SCI P363 "surface area per metre"), printed to
    # three significant figures (0.01 m²/m above 1 m²/m): 1 % covers the rounding.
    section = CATALOGUE[designation]
    assert i_section_perimeter(*_dimensions(section)) == pytest.approx(section.published_surface,
                                                                       rel=1e-2)


# --- section factors against published and hand-calculated values ---------------------------------

@pytest.mark.parametrize("designation, surface_per_tonne", [
    # SCI P363 surface area per tonne, from memory; the same figures are in the open-source
    # steelsnakes section data (UK/data/UB.json, UC.json), not the printed table.
    ("UB 457x191x67", 24.3),
    ("UC 254x254x73", 20.4),
    ("IPE 300", 27.46),  # ArcelorMittal sections tables, IPE 300 A_G in m²/t (from memory)
])
def test_section_factor__equals_published_surface_per_tonne_times_steel_density(
        designation, surface_per_tonne):
    # Am/V = P/A = (P / mass per metre) * density: the tables' surface per tonne times 7.85 t/m³.
    # Printed to three or four figures; the tables' masses use 7850 kg/m³: 1 % tolerance.
    expected = surface_per_tonne * STEEL_DENSITY_T_PER_M3
    section = rolled_section(designation)
    assert section_factor(*_dimensions(section)) == pytest.approx(expected, rel=1e-2)


def test_ipe_300__hand_calculation_of_every_factor_four_and_three_sided():
    # IPE 300: h 300, b 150, t_w 7.1, t_f 10.7, r 15 mm (Euronorm 19-57).
    # P  = 2*300 + 4*150 - 2*7.1 + (2*pi - 8)*15 = 1200 - 14.2 - 25.752 = 1160.05 mm
    # A  = 2*150*10.7 + (300 - 21.4)*7.1 + (4 - pi)*15^2 = 3210 + 1978.06 + 193.17 = 5381.2 mm²
    # Am/V four sided  = 1.16005 / 0.0053812 = 215.57 1/m
    # Am/V three sided = (1160.05 - 150) / 5381.2 mm = 187.70 1/m
    # box: four sided 2(150 + 300) = 900 mm -> 167.25 1/m; three sided 150 + 600 = 750 mm -> 139.37
    # k_sh four sided  = 0.9 * 167.25 / 215.57 = 0.9 * 900 / 1160.05 = 0.6983
    # k_sh three sided = 0.9 * 750 / 1010.05 = 0.6683
    dims = (0.300, 0.150, 0.0071, 0.0107, 0.015)
    four = i_section_factors(*dims)
    three = i_section_factors(*dims, exposure="three_sided")
    assert four.perimeter == pytest.approx(1.16005, abs=5e-6)
    assert four.area == pytest.approx(5381.2e-6, abs=0.1e-6)
    assert four.section_factor == pytest.approx(215.57, abs=0.01)
    assert four.box_section_factor == pytest.approx(167.25, abs=0.01)
    assert four.shadow_factor == pytest.approx(0.6983, abs=1e-4)
    assert three.section_factor == pytest.approx(187.70, abs=0.01)
    assert three.box_section_factor == pytest.approx(139.37, abs=0.01)
    assert three.shadow_factor == pytest.approx(0.6683, abs=1e-4)


def test_protected_section_factor__contour_equals_unprotected_and_box_uses_box_perimeter():
    # EN 1993-1-2:2005 Table 4.2: contour encasement Ap/V = Am/V; box encasement Ap/V = 2(b+h)/A.
    section = rolled_section("HEB 300")
    dims = _dimensions(section)
    assert section_factor(*dims, encasement="contour") == section_factor(*dims)
    area = i_section_area(*dims)
    assert section_factor(*dims, encasement="box") == pytest.approx(2 * (0.300 + 0.300) / area,
                                                                    rel=1e-12)
    assert i_section_factors(*dims, encasement="box").shadow_factor is None


def test_shadow_factor__eq_4_26a_by_hand():
    # k_sh = 0.9 * [Am/V]_b / [Am/V] = 0.9 * 120 / 200 = 0.54 (EN 1993-1-2:2005 eq. 4.26a)
    assert shadow_factor(200.0, 120.0) == pytest.approx(0.54, abs=1e-12)


def test_shadow_factor__eq_4_26b_without_the_0_9_for_other_fires():
    # k_sh = [Am/V]_b / [Am/V] = 120 / 200 = 0.6 (EN 1993-1-2:2005 eq. 4.26b, from memory:
    # every case other than an I-section under a nominal fire)
    assert shadow_factor(200.0, 120.0, nominal_fire=False) == pytest.approx(0.6, abs=1e-12)
    # IPE 300 four sided, other fire: 900 / 1160.05 = 0.7758 (hand calculation above)
    dims = (0.300, 0.150, 0.0071, 0.0107, 0.015)
    assert i_section_factors(*dims, nominal_fire=False).shadow_factor == pytest.approx(
        0.7758, abs=1e-4)


def test_box_perimeter__four_sided_2_b_plus_h_three_sided_b_plus_2h():
    # EN 1993-1-2:2005 Table 4.2, box values: 2(b + h) and b + 2h.
    assert box_perimeter(0.4, 0.2) == pytest.approx(1.2)
    assert box_perimeter(0.4, 0.2, "three_sided") == pytest.approx(1.0)


def test_box_section_factor__same_as_protected_box():
    dims = _dimensions(rolled_section("UB 457x191x67"))
    assert box_section_factor(*dims, "three_sided") == section_factor(*dims, "three_sided", "box")


# --- refusals -------------------------------------------------------------------------------------

@pytest.mark.parametrize("dims, quantity", [
    ((0.3, 0.15, 0.0, 0.0107, 0.015), "web_thickness"),
    ((0.3, 0.15, 0.16, 0.0107, 0.015), "web_thickness"),   # t_w >= b
    ((0.3, 0.15, 0.0071, 0.15, 0.015), "flange_thickness"),  # 2 t_f >= h
    ((0.3, 0.15, 0.0071, 0.0107, 0.08), "root_radius"),     # fillet wider than the outstand
    ((-0.3, 0.15, 0.0071, 0.0107, 0.015), "height"),
    ((0.3, 0.15, 0.0071, 0.0107, -0.001), "root_radius"),
])
def test_i_section__impossible_dimensions_refused_naming_the_dimension(dims, quantity):
    with pytest.raises(PhysicsRangeError) as caught:
        i_section_area(*dims)
    assert caught.value.quantity == quantity


def test_section_factor__unknown_exposure_and_encasement_refused():
    dims = (0.3, 0.15, 0.0071, 0.0107, 0.015)
    with pytest.raises(PhysicsRangeError) as caught:
        section_factor(*dims, exposure="two_sided")
    assert caught.value.quantity == "exposure"
    with pytest.raises(PhysicsRangeError) as caught:
        section_factor(*dims, encasement="spray")
    assert caught.value.quantity == "encasement"


def test_shadow_factor__box_larger_than_contour_refused():
    with pytest.raises(PhysicsRangeError) as caught:
        shadow_factor(100.0, 150.0)
    assert caught.value.quantity == "box_section_factor_value"


def test_rolled_section__spacing_case_and_he_designation_forms_accepted():
    assert rolled_section("ipe300").designation == "IPE 300"
    assert rolled_section("HE 300 B").designation == "HEB 300"
    assert rolled_section("UB 457 × 191 × 67").designation == "UB 457x191x67"


def test_rolled_section__unknown_designation_refused_with_closest_names():
    with pytest.raises(PhysicsRangeError) as caught:
        rolled_section("IPE 310")
    assert caught.value.quantity == "profile"
    assert "IPE 300" in caught.value.expected


@pytest.mark.parametrize("mistyped, closest", [
    ("IPE 310", ["IPE 300", "IPE 330", "IPE 360"]),   # nearest sizes first among equals
    ("UB 356x171x50", ["UB 356x171x51", "UB 356x171x45", "UB 356x171x57"]),
    ("heb210", ["HEB 200", "HEB 220", "HEB 180"]),
])
def test_closest_sections__nearest_designations_first(mistyped, closest):
    assert closest_sections(mistyped) == closest


def test_closest_sections__nothing_close_gives_none():
    assert closest_sections("W12x26") == []  # an American designation, not in the catalogue


def test_dimension_source__the_tables_that_give_the_dimensions():
    # IPE: the Euronorm / EN 10365 part; the sales programme's A and A_L table is left out.
    assert rolled_section("IPE 300").dimension_source == (
        "Euronorm 19-57 and EN 10365:2017, IPE dimensions and sectional area")
    assert rolled_section("UB 356x171x51").dimension_source.startswith(
        "BS 4-1:2005, universal beam dimensions")


def test_rolled_section__dimensions_in_metres():
    # UB 457x191x67: D 453.4 mm, B 189.9 mm, t 8.5 mm, T 12.7 mm, r 10.2 mm (BS 4-1:2005)
    section = rolled_section("UB 457x191x67")
    assert _dimensions(section) == pytest.approx((0.4534, 0.1899, 0.0085, 0.0127, 0.0102))
    assert section.published_area == pytest.approx(85.5e-4)


def test_docstring_examples__run_as_written():
    failures, _ = doctest.testmod(sections, raise_on_error=False, verbose=False)
    assert failures == 0
