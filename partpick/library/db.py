"""The database: declarative base, engine and sessionmaker, in one place.

SQLite is the default (a file per library); any SQLAlchemy URL works
(``postgresql+psycopg://...`` for a team library). Only the connection set-up
below knows which dialect it talks to; the models and queries are portable.

SQLite set-up, per connection: foreign keys on, WAL journal (readers never
block the writer), a busy timeout so that a second writer waits and then gets
a clear "library is busy" instead of an error, and transactions that take the
write lock when they begin (``BEGIN IMMEDIATE``) for writing units of work —
a deferred transaction that upgrades from read to write cannot wait for the
lock and would fail at once.
"""

from __future__ import annotations

import contextlib
import os
import sqlite3
import urllib.parse
from pathlib import Path

from sqlalchemy import MetaData, create_engine, event, exc
from sqlalchemy.engine import URL, Engine, make_url
from sqlalchemy.orm import DeclarativeBase, Session, sessionmaker

from partpick.errors import LibraryError

__all__ = ["Base", "to_url", "sqlite_path", "library_file", "make_engine", "make_sessionmakers", "library_errors", "one_line"]

# Names for constraints, so that migrations can refer to them on every backend.
NAMING_CONVENTION = {
    "ix": "ix_%(column_0_label)s",
    "uq": "uq_%(table_name)s_%(column_0_name)s",
    "ck": "ck_%(table_name)s_%(constraint_name)s",
    "fk": "fk_%(table_name)s_%(column_0_name)s_%(referred_table_name)s",
    "pk": "pk_%(table_name)s",
}

DEFAULT_BUSY_TIMEOUT_S = 5.0


class Base(DeclarativeBase):
    metadata = MetaData(naming_convention=NAMING_CONVENTION)


def to_url(location: str | Path) -> URL:
    """The SQLAlchemy URL of a library location: a file path or a URL."""
    text = str(location)
    if "://" in text:
        try:
            return make_url(text)
        except exc.ArgumentError as error:
            raise LibraryError(f"{text!r} is not a database URL ({error})") from error
    return URL.create("sqlite", database=str(Path(text).expanduser().resolve()))


def sqlite_path(url: URL) -> Path | None:
    """The file of a SQLite URL, or None for a server database or an in-memory one."""
    if url.get_backend_name() != "sqlite":
        return None
    database = url.database or ""
    if database in ("", ":memory:") or database.startswith("file:"):
        return None
    return Path(database)


def library_file(location: str | Path | None) -> Path | None:
    """The file a library location names (None for a server library); ``None`` = the user's own."""
    if location is None:
        from partpick.library.location import user_library_path

        return user_library_path()
    return sqlite_path(to_url(location))


def sqlite_read_only(path: Path) -> bool:
    """True when an existing SQLite library can only be read: a read-only file or folder.

    ``os.access`` asks the kernel, so a read-only mount and an immutable file
    (``chattr +i``) count, and root's permission override is respected.
    """
    if not path.exists():
        return False
    return not os.access(path, os.W_OK) or not os.access(path.parent, os.W_OK | os.X_OK)


def sqlite_read_only_connect(path: Path, busy_timeout_s: float = DEFAULT_BUSY_TIMEOUT_S):
    """A read-only sqlite3 connection to ``path`` (URI ``mode=ro``), no journal-mode switch.

    A file that cannot be written, or one in a folder where SQLite cannot create
    the WAL index (``-shm``), is opened ``immutable`` as well: nobody can write
    it there either, and no side file is made.
    """
    folder_writable = os.access(path.parent, os.W_OK | os.X_OK)
    file_writable = os.access(path, os.W_OK)
    shm = path.with_name(path.name + "-shm")
    # A file nobody may write (read-only file, immutable, read-only mount) cannot change under us:
    # immutable reads need no WAL index, so no side file is made beside it.
    immutable = not file_writable or not (folder_writable or shm.exists())
    options = "mode=ro&immutable=1" if immutable else "mode=ro"
    uri = f"file:{urllib.parse.quote(str(path))}?{options}"
    return sqlite3.connect(uri, uri=True, timeout=busy_timeout_s, check_same_thread=False)


def server_read_only(engine: Engine) -> bool:
    """True when the server's role may not write the library (no INSERT/UPDATE/DELETE on ``part``)."""
    if engine.dialect.name != "postgresql":
        return False
    with engine.connect() as connection:
        row = connection.exec_driver_sql(
            "SELECT current_setting('transaction_read_only') = 'on' "
            "OR NOT has_table_privilege(current_user, 'part', 'INSERT') "
            "OR NOT has_table_privilege(current_user, 'part', 'UPDATE') "
            "OR NOT has_table_privilege(current_user, 'part', 'DELETE')"
        ).scalar()
    return bool(row)


