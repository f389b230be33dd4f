"""The editor's door: every request passes these rules before it reaches the application.

Rules (docs/editor.md, each tested):

1. the Host header must be the address the server is bound to (defeats DNS rebinding);
2. the per-start token must come with every request, page and API alike (query ``t`` or the
   ``X-Bracegrid-Token`` header), or the answer is 403;
3. a request that carries an Origin must carry the page's own; a state-changing request
   (anything but GET and HEAD) must carry one (defeats cross-site requests);
4. request bodies are limited in size (413 beyond), by the declared length and by counting;
5. refusals are JSON, and every response carries headers that keep the page to its own origin.
"""

from __future__ import annotations

import hmac
import ipaddress
import json
import secrets
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any
from urllib.parse import parse_qs

from bracegrid.errors import InputError
from bracegrid.outputs.shapes import error_dict

#: Largest request body accepted (a 100 x 100 frame with both diagonals everywhere is about 1.5 MB).
MAX_BODY_BYTES = 4 * 1024 * 1024
#: The header a script sends the token in (the page's links carry it as ``?t=``).
TOKEN_HEADER = "x-bracegrid-token"
#: Methods that change nothing (and so need no Origin).
SAFE_METHODS = frozenset({"GET", "HEAD"})
#: Methods the editor answers at all.
METHODS = frozenset({"GET", "HEAD", "POST"})

#: The page may load only what the server itself serves: no other origin, no inline script.
PAGE_POLICY = (
    "default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self' data:; connect-src 'self'; "
    "frame-ancestors 'none'; base-uri 'none'; form-action 'none'"
)


def new_token() -> str:
    """A fresh random token (about 190 bits), made once per server start."""
    return secrets.token_urlsafe(24)


def host_literal(host: str) -> str:
    """The host as it appears in a URL and a Host header (IPv6 in brackets).

    Example:
        >>> host_literal("127.0.0.1"), host_literal("::1")
        ('127.0.0.1', '[::1]')
    """
    return f"[{host}]" if ":" in host else host


def check_bind_address(text: str) -> tuple[str, bool]:
    """The address to listen on, and whether it is a loopback one.

    Raises:
        InputError: If it is not an IP address, or is an unspecified one (all interfaces), since
            the Host check needs the one address the page is reached at.

    Example:
        >>> check_bind_address("127.0.0.1"), check_bind_address("192.0.2.7")
        (('127.0.0.1', True), ('192.0.2.7', False))
    """
    try:
        address = ipaddress.ip_address(text.strip().strip("[]"))
    except ValueError:
        msg = f"{text!r} is not an IP address; give one such as 127.0.0.1"
        raise InputError(msg) from None
    if address.is_unspecified:
        msg = f"{text!r} means every interface; give the one address the page will be opened at"
        raise InputError(msg)
    return str(address), address.is_loopback


@dataclass(frozen=True, slots=True)
class GuardRules:
    """What a request must show to be let in.

    Attributes:
        token: The per-start token.
        host: The bound address as a Host header gives it (``127.0.0.1:8765``).
        max_body: Largest body, in bytes.
    """

    token: str
    host: str
    max_body: int = MAX_BODY_BYTES

    @classmethod
    def bound(cls, host: str, port: int, token: str, *, max_body: int = MAX_BODY_BYTES) -> GuardRules:
        """The rules for a server bound to ``host:port``."""
        return cls(token=token, host=f"{host_literal(host)}:{port}".lower(), max_body=max_body)

    @property
    def origin(self) -> str:
        """The page's own origin."""
        return f"http://{self.host}"

    def url(self, path: str = "/") -> str:
        """The full URL of a page with its token."""
        return f"{self.origin}{path}?t={self.token}"


@dataclass(frozen=True, slots=True)
class Refusal:
    """Why a request is turned away.

    Attributes:
        status: HTTP status.
        error: Short error word.
        message: A sentence for the user.
    """

    status: int
    error: str
    message: str


