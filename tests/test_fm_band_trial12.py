"""The small-rotor figure-of-merit band is given one way (new-user trial 12, finding 12: README
said 0.35-0.45, the whoop's sheet 0.40-0.50, `static` 0.41-0.51, without a word that the band
depends on the blade Reynolds number). Values from published micro-rotor hover tests (Kroo and
Kunz 2001; Bohorquez and Pines 2003; Hein and Chopra 2007; from memory): about 0.3-0.4 for rotors
of a few cm, 0.4-0.55 at Reynolds numbers 1e4..3e4.
"""

import os

from estimator.preflight import low_reynolds as lr
from io_helpers import ROOT, run

BAND = "the band rises with the blade Reynolds number, from 0.35-0.45 at 5000 and below to 0.45-0.55 at 30000"


def test_the_band_constants_and_their_words():
    assert (lr.FALLBACK_FM_LOW, lr.FALLBACK_FM_HIGH, lr.FALLBACK_FM_SPREAD) == (0.35, 0.45, 0.1)
    assert lr.band_text() == BAND


def test_readme_static_and_the_sheet_say_the_band_one_way():
    with open(os.path.join(ROOT, "README.md"), encoding="utf-8") as fh:
        readme = " ".join(fh.read().split())
    assert "from 0.35-0.45 at 5000 and below to 0.45-0.55 at 30000" in readme
    code, out, err = run(["static", "--diameter", "40mm", "--thrust", "22.5g", "--altitude", "0m",
                          "--temperature", "30C"])
    assert code == 0, err
    assert BAND in " ".join(out.split())
