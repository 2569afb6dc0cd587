"""One JSON-in, JSON-out entry point for the page's worker and for tools.

``call(command, request_json)`` never raises: it returns
``{"ok": true, "result": ...}`` or ``{"ok": false, "error": {"field", "message"}}``
as a JSON string.  Commands are listed in :data:`COMMANDS`.
"""

from __future__ import annotations

import json
import traceback
from typing import Any, Callable

from .errors import ScenarioError

__all__ = ["COMMANDS", "call", "dispatch"]


def _solve(payload: Any) -> Any:
    from .solve import solve
    return solve(payload).to_dict()


def _advise(payload: Any) -> Any:
    from .advise import advise_request
    return advise_request(payload).to_dict()


def _link_encode(payload: Any) -> Any:
    from .link import encode_fragment
    return {"fragment": encode_fragment(payload)}


def _link_decode(payload: Any) -> Any:
    from .link import decode_fragment
    if isinstance(payload, dict):
        payload = payload.get("fragment")
    if not isinstance(payload, str):
        raise ScenarioError("fragment", "expected the link's fragment as text")
    return decode_fragment(payload).to_dict()


def _validate(payload: Any) -> Any:
    from .scenario import parse_scenario
    return parse_scenario(payload).to_dict()


COMMANDS: dict[str, Callable[[Any], Any]] = {
    "solve": _solve,
    "advise": _advise,
    "link_encode": _link_encode,
    "link_decode": _link_decode,
    "validate": _validate,
}


def dispatch(command: str, payload: Any) -> dict[str, Any]:
    """Run ``command`` on a decoded payload; return the reply as a dict."""
    fn = COMMANDS.get(command)
    if fn is None:
        return {"ok": False, "error": {"field": "command", "message":
                f"unknown command {command!r}; expected one of {', '.join(COMMANDS)}"}}
    try:
        return {"ok": True, "result": fn(payload)}
    except ScenarioError as e:
        return {"ok": False, "error": e.to_dict()}
    except RecursionError:
        return {"ok": False, "error": {"field": "", "message": "input nested too deeply"}}
    except Exception as e:  # never let a bug reach the page as a crash
        return {"ok": False, "error": {"field": "", "message":
                f"internal error ({type(e).__name__}: {e}); please report it",
                "trace": traceback.format_exc(limit=5)}}


def call(command: str, request_json: str) -> str:
    """JSON string in, JSON string out; never raises."""
    try:
        payload = json.loads(request_json)
    except (ValueError, TypeError) as e:
        return json.dumps({"ok": False, "error": {"field": "input", "message":
                           f"not valid JSON: {e}"}})
    return json.dumps(dispatch(command, payload), allow_nan=False, separators=(",", ":"))
