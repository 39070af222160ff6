"""The toy model family is a module for the registry tests to import, not a test module.

Collecting it (for doctests) would import it, and importing registers the toy for the
whole run; ``tests/models/test_registry.py`` registers it only while its tests run.
"""

collect_ignore = ["toy_power_law.py"]
