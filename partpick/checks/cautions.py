"""The cautions of SPEC §7, in one place for the window (the reports keep their own wording in
`partpick.report.words`): the general caution and the assumptions that bound every number."""

from __future__ import annotations

__all__ = ["GENERAL_CAUTIONS", "ASSUMPTION_CAUTIONS", "ALL_CAUTIONS", "SHORT_CAUTION"]

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
    "The analysis is DC steady state per corner (plus the surge check where it applies); it does not "
    "replace a transient simulation or a measurement on the built circuit.",
)

ALL_CAUTIONS = GENERAL_CAUTIONS + ASSUMPTION_CAUTIONS

SHORT_CAUTION = "Estimates from datasheet data: verify before relying on them (cautions)"
