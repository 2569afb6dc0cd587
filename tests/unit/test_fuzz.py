"""Property-based fuzzing of the scenario validator and the link decoder.

At least 10,000 generated inputs in all (3 x 3,000 + 1,500); none may raise anything but a
ScenarioError, and every rejection or warning must name a field.
"""

from __future__ import annotations

import json

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from seqpick.api import call
from seqpick.errors import ScenarioError
from seqpick.link import LINK_KEYS, decode_fragment, encode_fragment
from seqpick.scenario import parse_scenario

KEYS = ["version", "title", "pool", "goal", "scores", "accept_probability", "openings",
        "cost_per_candidate", "must_hire", "compare", "size", "size_min", "size_max",
        "size_mean", "size_weights", "window", "arrivals_per_unit", "chances", "start",
        "unit", "type", "k", "distribution", "low", "high", "mean", "sd", "values", "skip",
        "skip_share", "start_share", "score_at_least", "x"]

scalars = st.one_of(
    st.none(), st.booleans(), st.integers(-10**7, 10**7),
    st.floats(allow_nan=True, allow_infinity=True), st.text(max_size=12),
    st.sampled_from(["best", "top", "rank", "score", "uniform", "normal", "sample", "day"]),
)
json_like = st.recursive(
    scalars,
    lambda inner: st.one_of(st.lists(inner, max_size=4),
                            st.dictionaries(st.sampled_from(KEYS), inner, max_size=4)),
    max_leaves=10,
)

# Scenario-shaped documents get deeper into the validator than random JSON.
pools = st.one_of(
    st.fixed_dictionaries({"size": st.one_of(st.integers(-5, 2_000_000), scalars)}),
    st.fixed_dictionaries({"size_min": st.integers(-3, 200), "size_max": st.integers(-3, 200)}),
    st.fixed_dictionaries({"size_mean": st.one_of(st.floats(-5, 1e6), scalars)}),
    st.fixed_dictionaries({"size_weights": st.lists(st.floats(-1, 5), max_size=8)}),
    st.fixed_dictionaries({"window": st.floats(-1, 1e3), "arrivals_per_unit": st.floats(-1, 1e3)}),
    st.fixed_dictionaries({"chances": st.lists(st.floats(-0.5, 1.5), max_size=8)}),
    json_like,
)
scenario_like = st.fixed_dictionaries(
    {"pool": pools},
    optional={
        "version": st.one_of(st.just(1), scalars),
        "goal": st.one_of(st.fixed_dictionaries({"type": st.sampled_from(
            ["best", "top", "rank", "score", "worst"])}, optional={"k": st.integers(-2, 40)}),
            json_like),
        "scores": st.one_of(st.none(), json_like, st.fixed_dictionaries(
            {"distribution": st.sampled_from(["uniform", "normal", "sample", "beta"])},
            optional={"low": st.floats(), "high": st.floats(), "mean": st.floats(),
                      "sd": st.floats(), "values": st.lists(st.floats(), max_size=6)})),
        "accept_probability": st.one_of(st.floats(-1, 2), scalars),
        "openings": st.one_of(st.integers(-2, 80), scalars),
        "cost_per_candidate": st.one_of(st.floats(), scalars),
        "must_hire": scalars,
        "compare": st.one_of(json_like, st.lists(st.dictionaries(
            st.sampled_from(["skip", "skip_share", "start_share", "score_at_least", "y"]),
            st.one_of(st.integers(-5, 10**6), st.floats()), max_size=2), max_size=4)),
        "title": st.one_of(st.text(max_size=300), scalars),
    },
)

FUZZ = settings(max_examples=3000, deadline=None, suppress_health_check=list(HealthCheck))


def _check_parse(doc):
    try:
        parse_scenario(doc)
    except ScenarioError as e:
        assert e.field, f"rejection without a field: {e.message}"
        assert e.message


@FUZZ
@given(json_like)
def test_validator_random_json(doc):
    _check_parse(doc)


@FUZZ
@given(scenario_like)
def test_validator_scenario_shaped(doc):
    _check_parse(doc)


link_values = st.one_of(
    st.text(max_size=30),
    st.builds(lambda a, b: f"{a}:{b}", st.sampled_from(
        ["size", "range", "mean", "weights", "window", "chances", "top", "uniform", "normal",
         "sample", "skip", "share", "start", "bar", "x"]), st.text(
        alphabet="0123456789.,-;:%eE+ab", max_size=20)),
)
fragments = st.builds(
    lambda parts, hash_: ("#" if hash_ else "") + "&".join(parts),
    st.lists(st.builds(lambda k, v: f"{k}={v}", st.one_of(
        st.sampled_from(LINK_KEYS), st.text(max_size=5)), link_values), max_size=8),
    st.booleans(),
)


@FUZZ
@given(st.one_of(fragments, st.text(max_size=200)))
def test_link_decoder_never_breaks(fragment):
    d = decode_fragment(fragment)
    for w in d.warnings:
        assert w["field"] and w["message"]
    s = parse_scenario(d.scenario)  # the result is always a valid scenario
    # and it survives its own round trip
    assert decode_fragment(encode_fragment(s)).scenario == s.to_dict()


@settings(max_examples=1500, deadline=None, suppress_health_check=list(HealthCheck))
@given(st.one_of(json_like, st.text(max_size=50)))
def test_api_call_never_raises(doc):
    for command in ("validate", "link_decode"):
        reply = json.loads(call(command, json.dumps(doc) if not isinstance(doc, str)
                                else json.dumps(doc)))
        if not reply["ok"]:
            assert reply["error"]["field"]
