"""Write parts.csv, the readable source of partpick's bundled example library.

Everything here is INVENTED for the demo: the four makers, their part-number
schemes, every rating and every curve. Nothing is copied from a real datasheet
and no value describes a real product. The numbers are chosen to be plausible
for each kind of diode, so that the example requirements in
resources/requirements/ give a mix of passing and failing candidates.

Scenario: a small distributor stocks four invented makers
  Quillfen Semiconductor  - switching diodes, Schottky rectifiers, 1.3 W Zeners
  Marrowgate Devices      - general rectifiers, Schottky rectifiers, a fast axial part
  Velkana Electronics     - fast-recovery rectifiers, second-source rectifiers
  Osterlund Microparts    - 0.5 W Zeners, second-source switching diodes

Forward curves: most non-Zener parts carry `vf_points` read off a typical
25 degC curve. The points are generated from the Shockley model with series
resistance, V = n*VT*ln(1 + I/Is) + I*Rs (VT = k*298.15 K/q, CODATA constants
from scipy), and rounded to 1 mV as if read off a datasheet plot; partpick
fits Is, n, Rs on import. A few parts give the model directly
(model_source "entered").

Zener impedances follow the trade's pattern (common practice): lowest around
6-8 V, rising at low and high voltage. The knee impedance Zzk is derived so
that the voltage lost between Izt and Izk in partpick's knee model (SPEC 3:
ln Z linear in ln Iz) equals an invented knee drop, softer at low voltage.

Run:  .venv/bin/python resources/example_library/make_parts.py
It is deterministic; it overwrites parts.csv beside this file.
"""

from __future__ import annotations

import csv
import math
from pathlib import Path

import numpy as np
from scipy import constants
from scipy.optimize import brentq

from protection_parts import PROTECTION_COLUMNS, protection_rows

OUT = Path(__file__).with_name("parts.csv")

# Thermal voltage at 25 degC (T0 = 298.15 K), CODATA k and q.
VT_25C = constants.k * 298.15 / constants.e

# SPEC section 5, parts CSV columns, in the contract's order.
COLUMNS = (
    "part_number", "kind", "manufacturer", "package", "datasheet",
    "vrrm_V", "if_avg_A", "if_ref_C", "ifsm_A", "ifsm_ms", "pd_W", "pd_ref_C",
    "tj_max_C", "rth_ja_K_per_W", "is_A", "n", "rs_ohm", "rs_temp_exponent",
    "eg_eV", "is_temp_exponent", "model_source", "vf_points", "vf_max_V",
    "vf_max_at_A", "ir_A", "ir_vr_V", "ir_t_C", "ir_double_K", "vz_V",
    "vz_tol_pct", "izt_A", "zzt_ohm", "izk_A", "zzk_ohm", "vz_tc_pct_per_K",
    "pd_ref_point", "if_ref_point", "rth_jc_K_per_W", "rth_jl_K_per_W", "rth_ja_area_mm2",
    "rth_ja_large_K_per_W", "rth_ja_large_area_mm2",
    "price", "lifecycle", "notes",
)
# The coil-clamp and TVS columns (protection_parts.py), after the others.
COLUMNS = COLUMNS[:-3] + tuple(c for c in PROTECTION_COLUMNS if c not in COLUMNS) + COLUMNS[-3:]

# ---------------------------------------------------------------------------
# Thermal path of the power packages (invented, plausible): the datasheet RthJA
# of the table below is the one on the smaller copper area; on the larger area
# it falls by the factor given. Heatsink packages (TO-220AC, DPAK) rate IF(AV)
# at the case and give RthJC; SMC rates it at the lead and gives RthJL. The
# junction-to-case/lead resistance falls with the die size (the current rating).
#   package: (small area [mm2], large area [mm2], RthJA large/small,
#             reference point, K*A for RthJC or RthJL = value / IF(AV))
# ---------------------------------------------------------------------------
POWER_THERMAL = {
    "TO-220AC": (100.0, 1000.0, 0.62, "case", 16.0),
    "DPAK": (40.0, 650.0, 0.55, "case", 20.0),
    "SMC": (25.0, 600.0, 0.60, "lead", 40.0),
}

MAKERS = {
    "QF": "Quillfen Semiconductor",
    "MG": "Marrowgate Devices",
    "VK": "Velkana Electronics",
    "OS": "Osterlund Microparts",
}

# Invented datasheet reference schemes, one per maker.
DATASHEET = {
    "QF": "QF-DS-{:04d} rev {}",
    "MG": "MGD doc {:04d}/{}",
    "VK": "VK-TDS-{:04d} issue {}",
    "OS": "OSM-{:04d}-{}",
}

# Currents of the vf_points read-off, as multiples of IF(AV).
POINT_MULTIPLES = (0.01, 0.1, 0.3, 1.0, 3.0)
SIGNAL_POINT_CURRENTS_A = (1e-3, 10e-3, 50e-3, 150e-3, 300e-3)

