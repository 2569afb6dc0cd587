"""Share links: the whole scenario in the URL fragment.

The fragment is versioned, compact and readable: ``&``-separated
``key=value`` parts, only the fields that differ from the defaults, values
percent-encoded (RFC 3986) where needed::

    #v=1&pool=size:100&cmp=skip:30;share:0.37
    #v=1&title=Workshop%20lead&pool=range:20-40&goal=top:3&accept=0.8&open=2

=========  ====================================================================
key        value
=========  ====================================================================
``v``      format version (1)
``title``  free text
``pool``   ``size:N`` | ``range:A-B`` | ``mean:M`` | ``weights:w1,w2,...`` |
           ``window:T,L[,unit[,start]]`` | ``chances:p1,p2,...``
``goal``   ``best`` | ``top:K`` | ``rank`` | ``score``
``scores`` ``uniform:LOW,HIGH`` | ``normal:MEAN,SD`` | ``sample:v1,v2,...``
``accept`` chance an offer is accepted
``open``   openings
``cost``   cost per candidate
``must``   1 / 0: must end with a hire (written only when not the default)
``cmp``    ``;``-separated rules ``skip:R`` | ``share:X`` | ``start:T`` | ``bar:S``
=========  ====================================================================

Numbers are written in their shortest exact form (``repr``), so decoding a
link gives back exactly the scenario that made it.  A malformed, unknown or
out-of-range part is reported by name and that part falls back to its
default; the rest of the link still applies.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any
from urllib.parse import quote, unquote

from .errors import ScenarioError
from .results import _clean
from .scenario import SCENARIO_VERSION, Scenario, parse_scenario

__all__ = ["encode_fragment", "decode_fragment", "DecodedLink", "LINK_KEYS"]

LINK_KEYS = ("v", "title", "pool", "goal", "scores", "accept", "open", "cost", "must", "cmp")
MAX_FRAGMENT = 2_000_000
_SAFE = ":,;-._~!*'()"
_CMP_KEYS = {"skip": "skip", "skip_share": "share", "start_share": "start",
             "score_at_least": "bar"}
_CMP_BACK = {v: k for k, v in _CMP_KEYS.items()}
# which scenario field each link key feeds (for error messages and fallbacks)
_FIELD_OF = {"title": "title", "pool": "pool", "goal": "goal", "scores": "scores",
             "accept": "accept_probability", "open": "openings",
             "cost": "cost_per_candidate", "must": "must_hire", "cmp": "compare"}
_KEY_OF = {v: k for k, v in _FIELD_OF.items()}


def _num(x: float | int) -> str:
    if isinstance(x, int) or (isinstance(x, float) and x.is_integer() and abs(x) < 1e15):
        return str(int(x))
    return repr(float(x))


def _q(text: str) -> str:
    return quote(text, safe=_SAFE)


def encode_fragment(scenario: Any) -> str:
    """The share-link fragment (starting with ``#``) for a scenario."""
    s = scenario if isinstance(scenario, Scenario) else parse_scenario(scenario)
    parts = [f"v={SCENARIO_VERSION}"]
    if s.title:
        parts.append("title=" + quote(s.title, safe=""))
    pool = s.pool
    if pool.kind == "fixed":
        pv = f"size:{pool.size}"
    elif pool.kind == "range":
        pv = f"range:{pool.size_min}-{pool.size_max}"
    elif pool.kind == "poisson":
        pv = f"mean:{_num(pool.size_mean)}"
    elif pool.kind == "weights":
        pv = "weights:" + ",".join(_num(w) for w in pool.weights)
    elif pool.kind == "window":
        bits = [_num(pool.window), _num(pool.arrivals_per_unit)]
        if pool.unit is not None or pool.start is not None:
            bits.append(pool.unit or "")
        if pool.start is not None:
            bits.append(quote(pool.start, safe=""))
        pv = "window:" + ",".join(bits)
    else:
        pv = "chances:" + ",".join(_num(c) for c in pool.chances)
    parts.append("pool=" + pv)
    if s.goal.type != "best":
        parts.append("goal=" + (f"top:{s.goal.k}" if s.goal.type == "top" else s.goal.type))
    if s.scores is not None:
        sc = s.scores
        if sc.distribution == "uniform":
            sv = f"uniform:{_num(sc.low)},{_num(sc.high)}"
        elif sc.distribution == "normal":
            sv = f"normal:{_num(sc.mean)},{_num(sc.sd)}"
        else:
            sv = "sample:" + ",".join(_num(v) for v in sc.values or ())
        parts.append("scores=" + sv)
    if s.accept_probability != 1.0:
        parts.append("accept=" + _num(s.accept_probability))
    if s.openings != 1:
        parts.append(f"open={s.openings}")
    if s.cost_per_candidate != 0.0:
        parts.append("cost=" + _num(s.cost_per_candidate))
    default_must = s.goal.type in ("rank", "score")
    if s.must_hire != default_must:
        parts.append("must=" + ("1" if s.must_hire else "0"))
    if s.compare:
        parts.append("cmp=" + ";".join(f"{_CMP_KEYS[c.kind]}:{_num(c.value)}"
                                       for c in s.compare))
    return "#" + "&".join(parts)


@dataclass
class DecodedLink:
    """A decoded link: the scenario (always valid) and what was set aside."""

    scenario: dict[str, Any]
    warnings: list[dict[str, str]] = field(default_factory=list)
    version: int | None = None

    def to_dict(self) -> dict[str, Any]:
        return _clean(self)


class _Bad(Exception):
    def __init__(self, message: str) -> None:
        super().__init__(message)
        self.message = message


def _float(text: str) -> float:
    try:
        v = float(text)
    except ValueError:
        raise _Bad(f"{text[:30]!r} is not a number") from None
    if not math.isfinite(v):
        raise _Bad(f"{text[:30]!r} is not a finite number")
    return v


def _number(text: str) -> int | float:
    v = _float(text)
    if v.is_integer() and "." not in text and "e" not in text.lower():
        return int(v)
    return v


def _list(text: str) -> list[int | float]:
    if not text:
        raise _Bad("the list is empty")
    return [_number(t) for t in text.split(",")]


def _pool(v: str) -> dict[str, Any]:
    kind, _, rest = v.partition(":")
    if kind == "size":
        return {"size": _number(rest)}
    if kind == "range":
        a, sep, b = rest.partition("-")
        if not sep:
            raise _Bad("expected range:MIN-MAX")
        return {"size_min": _number(a), "size_max": _number(b)}
    if kind == "mean":
        return {"size_mean": _number(rest)}
    if kind == "weights":
        return {"size_weights": _list(rest)}
    if kind == "window":
        bits = rest.split(",")
        if len(bits) < 2 or len(bits) > 4:
            raise _Bad("expected window:LENGTH,ARRIVALS_PER_UNIT[,UNIT[,START]]")
        d: dict[str, Any] = {"window": _number(bits[0]), "arrivals_per_unit": _number(bits[1])}
        if len(bits) >= 3 and bits[2]:
            d["unit"] = bits[2]
        if len(bits) == 4:
            try:
                d["start"] = unquote(bits[3], errors="strict")
            except UnicodeDecodeError:
                raise _Bad("the window start is not valid UTF-8") from None
        return d
    if kind == "chances":
        return {"chances": _list(rest)}
    raise _Bad(f"unknown pool form {kind[:20]!r}; expected size, range, mean, weights, "
               "window or chances")


def _goal(v: str) -> dict[str, Any]:
    kind, sep, rest = v.partition(":")
    if kind == "top":
        if not sep:
            raise _Bad("expected top:K")
        return {"type": "top", "k": _number(rest)}
    if kind in ("best", "rank", "score") and not sep:
        return {"type": kind}
    raise _Bad(f"unknown goal {v[:20]!r}; expected best, top:K, rank or score")


def _scores(v: str) -> dict[str, Any]:
    kind, _, rest = v.partition(":")
    if kind == "uniform":
        lo, hi = (_list(rest) + [None, None])[:2] if rest.count(",") == 1 else (None, None)
        if lo is None:
            raise _Bad("expected uniform:LOW,HIGH")
        return {"distribution": "uniform", "low": lo, "high": hi}
    if kind == "normal":
        if rest.count(",") != 1:
            raise _Bad("expected normal:MEAN,SD")
        m, sd = _list(rest)
        return {"distribution": "normal", "mean": m, "sd": sd}
    if kind == "sample":
        return {"distribution": "sample", "values": _list(rest)}
    raise _Bad(f"unknown score distribution {kind[:20]!r}; expected uniform, normal or "
               "sample")


def _compare(v: str) -> list[dict[str, Any]]:
    out = []
    for item in v.split(";"):
        kind, sep, rest = item.partition(":")
        if kind not in _CMP_BACK or not sep:
            raise _Bad(f"unknown rule {item[:20]!r}; expected skip:R, share:X, start:T or "
                       "bar:S")
        out.append({_CMP_BACK[kind]: _number(rest)})
    return out


def _must(v: str) -> bool:
    if v in ("1", "0"):
        return v == "1"
    raise _Bad("expected 1 or 0")


_PARSERS = {"pool": _pool, "goal": _goal, "scores": _scores, "cmp": _compare,
            "accept": _number, "open": _number, "cost": _number, "must": _must,
            "title": lambda v: v}

DEFAULT_SCENARIO: dict[str, Any] = {"version": 1, "pool": {"size": 30}}


def decode_fragment(fragment: str, default: dict[str, Any] | None = None) -> DecodedLink:
    """Decode a share-link fragment; never raises for a bad link.

    Each bad part is listed in ``warnings`` as ``{"field": <link key>,
    "message": ...}`` and falls back to its default (``default`` for the
    pool when the pool part is unusable).
    """
    base = dict(default or DEFAULT_SCENARIO)
    warnings: list[dict[str, str]] = []
    if not isinstance(fragment, str):
        raise ScenarioError("fragment", "expected text")
    if len(fragment) > MAX_FRAGMENT:
        return DecodedLink(parse_scenario(base).to_dict(),
                           [{"field": "fragment", "message":
                             f"the link is too long ({len(fragment):,} characters; at most "
                             f"{MAX_FRAGMENT:,})"}])
    text = fragment[1:] if fragment.startswith("#") else fragment
    raw: dict[str, Any] = {}
    version = None
    seen: set[str] = set()
    for part in (p for p in text.split("&") if p):
        key, sep, value = part.partition("=")
        if key not in LINK_KEYS:
            warnings.append({"field": key[:30] or "fragment",
                             "message": f"unknown part {key[:30]!r}; it was ignored"})
            continue
        if key in seen:
            warnings.append({"field": key, "message": f"{key!r} appears twice; the first "
                                                      "one was used"})
            continue
        seen.add(key)
        if key == "v":
            version = value
            continue
        try:
            if key != "pool":  # the pool's window start is unquoted on its own
                value = unquote(value, errors="strict")
        except UnicodeDecodeError:
            warnings.append({"field": key, "message": "not valid UTF-8; using the default"})
            continue
        try:
            raw[_FIELD_OF[key]] = _PARSERS[key](value)
        except _Bad as e:
            warnings.append({"field": key, "message": e.message + "; using the default"})
    if version is None:
        warnings.insert(0, {"field": "v", "message": "the link has no version; read as "
                                                     f"version {SCENARIO_VERSION}"})
    elif version != str(SCENARIO_VERSION):
        return DecodedLink(parse_scenario(base).to_dict(),
                           [{"field": "v", "message": f"link version {version[:10]!r} is not "
                                                      f"known (this page reads version "
                                                      f"{SCENARIO_VERSION}); showing the "
                                                      "default scenario"}],
                           None)
    if "pool" not in raw:
        raw["pool"] = base["pool"]
        if "pool" not in {w["field"] for w in warnings}:
            warnings.append({"field": "pool", "message": "the link has no pool; using the "
                                                         "default"})
    # Validate; drop the offending part and retry, so one bad part never
    # spoils the rest.
    for _ in range(len(_FIELD_OF) + 2):
        try:
            s = parse_scenario({"version": SCENARIO_VERSION, **raw})
            return DecodedLink(s.to_dict(), warnings, SCENARIO_VERSION)
        except ScenarioError as e:
            top = e.field.split(".")[0] if e.field else ""
            key = _KEY_OF.get(top, top or "fragment")
            warnings.append({"field": key, "message": f"{e.field}: {e.message}; using the "
                                                      "default"})
            if top == "pool":
                raw["pool"] = base["pool"]
            elif top in raw:
                del raw[top]
            else:
                # a conflict involving a default (e.g. goal.k vs the pool): fall back
                for k in ("compare", "openings", "goal", "scores"):
                    if k in raw:
                        del raw[k]
                        break
                else:
                    raw = {"pool": base["pool"]}
    return DecodedLink(parse_scenario(base).to_dict(), warnings, SCENARIO_VERSION)
