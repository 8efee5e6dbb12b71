"""Counting on Dask: the same store as the single-process path, whatever the cluster does.

One LocalCluster of two worker processes serves the whole module (it takes
seconds to start); ``--workers 2`` starts its own once.
"""

from __future__ import annotations

import os
import signal
import subprocess
import threading
from pathlib import Path

import pytest

pytest.importorskip("distributed")
pytest.importorskip("pyarrow")

from countstore_corpus import write_corpus  # noqa: E402

from foretype.counting.store_count import count_to_store  # noqa: E402
from foretype.errors import EncodingError  # noqa: E402

BLOCK = 700
"""Bytes per block: every boundary of these blocks falls inside a line of the corpus or splits a wrapped sentence."""

PARTITION_BYTES = 16384
"""Small partitions, so the corpus's trigrams are hash-partitioned several ways."""


@pytest.fixture(scope="module")
def cluster():
    from distributed import LocalCluster

    local = LocalCluster(n_workers=2, threads_per_worker=1, processes=True, host="127.0.0.1", dashboard_address=None)
    yield local
    local.close()


@pytest.fixture(scope="module")
def corpus(tmp_path_factory: pytest.TempPathFactory) -> list[Path]:
    return write_corpus(tmp_path_factory.mktemp("corpus"))


def _same_store(first: Path, second: Path) -> None:
    # Byte-for-byte: every file of both folders (diff -r, the reference tool).
    result = subprocess.run(["diff", "-r", str(first), str(second)], capture_output=True, text=True)
    assert result.returncode == 0, result.stdout[:2000]
    assert sorted(p.relative_to(first) for p in first.rglob("*")) == sorted(p.relative_to(second) for p in second.rglob("*"))


@pytest.fixture(scope="module")
def single_stores(corpus: list[Path], tmp_path_factory: pytest.TempPathFactory) -> dict[bool, Path]:
    folder = tmp_path_factory.mktemp("single")
    return {wrapped: _count(corpus, folder / f"w{wrapped}", wrapped=wrapped) for wrapped in (False, True)}


def _count(corpus: list[Path], out: Path, **options) -> Path:
    count_to_store(corpus, out, block_bytes=BLOCK, partition_bytes=PARTITION_BYTES, **options)
    return out


@pytest.mark.parametrize("wrapped", [False, True])
def test_a_cluster_counts_the_same_store_as_the_single_process(cluster, corpus, single_stores, tmp_path: Path, wrapped: bool) -> None:
    reports: list[tuple[int, int]] = []
    out = tmp_path / "cluster.counts"
    count_to_store(
        corpus, out, wrapped=wrapped, cluster=cluster.scheduler_address, block_bytes=BLOCK, partition_bytes=PARTITION_BYTES, progress=lambda d, t: reports.append((d, t))
    )
    _same_store(single_stores[wrapped], out)
    assert reports and reports[-1][0] == reports[-1][1]  # progress counts Dask tasks to the last one


def test_a_local_cluster_of_two_workers_counts_the_same_store(corpus, single_stores, tmp_path: Path, run_cli) -> None:
    out = tmp_path / "workers.counts"
    result = run_cli("count", *corpus, "-o", out, "--wrapped", "--workers", "2", "--block-size", "2000")
    assert result.code == 0, result.err
    # The CLI keeps the default partition size, so compare with a single-process count made the same way.
    single = tmp_path / "single.counts"
    assert run_cli("count", *corpus, "-o", single, "--wrapped").code == 0
    _same_store(single, out)


def test_a_worker_killed_mid_count_leaves_the_store_unchanged(cluster, corpus, single_stores, tmp_path: Path) -> None:
    from distributed import Client

    with Client(cluster.scheduler_address) as client:
        pids = client.run(os.getpid)
    victim = sorted(pids.values())[0]
    killed = threading.Event()

    def kill_once(done: int, total: int) -> None:
        # Mid-count: after the first pass, once pass-2 tasks are finishing.
        if not killed.is_set() and done >= 30:
            killed.set()
            os.kill(victim, signal.SIGKILL)

    out = tmp_path / "killed.counts"
    count_to_store(corpus, out, wrapped=True, cluster=cluster.scheduler_address, block_bytes=BLOCK, partition_bytes=PARTITION_BYTES, progress=kill_once)
    assert killed.is_set()
    with Client(cluster.scheduler_address) as client:
        client.wait_for_workers(2, timeout=60)
        assert victim not in client.run(os.getpid).values()  # the nanny started a new worker process
    _same_store(single_stores[True], out)


def test_a_url_corpus_counts_like_its_local_files(cluster, corpus, single_stores, tmp_path: Path) -> None:
    out = tmp_path / "url.counts"
    count_to_store([f"file://{p}" for p in corpus], out, cluster=cluster.scheduler_address, block_bytes=2000, partition_bytes=PARTITION_BYTES)
    for name in ("vocabulary.parquet", "trigrams", "heldout"):
        _same_store_part(single_stores[False] / name, out / name)


def _same_store_part(first: Path, second: Path) -> None:
    result = subprocess.run(["diff", "-r", str(first), str(second)], capture_output=True)
    assert result.returncode == 0


def test_invalid_utf8_is_reported_with_the_file_and_line_the_single_process_reports(cluster, tmp_path: Path) -> None:
    bad = tmp_path / "bad.txt"
    bad.write_bytes(("a fine line of text here\n" * 9).encode() + b"then \xff here\n" + b"more\n")
    messages = []
    for options in ({}, {"cluster": cluster.scheduler_address}):
        with pytest.raises(EncodingError) as error:
            count_to_store([bad], tmp_path / "x.counts", block_bytes=BLOCK, **options)
        messages.append(str(error.value))
    assert messages[0] == messages[1]
    assert ":10: not valid UTF-8 (byte 0xff)" in messages[0]
    assert not (tmp_path / "x.counts").exists()
