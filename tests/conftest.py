"""Test-wide set-up.

Qt must never try to open a display here: with no platform set, creating a
QApplication without a display aborts the whole pytest process. The platform
is set before anything can import Qt.
"""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")


# -- one library fixture, two backends (SQLite file, PostgreSQL server) ----------------------------------
import pytest  # noqa: E402

POSTGRES_URL = os.environ.get("PARTPICK_TEST_POSTGRES_URL")
NO_SERVER = "PARTPICK_TEST_POSTGRES_URL is not set: no PostgreSQL server to test against"


def clear_server(url: str) -> None:
    """Drop every table of the test database (it must be one the tests may fill and clear)."""
    import sqlalchemy as sa

    engine = sa.create_engine(url)
    try:
        with engine.begin() as connection:
            metadata = sa.MetaData()
            metadata.reflect(connection)
            metadata.drop_all(connection)
    finally:
        engine.dispose()


@pytest.fixture(params=["sqlite", pytest.param("postgresql", marks=pytest.mark.postgres)])
def library_location(request, tmp_path):
    """Where a test's library lives: a new SQLite file, or the (cleared) PostgreSQL test database.

    The PostgreSQL case runs when PARTPICK_TEST_POSTGRES_URL names a database the tests may fill and
    clear (``.ci/run`` starts one); it is skipped with that reason otherwise. A test that works on the
    library's file itself (bytes, side files, permissions) is marked ``sqlite_only``.
    """
    if request.param == "sqlite":
        yield tmp_path / "lib.sqlite"
        return
    if not POSTGRES_URL:
        pytest.skip(NO_SERVER)
    if request.node.get_closest_marker("sqlite_only") or "library_path" in request.fixturenames:
        pytest.skip("works on the library's SQLite file itself")
    clear_server(POSTGRES_URL)
    yield POSTGRES_URL
    clear_server(POSTGRES_URL)
