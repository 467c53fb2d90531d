# Decodes NMEA 0183 route sentences (WPL, RTE; one per line of the file argv[1]) with pynmea2
# 1.15.0 (Debian package python3-nmea2, a general-purpose NMEA 0183 parser; checksums checked:
# parse(check=True) refuses a wrong or missing one) and prints one JSON object per line.
# Run with Debian's /usr/bin/python3. Used by tests/helm/test_helm_serial.cpp.
import json
import sys

import pynmea2
from pynmea2.nmea_utils import dm_to_sd

with open(sys.argv[1], encoding="ascii") as f:
    for line in f.read().splitlines():
        if not line:
            continue
        out = {"line": line}
        try:
            m = pynmea2.parse(line, check=True)
            out["talker"] = m.talker
            out["type"] = m.sentence_type
            if m.sentence_type == "WPL":
                # pynmea2's WPL has no lat/lon in degrees; its ddmm.mmmm converter does it.
                out["lat"] = dm_to_sd(m.lat) * (-1 if m.lat_dir == "S" else 1)
                out["lon"] = dm_to_sd(m.lon) * (-1 if m.lon_dir == "W" else 1)
                out["id"] = m.waypoint_id
            elif m.sentence_type == "RTE":
                out["total"] = int(m.num_in_seq)
                out["number"] = int(m.sen_num)
                out["mode"] = m.start_type
                out["route_id"] = m.active_route_id
                out["waypoints"] = m.waypoint_list
        except Exception as e:  # reported to the test, never hidden
            out["error"] = f"{type(e).__name__}: {e}"
        print(json.dumps(out))
