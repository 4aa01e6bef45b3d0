"""A run warns once per shield whose penetrations come from outside its equation's range."""

import re
import warnings

from pockmark.errors import ModelRangeWarning
from pockmark.io.config import load_case
from pockmark.report.summary import build_summary
from pockmark.risk.assess import assess


def test_one_warning_per_shield_with_parameter_range_and_share(shadowed_box_case):
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        run = assess(load_case(shadowed_box_case))
    messages = [str(w.message) for w in caught if issubclass(w.category, ModelRangeWarning)
                and "of its expected penetrations" in str(w.message)]
    summary = build_summary(run)
    for tag in ("hull", "panel"):
        (message,) = [m for m in messages if m.startswith(f"shield {tag!r}:")]
        share = summary["by_tag"][tag]["share_outside_validity"]
        assert re.search(rf"{round(100 * share)}% of its expected penetrations", message)
        assert "impact_velocity ≤ 8 km s⁻¹" in message
