"""Fuzzing the recovery folder: whatever a recovery file holds, the start-up scan
never raises and never loses it (offered, set aside under a new name, or kept
where it is).  Examples come from ``SHIPGUI_FUZZ_EXAMPLES`` as for the loaders."""

from __future__ import annotations

import json
import os
import tempfile
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from shipgui.core.io.plan_file import inputs_to_json
from shipgui.gui.services.autosave import SET_ASIDE_SUFFIX, find_recoveries
from tests.support.documents import small_document

EXAMPLES = int(os.environ.get("SHIPGUI_FUZZ_EXAMPLES", "0") or 0)
FUZZ = settings(max_examples=EXAMPLES or 60, deadline=None, database=None,
                suppress_health_check=list(HealthCheck))
VALID = inputs_to_json(small_document().inputs())

odd_values = st.one_of(
    st.none(), st.booleans(), st.integers(-10**500, 10**500), st.floats(),
    st.text(st.characters(codec=None, exclude_categories=()), max_size=20),
    st.just("J\ud800"), st.lists(st.integers(), max_size=3), st.dictionaries(st.text(), st.none(),
                                                                             max_size=2))


@st.composite
def recovery_bytes(draw) -> bytes:
    kind = draw(st.sampled_from(["field", "version", "cut", "bytes"]))
    data = json.loads(json.dumps(VALID))
    if kind == "field":
        where = draw(st.sampled_from([("inputs", "jobs", 0), ("inputs", "sites", 1),
                                      ("settings",), ("drivers",), ("recovery",)]))
        record = data
        for key in where:
            record = record.setdefault(key, {}) if isinstance(key, str) else record[key]
        if isinstance(record, dict):
            record[draw(st.sampled_from(["job", "start", "lat", "turnaround_seconds", "name",
                                         "x"]))] = draw(odd_values)
        else:
            data[where[0]] = draw(odd_values)
    elif kind == "version":
        data["schema_version"] = draw(odd_values)
    text = json.dumps(data, ensure_ascii=draw(st.booleans()))
    raw = text.encode("utf-8", "surrogatepass")
    if kind == "cut":
        raw = raw[:draw(st.integers(0, len(raw)))]
    elif kind == "bytes":
        raw = draw(st.binary(max_size=200))
    return raw


@FUZZ
@given(recovery_bytes())
def test_the_scan_never_raises_and_never_loses_a_file(raw):
    with tempfile.TemporaryDirectory() as folder:
        recovery = Path(folder) / "recovery"
        recovery.mkdir()
        path = recovery / "fuzz.shipgui"
        path.write_bytes(raw)
        scan = find_recoveries(Path(folder))
        for found in scan.found:
            found.lock.unlock()
        aside = recovery / f"fuzz.shipgui{SET_ASIDE_SUFFIX}"
        kept = path if path.exists() else aside
        assert kept.read_bytes() == raw
        assert (len(scan.found), len(scan.set_aside), len(scan.kept)).count(1) == 1