# ---------------------------------------------------------------------------
# Non-Zener parts. One row per part:
#   part_number, kind, maker, package, doc no, VRRM [V], IF(AV) [A], if_ref [degC],
#   IFSM [A], IFSM pulse [ms], Pd [W] (None = not given), Tj max [degC],
#   RthJA [K/W] (None = not given), Is [A], n, Rs [ohm]   (invented 25 degC model),
#   VF max [V] at IF [A] (guaranteed maximum), IR max [A] at VR [V] and 25 degC,
#   IR doubling interval [K] (None = default), price, lifecycle,
#   form ("points" = vf_points for the import fit, "entered" = model given), notes
# ---------------------------------------------------------------------------
SIGNAL = [
    ("QFS-101", "QF", "axial-2", 101, 100, 0.20, 25, 2.0, 1.0, 0.50, 175, None,
     2.0e-9, 1.85, 0.70, 1.00, 0.10, 1.0e-6, 75, None, 0.030, "nrnd", "points",
     "glass axial switching diode; QFS-102 is the surface-mount successor"),
    ("QFS-102", "QF", "SOD-123", 102, 100, 0.20, 25, 2.0, 1.0, 0.40, 150, None,
     2.0e-9, 1.85, 0.80, 1.00, 0.10, 1.0e-6, 75, None, 0.020, "active", "points",
     "general switching diode, trr 4 ns class"),
    ("QFS-103", "QF", "SOD-323", 103, 100, 0.15, 25, 1.5, 1.0, 0.30, 150, None,
     2.2e-9, 1.85, 0.90, 1.00, 0.10, 1.0e-6, 75, None, 0.025, "active", "points",
     "small-outline switching diode"),
    ("QFS-104", "QF", "SOT-23", 104, 100, 0.20, 25, 2.0, 1.0, None, 150, 420,
     2.0e-9, 1.85, 0.80, 1.00, 0.10, 1.0e-6, 75, None, 0.020, "active", "points",
     "single diode in a three-lead outline, pin 3 not connected"),
    ("QFS-105L", "QF", "SOD-123", 105, 75, 0.20, 25, 2.0, 1.0, 0.40, 150, None,
     8.0e-10, 1.75, 0.80, 1.00, 0.10, 5.0e-9, 75, None, 0.060, "active", "points",
     "low-leakage variant for sample-and-hold and clamp inputs"),
    ("QFS-106H", "QF", "SOD-123", 106, 250, 0.20, 25, 2.0, 1.0, 0.40, 150, None,
     3.0e-9, 1.90, 1.00, 1.10, 0.10, 1.0e-7, 200, None, 0.050, "active", "points",
     "high-voltage switching diode"),
    ("OSW-75", "OS", "SOD-123", 7501, 75, 0.15, 25, 2.0, 1.0, 0.40, 150, None,
     2.5e-9, 1.80, 0.60, 1.00, 0.10, 2.0e-6, 75, None, 0.018, "active", "entered",
     "second source for general switching in SOD-123"),
    ("OSW-75T", "OS", "SOT-23", 7502, 75, 0.20, 25, 2.0, 1.0, 0.30, 150, None,
     2.2e-9, 1.82, 0.75, 1.00, 0.10, 2.0e-6, 75, None, 0.015, "active", "points",
     "three-lead outline, cathode on pin 3"),
    ("OSW-75M", "OS", "SOD-323", 7503, 75, 0.15, 25, 1.0, 1.0, 0.25, 150, None,
     1.8e-9, 1.80, 0.90, 1.00, 0.10, 2.0e-6, 75, None, 0.020, "obsolete", "points",
     "discontinued; consider QFS-103"),
    ("OSW-100A", "OS", "axial-2", 7510, 100, 0.30, 25, 4.0, 1.0, 0.50, 175, None,
     2.5e-9, 1.80, 0.50, 1.00, 0.20, 1.0e-6, 100, None, 0.035, "active", "entered",
     "glass axial, higher current rating"),
]

