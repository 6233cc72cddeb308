"""Coil-clamp (flyback) diodes and TVS parts of the example library — INVENTED for the demo.

One more invented maker, Tessary Components, with flyback diodes `TCF<A>-<V>`
(IF(AV) in tenths of an ampere when it starts with 0, e.g. 05 = 0.5 A) and
transient-voltage suppressors `TCT<PPP/100 W>-<VWM><U|B>` (U unidirectional,
B bidirectional). No value is taken from a real datasheet; the numbers are
plausible for each kind so that the example requirements
(`solenoid_valve_24V_*.toml`, `surge_input_24V.toml`) give passing and failing
candidates. `make_parts.py` appends these rows.

Flyback diodes give the model directly (Is, n, Rs at 25 °C, "entered"), the
repetitive peak rating IFRM where the invented datasheet has one, reverse
recovery (trr, Qrr) and the thermal time constant tau_th_s of the pulse model.
TVS parts: stand-off VWM, breakdown VBR min/max at IT, clamping VC at IPP for
the 10/1000 µs rating PPP, some with a second 8/20 µs point, breakdown TC
+0.1 %/K (common practice for avalanche TVS around 30 V, from memory).
"""

from __future__ import annotations

MAKER = "Tessary Components"
DATASHEET = "TSC-{:04d} v{}"

PROTECTION_COLUMNS = ("ifrm_A", "trr_s", "qrr_C", "tau_th_s", "vwm_V", "vbr_min_V", "vbr_max_V", "it_A", "vc_V",
                      "ipp_A", "ppp_W", "ppp_waveform", "ppp2_W", "ppp2_waveform", "bidirectional",
                      "vbr_tc_pct_per_K")

# part, kind, package, doc, VRRM, IF(AV), IFSM [A] (8.3 ms), IFRM [A] (None: not rated),
# trr [s], Qrr [C], Pd [W] or None, RthJA [K/W] or None, Tj max, tau_th [s] (None: not given),
# Is [A], n, Rs [ohm], price, lifecycle, notes
_FLYBACK = (
    ("TCF05-25", "signal", "SOD-123", 701, 25, 0.5, 4, 1.0, 4e-9, 4e-12, 0.4, None, 150, 0.08,
     3e-9, 1.85, 0.35, 0.02, "active", "small flyback diode for relays up to 12 V"),
    ("TCF05-100", "signal", "SOD-123", 702, 100, 0.5, 4, 1.0, 4e-9, 4e-12, 0.4, None, 150, 0.08,
     3e-9, 1.85, 0.35, 0.025, "active", "small flyback diode for relays and small valves"),
    ("TCF1-200", "fast_recovery", "SMA", 711, 200, 1.0, 30, 10.0, 75e-9, 30e-9, None, 75, 150, 0.3,
     5e-9, 1.85, 0.08, 0.05, "active", "fast flyback diode, 75 ns"),
    ("TCF1-600", "rectifier", "SMA", 712, 600, 1.0, 30, None, 2e-6, 2e-6, None, 100, 150, None,
     3e-9, 1.9, 0.07, 0.03, "active", "standard-recovery rectifier used as a coil clamp"),
    ("TCF2-60S", "schottky", "SMB", 721, 60, 2.0, 50, 8.0, None, None, None, 80, 150, 0.4,
     2e-6, 1.15, 0.05, 0.09, "active", "Schottky flyback diode for fast-switched coils"),
    ("TCF3-100", "fast_recovery", "SMC", 731, 100, 3.0, 80, 25.0, 35e-9, 15e-9, None, 50, 150, 0.8,
     1e-8, 1.9, 0.03, 0.14, "active", "fast flyback diode for motor and brake coils"),
)

