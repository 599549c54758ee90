"""The review page: server-rendered HTML (Flask + Jinja) with a little vanilla JavaScript; no build step.

Reads open the store read-only for each request (a nightly job can write meanwhile). Decisions go through the
same library functions as the CLI, via `DecisionGate`: they wait briefly for the single-writer lock, else they
are queued beside the store and applied when it is free.

Every write needs the page's token in the `X-Review-Token` header (a page from another site cannot send it);
with `require_token` (any non-local bind) every page needs it too, once, as `?token=...` (kept in a cookie).
"""

from __future__ import annotations

import hmac
import secrets
from pathlib import Path

from flask import Flask, abort, jsonify, redirect, render_template, request, url_for

from pipeline.errors import GraftworkError, StoreLocked
from pipeline.review.decisions import ACTIONS, Decision, pick_reference, who
from pipeline.review.events import edge_history
from pipeline.review.gate import DecisionGate
from pipeline.review.queues import QUEUES, ReviewSnapshot, candidate_dicts, queue_counts, review_queue
from pipeline.review.search import search_concepts
from pipeline.review.tree import ConceptTree
from pipeline.store import open_store

COOKIE = "graftwork_review_token"
HERE = Path(__file__).resolve().parent


def create_app(store_path: str | Path, *, token: str | None = None, require_token: bool = False,
               by: str | None = None, reference: str | None = None, write_wait: float = 5.0) -> Flask:
    app = Flask("graftwork_review", template_folder=str(HERE / "templates"), static_folder=str(HERE / "static"))
    app.config.update(STORE=str(store_path), TOKEN=token or secrets.token_urlsafe(24), REQUIRE_TOKEN=require_token,
                      DECIDER=who(by), REFERENCE=reference, WRITE_WAIT=write_wait)
    gate = DecisionGate(store_path, reference=reference)
    app.extensions["graftwork_gate"] = gate

    def read_store():
        return open_store(app.config["STORE"], read_only=True)

    def token_ok(given: str | None) -> bool:
        return bool(given) and hmac.compare_digest(given, app.config["TOKEN"])

    @app.before_request
    def guard():
        if not app.config["REQUIRE_TOKEN"] or request.endpoint == "static":
            return None
        given = request.args.get("token") or request.cookies.get(COOKIE) or request.headers.get("X-Review-Token")
        if not token_ok(given):
            abort(401)
        return None

    @app.after_request
    def remember(resp):
        if app.config["REQUIRE_TOKEN"] and token_ok(request.args.get("token")):
            resp.set_cookie(COOKIE, app.config["TOKEN"], httponly=True, samesite="Strict")
        resp.headers.setdefault("X-Frame-Options", "DENY")
        resp.headers.setdefault("Cache-Control", "no-store")
        return resp

    @app.context_processor
    def common():
        return {"queues": QUEUES, "token": app.config["TOKEN"], "decider": app.config["DECIDER"],
                "pending": len(gate.pending())}

    @app.errorhandler(GraftworkError)
    def graftwork_error(exc):
        # a job writing the embedded store keeps readers out too: "try again shortly", not "bad request"
        status, headers = (503, {"Retry-After": "30"}) if isinstance(exc, StoreLocked) else (400, {})
        if request.path.startswith("/api/"):
            return jsonify({"error": str(exc)}), status, headers
        return render_template("error.html", message=str(exc)), status, headers

    @app.get("/")
    def index():
        return redirect(url_for("queue", name="uncertain"))

    @app.get("/queue/<name>")
    def queue(name: str):
        if name not in QUEUES:
            abort(404)
        sources = [s for s in request.args.getlist("source") if s]
        text = (request.args.get("q") or "").strip().casefold()
        limit = request.args.get("limit", type=int) or 100
        with read_store() as store:
            snap = ReviewSnapshot(store, sources=sources, reference=app.config["REFERENCE"])
            counts = queue_counts(snap)
            entries = review_queue(store, name, limit=None, snapshot=snap)
            all_sources = sorted({c["source"] for c in snap.categories.values()})
        if text:
            entries = [e for e in entries if text in e.path.casefold() or text in e.code.casefold()
                       or any(text in t.casefold() for t in e.titles)]
        total = len(entries)
        return render_template("queue.html", name=name, entries=entries[:limit], total=total, counts=counts,
                               sources=all_sources, chosen=sources, q=request.args.get("q", ""), limit=limit)

    @app.get("/category")
    def category():
        uid = request.args.get("uid", "")
        qname = request.args.get("queue", "")
        with read_store() as store:
            reference = pick_reference(store, app.config["REFERENCE"])
            cat = store.rows("review_category_get", uid=uid)
            if not cat:
                abort(404)
            cat = cat[0]
            cands = candidate_dicts(store.rows("review_category_candidates", category=uid, reference=reference),
                                    include_rejected=True)
            items = store.rows("review_category_items", uid=uid, limit=25)
            n_items = int(store.scalar("review_category_item_count", uid=uid) or 0)
            tree = ConceptTree.load(store, reference)
            history = edge_history(store, uid).to_dict("records")
            reasons, next_uid = [], None
            if qname in QUEUES:
                snap = ReviewSnapshot(store, reference=reference)
                found = snap.reasons(qname)
                reasons = found.get(uid, [])
                order = [e.uid for e in review_queue(store, qname, limit=None, snapshot=snap)]
                later = order[order.index(uid) + 1:] if uid in order else order
                next_uid = later[0] if later else None
        for c in cands:
            c["around"] = tree.neighbourhood(c["concept_uid"]) if c["concept_uid"] in tree else None
        return render_template("category.html", cat=cat, cands=cands, items=items, n_items=n_items,
                               history=history, reasons=reasons, qname=qname, next_uid=next_uid)

    @app.get("/concept")
    def concept():
        uid = request.args.get("uid", "")
        with read_store() as store:
            reference = pick_reference(store, app.config["REFERENCE"])
            tree = ConceptTree.load(store, reference)
            if uid not in tree:
                abort(404)
            mapped = store.rows("review_concept_mapped", uid=uid)
        return render_template("concept.html", node=tree.nodes[uid], around=tree.neighbourhood(uid), mapped=mapped)

    @app.get("/search")
    def search():
        q = request.args.get("q", "")
        with read_store() as store:
            tree = ConceptTree.load(store, pick_reference(store, app.config["REFERENCE"]))
        return render_template("search.html", q=q, hits=search_concepts(tree, q, limit=50))

    @app.get("/api/concepts")
    def api_concepts():
        q = request.args.get("q", "")
        with read_store() as store:
            tree = ConceptTree.load(store, pick_reference(store, app.config["REFERENCE"]))
        return jsonify([{"uid": n.uid, "code": n.code, "label": n.label, "path": n.path}
                        for n in search_concepts(tree, q, limit=15)])

    @app.post("/api/decide")
    def api_decide():
        if not token_ok(request.headers.get("X-Review-Token")):
            abort(403)
        body = request.get_json(silent=True) or {}
        action = body.get("action", "")
        if action not in ACTIONS:
            return jsonify({"error": f"unknown action {action!r}"}), 400
        d = Decision(action=action, source=str(body.get("source", "")), category=str(body.get("category", "")),
                     concept=str(body.get("concept", "") or ""), note=str(body.get("note", "") or "")[:2000],
                     by=app.config["DECIDER"])
        summary = gate.submit([d], wait=app.config["WRITE_WAIT"])
        if summary["status"] == "queued":
            return jsonify({"status": "queued", "message": summary["message"]}), 202
        return jsonify({"status": "applied", "changes": summary["decisions"][0]["changes"] if summary["decisions"]
                        else [], "message": f"{action} stored"})

    return app