def refuse(rules: GuardRules, *, method: str, headers: Mapping[str, str], query: str) -> Refusal | None:
    """The refusal for a request, or None when it may go on.

    Args:
        rules: The server's rules.
        method: HTTP method.
        headers: Request headers, names in lower case.
        query: The raw query string.

    Example:
        >>> rules = GuardRules.bound("127.0.0.1", 8765, "s3cret")
        >>> refuse(rules, method="GET", headers={"host": "127.0.0.1:8765"}, query="t=s3cret") is None
        True
        >>> refuse(rules, method="GET", headers={"host": "evil.example:8765"}, query="t=s3cret").status
        403
    """
    host = headers.get("host", "").lower()
    if host != rules.host:
        return Refusal(403, "forbidden-host", f"this server answers only at {rules.host}, not {host or 'no host'}")
    given = headers.get(TOKEN_HEADER) or (parse_qs(query).get("t") or [""])[0]
    if not hmac.compare_digest(given.encode("utf-8", "replace"), rules.token.encode("utf-8")):
        return Refusal(403, "forbidden-token", "missing or wrong access token; open the URL the editor printed")
    origin = headers.get("origin")
    if origin is not None and origin.lower() != rules.origin:
        return Refusal(403, "forbidden-origin", f"requests from {origin} are not accepted; use the editor's own page")
    if method not in METHODS:
        return Refusal(405, "method", f"{method} is not used by the editor")
    if method not in SAFE_METHODS and origin is None:
        return Refusal(403, "forbidden-origin", "a request that changes something must come from the editor's page")
    length = headers.get("content-length")
    if length is not None:
        if not length.isdigit():
            return Refusal(400, "bad-request", f"Content-Length {length!r} is not a number of bytes")
        if int(length) > rules.max_body:
            return Refusal(413, "too-large", f"request body over {rules.max_body} bytes")
    return None


class BodyTooLargeError(Exception):
    """A request body grew past the limit while it was read (answered 413)."""


def json_bytes(payload: Mapping[str, Any]) -> bytes:
    """A JSON body."""
    return json.dumps(payload).encode("utf-8")


_SECURITY_HEADERS = (
    (b"x-content-type-options", b"nosniff"),
    (b"referrer-policy", b"no-referrer"),
    (b"x-frame-options", b"DENY"),
    (b"cache-control", b"no-store"),
    (b"cross-origin-resource-policy", b"same-origin"),
)

Scope = dict[str, Any]
Message = dict[str, Any]


class GuardMiddleware:
    """ASGI middleware applying :func:`refuse` and the body limit to every HTTP request."""

    def __init__(self, app: Any, rules: GuardRules) -> None:
        self.app = app
        self.rules = rules

    async def __call__(self, scope: Scope, receive: Any, send: Any) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        headers = {k.decode("latin-1").lower(): v.decode("latin-1") for k, v in scope.get("headers", [])}
        refusal = refuse(
            self.rules,
            method=scope.get("method", "GET"),
            headers=headers,
            query=scope.get("query_string", b"").decode("latin-1"),
        )
        if refusal is not None:
            await _send_json(send, refusal.status, error_dict(refusal.error, refusal.message))
            return
        limit = self.rules.max_body
        seen = 0

        async def counted() -> Message:
            nonlocal seen
            message: Message = await receive()
            if message.get("type") == "http.request":
                seen += len(message.get("body", b""))
                if seen > limit:
                    raise BodyTooLargeError
            return message

        async def secured(message: Message) -> None:
            if message.get("type") == "http.response.start":
                have = {k.lower() for k, _ in message.get("headers", [])}
                extra = [(k, v) for k, v in _SECURITY_HEADERS if k not in have]
                if b"content-security-policy" not in have:
                    extra.append((b"content-security-policy", PAGE_POLICY.encode("ascii")))
                message = {**message, "headers": [*message.get("headers", []), *extra]}
            await send(message)

        await self.app(scope, counted, secured)


async def _send_json(send: Any, status: int, payload: Mapping[str, Any]) -> None:
    body = json_bytes(payload)
    headers = [
        (b"content-type", b"application/json"),
        (b"content-length", str(len(body)).encode("ascii")),
        *_SECURITY_HEADERS,
        (b"content-security-policy", PAGE_POLICY.encode("ascii")),
    ]
    await send({"type": "http.response.start", "status": status, "headers": headers})
    await send({"type": "http.response.body", "body": body})
