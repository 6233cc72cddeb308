"""Schema versions: recognise a partpick library, refuse what is not one, migrate older ones.

Opening a location goes through `prepare_database` first:

- a file that is not SQLite, or a database without partpick's ``schema_version``
  row, is refused with `LibraryError` and left untouched (the probe opens it
  without any set-up that writes, e.g. no WAL switch);
- a library written by a newer partpick is refused;
- an older library is copied next to itself once per old version
  (``NAME.backup-vN``, with the SQLite backup API so a live WAL is included; an
  existing backup of that version is kept, not repeated) and then migrated step
  by step, all steps in one transaction; the note says where the backup is.

A migration step is a function ``step(operations)`` receiving alembic's
`Operations` bound to the open transaction (portable ALTER TABLE, SQLite
batch mode included); register it in `MIGRATIONS` under the version it
upgrades from.
"""

from __future__ import annotations

import sqlite3
from collections.abc import Callable
from pathlib import Path

from sqlalchemy import create_engine, exc, inspect, insert, select, update
from sqlalchemy.engine import URL, Engine

from partpick.errors import LibraryError
from partpick.library import models
from partpick.library.db import one_line, sqlite_path

__all__ = ["MIGRATIONS", "SQLITE_MAGIC", "probe_version", "prepare_database", "backup_sqlite", "backup_path"]

SQLITE_MAGIC = b"SQLite format 3\x00"

# MIGRATIONS[k] upgrades a library from schema k to k + 1.
MIGRATIONS: dict[int, Callable] = {}

# Schema 2 added these part columns (thermal path, bridge and TVS data, hot leakage, VRSM).
_SCHEMA2_COLUMNS = (
    "pd_ref_point", "if_ref_point", "rth_jc_K_per_W", "rth_jl_K_per_W", "rth_ja_area_mm2",
    "rth_ja_large_K_per_W", "rth_ja_large_area_mm2", "tau_th_s", "ifrm_A", "trr_s", "qrr_C", "junction",
    "vwm_V", "vbr_min_V", "vbr_max_V", "it_A", "vc_V", "ipp_A", "ppp_W", "ppp_waveform", "ppp2_W",
    "ppp2_waveform", "bidirectional", "vbr_tc_pct_per_K", "ir_hot_A", "ir_hot_t_C", "vrsm_V",
)
_SCHEMA2_CHOICES = ("pd_ref_point", "if_ref_point", "junction", "bidirectional")


def _add_schema2_columns(operations) -> None:
    import sqlalchemy as sa

    table = models.Part.__table__
    # SQLite cannot add a CHECK constraint in place: batch mode rebuilds the table.
    with operations.batch_alter_table("part") as batch:
        for name in _SCHEMA2_COLUMNS:
            batch.add_column(sa.Column(name, table.c[name].type, nullable=True))
    # The new kinds (bridge, tvs) widen the kind constraint; the choice columns get theirs.
    with operations.batch_alter_table("part") as batch:
        batch.drop_constraint("ck_part_kind", type_="check")
        batch.create_check_constraint("ck_part_kind", _constraint_text("kind"))
        for name in _SCHEMA2_CHOICES:
            batch.create_check_constraint(f"ck_part_{name}", _constraint_text(name))


def _constraint_text(name: str) -> str:
    for constraint in models.Part.__table__.constraints:
        if getattr(constraint, "name", None) in (name, f"ck_part_{name}"):
            return str(constraint.sqltext)
    raise LookupError(name)


MIGRATIONS[1] = _add_schema2_columns


def _check_sqlite_file(path: Path, location: str) -> None:
    if path.is_dir():
        raise LibraryError(f"{location} is a folder, not a partpick library")
    try:
        with open(path, "rb") as handle:
            header = handle.read(len(SQLITE_MAGIC))
    except OSError as error:
        raise LibraryError(f"cannot read library {location}: {error.strerror or error}") from error
    if header != SQLITE_MAGIC:
        raise LibraryError(f"{location} is not a partpick library (not an SQLite database file); left untouched")


def probe_version(url: URL, location: str, *, read_only: bool = False) -> int | None:
    """The schema version of the library at ``url``; None for an empty database.

    Raises
    ------
    LibraryError
        The database has tables but is not a partpick library, or cannot be read.
    """
    if read_only and sqlite_path(url) is not None:
        from partpick.library.db import sqlite_read_only_connect

        path = sqlite_path(url)
        engine = create_engine(url, creator=lambda: sqlite_read_only_connect(path))
    else:
        engine = create_engine(url)
    try:
        with engine.connect() as connection:
            if url.get_backend_name() == "sqlite":
                connection.exec_driver_sql("PRAGMA query_only = ON")
            tables = set(inspect(connection).get_table_names())
            if not tables:
                return None
            if models.SchemaVersion.__tablename__ not in tables:
                raise LibraryError(f"{location} is not a partpick library (no schema version record); left untouched")
            table = models.SchemaVersion.__table__
            rows = connection.execute(select(table.c.application, table.c.version)).all()
    except exc.DBAPIError as error:
        text = one_line(error.orig if error.orig is not None else error)
        if "not a database" in text or "malformed" in text:
            raise LibraryError(f"{location} is not a partpick library ({text}); left untouched") from error
        if "locked" in text or "busy" in text:
            raise LibraryError(f"library {location} is busy: another program is writing to it; try again") from error
        raise LibraryError(f"cannot read library {location}: {text}") from error
    finally:
        engine.dispose()
    if len(rows) != 1 or rows[0].application != models.APPLICATION:
        raise LibraryError(f"{location} is not a partpick library (no partpick schema version record); left untouched")
    return int(rows[0].version)