RECTIFIER = [
    # Marrowgate 1 A axial ladder
    ("MGR1A-0050", "MG", "axial-2", 1100, 50, 1.0, 75, 30, 8.3, None, 150, 80,
     1.0e-9, 1.70, 0.040, 1.10, 1.0, 5.0e-6, 50, 11, 0.030, "obsolete", "points",
     "general-purpose axial rectifier; use MGR1A-0100"),
    ("MGR1A-0100", "MG", "axial-2", 1101, 100, 1.0, 75, 30, 8.3, None, 150, 80,
     1.0e-9, 1.70, 0.045, 1.10, 1.0, 5.0e-6, 100, 11, 0.030, "active", "points",
     "general-purpose axial rectifier"),
    ("MGR1A-0200", "MG", "axial-2", 1102, 200, 1.0, 75, 30, 8.3, None, 150, 80,
     1.0e-9, 1.70, 0.050, 1.10, 1.0, 5.0e-6, 200, 11, 0.032, "active", "points",
     "general-purpose axial rectifier"),
    ("MGR1A-0400", "MG", "axial-2", 1104, 400, 1.0, 75, 30, 8.3, None, 150, 80,
     1.0e-9, 1.70, 0.055, 1.10, 1.0, 5.0e-6, 400, 11, 0.035, "active", "points",
     "general-purpose axial rectifier"),
    ("MGR1A-0600", "MG", "axial-2", 1106, 600, 1.0, 75, 30, 8.3, None, 150, 80,
     9.0e-10, 1.72, 0.060, 1.10, 1.0, 5.0e-6, 600, 11, 0.038, "active", "points",
     "general-purpose axial rectifier"),
    ("MGR1A-0800", "MG", "axial-2", 1108, 800, 1.0, 75, 30, 8.3, None, 150, 80,
     9.0e-10, 1.72, 0.070, 1.10, 1.0, 5.0e-6, 800, 11, 0.042, "nrnd", "points",
     "general-purpose axial rectifier; MGR1A-1000 covers this rating"),
    ("MGR1A-1000", "MG", "axial-2", 1110, 1000, 1.0, 75, 30, 8.3, None, 150, 80,
     8.0e-10, 1.74, 0.080, 1.10, 1.0, 5.0e-6, 1000, 11, 0.045, "active", "points",
     "general-purpose axial rectifier for mains input"),
    # Marrowgate 1 A SMA
    ("MGR1S-0200", "MG", "SMA", 1202, 200, 1.0, 75, 30, 8.3, None, 150, 100,
     1.2e-9, 1.72, 0.060, 1.10, 1.0, 5.0e-6, 200, 11, 0.040, "active", "points",
     "surface-mount rectifier"),
    ("MGR1S-0400", "MG", "SMA", 1204, 400, 1.0, 75, 30, 8.3, None, 150, 100,
     1.2e-9, 1.72, 0.065, 1.10, 1.0, 5.0e-6, 400, 11, 0.040, "active", "points",
     "surface-mount rectifier"),
    ("MGR1S-0600", "MG", "SMA", 1206, 600, 1.0, 75, 30, 8.3, None, 150, 100,
     1.1e-9, 1.73, 0.070, 1.10, 1.0, 5.0e-6, 600, 11, 0.042, "active", "points",
     "surface-mount rectifier"),
    ("MGR1S-1000", "MG", "SMA", 1210, 1000, 1.0, 75, 30, 8.3, None, 150, 100,
     9.0e-10, 1.75, 0.085, 1.10, 1.0, 5.0e-6, 1000, 11, 0.048, "active", "points",
     "surface-mount rectifier for mains input"),
    # Velkana second source, 1 A SMA
    ("VKR1S-0400", "VK", "SMA", 3104, 400, 1.0, 75, 30, 8.3, None, 150, 95,
     8.0e-10, 1.68, 0.070, 1.10, 1.0, 5.0e-6, 400, 11, 0.035, "active", "entered",
     "second source for 1 A / 400 V in SMA"),
    ("VKR1S-0600", "VK", "SMA", 3106, 600, 1.0, 75, 30, 8.3, None, 150, 95,
     8.0e-10, 1.70, 0.075, 1.10, 1.0, 5.0e-6, 600, 11, 0.038, "nrnd", "points",
     "second source for 1 A / 600 V in SMA"),
    ("VKR1S-1000", "VK", "SMA", 3110, 1000, 1.0, 75, 30, 8.3, None, 150, 95,
     7.0e-10, 1.74, 0.090, 1.10, 1.0, 5.0e-6, 1000, 11, 0.045, "active", "entered",
     "second source for 1 A / 1000 V in SMA"),
    # Marrowgate 2 A SMB
    ("MGR2B-0400", "MG", "SMB", 1304, 400, 2.0, 75, 60, 8.3, None, 150, 65,
     2.0e-9, 1.72, 0.035, 1.10, 2.0, 5.0e-6, 400, 11, 0.070, "active", "points",
     "surface-mount rectifier"),
    ("MGR2B-1000", "MG", "SMB", 1310, 1000, 2.0, 75, 60, 8.3, None, 150, 65,
     1.6e-9, 1.75, 0.045, 1.10, 2.0, 5.0e-6, 1000, 11, 0.080, "active", "points",
     "surface-mount rectifier for mains input"),
    # Marrowgate 3 A axial (larger body) and SMC
    ("MGR3A-0200", "MG", "axial-2L", 1402, 200, 3.0, 75, 150, 8.3, None, 150, 45,
     3.0e-9, 1.70, 0.020, 1.20, 3.0, 1.0e-5, 200, 11, 0.090, "active", "points",
     "axial rectifier, large body; lead length sets RthJA"),
    ("MGR3A-0600", "MG", "axial-2L", 1406, 600, 3.0, 75, 150, 8.3, None, 150, 45,
     3.0e-9, 1.71, 0.022, 1.20, 3.0, 1.0e-5, 600, 11, 0.095, "active", "points",
     "axial rectifier, large body"),
    ("MGR3A-1000", "MG", "axial-2L", 1410, 1000, 3.0, 75, 150, 8.3, None, 150, 45,
     2.5e-9, 1.73, 0.026, 1.20, 3.0, 1.0e-5, 1000, 11, 0.110, "active", "points",
     "axial rectifier, large body, mains input"),
    ("MGR3C-0400", "MG", "SMC", 1504, 400, 3.0, 75, 100, 8.3, None, 150, 47,
     3.0e-9, 1.72, 0.025, 1.15, 3.0, 1.0e-5, 400, 11, 0.100, "active", "points",
     "surface-mount rectifier"),
    ("MGR3C-1000", "MG", "SMC", 1510, 1000, 3.0, 75, 100, 8.3, None, 150, 47,
     2.5e-9, 1.75, 0.030, 1.15, 3.0, 1.0e-5, 1000, 11, 0.120, "active", "points",
     "surface-mount rectifier for mains input"),
    # 6 A power rectifiers
    ("MGR6T-0400", "MG", "TO-220AC", 1604, 400, 6.0, 100, 250, 8.3, None, 175, 60,
     8.0e-9, 1.70, 0.012, 1.10, 6.0, 1.0e-5, 400, 11, 0.350, "active", "points",
     "power rectifier; RthJA is free air without heatsink"),
    ("MGR6T-0800", "MG", "TO-220AC", 1608, 800, 6.0, 100, 250, 8.3, None, 175, 60,
     7.0e-9, 1.72, 0.014, 1.10, 6.0, 1.0e-5, 800, 11, 0.380, "active", "entered",
     "power rectifier; RthJA is free air without heatsink"),
    ("VKR6D-0600", "VK", "DPAK", 3606, 600, 6.0, 90, 200, 8.3, None, 175, 55,
     7.0e-9, 1.71, 0.015, 1.10, 6.0, 1.0e-5, 600, 11, 0.300, "active", "entered",
     "power rectifier; RthJA on 6 cm2 copper"),
]

