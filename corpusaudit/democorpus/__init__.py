"""Generated demo corpus with known truth: charts with stated defects, placed in invented reports.

charts: ChartSpec -> matplotlib Figure, and the rule ids a spec should trigger.
build: assembles PDFs and image files, writes manifest.csv and truth.json.
"""

from corpusaudit.democorpus.build import build_corpus, build_sample_corpus
from corpusaudit.democorpus.charts import ChartSpec, draw, expected_rules

__all__ = ["ChartSpec", "build_corpus", "build_sample_corpus", "draw", "expected_rules"]
