"""The review family: findings about the waivers themselves, and the safety-caution marker.
Not run on the model: speccheck/waivers.py reports these, and they cannot be waived. Defined
here so that every rule is defined in rules/."""

from __future__ import annotations

from speccheck.registry import define

define("review.waiver-reason", level="warning",
       title="A waiver without a reason",
       explanation="""
       A waiver tells every later reader that a finding was looked at and accepted on purpose.
       Without the reason, nobody can tell a considered decision from a finding that was only
       silenced, and nobody can tell when the reason stops holding. speccheck therefore does not
       honour a waiver without a reason: the finding it names stays open.
       """,
       fix="Write the reason after the word 'because': `# waive RULE-ID because REASON` (why it is "
           "acceptable here).",
       source="speccheck waiver syntax",
       verify="Re-run the check: the finding shows as waived with your reason, and this finding is gone.")

define("review.waiver-unused", level="warning",
       title="A waiver that matches no finding",
       explanation="""
       The waiver names a rule that found nothing on the line below it (or on its own line).
       Usually the plan was corrected and the waiver was left behind, or the waiver sits above
       the wrong line. A stale waiver would quietly cover a new problem later, so it is reported.
       """,
       fix="Delete the waiver if the finding is gone, or move it onto (or directly above) the line the "
           "finding points at.",
       source="speccheck waiver syntax",
       verify="Re-run the check without the waiver: if nothing of that rule appears there, the waiver was "
              "stale.")

define("review.waiver-unknown-rule", level="warning",
       title="A waiver names no rule that can be waived",
       explanation="""
       The rule id in the waiver is not one speccheck knows (often a typing slip), or it names an
       input or review finding, which cannot be waived: input findings mean the plan could not be
       read, and review findings are about the waivers themselves.
       """,
       fix="Correct the rule id (`speccheck rules` lists them), or fix the input problem instead of waiving "
           "it.",
       source="speccheck waiver syntax",
       verify="`speccheck explain RULE-ID` prints the rule when the id is right.")

define("review.safety-caution", level="note",
       title="Safety cautions for this build",
       explanation="""
       Some builds can hurt someone: mains voltage, high voltage, heat, fire. For those speccheck
       shows the usual cautions before anything else. They are reminders, not findings about the
       plan, and they never change the exit code. speccheck is a review aid, not an approval:
       local electrical codes and licensed practice decide.
       """,
       fix="Read the cautions; have mains wiring checked by someone qualified before it is powered.",
       source="common practice",
       verify="Before power is applied: unplug, discharge, and check the earth bond and the primary fuse.")