# One key for partpick's write lock on a server (any constant works; this one spells "ppck").
_WRITE_LOCK_KEY = 0x7070636B


def _serialise_server_writers(engine: Engine, busy_timeout_s: float) -> None:
    """PostgreSQL: a writing transaction takes partpick's advisory lock first, as SQLite's BEGIN IMMEDIATE does.

    Two imports at once then run one after the other (the second reads what the
    first committed before merging its rows), instead of colliding on a part
    number; readers are never blocked. A writer that waits longer than the busy
    timeout gets "lock timeout", which `library_errors` words as "library is busy".
    """
    busy_ms = int(busy_timeout_s * 1000)

    @event.listens_for(engine, "begin")
    def _on_begin(connection):
        if connection.get_execution_options().get("partpick_write", False):
            connection.exec_driver_sql(f"SET LOCAL lock_timeout = {busy_ms}")
            connection.exec_driver_sql(f"SELECT pg_advisory_xact_lock({_WRITE_LOCK_KEY})")


def make_engine(url: URL, *, busy_timeout_s: float = DEFAULT_BUSY_TIMEOUT_S, read_only: bool = False) -> Engine:
    """An engine for the library at ``url``, set up as described in the module docstring.

    ``read_only`` (SQLite): connections open the file read-only and switch no
    journal mode, so a library in a read-only folder or file can be read.
    """
    if url.get_backend_name() != "sqlite":
        engine = create_engine(url, pool_pre_ping=True)
        if url.get_backend_name() == "postgresql":
            _serialise_server_writers(engine, busy_timeout_s)
        return engine
    if read_only:
        path = sqlite_path(url)
        engine = create_engine(url, creator=lambda: sqlite_read_only_connect(path, busy_timeout_s))
    else:
        engine = create_engine(url, connect_args={"timeout": busy_timeout_s})
    busy_ms = int(busy_timeout_s * 1000)

    @event.listens_for(engine, "connect")
    def _on_connect(dbapi_connection, _record):
        # Let SQLAlchemy, not the sqlite3 module, decide where transactions begin.
        dbapi_connection.isolation_level = None
        cursor = dbapi_connection.cursor()
        try:
            cursor.execute("PRAGMA foreign_keys = ON")
            cursor.execute(f"PRAGMA busy_timeout = {busy_ms}")
            if read_only:
                cursor.execute("PRAGMA query_only = ON")
            else:
                mode = cursor.execute("PRAGMA journal_mode").fetchone()[0]
                if mode.lower() != "wal":
                    cursor.execute("PRAGMA journal_mode = WAL")
        finally:
            cursor.close()

    @event.listens_for(engine, "begin")
    def _on_begin(connection):
        writing = connection.get_execution_options().get("partpick_write", False) and not read_only
        connection.exec_driver_sql("BEGIN IMMEDIATE" if writing else "BEGIN")

    return engine


def make_sessionmakers(engine: Engine) -> tuple[sessionmaker[Session], sessionmaker[Session]]:
    """(reading, writing) sessionmakers; a writing session takes the write lock at its start."""
    reading = sessionmaker(bind=engine, expire_on_commit=False)
    writing = sessionmaker(bind=engine.execution_options(partpick_write=True), expire_on_commit=False)
    return reading, writing


def one_line(text: str) -> str:
    """A driver's message on one line (the CLI prints one line per error)."""
    return " ".join(str(text).split())


@contextlib.contextmanager
def library_errors(location: str, action: str):
    """Turn database failures into `LibraryError` with a message a user can act on."""
    try:
        yield
    except exc.OperationalError as error:
        text = one_line(error.orig if error.orig is not None else error)
        lowered = text.lower()
        if "locked" in lowered or "busy" in lowered or "lock timeout" in lowered:
            raise LibraryError(
                f"library {location} is busy: another program is writing to it; try again in a moment"
            ) from error
        if "readonly" in lowered or "read-only" in lowered:
            raise LibraryError(f"library {location} is read-only: cannot {action}") from error
        raise LibraryError(f"library {location}: cannot {action}: {text}") from error
    except exc.DatabaseError as error:
        text = one_line(error.orig if error.orig is not None else error)
        lowered = text.lower()
        if "permission denied" in lowered or "read-only transaction" in lowered or "readonly" in lowered:
            raise LibraryError(f"library {location} is read-only: cannot {action} ({text})") from error
        raise LibraryError(f"library {location}: cannot {action}: {text}") from error
