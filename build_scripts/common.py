"""Shared paths, hashing helpers and HTTP policy for Seqpick's build, server and tests.

Only the standard library is used, so every script here runs on a fresh
machine with nothing but Python 3.11 and pip.
"""

from __future__ import annotations

import base64
import hashlib
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
SITE_SRC = ROOT / "site"
PYLIB = ROOT / "pylib"
DIST_SITE = ROOT / "dist" / "site"
CACHE_DIR = ROOT / ".cache"

# Content-Security-Policy sent by build_scripts/serve.py on every response.
# 'wasm-unsafe-eval' lets WebAssembly compile (Pyodide); it does not allow
# JavaScript eval. The test harness checks that Pyodide boots under exactly
# this policy inside the module worker.
CSP_DIRECTIVES: tuple[tuple[str, str], ...] = (
    ("default-src", "'self'"),
    ("script-src", "'self' 'wasm-unsafe-eval'"),
    ("worker-src", "'self'"),
    ("connect-src", "'self'"),
    ("img-src", "'self' data:"),
    ("style-src", "'self'"),
    ("object-src", "'none'"),
    ("base-uri", "'none'"),
    ("frame-ancestors", "'none'"),
    ("form-action", "'none'"),
)
# Directives a <meta http-equiv> policy cannot carry (browsers ignore them there).
_META_UNSUPPORTED = {"frame-ancestors", "report-uri", "sandbox"}


def _join(directives) -> str:
    return "; ".join(f"{name} {value}" for name, value in directives)


CSP_HEADER = _join(CSP_DIRECTIVES)
CSP_META = _join(d for d in CSP_DIRECTIVES if d[0] not in _META_UNSUPPORTED)

# File-name suffix -> Content-Type used by the dev server. Anything not listed
# falls back to Python's mimetypes guess, then application/octet-stream.
MIME_TYPES: dict[str, str] = {
    ".html": "text/html; charset=utf-8",
    ".css": "text/css; charset=utf-8",
    ".js": "text/javascript; charset=utf-8",
    ".mjs": "text/javascript; charset=utf-8",
    ".json": "application/json",
    ".webmanifest": "application/manifest+json",
    ".wasm": "application/wasm",
    ".zip": "application/zip",
    ".whl": "application/zip",
    ".svg": "image/svg+xml",
    ".png": "image/png",
    ".ico": "image/x-icon",
    ".txt": "text/plain; charset=utf-8",
    ".map": "application/json",
    ".woff2": "font/woff2",
}


class IntegrityError(Exception):
    """A downloaded or cached file does not match its pinned integrity string."""


def sri(data: bytes, algorithm: str = "sha512") -> str:
    """Subresource-Integrity string (as npm publishes it): 'sha512-<base64>'."""
    digest = hashlib.new(algorithm, data).digest()
    return f"{algorithm}-{base64.b64encode(digest).decode('ascii')}"


def file_sri(path: Path, algorithm: str = "sha512") -> str:
    h = hashlib.new(algorithm)
    with open(path, "rb") as f:
        for block in iter(lambda: f.read(1 << 20), b""):
            h.update(block)
    return f"{algorithm}-{base64.b64encode(h.digest()).decode('ascii')}"


def verify_integrity(path: Path, integrity: str) -> None:
    """Raise IntegrityError unless the file at *path* matches *integrity*.

    *integrity* is an SRI string such as npm's ``dist.integrity``
    ("sha512-..."); several space-separated hashes are allowed, and one match
    is enough, as in the SRI rules.
    """
    candidates = integrity.split()
    if not candidates:
        raise IntegrityError(f"empty integrity string for {path}")
    seen = []
    for candidate in candidates:
        algorithm, sep, _ = candidate.partition("-")
        if not sep or algorithm not in {"sha256", "sha384", "sha512"}:
            raise IntegrityError(f"unsupported integrity string {candidate!r}")
        actual = file_sri(path, algorithm)
        if actual == candidate:
            return
        seen.append(actual)
    raise IntegrityError(
        f"{path.name}: integrity mismatch\n  expected {integrity}\n  got      {' '.join(seen)}"
    )


def sha256_hex(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()
