"""Connection settings and connection errors for the Neo4j engine (no driver import at module level).

Settings come from `--neo4j URI` and the environment; the password is read from the environment only and never
appears in a message, a log line or `Neo4jStore.location`.

    >>> s = Neo4jSettings.from_uri("neo4j://graph.example:7687", env={"GRAFTWORK_NEO4J_PASSWORD": "x" * 8})
    >>> s.uri, s.user, s.database
    ('neo4j://graph.example:7687', 'neo4j', None)
    >>> "x" * 8 in repr(s)
    False
"""

from __future__ import annotations

import os
import re
from collections.abc import Mapping
from dataclasses import dataclass, field
from urllib.parse import unquote, urlsplit, urlunsplit

from pipeline.errors import BadInput, GraftworkError, Problem

SCHEMES = ("bolt", "bolt+s", "bolt+ssc", "neo4j", "neo4j+s", "neo4j+ssc")
ENV_USER = "GRAFTWORK_NEO4J_USER"
ENV_PASSWORD = "GRAFTWORK_NEO4J_PASSWORD"
ENV_DATABASE = "GRAFTWORK_NEO4J_DATABASE"


class StoreUnavailable(GraftworkError):
    """The Neo4j server could not be reached (wrong address, server down, network); worth retrying later."""

    exit_code = 1


class StoreAuthFailed(GraftworkError):
    """The server refused the user name or password."""

    exit_code = 2


class UnsupportedServer(GraftworkError):
    """The server is a Neo4j version (or edition) graftwork does not run on."""

    exit_code = 2


@dataclass(frozen=True)
class Neo4jSettings:
    uri: str                      # without any user:password@ part
    user: str
    password: str | None = field(repr=False)
    database: str | None = None   # None: the server's default database

    @classmethod
    def from_uri(cls, uri: str, *, env: Mapping[str, str] | None = None) -> Neo4jSettings:
        """Parse `--neo4j URI`; user/password/database from the environment (a user in the URI is accepted,
        a password in the URI too, but the environment wins so shells need not hold it in history)."""
        env = os.environ if env is None else env
        parts = urlsplit(uri.strip())
        if parts.scheme not in SCHEMES or not parts.hostname:
            raise BadInput(Problem(
                f"not a Neo4j address: expected {'|'.join(SCHEMES)}://HOST[:PORT], e.g. bolt://127.0.0.1:7687",
                field="--neo4j"))
        netloc = parts.hostname if ":" not in parts.hostname else f"[{parts.hostname}]"
        try:
            port = parts.port
        except ValueError:
            raise BadInput(Problem("the port in the Neo4j address is not a number", field="--neo4j")) from None
        if port:
            netloc += f":{port}"
        path = parts.path.strip("/")
        database = env.get(ENV_DATABASE) or (path or None)
        if database and not re.fullmatch(r"[A-Za-z][A-Za-z0-9.\-]{0,62}", database):
            raise BadInput(Problem(f"not a Neo4j database name: {database!r}", field=ENV_DATABASE))
        user = env.get(ENV_USER) or (unquote(parts.username) if parts.username else "neo4j")
        password = env.get(ENV_PASSWORD) or (unquote(parts.password) if parts.password else None)
        clean = urlunsplit((parts.scheme, netloc, "", parts.query, ""))
        return cls(uri=clean, user=user, password=password, database=database)

    @property
    def location(self) -> str:
        return self.uri + (f"/{self.database}" if self.database else "")


def translate_connect_error(settings: Neo4jSettings, exc: Exception) -> GraftworkError:
    """Turn a driver error raised while connecting into one of ours, with a message that names what to fix."""
    from neo4j import exceptions as nx

    where = settings.location
    if isinstance(exc, nx.AuthError):
        hint = f"set {ENV_PASSWORD}" if settings.password is None else f"check {ENV_USER} / {ENV_PASSWORD}"
        return StoreAuthFailed(f"{where}: the server refused user {settings.user!r} (wrong user or password; {hint})")
    if isinstance(exc, nx.ServiceUnavailable | OSError):
        return StoreUnavailable(f"{where}: cannot reach a Neo4j server there ({_first_line(exc)}); is it running, "
                                "and is the address and port right?")
    if isinstance(exc, nx.ConfigurationError):
        return BadInput(Problem(f"{where}: {_first_line(exc)}", field="--neo4j"))
    if isinstance(exc, nx.ClientError) and "database" in str(exc).lower():
        return BadInput(Problem(f"{where}: {_first_line(exc)}", field=ENV_DATABASE))
    return StoreUnavailable(f"{where}: {type(exc).__name__}: {_first_line(exc)}")


def check_server_version(where: str, agent: str, version: str, edition: str) -> tuple[int, int]:
    """Accept Neo4j 5.x and the calendar-versioned releases after it (2025.01 on); refuse 4.x and older.

    >>> check_server_version("x", "Neo4j/5.26.3", "5.26.3", "community")
    (5, 26)
    """
    m = re.match(r"(\d+)\.(\d+)", version or "")
    if not m:
        raise UnsupportedServer(f"{where}: cannot tell the server's version ({agent!r}); graftwork needs Neo4j 5")
    major, minor = int(m.group(1)), int(m.group(2))
    if major < 5:
        raise UnsupportedServer(f"{where}: Neo4j {version} ({edition}) is too old; graftwork needs Neo4j 5.x "
                                "(5.26 LTS recommended) or a 2025+ release")
    return major, minor


def supports_vector_index(major: int, minor: int) -> bool:
    """A vector index without a fixed dimension (what schema creation uses) needs 5.23 or later."""
    return major > 5 or (major == 5 and minor >= 23)


def _first_line(exc: Exception) -> str:
    text = " ".join(line.strip() for line in str(exc).strip().splitlines() if line.strip())
    return text[:300] or type(exc).__name__