FAST_RECOVERY = [
    ("VKT1S-0200", "VK", "SMA", 4102, 200, 1.0, 75, 30, 8.3, None, 150, 100,
     5.0e-10, 1.80, 0.120, 1.25, 1.0, 5.0e-6, 200, 11, 0.050, "active", "entered",
     "fast recovery, trr 150 ns class"),
    ("VKT1S-0400", "VK", "SMA", 4104, 400, 1.0, 75, 30, 8.3, None, 150, 100,
     2.0e-10, 1.90, 0.140, 1.35, 1.0, 5.0e-6, 400, 11, 0.055, "active", "points",
     "fast recovery, trr 150 ns class"),
    ("VKT1S-0600", "VK", "SMA", 4106, 600, 1.0, 75, 30, 8.3, None, 150, 100,
     1.0e-10, 1.95, 0.150, 1.50, 1.0, 5.0e-6, 600, 11, 0.060, "active", "points",
     "fast recovery, trr 250 ns class"),
    ("VKT1S-1000", "VK", "SMA", 4110, 1000, 1.0, 75, 30, 8.3, None, 150, 100,
     5.0e-11, 1.98, 0.200, 1.70, 1.0, 5.0e-6, 1000, 11, 0.070, "active", "points",
     "fast recovery, trr 500 ns class"),
    ("VKT2B-0400", "VK", "SMB", 4204, 400, 2.0, 75, 50, 8.3, None, 150, 65,
     4.0e-10, 1.90, 0.070, 1.35, 2.0, 5.0e-6, 400, 11, 0.090, "active", "points",
     "fast recovery, trr 150 ns class"),
    ("VKT2B-0600", "VK", "SMB", 4206, 600, 2.0, 75, 50, 8.3, None, 150, 65,
     2.0e-10, 1.95, 0.080, 1.50, 2.0, 5.0e-6, 600, 11, 0.095, "nrnd", "points",
     "fast recovery, trr 250 ns class"),
    ("VKT3C-0200", "VK", "SMC", 4302, 200, 3.0, 75, 100, 8.3, None, 150, 47,
     1.5e-9, 1.80, 0.040, 1.25, 3.0, 1.0e-5, 200, 11, 0.120, "active", "points",
     "fast recovery, trr 150 ns class"),
    ("VKT3C-0600", "VK", "SMC", 4306, 600, 3.0, 75, 100, 8.3, None, 150, 47,
     3.0e-10, 1.95, 0.050, 1.50, 3.0, 1.0e-5, 600, 11, 0.130, "active", "points",
     "fast recovery, trr 250 ns class"),
    ("VKT8T-0600", "VK", "TO-220AC", 4806, 600, 8.0, 100, 150, 8.3, None, 175, 60,
     8.0e-10, 1.95, 0.020, 1.40, 8.0, 1.0e-5, 600, 11, 0.450, "active", "points",
     "fast recovery power rectifier, trr 200 ns class; free air RthJA"),
    ("MGF1A-0600", "MG", "axial-2", 1706, 600, 1.0, 75, 30, 8.3, None, 150, 80,
     1.0e-10, 1.95, 0.160, 1.50, 1.0, 5.0e-6, 600, 11, 0.060, "active", "points",
     "fast recovery axial, trr 250 ns class"),
    ("MGF1S-0600", "MG", "SMA", 1716, 600, 1.0, 75, 30, 8.3, None, 150, 100,
     1.2e-10, 1.94, 0.150, 1.50, 1.0, 5.0e-6, 600, 11, 0.058, "obsolete", "points",
     "discontinued; VKT1S-0600 is a same-package replacement"),
]

