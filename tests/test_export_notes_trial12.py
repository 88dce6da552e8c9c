"""`export --out` writes the notes the screen shows (what the values mean, the fit's warnings) into
the settings file as '# !' lines, as its help says (new-user trial 12, finding 10: the screen had
four '! fit:' lines, the file none). Common practice: a settings file kept beside the controller
carries its own caveats.
"""

from io_helpers import MAP, PARAMS, run


def test_the_settings_file_carries_every_note_the_screen_shows(tmp_path):
    out = tmp_path / "settings.txt"
    code, text, err = run(["export", PARAMS, "--map", MAP, "--out", out])
    assert code == 0, err
    screen = " ".join(text.split())
    written = out.read_text().splitlines()
    notes = [line[len("# ! "):] for line in written if line.startswith("# ! ")]
    assert any(n.startswith("fit: ") for n in notes), written   # the example set has fit warnings
    for note in notes:
        assert "! " + note in screen, note
    assert screen.count("! ") == len(notes)
    # still a settings file liftcal wrote and may replace
    code, text, err = run(["export", PARAMS, "--map", MAP, "--out", out])
    assert code == 0 and "replaced" in text + err, err
