"""Serving the editor: the listening socket, the page's URL, and uvicorn until Ctrl-C."""

from __future__ import annotations

import socket
from typing import Any

from bracegrid.errors import InputError
from bracegrid.web.guard import host_literal

#: Seconds open connections (event streams) get to finish when the server stops.
GRACEFUL_SECONDS = 2


def bind_socket(host: str, port: int) -> socket.socket:
    """A listening socket on ``host:port`` (port 0: any free port).

    Raises:
        InputError: If the port is outside 0..65535 or cannot be had.
    """
    if not 0 <= port <= 65535:
        msg = f"port {port}: give 0 (any free port) or a port from 1 to 65535"
        raise InputError(msg)
    family = socket.AF_INET6 if ":" in host else socket.AF_INET
    sock = socket.socket(family, socket.SOCK_STREAM)
    try:
        sock.setsockopt(socket.SOL_SOCKET, socket.SO_REUSEADDR, 1)
        sock.bind((host, port))
        sock.listen(128)
    except OSError as exc:
        sock.close()
        msg = f"cannot listen on {host_literal(host)}:{port} ({exc.strerror or exc}); give another port, or 0"
        raise InputError(msg) from None
    sock.set_inheritable(True)
    return sock


def bound_port(sock: socket.socket) -> int:
    """The port a socket listens on."""
    port: int = sock.getsockname()[1]
    return port


def serve(app: Any, sock: socket.socket) -> None:
    """Serve the app on an open socket until Ctrl-C (or SIGTERM); open streams get a moment to end."""
    import uvicorn  # heavy, and needed only when the editor runs: loaded here, not at start-up

    config = uvicorn.Config(
        app, log_level="warning", access_log=False, lifespan="on", timeout_graceful_shutdown=GRACEFUL_SECONDS
    )
    uvicorn.Server(config).run(sockets=[sock])