# Schottky rectifiers: high leakage that doubles every 7.5-11 K, so the reverse
# state can run away thermally at a hot ambient with a high RthJA.
SCHOTTKY = [
    ("QFB-0120", "QF", "SMA", 201, 20, 1.0, 75, 30, 8.3, None, 125, 100,
     1.0e-5, 1.05, 0.080, 0.45, 1.0, 1.0e-3, 20, 7.5, 0.050, "nrnd", "points",
     "low-drop Schottky; very leaky when hot"),
    ("QFB-0140", "QF", "SMA", 202, 40, 1.0, 75, 30, 8.3, None, 125, 100,
     3.0e-6, 1.08, 0.100, 0.55, 1.0, 5.0e-4, 40, 8.5, 0.050, "active", "points",
     "general Schottky rectifier"),
    ("QFB-0160", "QF", "SMA", 203, 60, 1.0, 75, 30, 8.3, None, 150, 100,
     5.0e-7, 1.10, 0.120, 0.65, 1.0, 2.0e-4, 60, 9.0, 0.055, "active", "points",
     "general Schottky rectifier"),
    ("QFB-01A0", "QF", "SMA", 204, 100, 1.0, 75, 30, 8.3, None, 150, 100,
     1.0e-7, 1.15, 0.150, 0.75, 1.0, 5.0e-5, 100, 10.0, 0.065, "active", "points",
     "high-voltage Schottky rectifier"),
    ("QFB-0240", "QF", "SMB", 212, 40, 2.0, 75, 50, 8.3, None, 150, 65,
     6.0e-6, 1.08, 0.050, 0.55, 2.0, 5.0e-4, 40, 8.5, 0.080, "active", "entered",
     "general Schottky rectifier"),
    ("QFB-0340", "QF", "SMC", 222, 40, 3.0, 90, 80, 8.3, None, 150, 47,
     5.0e-6, 1.10, 0.030, 0.55, 3.0, 5.0e-4, 40, 8.5, 0.110, "active", "points",
     "general Schottky rectifier"),
    ("QFB-0360", "QF", "SMC", 223, 60, 3.0, 90, 80, 8.3, None, 150, 47,
     1.5e-6, 1.12, 0.040, 0.65, 3.0, 3.0e-4, 60, 9.0, 0.120, "active", "points",
     "general Schottky rectifier"),
    ("QFB-0545", "QF", "DPAK", 232, 45, 5.0, 100, 120, 8.3, None, 150, 40,
     1.0e-5, 1.10, 0.020, 0.55, 5.0, 2.5e-4, 45, 9.0, 0.250, "active", "points",
     "power Schottky; RthJA on 6 cm2 copper"),
    ("QFB-08A0", "QF", "DPAK", 236, 100, 8.0, 100, 150, 8.3, None, 150, 40,
     1.2e-6, 1.15, 0.015, 0.68, 8.0, 3.0e-5, 100, 11.0, 0.390, "active", "points",
     "power Schottky, 100 V class; RthJA on 6 cm2 copper"),
    ("QFB-1045", "QF", "TO-220AC", 242, 45, 10.0, 100, 200, 8.3, None, 150, 60,
     2.0e-5, 1.10, 0.012, 0.57, 10.0, 1.0e-3, 45, 9.0, 0.450, "active", "points",
     "power Schottky; free air RthJA, much lower on a heatsink"),
    ("QFB-10A0", "QF", "TO-220AC", 246, 100, 10.0, 100, 200, 8.3, None, 175, 60,
     8.0e-7, 1.15, 0.015, 0.80, 10.0, 2.0e-4, 100, 10.0, 0.550, "nrnd", "points",
     "power Schottky, 100 V class; free air RthJA"),
    ("MGH1S-040", "MG", "SMA", 2140, 40, 1.0, 75, 30, 8.3, None, 125, 100,
     2.5e-6, 1.08, 0.110, 0.55, 1.0, 5.0e-4, 40, 8.5, 0.045, "active", "entered",
     "second source for 1 A / 40 V Schottky in SMA"),
    ("MGH2B-020", "MG", "SMB", 2220, 20, 2.0, 75, 50, 8.3, None, 125, 65,
     2.0e-5, 1.05, 0.040, 0.45, 2.0, 2.0e-3, 20, 7.5, 0.070, "obsolete", "points",
     "discontinued low-voltage Schottky"),
    ("MGH3C-040", "MG", "SMC", 2340, 40, 3.0, 90, 80, 8.3, None, 150, 47,
     4.5e-6, 1.10, 0.032, 0.55, 3.0, 5.0e-4, 40, 8.5, 0.100, "active", "points",
     "second source for 3 A / 40 V Schottky in SMC"),
    ("MGH3C-060", "MG", "SMC", 2360, 60, 3.0, 90, 80, 8.3, None, 150, 47,
     1.4e-6, 1.12, 0.042, 0.65, 3.0, 3.0e-4, 60, 9.0, 0.115, "active", "points",
     "second source for 3 A / 60 V Schottky in SMC"),
    ("MGH3C-100", "MG", "SMC", 2300, 100, 3.0, 90, 80, 8.3, None, 150, 47,
     3.0e-7, 1.15, 0.050, 0.80, 3.0, 1.0e-4, 100, 10.0, 0.130, "active", "points",
     "100 V Schottky in SMC"),
    ("MGH5C-060", "MG", "SMC", 2560, 60, 5.0, 90, 120, 8.3, None, 150, 40,
     2.5e-6, 1.12, 0.030, 0.65, 5.0, 3.0e-4, 60, 9.5, 0.180, "active", "points",
     "Schottky rectifier; RthJA on the larger recommended pad"),
    ("MGH5D-045", "MG", "DPAK", 2545, 45, 5.0, 100, 120, 8.3, None, 150, 40,
     9.0e-6, 1.10, 0.022, 0.56, 5.0, 2.0e-4, 45, 9.0, 0.230, "active", "points",
     "second source for 5 A / 45 V Schottky in DPAK; RthJA on 6 cm2 copper"),
    ("MGH6D-060", "MG", "DPAK", 2660, 60, 6.0, 100, 150, 8.3, None, 150, 40,
     3.0e-6, 1.12, 0.022, 0.65, 6.0, 2.5e-4, 60, 9.5, 0.240, "active", "entered",
     "power Schottky; RthJA on 6 cm2 copper"),
    ("MGH8D-100", "MG", "DPAK", 2800, 100, 8.0, 100, 150, 8.3, None, 150, 40,
     1.0e-6, 1.15, 0.018, 0.70, 8.0, 5.0e-5, 100, 10.5, 0.360, "active", "points",
     "second source for 8 A / 100 V Schottky in DPAK"),
]

