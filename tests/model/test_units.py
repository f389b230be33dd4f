"""Length units (src/bracegrid/units.py): parse_length, mm/m conversions, bay diagonals, report formatting.

References for the expected values:
* the inch is exactly 25.4 mm and the foot exactly 304.8 mm (international yard and pound
  agreement, 1959); cm and m by the SI prefixes;
* DXF ``$INSUNITS`` codes 1 = inches, 2 = feet, 4 = millimetres, 5 = centimetres, 6 = metres
  (DXF reference, HEADER section variables);
* diagonals by Pythagoras (the 3-4-5 and 5-12-13 triangles); everything else by hand.
"""

from __future__ import annotations

import math

import pytest

from bracegrid.units import (
    DXF_INSUNITS,
    MM_PER_UNIT,
    diagonal_mm,
    format_length_m,
    m_to_mm,
    mm_to_m,
    parse_length,
)


def test_unit_table_holds_the_exact_definitions() -> None:
    # 1 in = 25.4 mm and 1 ft = 12 in = 304.8 mm exactly (1959 agreement); SI prefixes for cm and m.
    assert MM_PER_UNIT == {"mm": 1.0, "cm": 10.0, "m": 1000.0, "in": 25.4, "ft": 304.8}


def test_dxf_unit_codes() -> None:
    # DXF reference, HEADER section, $INSUNITS.
    assert DXF_INSUNITS == {"in": 1, "ft": 2, "mm": 4, "cm": 5, "m": 6}
    assert set(DXF_INSUNITS) == set(MM_PER_UNIT)


@pytest.mark.parametrize(
    ("text", "expected_mm"),
    [
        ("2400 mm", 2400),  # hand: 2400 x 1
        ("240 cm", 2400),  # 240 x 10
        ("2.4 m", 2400),  # 2.4 x 1000
        ("10 ft", 3048),  # 10 x 304.8 (docstring example)
        ("1 ft", 305),  # 304.8 rounds to 305
        ("12 in", 305),  # 12 x 25.4 = 304.8 rounds to 305
        ("1 in", 25),  # 25.4 rounds to 25
        ("0.5 in", 13),  # 12.7 rounds to 13
    ],
)
def test_strings_with_a_unit(text: str, expected_mm: int) -> None:
    assert parse_length(text) == expected_mm


@pytest.mark.parametrize(
    ("text", "expected_mm"),
    [
        ("2.4m", 2400),  # no space between number and unit
        ("  2.4   m  ", 2400),  # surrounding and inner whitespace
        ("2.4 M", 2400),  # unit names are case-insensitive
        ("10 FT", 3048),
        ("2.4e3 mm", 2400),  # exponent notation: 2.4 x 10^3
        (".5 m", 500),  # leading decimal point
        ("3. m", 3000),  # trailing decimal point
        ("+2 m", 2000),  # explicit sign
    ],
)
def test_string_spellings(text: str, expected_mm: int) -> None:
    assert parse_length(text) == expected_mm


def test_bare_numbers_use_the_given_unit() -> None:
    assert parse_length(2.4) == 2400  # default unit is metres (docstring)
    assert parse_length(3) == 3000
    assert parse_length(2400, unit="mm") == 2400
    assert parse_length(300, unit="cm") == 3000
    assert parse_length(10, unit="ft") == 3048  # 10 x 304.8
    assert parse_length(12, unit="in") == 305  # 304.8 rounds to 305


def test_strings_without_a_unit_use_the_given_unit() -> None:
    assert parse_length("2.4") == 2400
    assert parse_length("2400", unit="mm") == 2400
    assert parse_length("8", unit="ft") == 2438  # 8 x 304.8 = 2438.4
    # A unit in the string wins over the default.
    assert parse_length("2400 mm", unit="ft") == 2400


