"""Start graftwork jobs as child processes, kill them at seeded random moments, and let tests compare the graph.

Each job is a real child process running `pipeline.cli.main(argv)`, killed with a real signal. To keep the kill
tests fast, the children are forked from one warm "job starter" process that has imported graftwork, pandas,
LadybugDB and the static embedder once (a cold `python -m pipeline.cli` spends seconds importing on this machine,
which would put most random kill moments before the job touched the store). Uninterrupted reference runs and
re-runs go through the same starter, so every run sees the same libraries and thread settings.

>>> # with JobStarter() as jobs:
>>> #     outcome = jobs.run(["--store", "s.lbug", "embed"], cwd=tmp)            # to the end
>>> #     outcome = jobs.run([...], cwd=tmp, kill_after=0.8)                      # SIGKILL after 0.8 s
>>> #     outcome = jobs.run([...], cwd=tmp, kill_after=0.8, sig=signal.SIGTERM)  # a clean stop
"""

from __future__ import annotations

import json
import os
import shutil
import signal
import subprocess
import sys
import time
from dataclasses import dataclass
from pathlib import Path

_STARTER = r"""
import json, os, signal, sys, traceback
import pipeline.cli
import pipeline.embed.embed_job, pipeline.ingest.items_job, pipeline.ingest.reference_job
import pipeline.ingest.source_job, pipeline.jobs.nightly, pipeline.match.map_job, pipeline.place.place_job
from pipeline.embed.registry import get_embedder
import pipeline.store.ladybug_store, ladybug
get_embedder("static")
print(json.dumps({"ready": os.getpid()}), flush=True)
for line in sys.stdin:
    req = json.loads(line)
    if req["op"] == "start":
        sys.stdout.flush(); sys.stderr.flush()
        pid = os.fork()
        if pid == 0:
            code = 99
            try:
                os.chdir(req["cwd"])
                fd = os.open(req["log"], os.O_WRONLY | os.O_CREAT | os.O_TRUNC, 0o644)
                os.dup2(fd, 1); os.dup2(fd, 2)
                sys.stdin = open(os.devnull)
                signal.signal(signal.SIGINT, signal.default_int_handler)
                code = pipeline.cli.main(req["argv"])
            except SystemExit as exc:
                code = exc.code if isinstance(exc.code, int) else 1
            except BaseException:
                traceback.print_exc()
            finally:
                sys.stdout.flush(); sys.stderr.flush()
                os._exit(code)
        print(json.dumps({"pid": pid}), flush=True)
    elif req["op"] == "wait":
        _, status = os.waitpid(req["pid"], 0)
        print(json.dumps({"signal": os.WTERMSIG(status) if os.WIFSIGNALED(status) else None,
                          "code": os.WEXITSTATUS(status) if os.WIFEXITED(status) else None}), flush=True)
"""


@dataclass
class Outcome:
    argv: list[str]
    code: int | None  # exit code, or None when a signal ended the process
    signal: int | None  # the signal that ended it (SIGKILL); None when it exited
    seconds: float  # from start to end
    log: str  # what it printed (stdout and stderr)
    sent: int | None = None  # the signal the harness sent, if any
    sent_after: float | None = None

    @property
    def killed(self) -> bool:
        return self.signal is not None


@dataclass
class Started:
    argv: list[str]
    pid: int
    log: Path
    started: float

    def output(self) -> str:
        return self.log.read_text(errors="replace") if self.log.exists() else ""


class JobStarter:
    """One warm process that forks a child per job. Use as a context manager; `close()` ends it."""

    def __init__(self):
        env = dict(os.environ, TOKENIZERS_PARALLELISM="false", PYTHONUNBUFFERED="1")
        self.proc = subprocess.Popen([sys.executable, "-c", _STARTER], stdin=subprocess.PIPE,
                                     stdout=subprocess.PIPE, text=True, env=env)
        ready = self.proc.stdout.readline()
        if not ready:
            raise RuntimeError("the job starter did not come up")
        self._n = 0

    def _ask(self, req: dict) -> dict:
        self.proc.stdin.write(json.dumps(req) + "\n")
        self.proc.stdin.flush()
        line = self.proc.stdout.readline()
        if not line:
            raise RuntimeError("the job starter died")
        return json.loads(line)

    def start(self, argv: list[str], *, cwd: Path) -> Started:
        """Start a job and return at once; `wait(started)` collects it."""
        self._n += 1
        log = Path(cwd) / f"job-{self._n}.log"
        started = time.monotonic()
        pid = self._ask({"op": "start", "argv": [str(a) for a in argv], "cwd": str(cwd), "log": str(log)})["pid"]
        return Started([str(a) for a in argv], pid, log, started)

    def wait(self, job: Started, *, sent: int | None = None, sent_after: float | None = None) -> Outcome:
        status = self._ask({"op": "wait", "pid": job.pid})
        return Outcome(job.argv, status["code"], status["signal"], time.monotonic() - job.started,
                       job.log.read_text(errors="replace") if job.log.exists() else "", sent, sent_after)

    def run(self, argv: list[str], *, cwd: Path, kill_after: float | None = None,
            sig: int = signal.SIGKILL) -> Outcome:
        """Run one job to its end, or send `sig` after `kill_after` seconds (if it is still running then)."""
        job = self.start(argv, cwd=cwd)
        sent = None
        if kill_after is not None:
            time.sleep(max(0.0, kill_after - (time.monotonic() - job.started)))
            # The child is not reaped until "wait" below, so this pid is still ours (at worst a zombie).
            os.kill(job.pid, sig)
            sent = sig
        return self.wait(job, sent=sent, sent_after=kill_after)

    def close(self) -> None:
        if self.proc.poll() is None:
            self.proc.stdin.close()
            try:
                self.proc.wait(timeout=10)
            except subprocess.TimeoutExpired:
                self.proc.kill()
                self.proc.wait()

    def __enter__(self) -> JobStarter:
        return self

    def __exit__(self, *exc) -> None:
        self.close()


def copy_store(src: Path, dst: Path) -> Path:
    """Copy an embedded store (its file and write-ahead log, if any) that no process has open."""
    dst.parent.mkdir(parents=True, exist_ok=True)
    for f in src.parent.glob(src.name + "*"):
        if f.is_file():
            shutil.copy2(f, dst.parent / (dst.name + f.name[len(src.name):]))
    return dst
