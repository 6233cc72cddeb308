"""Tables of a partpick library: parts, their VF points, derating policies, schema version.

Every CSV column of SPEC §5 is a column of ``part`` with the same name and
unit. Numbers are double precision, so a value read back is the value stored.
Adding a field: see DEVELOPERS.md ("Adding a part parameter").
"""

from __future__ import annotations

from typing import Optional

from sqlalchemy import CheckConstraint, Double, ForeignKey, Integer, String, Text, UniqueConstraint
from sqlalchemy.orm import Mapped, mapped_column, relationship

from partpick.library.db import Base
from partpick.library.fields import BOOLEANS, FIELDS_BY_NAME, JUNCTIONS, KINDS, LIFECYCLES, MODEL_SOURCES, REF_POINTS

__all__ = ["SCHEMA_VERSION", "APPLICATION", "Part", "VfPoint", "Policy", "SchemaVersion", "PART_COLUMNS"]

# The schema this partpick writes. Raise it with every change to the tables
# and add the step to partpick.library.migrate.MIGRATIONS.
SCHEMA_VERSION = 2
APPLICATION = "partpick"


def _in(column: str, values: tuple[str, ...]) -> str:
    # A constant list, not user input: the constraint text is fixed at import.
    return f"{column} IN ({', '.join(repr(v) for v in values)})"


def _text(name: str) -> int:
    return FIELDS_BY_NAME[name].max_length


