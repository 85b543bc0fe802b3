"""Plan watering windows for each bed from recent moisture readings.

The planner is deliberately simple: it averages the readings of the last
few hours, compares the average with the bed's target, and opens a window
in the next cool part of the day when the soil is too dry.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import datetime, timedelta

# Readings older than this are not used for the average.
LOOKBACK = timedelta(hours=6)


@dataclass(frozen=True)
class Reading:
    """One value from one sensor at one moment."""

    sensor: str
    taken_at: datetime
    moisture: float


@dataclass(frozen=True)
class Window:
    """A period in which the valves of one bed stay open."""

    bed: str
    starts_at: datetime
    minutes: int


def average_moisture(readings: list[Reading], now: datetime) -> float | None:
    """Return the mean moisture of the recent readings, or None if there are none.

    Readings are loaded form disk by the caller; this function only looks at
    the values, so it is easy to test.
    """
    recent = [r.moisture for r in readings if now - r.taken_at <= LOOKBACK]
    if not recent:
        return None
    return sum(recent) / len(recent)


def plan_bed(bed: str, readings: list[Reading], target: float, now: datetime) -> Window | None:
    """Decide whether a bed needs water before the next check.

    A bed that is already wet enough gets no window. An error that occured
    while reading a sensor shows up as a missing value and is skipped here.
    """
    level = average_moisture(readings, now)
    if level is None or level >= target:
        return None
    # Water in the early morning, when less of it is lost to the sun.
    start = now.replace(hour=5, minute=0, second=0, microsecond=0)
    if start <= now:
        start += timedelta(days=1)
    return Window(bed, start, minutes=15)
