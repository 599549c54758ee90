"""Engine fixtures: store-facing tests run on the embedded engine and, marked `neo4j`, on a real Neo4j server.

The Neo4j server is found through GRAFTWORK_TEST_NEO4J_URI (with GRAFTWORK_TEST_NEO4J_USER, default `neo4j`, and
GRAFTWORK_TEST_NEO4J_PASSWORD); `.ci/run` starts one from tests/neo4j_launcher/ and sets them. Without the
variable, the `testcontainers` package and a Docker engine are tried; otherwise the tests skip and say how to run
them, unless GRAFTWORK_TEST_NEO4J_REQUIRED=1 (CI), where a missing server is an error.

Every Neo4j test starts from an empty database (Community has a single user database, so isolation is by wiping).
"""

from __future__ import annotations

import os
import secrets
import shutil
import subprocess
from dataclasses import dataclass
from pathlib import Path

import pytest

NEO4J = pytest.param("neo4j", marks=pytest.mark.neo4j)
ENGINES = ["ladybug", NEO4J]
HOW_TO = ("no Neo4j server for the `-m neo4j` tests: start one (`bash tests/neo4j_launcher/start.sh`, or "
          "`docker compose up -d neo4j`) and set GRAFTWORK_TEST_NEO4J_URI=bolt://127.0.0.1:7687 and "
          "GRAFTWORK_TEST_NEO4J_PASSWORD; or install `testcontainers` with a Docker engine running")


@dataclass(frozen=True)
class Neo4jServer:
    uri: str
    user: str
    password: str


@dataclass
class Engine:
    """Where a test's store lives: `cli` is the global option for `graftwork`, `open()` the library call."""

    name: str
    path: str | None = None
    uri: str | None = None

    @property
    def cli(self) -> list[str]:
        return ["--store", self.path] if self.name == "ladybug" else ["--neo4j", self.uri]

    def open(self, *, read_only: bool = False, create: bool = True):
        from pipeline.store import open_store

        return open_store(self.path, neo4j=self.uri, read_only=read_only, create=create)


def _docker_engine_running() -> bool:
    docker = shutil.which("docker")
    if not docker:
        return False
    try:
        return subprocess.run([docker, "info"], capture_output=True, timeout=20).returncode == 0
    except (OSError, subprocess.TimeoutExpired):
        return False


def _missing(reason: str):
    if os.environ.get("GRAFTWORK_TEST_NEO4J_REQUIRED") == "1":
        pytest.fail(f"GRAFTWORK_TEST_NEO4J_REQUIRED=1 but {reason}", pytrace=False)
    pytest.skip(reason)


@pytest.fixture(scope="session")
def neo4j_server():
    """The test server's address and credentials; the CLI's GRAFTWORK_NEO4J_* variables point at it."""
    uri = os.environ.get("GRAFTWORK_TEST_NEO4J_URI")
    container = None
    if uri:
        server = Neo4jServer(uri, os.environ.get("GRAFTWORK_TEST_NEO4J_USER", "neo4j"),
                             os.environ.get("GRAFTWORK_TEST_NEO4J_PASSWORD", ""))
    else:
        try:
            from testcontainers.neo4j import Neo4jContainer
        except ImportError:
            _missing(HOW_TO)
        if not _docker_engine_running():
            _missing(HOW_TO + " (testcontainers is installed, but no Docker engine answers)")
        password = secrets.token_hex(8)
        container = Neo4jContainer("neo4j:5.26-community", password=password)
        container.start()
        server = Neo4jServer(container.get_connection_url(), "neo4j", password)
    mp = pytest.MonkeyPatch()
    mp.setenv("GRAFTWORK_NEO4J_USER", server.user)
    mp.setenv("GRAFTWORK_NEO4J_PASSWORD", server.password)
    mp.delenv("GRAFTWORK_NEO4J_DATABASE", raising=False)
    try:
        yield server
    finally:
        mp.undo()
        if container is not None:
            container.stop()


def _engine(name: str, request, folder: Path) -> Engine:
    if name == "ladybug":
        return Engine("ladybug", path=str(folder / "store.lbug"))
    server = request.getfixturevalue("neo4j_server")
    engine = Engine("neo4j", uri=server.uri)
    wipe_neo4j(engine)
    return engine


def wipe_neo4j(engine: Engine) -> None:
    from pipeline.store.neo4j_store import wipe_database

    wipe_database(engine.uri)


@pytest.fixture(params=ENGINES)
def engine(request, tmp_path) -> Engine:
    """One empty store per test, on each engine."""
    return _engine(request.param, request, tmp_path)


@pytest.fixture(scope="module", params=ENGINES)
def module_engine(request, tmp_path_factory) -> Engine:
    """One empty store per test module and engine (for modules that build a layer once and query it)."""
    return _engine(request.param, request, tmp_path_factory.mktemp(f"store-{request.param}"))


@pytest.fixture()
def neo4j_engine(request) -> Engine:
    """An empty Neo4j store, for tests of what only the Neo4j engine does (mark them neo4j)."""
    return _engine("neo4j", request, Path("."))
