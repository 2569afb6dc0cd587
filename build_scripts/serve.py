#!/usr/bin/env python3
"""Build (fast when nothing changed) and serve dist/site/ on 127.0.0.1.

    python3 build_scripts/serve.py [--port 8000] [--no-build] [--verbose]

`--port 0` picks a free port. The server prints one line
`Serving Seqpick at http://127.0.0.1:PORT/` once it is listening (the tests
read it). Every response carries the site's Content-Security-Policy and
Cache-Control: no-cache; requests are logged only with --verbose.
"""

from __future__ import annotations

import argparse
import functools
import mimetypes
import sys
from http.server import SimpleHTTPRequestHandler, ThreadingHTTPServer
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from common import CSP_HEADER, DIST_SITE, MIME_TYPES  # noqa: E402


def content_type(path: str) -> str:
    """Content-Type for a file name, from MIME_TYPES first."""
    suffix = Path(path).suffix.lower()
    if suffix in MIME_TYPES:
        return MIME_TYPES[suffix]
    guessed, _ = mimetypes.guess_type(path)
    return guessed or "application/octet-stream"


class SiteHandler(SimpleHTTPRequestHandler):
    protocol_version = "HTTP/1.1"  # keep-alive: the page loads a dozen files at once
    verbose = False

    def guess_type(self, path):  # noqa: D401 - http.server's hook
        return content_type(str(path))

    def end_headers(self):
        self.send_header("Cache-Control", "no-cache")
        self.send_header("Content-Security-Policy", CSP_HEADER)
        self.send_header("X-Content-Type-Options", "nosniff")
        super().end_headers()

    def list_directory(self, path):
        # No directory listings: a folder without index.html is a 404.
        self.send_error(404, "File not found")
        return None

    def log_message(self, format, *args):
        if self.verbose:
            super().log_message(format, *args)

    def log_error(self, format, *args):
        # Errors (404s, bad requests) are worth a line even when quiet.
        sys.stderr.write("serve: %s - %s\n" % (self.address_string(), format % args))


class Server(ThreadingHTTPServer):
    daemon_threads = True
    allow_reuse_address = True


def make_server(directory: Path, port: int, verbose: bool = False) -> Server:
    handler = type("Handler", (SiteHandler,), {"verbose": verbose})
    return Server(("127.0.0.1", port), functools.partial(handler, directory=str(directory)))


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Serve the built Seqpick site on 127.0.0.1.")
    parser.add_argument("--port", type=int, default=8000, help="port (0 picks a free one; default 8000)")
    parser.add_argument("--no-build", action="store_true", help="serve dist/site/ as it is")
    parser.add_argument("--verbose", action="store_true", help="log every request")
    args = parser.parse_args(argv)

    if not args.no_build:
        import build

        if build.main([]) != 0:
            return 1
    if not (DIST_SITE / "index.html").is_file():
        print(f"serve: {DIST_SITE} has no index.html; run without --no-build", file=sys.stderr)
        return 1

    try:
        server = make_server(DIST_SITE, args.port, args.verbose)
    except OSError as exc:
        print(f"serve: cannot listen on 127.0.0.1:{args.port}: {exc}", file=sys.stderr)
        return 1
    port = server.server_address[1]
    print(f"Serving Seqpick at http://127.0.0.1:{port}/", flush=True)
    try:
        server.serve_forever()
    except KeyboardInterrupt:
        pass
    finally:
        server.server_close()
    return 0


if __name__ == "__main__":
    sys.exit(main())
