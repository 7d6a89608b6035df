"""corpusaudit: audit the figures of a whole corpus of documents against chart practice."""

__version__ = "0.1.0"