KIND_TABLES = (
    ("signal", SIGNAL),
    ("rectifier", RECTIFIER),
    ("fast_recovery", FAST_RECOVERY),
    ("schottky", SCHOTTKY),
)

# ---------------------------------------------------------------------------
# Zeners. E24 voltages 2.4 V to 33 V; temperature coefficient in %/K, invented
# along the trade's pattern (common practice): negative below about 5 V, near
# zero at 5-5.6 V, positive above.
# ---------------------------------------------------------------------------
ZENER_TC_PCT_PER_K = {
    2.4: -0.085, 2.7: -0.080, 3.0: -0.075, 3.3: -0.070, 3.6: -0.065,
    3.9: -0.055, 4.3: -0.040, 4.7: -0.020, 5.1: 0.005, 5.6: 0.020,
    6.2: 0.035, 6.8: 0.045, 7.5: 0.052, 8.2: 0.058, 9.1: 0.063, 10: 0.068,
    11: 0.072, 12: 0.075, 13: 0.078, 15: 0.080, 16: 0.082, 18: 0.084,
    20: 0.086, 22: 0.088, 24: 0.090, 27: 0.092, 30: 0.094, 33: 0.095,
}

# Power classes. Zzt(V) = z_min + z_low*ln(7/V)^3 below 7 V, z_min + z_high*ln(V/7)^2
# above (lowest around 6-8 V, steep towards the soft low-voltage parts). Izt = izt_power/Vz rounded, capped; Izk fixed per class.
ZENER_CLASSES = {
    # maker, prefix, package, doc, Pd [W], Tj max, Izt rule, Izk [A], Zzt shape,
    # price at 5 % / 2 %
    "0W5": dict(maker="OS", prefix="OSZ-", package="SOD-123", doc=8050, pd_W=0.5,
                tj_max_C=150, izt_fixed_A=5e-3, izt_high_V=27, izt_high_A=2e-3,
                izk_A=0.25e-3, z_min=6.0, z_low=70.0, z_high=28.0,
                price={5: 0.030, 2: 0.040}),
    "1W3": dict(maker="QF", prefix="QFZ-", package="SMA", doc=301, pd_W=1.3,
                tj_max_C=150, izt_power_W=0.25, izt_cap_A=0.1, izk_A=1e-3,
                izk_high_V=20, izk_high_A=0.5e-3,
                z_min=1.5, z_low=9.0, z_high=14.0, price={5: 0.090, 2: 0.110}),
}

