"""The history database under test: an SQLite file, and a real PostgreSQL server.

PostgreSQL comes from ``LAGAUDIT_TEST_POSTGRES_URL`` (``.ci/run`` starts a throwaway cluster
with ``.ci/postgres`` and sets it); each test gets a database of its own, dropped afterwards.
Without the variable the PostgreSQL cases skip, except under ``CI=true``, where they fail.
"""

import uuid

import psycopg
import pytest
from sqlalchemy.engine import make_url

from postgres_server import postgres_url


@pytest.fixture
def postgres():
    """A fresh, empty PostgreSQL database: its URL (with the server's password)."""
    url = postgres_url()
    name = "lagaudit_test_" + uuid.uuid4().hex[:12]
    with psycopg.connect(url, autocommit=True) as conn:
        conn.execute(f'CREATE DATABASE "{name}"')
    yield make_url(url).set(database=name).render_as_string(hide_password=False)
    with psycopg.connect(url, autocommit=True) as conn:
        conn.execute(f'DROP DATABASE IF EXISTS "{name}" WITH (FORCE)')


@pytest.fixture(params=["sqlite", "postgresql"])
def db(request, tmp_path):
    """A history database that does not exist yet (SQLite) or is empty (PostgreSQL)."""
    if request.param == "sqlite":
        return str(tmp_path / "history.db")
    return request.getfixturevalue("postgres")
