"""Where the board reads the watch's outputs: both READMEs name the places in ``Watch.data``
that the kernel writes (estimator/core/watch_layout.OUTPUT_AT), not attributes, which the kernel
does not have (the top README once said ``w.residual_permille``, an AttributeError on the board)."""

import os
import re

from estimator.core.watch import Watch
from estimator.core.watch_layout import OUTPUT_AT
from estimator.watch.bundle import readme_text
from estimator.watch.config import as_tuple, make_config
from watch_helpers import demo_fit_params

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


AT_PHRASE = r"{name}`?(?: \(permille\))? at `(?:w\.data)?\[(\d+)\]`"   # 'name` at `w.data[i]`', 'name at `[i]`'
LISTED = r"\[(\d+)\] ``?{name}``?"          # '[i] `name`' (markdown) or '[i] ``name``' (docstring)


def _places(text, pattern=AT_PHRASE):
    """{output name: index} from the phrases of the pattern in text."""
    flat = " ".join(text.split())
    found = {}
    for name, _ in OUTPUT_AT:
        m = re.search(pattern.format(name=re.escape(name)), flat)
        if m:
            found[name] = int(m.group(1))
    return found


def test_board_readme_names_the_kernels_places():
    config = make_config(demo_fit_params())[0]
    with open(os.path.join(ROOT, "firmware_port", "README.md"), encoding="utf-8") as fh:
        text = readme_text(fh.read(), config)
    assert "{at_" not in text
    assert _places(text) == dict(OUTPUT_AT)


def test_top_readme_names_the_kernels_places():
    with open(os.path.join(ROOT, "README.md"), encoding="utf-8") as fh:
        text = fh.read()
    assert _places(text) == dict(OUTPUT_AT)
    assert not re.search(r"w\.(residual_permille|thrust_mN|hover_permille|mass_g)\b", text)


def test_the_places_hold_the_outputs():
    w = Watch(as_tuple(make_config(demo_fit_params())[0]))
    for _ in range(200):                     # 20 s at 10 Hz: blocks of flight time written
        w.update(100, 520, 15000, 19000)
    at = dict(OUTPUT_AT)
    assert w.data[at["thrust_mN"]] > 0 and w.data[at["hover_permille"]] > 0
    assert not hasattr(w, "residual_permille")


def test_contributor_guide_and_kernel_docstring_name_the_kernels_places():
    # DEVELOPERS.md listed the outputs one place too low ([30] mass_g ... [34] hover_permille)
    # after the kernel's state list grew: a contributor reading it would take bm for mass_g.
    import estimator.core.watch as kernel
    with open(os.path.join(ROOT, "DEVELOPERS.md"), encoding="utf-8") as fh:
        assert _places(fh.read(), LISTED) == dict(OUTPUT_AT)
    assert _places(kernel.__doc__, LISTED) == dict(OUTPUT_AT)