# The knee: voltage lost between Izt and Izk = KNEE_FACTOR(V) x (the drop at
# constant Zzt). Softer (relatively) at mid voltages where Zzt is tiny.
def knee_factor(vz: float) -> float:
    """Invented knee softness: about 1.3 at 2.4 V, 2.2 at 6.8 V, 1.6 at 33 V."""
    if vz <= 6.8:
        return 1.3 + 0.9 * (math.log(vz / 2.4) / math.log(6.8 / 2.4))
    return 2.2 - 0.6 * (math.log(vz / 6.8) / math.log(33 / 6.8))


# A few Quillfen 0.5 W Zeners at popular values, second source in SOD-123.
QF_SMALL_ZENERS = (3.3, 5.1, 5.6, 12, 15)

# Lifecycle exceptions among the Zeners (everything else is active).
ZENER_LIFECYCLE = {
    "OSZ-2V4-02": "obsolete", "OSZ-2V7-02": "nrnd", "OSZ-33-02": "nrnd",
    "QFZ-2V4-02": "obsolete", "QFZ-30-05": "nrnd", "QFZ-33-02": "obsolete",
}


def sig(x: float, digits: int = 2) -> float:
    """Round to significant digits, as a datasheet states a value."""
    if x == 0:
        return 0.0
    return float(f"{x:.{digits}g}")


def rkm(vz: float) -> str:
    """Voltage in the letter-for-decimal-point form of IEC 60062 (5.1 -> 5V1, 3 -> 3V0, 12 -> 12)."""
    if vz >= 10:
        return f"{vz:g}"
    whole, frac = f"{vz:.1f}".split(".")
    return f"{whole}V{frac}"


def vf_typical(current, saturation_current, ideality, series_resistance):
    """Shockley with series resistance at 25 degC [V]."""
    current = np.asarray(current, dtype=float)
    return (ideality * VT_25C * np.log1p(current / saturation_current)
            + current * series_resistance)


def fmt(x) -> str:
    if x is None:
        return ""
    if isinstance(x, str):
        return x
    return f"{x:.6g}"


def knee_impedance(zzt, izt, izk, knee_drop):
    """Zzk [ohm] such that the ln Z - ln Iz knee loses `knee_drop` [V] from Izt to Izk.

    With Z = Zzk*(I/Izk)^p between Izk and Izt, the integral of Z dI is the
    logarithmic mean of A = Zzt*Izt and B = Zzk*Izk times ln(Izt/Izk).
    """
    a = zzt * izt
    ln_r = math.log(izt / izk)

    def drop(b):
        if abs(a - b) < 1e-15:
            return a * ln_r
        return (a - b) / math.log(a / b) * ln_r - knee_drop

    b = brentq(drop, 1e-9, 100.0)
    return b / izk


def zener_rows():
    rows = []
    for cls_name, cls in ZENER_CLASSES.items():
        for vz, tc in ZENER_TC_PCT_PER_K.items():
            rows.extend(_zener_pair(cls_name, cls, vz, tc))
    small = dict(ZENER_CLASSES["0W5"], maker="QF", prefix="QFZ-S", doc=351,
                 price={5: 0.032, 2: 0.045})
    for vz in QF_SMALL_ZENERS:
        rows.extend(_zener_pair("0W5", small, vz, ZENER_TC_PCT_PER_K[vz]))
    return rows


