"""The cautions of SPEC §7, in one place for every output: the general caution and the assumptions
that bound every number. The JSON result carries them (`result_cautions`, with the role's own);
the text table, HTML and PDF reports print the result's list; the window shows the same texts."""

from __future__ import annotations

__all__ = ["GENERAL_CAUTIONS", "ASSUMPTION_CAUTIONS", "ALL_CAUTIONS", "SHORT_CAUTION", "result_cautions"]

GENERAL_CAUTIONS = (
    "Diodes in mains rectifiers, high-energy supplies and protection paths can fail violently or leave "
    "circuits live.",
    "Results are estimates from datasheet parameters. Verify every choice against the manufacturer's "
    "datasheet, prototypes and measurements.",
    "Local electrical codes and licensed practice take precedence over anything partpick shows.",
)

ASSUMPTION_CAUTIONS = (
    "A datasheet RthJA is measured on a standard test board, not on your board: a Tj margin smaller than "
    "the uncertainty of your board's thermal resistance is no margin.",
    "Leakage growth with temperature is an assumption (a doubling interval from one or two datasheet "
    "points); hot leakage decides Schottky runaway.",
    "The analysis is DC steady state per corner (plus the surge, transient and AC-cycle checks where a "
    "role has them); it does not replace a transient simulation or a measurement on the built circuit.",
)

ALL_CAUTIONS = GENERAL_CAUTIONS + ASSUMPTION_CAUTIONS

SHORT_CAUTION = "Estimates from datasheet data: verify before relying on them (cautions)"


def result_cautions(role_cautions=()) -> list[str]:
    """The JSON ``cautions`` of a result: the general ones, the role's own, then the assumptions."""
    return list(GENERAL_CAUTIONS) + [c for c in role_cautions if c not in ALL_CAUTIONS] + list(ASSUMPTION_CAUTIONS)
