"""Command line: ``python -m seqpick solve|advise|link [FILE]``.

* ``solve [FILE]`` reads a scenario (JSON) from FILE or standard input and
  prints the result as JSON.  ``solve --fragment '#...'`` solves the scenario
  that a share-link fragment encodes.
* ``advise [FILE]`` reads ``{"scenario": {...}, "seen": [...]}`` and prints
  the advice for the newest candidate.
* ``link [FILE]`` prints the share-link fragment (starting with ``#``) for a
  scenario.

Invalid input exits with status 2 and prints
``{"error": {"field": "<dotted path>", "message": "..."}}`` on standard
output -- never a traceback.
"""

from __future__ import annotations

import argparse
import json
import sys
from typing import Any, Sequence

from .api import dispatch

__all__ = ["main"]

EXIT_INVALID = 2


def _read(path: str | None) -> str:
    if path is None or path == "-":
        return sys.stdin.read()
    with open(path, encoding="utf-8") as fh:
        return fh.read()


def _emit(obj: Any, pretty: bool) -> None:
    text = json.dumps(obj, indent=2 if pretty else None, allow_nan=False,
                      ensure_ascii=False, separators=None if pretty else (",", ":"))
    sys.stdout.write(text + "\n")


def _fail(field: str, message: str, pretty: bool) -> int:
    _emit({"error": {"field": field, "message": message}}, pretty)
    return EXIT_INVALID


def main(argv: Sequence[str] | None = None) -> int:
    parser = argparse.ArgumentParser(
        prog="python -m seqpick",
        description="Exact optimal rules for choosing from a stream of candidates.")
    parser.add_argument("--pretty", action="store_true", help="indent the JSON output")
    sub = parser.add_subparsers(dest="command", required=True)
    p_solve = sub.add_parser("solve", help="solve a scenario (JSON file or standard input)")
    p_solve.add_argument("file", nargs="?", help="scenario JSON file (default: stdin)")
    p_solve.add_argument("--fragment", help="solve the scenario a share-link fragment "
                                            "('#...') encodes instead of reading a file")
    p_adv = sub.add_parser("advise", help="advice for the newest candidate of a search")
    p_adv.add_argument("file", nargs="?", help='{"scenario": ..., "seen": [...]} '
                                               "(default: stdin)")
    p_link = sub.add_parser("link", help="print the share-link fragment for a scenario")
    p_link.add_argument("file", nargs="?", help="scenario JSON file (default: stdin)")
    args = parser.parse_args(argv)
    pretty = args.pretty

    if args.command == "solve" and args.fragment is not None:
        decoded = dispatch("link_decode", args.fragment)
        if not decoded["ok"]:
            return _fail(decoded["error"]["field"], decoded["error"]["message"], pretty)
        if decoded["result"].get("warnings"):
            first = decoded["result"]["warnings"][0]
            return _fail(first.get("field", "fragment"), first.get("message", ""), pretty)
        payload: Any = decoded["result"]["scenario"]
    else:
        try:
            text = _read(args.file)
        except OSError as e:
            return _fail("file", f"cannot read {args.file!r}: {e.strerror or e}", pretty)
        except UnicodeDecodeError:
            return _fail("file", f"{args.file!r} is not UTF-8 text", pretty)
        try:
            payload = json.loads(text)
        except ValueError as e:
            return _fail("input", f"not valid JSON: {e}", pretty)

    command = {"solve": "solve", "advise": "advise", "link": "link_encode"}[args.command]
    reply = dispatch(command, payload)
    if not reply["ok"]:
        err = reply["error"]
        return _fail(err.get("field", ""), err.get("message", ""), pretty)
    if command == "link_encode":
        sys.stdout.write(reply["result"]["fragment"] + "\n")
    else:
        _emit(reply["result"], pretty)
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
