"""What netfolio's results are called and how they read: one registry of measures, statistics
and methods with their definitions and references, and one formatter for numbers and counts.

Analysis keeps names and numbers only; figures, pages and downloads take every word from here."""

from __future__ import annotations

from .formatting import (DIGITS, MISSING, count, count_of, exact_text, is_missing, list_in_words,
                         node_name,
                         number, plural, share, signed, sort_key, value_text)
from .measures import (COMMUNITY, HISTOGRAM_MEASURES, MEASURE_NAMES, MEASURES, PATH_MEASURES,
                       SIZE_MEASURES, MeasureEntry, measure, omission_reason)
from .methods import (COMMUNITY_METHODS, LAYOUT_REFERENCES, PALETTE_REFERENCES,
                      SAMPLING_REFERENCES, STABILITY_REFERENCES, WEIGHT_REFERENCES,
                      CommunityMethod, community_method)
from .references import REFERENCES, Reference
from .statistics import (NEUTRAL_BELOW, STATISTICS, Reading, StatisticEntry, left_out_sentence,
                         reading, statistic, statistic_title, undefined_reason)

__all__ = [
    "COMMUNITY",
    "COMMUNITY_METHODS",
    "DIGITS",
    "HISTOGRAM_MEASURES",
    "LAYOUT_REFERENCES",
    "MEASURES",
    "MEASURE_NAMES",
    "MISSING",
    "NEUTRAL_BELOW",
    "PALETTE_REFERENCES",
    "PATH_MEASURES",
    "REFERENCES",
    "SAMPLING_REFERENCES",
    "SIZE_MEASURES",
    "STABILITY_REFERENCES",
    "STATISTICS",
    "WEIGHT_REFERENCES",
    "CommunityMethod",
    "MeasureEntry",
    "Reading",
    "Reference",
    "StatisticEntry",
    "community_method",
    "count",
    "count_of",
    "exact_text",
    "is_missing",
    "left_out_sentence",
    "list_in_words",
    "measure",
    "node_name",
    "number",
    "omission_reason",
    "plural",
    "reading",
    "share",
    "signed",
    "sort_key",
    "statistic",
    "statistic_title",
    "undefined_reason",
    "value_text",
]
