"""A sweep worker process: ``python -m simheat.batch.worker``.

Started by :class:`simheat.batch.pool.ProcessPool`. It reads the sweep context,
then variant after variant, from its standard input and writes each result to
its standard output, as length-prefixed pickles (:mod:`simheat.batch.channel`).
Anything else printed goes to standard error, so it cannot corrupt the channel.
The worker ends when its input is closed (the sweep process stopped or died) or
it reads ``None``.
"""

from __future__ import annotations

import os
import signal
import sys

from simheat.batch.channel import receive, send


def main() -> None:
    """Run variants from standard input until it closes."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # Ctrl-C is the sweep's to handle
    inbox = sys.stdin.buffer
    outbox = os.fdopen(os.dup(sys.stdout.fileno()), "wb")
    os.dup2(sys.stderr.fileno(), sys.stdout.fileno())  # stray prints -> stderr
    sys.stdout = sys.stderr
    try:
        context = receive(inbox)
        import simheat.dynamics.simulate  # noqa: F401 - the heavy imports, once
        from simheat.batch.variant import run_variant
    except EOFError:
        return
    except BaseException as exc:  # a broken install: tell the sweep, then stop
        send(outbox, ("error", f"{type(exc).__name__}: {exc}"))
        return
    while True:
        try:
            task = receive(inbox)
        except EOFError:  # the sweep process is gone
            return
        if task is None:
            return
        result = run_variant(context, task)
        try:
            send(outbox, ("result", result))
        except OSError:  # the sweep process is gone
            return


if __name__ == "__main__":
    main()
