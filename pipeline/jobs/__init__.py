"""Jobs: whole-pipeline runs (demo, nightly) and the run ledger."""
