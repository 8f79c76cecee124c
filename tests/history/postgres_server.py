"""Where the history tests find their PostgreSQL server: ``LAGAUDIT_TEST_POSTGRES_URL``."""

import os

import pytest

PG_ENV = "LAGAUDIT_TEST_POSTGRES_URL"


def postgres_url() -> str:
    url = os.environ.get(PG_ENV)
    if not url:
        if os.environ.get("CI") == "true":
            pytest.fail(f"CI=true but {PG_ENV} is not set: .ci/run starts a PostgreSQL cluster for these tests")
        pytest.skip(f"{PG_ENV} is not set (start a server with: .ci/postgres start DIR)")
    return url
