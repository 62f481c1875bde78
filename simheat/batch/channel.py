"""Messages between the sweep process and its workers: length-prefixed pickles.

Each message is an 8-byte little-endian length followed by the pickle. Only the
sweep process and the workers it started use these pipes. A worker writes a
message only in answer to one, so at most one message waits in a pipe.
"""

from __future__ import annotations

import pickle
from typing import IO, Any

_HEADER_BYTES = 8


def send(channel: IO[bytes], message: Any) -> None:
    """Write one message: 8-byte little-endian length, then the pickle.

    Parameters
    ----------
    channel : binary file
        Pipe to write to. [-]
    message : object
        Picklable message. [-]
    """
    data = pickle.dumps(message, protocol=pickle.HIGHEST_PROTOCOL)
    channel.write(len(data).to_bytes(_HEADER_BYTES, "little") + data)
    channel.flush()


def receive(channel: IO[bytes]) -> Any:
    """Read one message written by :func:`send`.

    Parameters
    ----------
    channel : binary file
        Pipe to read from. [-]

    Returns
    -------
    object
        The message.

    Raises
    ------
    EOFError
        When the other end closed the pipe (before or inside a message).
    """
    header = channel.read(_HEADER_BYTES)
    if len(header) < _HEADER_BYTES:
        raise EOFError("channel closed")
    size = int.from_bytes(header, "little")
    data = channel.read(size)
    if len(data) < size:
        raise EOFError("channel closed inside a message")
    return pickle.loads(data)  # our own processes, private pipes
