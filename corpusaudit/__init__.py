"""corpusaudit: audit the figures of a whole corpus of documents against chart practice."""

import sys

__version__ = "0.1.0"

# PyMuPDF 2 imports its optional layout analyser when installed (it comes with it), which
# loads ONNX models: about 1.5 s and 55 MiB in every process, for page layout analysis this
# tool never asks for. A None entry makes that import fail, which PyMuPDF treats as absent.
if "pymupdf" not in sys.modules:
    sys.modules.setdefault("pymupdf.layout", None)
