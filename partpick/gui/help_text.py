"""The Help window's text: what partpick computes, from which published method, and the cautions (SPEC §3, §7)."""

from __future__ import annotations

from html import escape

__all__ = ["CAUTIONS", "FORMULAS", "help_html"]

from partpick.checks.cautions import ALL_CAUTIONS as CAUTIONS  # SPEC §7: general and assumptions

# (topic, formula, source)
FORMULAS = (
    ("Thermal voltage", "VT = k·T / q", "k and q: CODATA values (scipy.constants)."),
    ("Forward branch", "I = Is·(exp((V − I·Rs)/(n·VT)) − 1);  V = n·VT·ln(1 + I/Is) + I·Rs",
     "Shockley diode equation with ideality factor and series resistance."),
    ("Source through a resistor (load line)",
     "I = (n·VT/Rt)·W((Is·Rt/(n·VT))·exp((Vb + Is·Rt)/(n·VT))) − Is,  Rt = R + Rs",
     "Banwell & Jayakumar, Electronics Letters 36(4), 2000; W(e^z) = ω(z), the Wright omega function."),
    ("Saturation current against temperature",
     "Is(T) = Is(T0)·(T/T0)^(m/n)·exp((Eg·q/(n·k))·(1/T0 − 1/T))",
     "Eg 1.11 eV pn, 0.69 eV Schottky; m 3 pn, 2 Schottky (defaults, editable per part)."),
    ("Series resistance against temperature", "Rs(T) = Rs·(T/T0)^x", "x = rs_temp_exponent, default 0."),
    ("Maximum forward voltage", "Is scaled so the curve passes through VF max at its current, 25 °C",
     "Used where the datasheet guarantees VF max above the typical curve."),
    ("Reverse leakage", "IR(Tj) = IR(rated)·2^((Tj − T_rated)/ΔT_double), ∝ VR above the rated VR",
     "Doubling every 10 K by default (common practice)."),
    ("Zener branch", "Vz(Iz, Tj) = Vz·(1 + αVz/100·(Tj − 25 °C)) + ΔV(Iz),  ΔV = ∫ Z dIz",
     "Z = Zzt above Izt; ln Z linear in ln Iz from Zzk (Izk) to Zzt (Izt)."),
    ("Thermal", "Tj = Ta + P·RthJA;  Pallow falls linearly from Pd at pd_ref_C to 0 at Tj max",
     "RthJA = (Tj max − pd_ref_C)/Pd; IF(AV) derated the same way."),
    ("Self-heating", "Tj = Ta + P(Tj)·RthJA solved by Newton per corner", ""),
    ("Reverse runaway", "stable when RthJA·dPR/dTj < 1 at the solution below Tj max", ""),
    ("Hand model at the operating point", "Ron = n·VT/(Iop + Is) + Rs;  Vth0 = Vf(Iop) − Iop·Ron",
     "Tangent to the exact curve at Iop = load max, at the Tj of the worst-drop corner."),
    ("Model fit", "bounded least squares on log Is, n, Rs (1 ≤ n ≤ 4, Rs ≥ 0); refused above 5 mV residual",
     "scipy.optimize.least_squares; two points fit Is and n with Rs = 0."),
    ("Surge", "I²t = Vmax²·C/(2·R) against IFSM²·t/2", "t = ifsm_ms, default 8.3 ms."),
    ("Preferred values", "E12, E24, E48, E96 resistors; power classes 0.125 … 5 W", "IEC 60063."),
    ("Derating policy high_reliability", "reverse ≤ 70 %, current ≤ 50 %, Tj ≤ min(125 °C, Tj max − 40 K), "
     "Zener power ≤ 50 %, resistor power ≤ 50 %",
     "In line with MIL-STD-975M appendix A as transcribed: a cancelled public standard, verify before relying "
     "on it (the 40 K and the resistor limit from memory — verify)."),
)


def help_html() -> str:
    rows = "".join(
        f"<tr><td><b>{escape(topic)}</b></td><td><code>{escape(formula)}</code></td><td>{escape(source)}</td></tr>"
        for topic, formula, source in FORMULAS
    )
    cautions = "".join(f"<li>{escape(c)}</li>" for c in CAUTIONS)
    return (
        "<h2>Cautions</h2>"
        f"<ul>{cautions}</ul>"
        "<h2>What partpick computes</h2>"
        "<p>Every candidate is evaluated at every corner (supply × load × ambient, min and max), cold start and "
        "self-heated, and each check is reported at its worst corner with its margin in its own unit and as a % (of the limit; of the "
        "allowed rise above ambient for temperatures).</p>"
        f"<table cellspacing='0' cellpadding='4' border='1'><tr><th>Topic</th><th>Formula</th><th>Source</th></tr>"
        f"{rows}</table>"
    )
