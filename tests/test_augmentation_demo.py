"""The yaw-damper demo variant and the report's augmentation section (issue 14).

The demo data are invented (a scenario, not a reference); what is checked is the pipeline:
the bare tip-tank airframe's cruise Dutch roll is below the MIL-F-8785C Level 1 damping
(Table VI as carried in latdyn/criteria/mil-f-8785c.toml with its sources) and the augmented
variant's closed loop and equivalent system are within it; the report carries the section.
"""

import json

import pytest

from latdyn.assessment import assess
from latdyn.report import write_report
from latdyn.turbulence import Gust

from conftest import ROOT

BARE = ROOT / "aircraft" / "kestrel-k40-tip-tanks.toml"
DAMPED = ROOT / "aircraft" / "kestrel-k40-tip-tanks-yaw-damper.toml"


def dutch_level(assessment, condition, equivalent=False):
    item = next(c for c in assessment.conditions if c.name == condition)
    entries = item.equivalent_assessments if equivalent else item.assessments
    return next(a for a in entries if a.mode == "dutch_roll" and a.criteria == "mil-f-8785c").level


def test_yaw_damper_restores_level_1_in_cruise():
    bare = assess(str(BARE))
    damped = assess(str(DAMPED))
    assert dutch_level(bare, "cruise") == 2
    assert dutch_level(damped, "cruise") == 1
    assert dutch_level(damped, "cruise", equivalent=True) == 1


@pytest.mark.slow
def test_report_has_the_augmentation_section(tmp_path):
    base = ROOT / "aircraft" / "kestrel-k40.toml"
    folder = write_report([str(base)], str(tmp_path / "report"), [str(BARE), str(DAMPED)], progress=False,
                          gust=Gust(1.5, 500.0))
    text = (tmp_path / "report" / "report.md").read_text()
    assert "## Stability augmentation" in text
    assert "Modes of the closed loop" in text and "Equivalent low-order systems" in text
    assert "RMS response to Dryden lateral turbulence" in text
    results = json.loads((tmp_path / "report" / "results.json").read_text())
    entries = results["turbulence"]
    assert {e["model"] for e in entries} == {"augmented", "bare airframe"}
    assert all(set(e["turbulence"]) == {"sigma_v", "scale_length", "rms"} for e in entries)
    assert folder.endswith("report")