class Part(Base):
    """One part, its ratings and forward / Zener model, in SI units at 25 °C."""

    __tablename__ = "part"
    __table_args__ = (
        CheckConstraint(_in("kind", KINDS), name="kind"),
        CheckConstraint(_in("model_source", MODEL_SOURCES), name="model_source"),
        CheckConstraint(_in("lifecycle", LIFECYCLES), name="lifecycle"),
        CheckConstraint(_in("pd_ref_point", REF_POINTS), name="pd_ref_point"),
        CheckConstraint(_in("if_ref_point", REF_POINTS), name="if_ref_point"),
        CheckConstraint(_in("junction", JUNCTIONS), name="junction"),
        CheckConstraint(_in("bidirectional", BOOLEANS), name="bidirectional"),
    )

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    part_number: Mapped[str] = mapped_column(String(_text("part_number")), unique=True)
    kind: Mapped[str] = mapped_column(String(_text("kind")))
    manufacturer: Mapped[Optional[str]] = mapped_column(String(_text("manufacturer")))
    package: Mapped[Optional[str]] = mapped_column(String(_text("package")))
    datasheet: Mapped[Optional[str]] = mapped_column(String(_text("datasheet")))
    vrrm_V: Mapped[Optional[float]] = mapped_column(Double)
    if_avg_A: Mapped[Optional[float]] = mapped_column(Double)
    if_ref_C: Mapped[Optional[float]] = mapped_column(Double)
    ifsm_A: Mapped[Optional[float]] = mapped_column(Double)
    ifsm_ms: Mapped[Optional[float]] = mapped_column(Double)
    pd_W: Mapped[Optional[float]] = mapped_column(Double)
    pd_ref_C: Mapped[Optional[float]] = mapped_column(Double)
    tj_max_C: Mapped[Optional[float]] = mapped_column(Double)
    rth_ja_K_per_W: Mapped[Optional[float]] = mapped_column(Double)
    is_A: Mapped[Optional[float]] = mapped_column(Double)
    n: Mapped[Optional[float]] = mapped_column(Double)
    rs_ohm: Mapped[Optional[float]] = mapped_column(Double)
    rs_temp_exponent: Mapped[Optional[float]] = mapped_column(Double)
    eg_eV: Mapped[Optional[float]] = mapped_column(Double)
    is_temp_exponent: Mapped[Optional[float]] = mapped_column(Double)
    model_source: Mapped[Optional[str]] = mapped_column(String(_text("model_source")))
    # Largest |model − point| of the fit in mV; None for entered models.
    fit_residual_mV: Mapped[Optional[float]] = mapped_column(Double)
    pd_ref_point: Mapped[Optional[str]] = mapped_column(String(_text("pd_ref_point")))
    if_ref_point: Mapped[Optional[str]] = mapped_column(String(_text("if_ref_point")))
    rth_jc_K_per_W: Mapped[Optional[float]] = mapped_column(Double)
    rth_jl_K_per_W: Mapped[Optional[float]] = mapped_column(Double)
    rth_ja_area_mm2: Mapped[Optional[float]] = mapped_column(Double)
    rth_ja_large_K_per_W: Mapped[Optional[float]] = mapped_column(Double)
    rth_ja_large_area_mm2: Mapped[Optional[float]] = mapped_column(Double)
    tau_th_s: Mapped[Optional[float]] = mapped_column(Double)
    ifrm_A: Mapped[Optional[float]] = mapped_column(Double)
    trr_s: Mapped[Optional[float]] = mapped_column(Double)
    qrr_C: Mapped[Optional[float]] = mapped_column(Double)
    junction: Mapped[Optional[str]] = mapped_column(String(_text("junction")))
    vwm_V: Mapped[Optional[float]] = mapped_column(Double)
    vbr_min_V: Mapped[Optional[float]] = mapped_column(Double)
    vbr_max_V: Mapped[Optional[float]] = mapped_column(Double)
    it_A: Mapped[Optional[float]] = mapped_column(Double)
    vc_V: Mapped[Optional[float]] = mapped_column(Double)
    ipp_A: Mapped[Optional[float]] = mapped_column(Double)
    ppp_W: Mapped[Optional[float]] = mapped_column(Double)
    ppp_waveform: Mapped[Optional[str]] = mapped_column(String(_text("ppp_waveform")))
    ppp2_W: Mapped[Optional[float]] = mapped_column(Double)
    ppp2_waveform: Mapped[Optional[str]] = mapped_column(String(_text("ppp2_waveform")))
    bidirectional: Mapped[Optional[str]] = mapped_column(String(_text("bidirectional")))
    vbr_tc_pct_per_K: Mapped[Optional[float]] = mapped_column(Double)
    vf_max_V: Mapped[Optional[float]] = mapped_column(Double)
    vf_max_at_A: Mapped[Optional[float]] = mapped_column(Double)
    ir_A: Mapped[Optional[float]] = mapped_column(Double)
    ir_vr_V: Mapped[Optional[float]] = mapped_column(Double)
    ir_t_C: Mapped[Optional[float]] = mapped_column(Double)
    ir_hot_A: Mapped[Optional[float]] = mapped_column(Double)
    ir_hot_t_C: Mapped[Optional[float]] = mapped_column(Double)
    ir_double_K: Mapped[Optional[float]] = mapped_column(Double)
    vrsm_V: Mapped[Optional[float]] = mapped_column(Double)
    vz_V: Mapped[Optional[float]] = mapped_column(Double)
    vz_tol_pct: Mapped[Optional[float]] = mapped_column(Double)
    izt_A: Mapped[Optional[float]] = mapped_column(Double)
    zzt_ohm: Mapped[Optional[float]] = mapped_column(Double)
    izk_A: Mapped[Optional[float]] = mapped_column(Double)
    zzk_ohm: Mapped[Optional[float]] = mapped_column(Double)
    vz_tc_pct_per_K: Mapped[Optional[float]] = mapped_column(Double)
    price: Mapped[Optional[float]] = mapped_column(Double)
    lifecycle: Mapped[Optional[str]] = mapped_column(String(_text("lifecycle")))
    notes: Mapped[Optional[str]] = mapped_column(Text)

    vf_points: Mapped[list["VfPoint"]] = relationship(
        back_populates="part", cascade="all, delete-orphan", order_by="VfPoint.seq", passive_deletes=True
    )


class VfPoint(Base):
    """One datasheet forward point (IF, VF) of a part at 25 °C."""

    __tablename__ = "vf_point"
    __table_args__ = (UniqueConstraint("part_id", "seq"),)

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    part_id: Mapped[int] = mapped_column(ForeignKey("part.id", ondelete="CASCADE"), index=True)
    seq: Mapped[int] = mapped_column(Integer)
    current_A: Mapped[float] = mapped_column(Double)
    voltage_V: Mapped[float] = mapped_column(Double)

    part: Mapped[Part] = relationship(back_populates="vf_points")


class Policy(Base):
    """A named derating policy; ``body`` is the policy's dict as JSON text."""

    __tablename__ = "policy"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    name: Mapped[str] = mapped_column(String(64), unique=True)
    body: Mapped[str] = mapped_column(Text)


class SchemaVersion(Base):
    """One row that says this database is a partpick library and which schema it has."""

    __tablename__ = "schema_version"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    application: Mapped[str] = mapped_column(String(32))
    version: Mapped[int] = mapped_column(Integer)


# Part columns as stored, in CSV order, then the read-only extra.
PART_COLUMNS: tuple[str, ...] = tuple(
    name for name in (c.name for c in Part.__table__.columns) if name != "id"
)