def backup_path(path: Path, version: int) -> Path:
    """Where the backup of ``path`` at schema ``version`` goes: ``NAME.backup-v<version>`` beside it."""
    return path.with_name(f"{path.name}.backup-v{version}")


def backup_sqlite(path: Path, version: int) -> tuple[Path, bool]:
    """Copy a SQLite library next to itself before a migration; (the copy's path, made now).

    One backup per old version: when ``NAME.backup-v<version>`` exists already
    (an earlier attempt that failed and rolled back), it is kept as it is and
    no second copy is made. The copy is written to a temporary file and renamed,
    so an interrupted backup leaves no partial file under the backup's name.
    """
    target = backup_path(path, version)
    if target.exists():
        return target, False
    temporary = target.with_name(f".{target.name}.partpick-tmp")
    source = sqlite3.connect(path)
    try:
        destination = sqlite3.connect(temporary)
        try:
            source.backup(destination)
        finally:
            destination.close()
        temporary.replace(target)
    except (sqlite3.Error, OSError) as error:
        temporary.unlink(missing_ok=True)
        raise LibraryError(f"cannot back up {path} before migrating it: {error}; left untouched") from error
    finally:
        source.close()
    return target, True


def _create_schema(engine: Engine) -> None:
    with engine.execution_options(partpick_write=True).begin() as connection:
        models.Base.metadata.create_all(connection)
        connection.execute(
            insert(models.SchemaVersion.__table__).values(
                id=1, application=models.APPLICATION, version=models.SCHEMA_VERSION
            )
        )


def _migrate(engine: Engine, version: int) -> None:
    from alembic.migration import MigrationContext
    from alembic.operations import Operations

    sqlite = engine.url.get_backend_name() == "sqlite"
    with engine.execution_options(partpick_write=True).connect() as connection:
        if sqlite:
            # A batch step rebuilds a table (copy, drop, rename); with foreign keys on, dropping
            # `part` would cascade-delete every VF point. The pragma works only outside a transaction.
            connection.connection.dbapi_connection.execute("PRAGMA foreign_keys = OFF")
        try:
            with connection.begin():
                operations = Operations(MigrationContext.configure(connection))
                for step_from in range(version, models.SCHEMA_VERSION):
                    step = MIGRATIONS.get(step_from)
                    if step is None:
                        raise LibraryError(f"no migration from library schema {step_from} to {step_from + 1}")
                    step(operations)
                if sqlite and connection.exec_driver_sql("PRAGMA foreign_key_check").first() is not None:
                    raise LibraryError("a migration step left VF points without their part")
                table = models.SchemaVersion.__table__
                connection.execute(update(table).values(version=models.SCHEMA_VERSION))
        finally:
            if sqlite:
                connection.connection.dbapi_connection.execute("PRAGMA foreign_keys = ON")


def prepare_database(url: URL, location: str, engine: Engine, *, create: bool, read_only: bool = False) -> str | None:
    """Make the database at ``url`` a usable library of the current schema.

    Parameters
    ----------
    url, location : the database and how the user named it (for messages).
    engine : the library's engine (with its connection set-up), used for writes.
    create : create the tables when the database is new or empty.

    Returns
    -------
    str or None
        A sentence about what was done (``"migrated from schema 1; backup at ..."``), or None.
    """
    path = sqlite_path(url)
    if path is not None:
        if not path.exists():
            if not create:
                raise LibraryError(f"no library at {location} (create one with `partpick library new {location}`)")
            if not path.parent.is_dir():
                raise LibraryError(f"cannot create library {location}: folder {path.parent} does not exist")
        else:
            _check_sqlite_file(path, location)
    version = None if path is not None and not path.exists() else probe_version(url, location, read_only=read_only)
    if version is None:
        if read_only:
            raise LibraryError(f"{location} is an empty database in a read-only place; cannot create a library there")
        if not create:
            raise LibraryError(f"{location} is an empty database, not a partpick library")
        _create_schema(engine)
        return "created a new library"
    if version > models.SCHEMA_VERSION:
        raise LibraryError(
            f"library {location} was written by a newer partpick (schema {version}; this partpick "
            f"reads up to schema {models.SCHEMA_VERSION}); update partpick to open it"
        )
    if version < models.SCHEMA_VERSION and read_only:
        raise LibraryError(
            f"library {location} is read-only and was written by an older partpick (schema {version}); "
            f"it needs migrating to schema {models.SCHEMA_VERSION}: open a writable copy"
        )
    if version < models.SCHEMA_VERSION:
        backup, made = backup_sqlite(path, version) if path is not None else (None, False)
        if backup is None:
            where = ""
        elif made:
            where = f"; backup of the old file at {backup}"
        else:
            where = f"; backup of the old file at {backup} (kept from an earlier attempt, not made again)"
        try:
            _migrate(engine, version)
        except LibraryError:
            raise
        except Exception as error:  # a failed step rolled back with its transaction
            raise LibraryError(
                f"migrating library {location} from schema {version} failed ({error}); "
                f"the library is unchanged{where}"
            ) from error
        return f"migrated library from schema {version} to {models.SCHEMA_VERSION}{where}"
    return None
