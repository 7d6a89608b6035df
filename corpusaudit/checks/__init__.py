"""Check families. Each module registers its rules on import; the list is explicit on purpose."""

from corpusaudit.checks import quality  # noqa: F401
from corpusaudit.checks import bar, box, line, pie, scatter  # noqa: F401,E402
from corpusaudit.checks import colour, legend, text  # noqa: F401,E402

FAMILY_MODULES = ("quality", "bar", "box", "line", "legend", "pie", "scatter", "colour", "text")
