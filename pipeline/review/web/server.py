"""Run the review page with waitress (a pure-Python WSGI server): localhost by default, a token for other binds."""

from __future__ import annotations

import ipaddress
import logging
import secrets
import threading
from pathlib import Path

from waitress.server import create_server

from pipeline.errors import StoreLocked
from pipeline.review.web.app import create_app

log = logging.getLogger(__name__)
FLUSH_EVERY = 5.0  # seconds between tries to apply decisions queued while the store was busy


def is_loopback(host: str) -> bool:
    if host == "localhost":
        return True
    try:
        return ipaddress.ip_address(host).is_loopback
    except ValueError:
        return False


def make_server(store_path: str | Path, *, host: str = "127.0.0.1", port: int = 8765, token: str | None = None,
                by: str | None = None, reference: str | None = None, write_wait: float = 5.0):
    """A ready server (not yet running) and its app; port 0 picks a free port (`server.effective_port`)."""
    if not Path(store_path).exists():
        from pipeline.errors import NotAStore

        raise NotAStore(f"{store_path}: no graftwork store here (run an ingest first, or check --store)")
    local = is_loopback(host)
    app = create_app(store_path, token=token or secrets.token_urlsafe(24), require_token=not local, by=by,
                     reference=reference, write_wait=write_wait)
    server = create_server(app, host=host, port=port, threads=4, ident="graftwork")
    return server, app


def start_flusher(app, stop: threading.Event) -> threading.Thread:
    """Apply queued decisions as soon as the store is free again (the job that held it has finished)."""
    gate = app.extensions["graftwork_gate"]

    def loop():
        while not stop.wait(FLUSH_EVERY):
            if not gate.pending():
                continue
            try:
                done = gate.flush()
                log.info("applied %s queued decisions", done["applied"])
            except StoreLocked:
                continue
            except Exception:  # keep serving; the queue file keeps the decisions
                log.exception("could not apply queued decisions")

    t = threading.Thread(target=loop, name="graftwork-flush", daemon=True)
    t.start()
    return t


def serve_forever(store_path: str | Path, *, host: str = "127.0.0.1", port: int = 8765, token: str | None = None,
                  by: str | None = None, reference: str | None = None) -> None:
    server, app = make_server(store_path, host=host, port=port, token=token, by=by, reference=reference)
    stop = threading.Event()
    start_flusher(app, stop)
    url = f"http://{host if ':' not in host else '[' + host + ']'}:{server.effective_port}/"
    print(f"graftwork review page for {store_path}, deciding as {app.config['DECIDER']}", flush=True)
    if app.config["REQUIRE_TOKEN"]:
        print(f"  open {url}?token={app.config['TOKEN']}", flush=True)
        print(f"  token: {app.config['TOKEN']}", flush=True)
    else:
        print(f"  open {url}", flush=True)
    print("  stop with Ctrl-C", flush=True)
    try:
        server.run()
    finally:
        stop.set()
        server.close()
