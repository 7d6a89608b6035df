"""Check families. Each module registers its rules on import; the list is explicit on purpose."""

from corpusaudit.checks import quality  # noqa: F401

FAMILY_MODULES = ("quality",)
