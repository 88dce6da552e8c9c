"""A parameter set edited since liftcal wrote it (its content seal broken, estimator.seal): what
each command says of it.

A command that only reads the set says so beside its result (edited_set_note); export and
firmware, whose settings and bundle fly, refuse it unless FROM_EDITED is given
(edited_set_warning). An edit that leaves the set inconsistent is refused by every command with
the edit named first, then the inconsistency (edited_refusal; a new-user trial: a hand-set hover
command was refused as if the fit had contradicted itself). FROM_EDITED takes one such edit:
a hover command moved outside the fit's 95 % interval. The hover block is the fit's summary for
the vehicle; no liftcal computation reads it (the pre-flight sheet, the watch and its bundle work
from the motor and power models), so the edited value can be exported as the person's own while
the interval stays the fit's. Every other inconsistency is in values liftcal computes with (the
thrust curve, the motor model, the schema's bounds), where a set that contradicts itself gives
numbers no rotor makes: no option takes it.

Imports no liftcal module that imports estimator.params (params reads this one).
"""

from estimator.errors import InputError

# the option that lets firmware and export use a set edited since liftcal wrote it
FROM_EDITED = "--from-edited"
# the edit FROM_EDITED takes although the set's own check refuses it (estimator.params.check_params)
HOVER_EDIT_PATH = "$.hover.hover_command_interval_95"
# the end of the set's credibility refusals (estimator.params): the fit or an edit; an edited set's
# refusal says which itself, so it leaves this end off
FIT_OR_EDIT = "a fit that broke down or an edited file: fit the sweep again"


def is_edited(path):
    """True when the file at ``path`` carries a content seal that no longer matches its text."""
    from estimator.outputs import seal_of

    return seal_of(path) == "broken"


def _edited_words(path):
    return "%s was EDITED since liftcal wrote it (its content seal no longer matches)" % path


def edited_refusal(path, message, from_edited=None):
    """The InputError for a set at ``path`` that fails its own checks after an edit: the edit first,
    then the inconsistency (``message``, the check's own line without its leading file name), then
    what to do. from_edited: None for a command without FROM_EDITED, else whether it was given."""
    problem = message[len(path) + 2:] if message.startswith(path + ": ") else message
    problem = problem[:-len(FIT_OR_EDIT) - 2] if problem.endswith(": " + FIT_OR_EDIT) else problem
    hover = problem.startswith(HOVER_EDIT_PATH)
    refit = "fit the bench sweep again%s rather than editing the set" % (" with --vehicle" if hover else "")
    if hover and from_edited is None:
        todo = ("%s; `liftcal export %s` exports the edited hover command (`liftcal firmware %s` takes it "
                "too: the bundle does not read it)" % (refit, FROM_EDITED, FROM_EDITED))
    elif hover:
        todo = "%s, or add %s to use the edited hover command" % (refit, FROM_EDITED)
    elif from_edited is None:
        todo = refit
    else:
        todo = ("%s; %s does not take this edit: liftcal computes with these values, and a set that "
                "contradicts itself gives numbers no rotor makes" % (refit, FROM_EDITED))
    return InputError("%s, and the edit leaves it inconsistent: %s%s: %s"
                      % (_edited_words(path), problem, " (the interval is the fit's)" if hover else "", todo))


def edited_set_warning(path, allowed, makes, params=None):
    """None for a parameter set whose content seal is intact (or absent: an older liftcal);
    for one edited since liftcal wrote it (seal broken, estimator.seal): InputError unless
    ``allowed`` (FROM_EDITED given), else the warning line to print first. makes: what the
    command writes from it ("the board bundle", "the settings"); params: the set as read, whose
    hover command outside the fit's interval the warning names. check and hover --params say
    the same of an edited set; the bundle and settings fly, so they refuse by default."""
    if not is_edited(path):
        return None
    words = _edited_words(path)
    if not allowed:
        raise InputError("%s: %s would carry values no fit gave; refit the bench sweep, or add %s "
                         "to use the edited values" % (words, makes, FROM_EDITED))
    hover = (params or {}).get("hover") or {}
    lo, hi = hover.get("hover_command_interval_95") or (None, None)
    outside = ("; its hover.hover_command %g lies outside the fit's 95 %% interval [%g, %g], which the edit "
               "left as the fit gave it" % (hover["hover_command"], lo, hi)
               if lo is not None and hover.get("hover_command") is not None
               and not lo <= hover["hover_command"] <= hi else "")
    return "%s: %s carries the edited values, not the fit's (%s)%s" % (words, makes, FROM_EDITED, outside)


def edited_set_note(path, use):
    """None, or for a parameter set edited since liftcal wrote it (seal broken) the warning of a
    command that only reads it (use: what it does with it: "this replay judges the log"), as hover
    --params gives one (new-user trial 14, finding 4: replay used an edited set without a word)."""
    if not is_edited(path):
        return None
    return ("%s was edited since liftcal wrote it (its content seal no longer matches): %s by the edited "
            "values, not the fit's; fit the sweep again rather than editing the set" % (path, use))