# part, package, doc, PPP [W] at 10/1000, second point (W, waveform) or None, VWM, VBR min, VBR max,
# IT [A], VC [V], IPP [A], bidirectional, IR [A] at VWM, price, lifecycle, notes
_TVS = (
    ("TCT4-30U", "SMA", 801, 400, None, 30, 33.3, 36.8, 1e-3, 48.4, 8.3, False, 1e-6, 0.07, "active",
     "400 W TVS, 30 V stand-off"),
    ("TCT6-26U", "SMB", 811, 600, (3500, "8/20"), 26, 28.9, 31.9, 1e-3, 42.1, 14.3, False, 1e-6, 0.08, "active",
     "600 W TVS, 26 V stand-off"),
    ("TCT6-30U", "SMB", 812, 600, (3500, "8/20"), 30, 33.3, 36.8, 1e-3, 48.4, 12.4, False, 1e-6, 0.08, "active",
     "600 W TVS, 30 V stand-off"),
    ("TCT6-30B", "SMB", 813, 600, (3500, "8/20"), 30, 33.3, 36.8, 1e-3, 48.4, 12.4, True, 1e-6, 0.09, "active",
     "600 W bidirectional TVS, 30 V stand-off"),
    ("TCT6-33U", "SMB", 814, 600, (3500, "8/20"), 33, 36.7, 40.6, 1e-3, 53.3, 11.3, False, 1e-6, 0.08, "nrnd",
     "600 W TVS, 33 V stand-off"),
    ("TCT15-30U", "SMC", 821, 1500, (9000, "8/20"), 30, 33.3, 36.8, 1e-3, 48.4, 31.0, False, 1e-6, 0.19, "active",
     "1500 W TVS, 30 V stand-off"),
    ("TCT15-36U", "SMC", 822, 1500, (9000, "8/20"), 36, 40.0, 44.2, 1e-3, 58.1, 25.8, False, 1e-6, 0.19, "active",
     "1500 W TVS, 36 V stand-off"),
)


def protection_rows() -> list[dict]:
    """The rows of the invented flyback diodes and TVS parts (keys of the parts CSV)."""
    rows = []
    for (pn, kind, package, doc, vrrm, if_avg, ifsm, ifrm, trr, qrr, pd, rth, tj_max, tau, is_a, n, rs, price,
         lifecycle, notes) in _FLYBACK:
        rows.append(dict(
            part_number=pn, kind=kind, manufacturer=MAKER, package=package,
            datasheet=DATASHEET.format(doc, 2), vrrm_V=vrrm, if_avg_A=if_avg, if_ref_C=25, ifsm_A=ifsm,
            ifsm_ms=8.3, ifrm_A=ifrm, trr_s=trr, qrr_C=qrr, pd_W=pd, pd_ref_C=25 if pd is not None else None,
            rth_ja_K_per_W=rth, tj_max_C=tj_max, tau_th_s=tau, is_A=is_a, n=n, rs_ohm=rs, model_source="entered",
            ir_A=2e-4 if kind == "schottky" else 1e-6, ir_vr_V=vrrm, ir_t_C=25,
            price=price, lifecycle=lifecycle, notes=notes,
        ))
    for (pn, package, doc, ppp, second, vwm, vbr_min, vbr_max, it, vc, ipp, bidirectional, ir, price, lifecycle,
         notes) in _TVS:
        row = dict(
            part_number=pn, kind="tvs", manufacturer=MAKER, package=package, datasheet=DATASHEET.format(doc, 1),
            vwm_V=vwm, vbr_min_V=vbr_min, vbr_max_V=vbr_max, it_A=it, vc_V=vc, ipp_A=ipp, ppp_W=ppp,
            ppp_waveform="10/1000", bidirectional="true" if bidirectional else "false", vbr_tc_pct_per_K=0.1,
            ir_A=ir, ir_vr_V=vwm, ir_t_C=25, tj_max_C=150, price=price, lifecycle=lifecycle, notes=notes,
        )
        if second is not None:
            row.update(ppp2_W=second[0], ppp2_waveform=second[1])
        rows.append(row)
    return rows