def _zener_pair(cls_name, cls, vz, tc, tolerances=(2, 5)):
    if "izt_fixed_A" in cls:
        izt = cls["izt_high_A"] if vz >= cls["izt_high_V"] else cls["izt_fixed_A"]
    else:
        izt = min(sig(cls["izt_power_W"] / vz), cls["izt_cap_A"])
    izk = cls["izk_A"]
    if vz >= cls.get("izk_high_V", 1e9):
        izk = cls["izk_high_A"]
    if vz < 7:
        zzt = cls["z_min"] + cls["z_low"] * math.log(7 / vz) ** 3
    else:
        zzt = cls["z_min"] + cls["z_high"] * math.log(vz / 7) ** 2
    zzt = sig(zzt)
    drop = knee_factor(vz) * zzt * (izt - izk)
    zzk = sig(knee_impedance(zzt, izt, izk, drop))
    out = []
    for tol in tolerances:
        pn = f"{cls['prefix']}{rkm(vz)}-{tol:02d}"
        letter = "B" if tol == 2 else "A"
        out.append(dict(
            part_number=pn, kind="zener", manufacturer=MAKERS[cls["maker"]],
            package=cls["package"],
            datasheet=DATASHEET[cls["maker"]].format(cls["doc"], letter),
            pd_W=cls["pd_W"], pd_ref_C=25, tj_max_C=cls["tj_max_C"],
            vz_V=float(vz), vz_tol_pct=float(tol), izt_A=izt, zzt_ohm=zzt,
            izk_A=izk, zzk_ohm=zzk, vz_tc_pct_per_K=tc,
            price=cls["price"][tol], lifecycle=ZENER_LIFECYCLE.get(pn, "active"),
            notes=f"{cls['pd_W']:g} W Zener, {tol} % tolerance at Izt",
        ))
    return out


def power_thermal(package, if_avg, tj_max, pd, rth):
    """RthJC or RthJL, the rating point and RthJA at two copper areas for a power package (else {})."""
    if package not in POWER_THERMAL:
        return {}
    small_area, large_area, factor, point, k = POWER_THERMAL[package]
    small = rth if rth is not None else (tj_max - 25) / pd
    out = dict(rth_ja_K_per_W=small, rth_ja_area_mm2=small_area, rth_ja_large_area_mm2=large_area,
               rth_ja_large_K_per_W=sig(small * factor, 2), if_ref_point=point)
    path = sig(max(k / if_avg, 0.8), 2)
    out["rth_jc_K_per_W" if point == "case" else "rth_jl_K_per_W"] = path
    return out


def forward_rows():
    rows = []
    for kind, table in KIND_TABLES:
        for (pn, maker, package, doc, vrrm, if_avg, if_ref, ifsm, ifsm_ms, pd, tj_max,
             rth, is_a, n, rs, vf_max, vf_max_at, ir, ir_vr, ir_double, price,
             lifecycle, form, notes) in table:
            typ_at_max = float(vf_typical(vf_max_at, is_a, n, rs))
            if not vf_max > 1.02 * typ_at_max:
                raise SystemExit(f"{pn}: VF max {vf_max} V is not above typical "
                                 f"{typ_at_max:.3f} V at {vf_max_at} A")
            row = dict(
                part_number=pn, kind=kind, manufacturer=MAKERS[maker], package=package,
                datasheet=DATASHEET[maker].format(doc, "B" if doc % 2 else "C"),
                vrrm_V=vrrm, if_avg_A=if_avg, if_ref_C=if_ref, ifsm_A=ifsm,
                ifsm_ms=ifsm_ms, pd_W=pd, pd_ref_C=25 if pd is not None else None,
                tj_max_C=tj_max, rth_ja_K_per_W=rth, vf_max_V=vf_max,
                vf_max_at_A=vf_max_at, ir_A=ir, ir_vr_V=ir_vr, ir_t_C=25,
                ir_double_K=ir_double, price=price, lifecycle=lifecycle, notes=notes,
            )
            row.update(power_thermal(package, if_avg, tj_max, pd, rth))
            if form == "entered":
                row.update(is_A=is_a, n=n, rs_ohm=rs, model_source="entered")
            else:
                currents = (SIGNAL_POINT_CURRENTS_A if kind == "signal"
                            else [m * if_avg for m in POINT_MULTIPLES])
                volts = np.round(vf_typical(currents, is_a, n, rs), 3)
                row["vf_points"] = ";".join(f"{i:g}:{v:.3f}" for i, v in zip(currents, volts))
            rows.append(row)
    return rows


def main() -> None:
    rows = forward_rows() + zener_rows() + protection_rows()
    numbers = [r["part_number"] for r in rows]
    duplicates = {p for p in numbers if numbers.count(p) > 1}
    if duplicates:
        raise SystemExit(f"duplicate part numbers: {sorted(duplicates)}")
    for r in rows:
        for key, value in r.items():
            if isinstance(value, str) and value[:1] in ("=", "+", "-", "@", "'", "\t", "\r"):
                raise SystemExit(f"{r['part_number']}: text cell {key} starts with {value[0]!r}")
    with OUT.open("w", newline="", encoding="utf-8") as f:
        writer = csv.writer(f, lineterminator="\n")
        writer.writerow(COLUMNS)
        for r in rows:
            writer.writerow([fmt(r.get(c)) for c in COLUMNS])
    print(f"wrote {len(rows)} parts to {OUT}")


if __name__ == "__main__":
    main()
