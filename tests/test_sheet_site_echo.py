"""The pre-flight sheet's site line says the site as read (new-user trial 24, finding 6): a vehicle
file's "altitude": "2000ft" showed only the air it gave ("air 1.083 kg/m^3 ... density altitude
1268 m"), so an ft/m slip was easy to miss, though mass and propeller are echoed "as written".
Reference: 2000 ft = 609.6 m (the international foot, 0.3048 m exactly: NIST SP 811, appendix B).
"""

import json
import os

from io_helpers import ROOT
from trial_helpers import json_file, ok


def test_the_site_line_echoes_altitude_and_temperature_in_si(tmp_path):
    with open(os.path.join(ROOT, "schemas", "examples", "valid", "vehicle-demo-quad.json"), encoding="utf-8") as fh:
        doc = json.load(fh)
    doc["site"] = {"altitude_m": "2000ft", "temperature_C": 30}
    path = json_file(tmp_path, doc)
    site = [line for line in ok("hover", path).split("\n") if line.startswith("site")]
    assert site and site[0].split()[1:4] == ["610", "m,", "30"], site
