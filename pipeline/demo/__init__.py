"""The invented demo scenario: a home-and-garden marketplace, its reference hierarchy and three suppliers.

Imports are lazy so that `python -m pipeline.demo.scenario` does not load the module twice.
"""

from __future__ import annotations

__all__ = ["ScenarioFiles", "generate_scenario", "scenario_present"]


def __getattr__(name: str):
    if name in __all__:
        from pipeline.demo import scenario

        return getattr(scenario, name)
    raise AttributeError(f"module 'pipeline.demo' has no attribute {name!r}")
