"""Stewardship: review queues, decisions that outrank every run, the edge history, decision sheets, the page.

Library first: `queues.review_queue`, `decisions.apply_decisions`, `events.record_machine_edges` and
`events.edge_history`, `bulk.write_sheet` / `bulk.import_sheet`, `gate.DecisionGate` (wait-or-queue writes), and
`web.app.create_app`; `commands.py` is the thin CLI over them.
"""
