"""The same per-document task on an existing Dask cluster (optional extra corpusaudit[dask]).

Workers return results (figure images as bytes included); the client writes them to the
store, so outputs equal those of the local executor. Time and memory limits are the
cluster's own (dask worker settings).
"""

from __future__ import annotations

from typing import Iterator

from corpusaudit.config import Config
from corpusaudit.model import Document


class DaskUnavailable(RuntimeError):
    pass


def run_on_dask(docs: list[Document], config: Config, scheduler: str, strict: bool) -> Iterator:
    try:
        from dask.distributed import Client, as_completed
    except ImportError as exc:
        raise DaskUnavailable("the dask executor needs `pip install corpusaudit[dask]`") from exc
    from corpusaudit.run import DocumentResult, process_task

    if not scheduler:
        raise DaskUnavailable("--executor dask needs --scheduler ADDRESS")
    with Client(scheduler) as client:
        futures = {client.submit(process_task, (doc, config, strict), pure=False): doc for doc in docs}
        for future in as_completed(futures):
            try:
                yield future.result()
            except Exception as exc:  # a lost worker costs its document, not the batch
                doc = futures[future]
                doc.status, doc.error = "error", f"cluster worker failed: {type(exc).__name__}: {exc}"
                yield DocumentResult(doc, [], [])
