"""Offsets and naive-local readings from Python's zoneinfo (PEP 615), which
reads the same TZif files and applies their footer rule past the table.

Usage: zone_offsets.py ZONE START STEP COUNT
For each t = START + k*STEP (k < COUNT) prints "offset utc": the UTC offset in
seconds at the instant t, and the instant at which the naive local time whose
wall clock reads like t in UTC happens, taking fold=0 (PEP 495: the earlier
instant in a repeated hour, the offset before the change in a skipped one).
"""
import sys
from datetime import datetime, timedelta, timezone
from zoneinfo import ZoneInfo

zone = ZoneInfo(sys.argv[1])
start, step, count = (int(a) for a in sys.argv[2:5])
epoch = datetime(1970, 1, 1)
out = []
for k in range(count):
    t = start + k * step
    offset = int(datetime.fromtimestamp(t, timezone.utc).astimezone(zone).utcoffset().total_seconds())
    local = (epoch + timedelta(seconds=t)).replace(tzinfo=zone, fold=0)
    out.append(f"{offset} {int(local.timestamp())}")
print("\n".join(out))