def test_rounds_to_the_nearest_millimetre() -> None:
    # Hand: 0.0004 m = 0.4 mm -> 0; 0.0006 m = 0.6 mm -> 1; 2.4004 m -> 2400; 2.4006 m -> 2401.
    assert parse_length(0.0004) == 0
    assert parse_length(0.0006) == 1
    assert parse_length(2.4004) == 2400
    assert parse_length(2.4006) == 2401
    assert parse_length("1234.4 mm") == 1234
    assert parse_length("1234.6 mm") == 1235
    assert isinstance(parse_length(2.4), int)


def test_negative_lengths_convert_and_leave_the_sign_check_to_the_reader() -> None:
    # The pattern accepts a sign; io/reading.py rejects sizes below 1 mm.
    assert parse_length("-2 m") == -2000
    assert parse_length(-1.5) == -1500


@pytest.mark.parametrize("value", [True, False])
def test_bools_are_not_lengths(value: bool) -> None:
    # bool is a subclass of int in Python; a TOML `true` must not read as 1 m.
    with pytest.raises(ValueError, match="expected a length"):
        parse_length(value)


@pytest.mark.parametrize("value", [math.nan, math.inf, -math.inf, "1e400 m", "1e999"])
def test_non_finite_lengths(value: object) -> None:
    # 1e400 overflows a double to inf (IEEE 754), so it is caught as not finite.
    with pytest.raises(ValueError, match="not finite"):
        parse_length(value)


@pytest.mark.parametrize(("text", "unit"), [("3 yd", "yd"), ("2 km", "km"), ("5 mmm", "mmm")])
def test_unknown_units_are_named(text: str, unit: str) -> None:
    with pytest.raises(ValueError, match=f"unknown length unit '{unit}'") as info:
        parse_length(text)
    for known in MM_PER_UNIT:
        assert known in str(info.value)


def test_unknown_default_unit() -> None:
    with pytest.raises(ValueError, match="unknown length unit 'yd'"):
        parse_length(3, unit="yd")


@pytest.mark.parametrize(
    "text", ["", "   ", "m", "wide", "2.4.5 m", "2 4 m", "2,4 m", "inf m", "nan", "2 m 3", "1/2 in"]
)
def test_unreadable_strings(text: str) -> None:
    with pytest.raises(ValueError, match="cannot read") as info:
        parse_length(text)
    assert repr(text) in str(info.value)


@pytest.mark.parametrize("value", [None, [2.4], {"m": 2.4}, (1, 2)])
def test_other_types(value: object) -> None:
    with pytest.raises(ValueError, match="expected a length") as info:
        parse_length(value)
    assert type(value).__name__ in str(info.value)


def test_mm_and_m() -> None:
    # Hand: 1 m = 1000 mm.
    assert mm_to_m(2400) == 2.4
    assert mm_to_m(0) == 0.0
    assert m_to_mm(3.0) == 3000
    assert m_to_mm(2.4) == 2400  # 2.4 * 1000 is 2400.0000000000005 in binary; rounding gives 2400
    assert m_to_mm(0.0004) == 0
    assert isinstance(m_to_mm(1.2346), int)
    assert m_to_mm(1.2346) == 1235  # 1234.6 mm rounds up
    for mm in (0, 1, 999, 2400, 123456):
        assert m_to_mm(mm_to_m(mm)) == mm


def test_diagonals() -> None:
    # Pythagoras: 3-4-5 and 5-12-13 triangles; a square's diagonal is side x sqrt(2).
    assert diagonal_mm(3000, 4000) == 5000.0
    assert diagonal_mm(4000, 3000) == 5000.0
    assert diagonal_mm(5, 12) == 13.0
    assert diagonal_mm(1000, 1000) == pytest.approx(1000 * math.sqrt(2), rel=1e-15)


def test_format_length_m() -> None:
    # Hand: mm / 1000 with the given number of decimals.
    assert format_length_m(2400) == "2.40 m"
    assert format_length_m(0) == "0.00 m"
    assert format_length_m(5000.0, decimals=0) == "5 m"
    assert format_length_m(2400, decimals=3) == "2.400 m"
    assert format_length_m(1234.5, decimals=1) == "1.2 m"
    assert format_length_m(123456) == "123.46 m"
