"""How the terminal summary and the report word and round a run, from the result document only.

Display rounding (temperatures and times to 0.1, factors to 4 significant figures; the exact values
stay in results.json), warnings grouped by kind with the members they name, the members that fail or
fall short and why, the equivalence routes that would accept what the direct check rejects, and the
specified design set beside the proposed one in a sizing run.

Everything here reads the document of :func:`steelfire.outputs.document.build` (the ``--json``
document) or :func:`~steelfire.outputs.document.full` (results.json) and compares the numbers and flags
it holds; nothing is recomputed.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field

DASH = "\u2014"

#: Significant figures of a factor or other derived quantity as displayed.
FACTOR_SIGNIFICANT = 4
#: Significant figures of an input value as displayed (the case's own figures, trailing zeros dropped).
INPUT_SIGNIFICANT = 6
#: Decimals of temperatures [C], times [min] and thicknesses [mm] as displayed.
FIXED_DECIMALS = 1

#: Labels of the time-equivalence routes (document keys of ``members[i].equivalence``).
ROUTE_LABELS = {"annex_f": "Annex F", "annex_f_small_compartment": "Annex F eq (F.3)", "cib_w14": "CIB W14",
                "equal_temperature": "equal steel temperature"}
ROUTE_KEYS = {"annex_f": "annex_f_min", "annex_f_small_compartment": "annex_f_small_compartment_min",
              "cib_w14": "cib_w14_min", "equal_temperature": "equal_temperature_min"}


# ----------------------------------------------------------------------------------------------
# numbers


def is_number(v) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool)


def _strip(s: str) -> str:
    if "." in s:
        s = s.rstrip("0").rstrip(".")
    return "0" if s in ("-0", "") else s


def significant(v, digits: int = FACTOR_SIGNIFICANT) -> str:
    """``v`` to ``digits`` significant figures in plain notation, trailing zeros dropped.

    >>> significant(0.0870253), significant(1429.17), significant(3.11831), significant(25000.7)
    ('0.08703', '1429', '3.118', '25000')
    """
    v = float(v)
    if v == 0 or not math.isfinite(v):
        return "0" if v == 0 else str(v)
    exp = math.floor(math.log10(abs(v)))
    decimals = digits - 1 - exp
    if decimals <= 0:
        return _strip(f"{round(v, decimals):.0f}")
    return _strip(f"{v:.{decimals}f}")


def fixed(v, decimals: int = FIXED_DECIMALS) -> str:
    """``v`` to ``decimals`` decimals (a temperature in C, a time in min): ``fixed(642.14) == '642.1'``."""
    s = f"{float(v):.{decimals}f}"
    return s[1:] if s.startswith("-") and float(s) == 0 else s


#: The most decimals a value is shown with beside its limit (:func:`decimals_apart`).
MOST_DECIMALS = 4


def decimals_apart(a, b) -> int:
    """Decimals (from one up to :data:`MOST_DECIMALS`) at which ``a`` and its limit ``b``, shown side by side,
    do not look equal unless they are: 549.96 beside a 550 critical is shown 549.96, not 550.0."""
    for d in range(FIXED_DECIMALS, MOST_DECIMALS + 1):
        if a == b or fixed(a, d) != fixed(b, d):
            return d
    return MOST_DECIMALS


def fixed_apart(a, b) -> tuple:
    """``a`` and its limit ``b`` as texts with the decimals of :func:`decimals_apart` (numbers only)."""
    d = decimals_apart(a, b)
    return fixed(a, d), fixed(b, d)


def outward(v, up: bool, decimals: int) -> str:
    """``v`` as text with ``decimals`` decimal places, rounded up (``up``) or down: the ends of an interval
    shown without moving them inwards (a shown upper end is never below the computed one). "-" for None."""
    if v is None:
        return DASH
    scale = 10.0 ** decimals
    r = (math.ceil if up else math.floor)(round(float(v) * scale, 6)) / scale
    return f"{r:.{decimals}f}"


def ceiling(v, decimals: int = FIXED_DECIMALS) -> str:
    """``v`` rounded up to ``decimals`` decimals: a required thickness is never shown below its value."""
    scale = 10 ** decimals
    return f"{math.ceil(float(v) * scale - 1e-9) / scale:.{decimals}f}"


#: Display kinds: how a value is rounded for display.
KINDS = ("temperature", "time", "thickness", "required_thickness", "factor", "input", "count")


def kind_of(key: str, unit: str | None = None) -> str:
    """The display kind of a document value from its key (unit suffix) or its unit."""
    k = key.rsplit(".", 1)[-1]
    u = (unit or "").strip()
    if k.endswith("_C") or u in ("C", "\u00b0C", "degC"):
        return "temperature"
    if k.endswith("_min") or u == "min":
        return "time"
    if k.endswith("_mm") or u == "mm":
        return "thickness"
    return "factor"


def fmt(v, kind: str = "factor", none: str = DASH) -> str:
    """A document value as displayed: None as ``none``, booleans as yes/no, text as is, numbers by kind."""
    if v is None:
        return none
    if isinstance(v, bool):
        return "yes" if v else "no"
    if isinstance(v, str):
        return v
    if isinstance(v, (list, tuple)):
        return ", ".join(fmt(x, kind, none) for x in v)
    if isinstance(v, dict):
        return ", ".join(f"{k} {fmt(x, kind_of(k), none)}" for k, x in v.items())
    if kind == "count" or (isinstance(v, int) and kind in ("factor", "input")):
        return str(v)
    if kind in ("temperature", "time", "thickness"):
        return fixed(v)
    if kind == "required_thickness":
        return ceiling(v)
    if kind == "input":
        return significant(v, INPUT_SIGNIFICANT)
    return significant(v, FACTOR_SIGNIFICANT)


def precision(text: str, kind: str) -> float:
    """Largest difference between a displayed number ``text`` of ``kind`` and the value it shows."""
    if kind == "required_thickness":
        return 10.0 ** -FIXED_DECIMALS
    if "." in text:
        return 0.5 * 10.0 ** -len(text.split(".")[1])
    digits = len(text.lstrip("-")) - len(text.lstrip("-").rstrip("0"))
    return 0.5 * 10.0 ** digits


# ----------------------------------------------------------------------------------------------
# names


def clip_name(name: str, most: int) -> str:
    """A name cut to ``most`` characters in the middle (start and end kept: names often differ at the end)."""
    name = str(name)
    if most <= 0 or len(name) <= most:
        return name
    if most < 5:
        return name[: most - 1] + "\u2026"
    head = (most - 1 + 1) // 2
    tail = most - 1 - head
    return name[:head] + "\u2026" + (name[-tail:] if tail else "")


def names_list(names, more: int = 0, most: int | None = None) -> str:
    """Names joined by commas, the first ``most`` of them, then how many more."""
    names = list(names)
    extra = more
    if most is not None and len(names) > most:
        extra += len(names) - most
        names = names[:most]
    text = ", ".join(names)
    return f"{text} and {extra} more" if extra else text


# ----------------------------------------------------------------------------------------------
# warnings


@dataclass
class WarningGroup:
    """One kind of warning: its message (``template``, with ``{members}`` where the member names
    stood), the members it names in run order, how many more a warning named only by number, and
    how many warnings of the run it stands for."""

    template: str
    members: list = field(default_factory=list)
    more: int = 0
    count: int = 1
    original: str = ""

    def text(self, most: int | None = None) -> str:
        """The warning in one line; the member names listed (the first ``most``) where it names any."""
        if self.count == 1 and (most is None or len(self.members) <= most):
            return self.original
        if "{members}" not in self.template:
            return self.template
        return self.template.replace("{members}", names_list(self.members, self.more, most), 1) \
            .replace("{members}", "")


_MORE = re.compile(r" and (\d+) more")
_HOLE = "\x00"


def _name_runs(text: str, names):
    """``text`` with each run of member names (joined by ', ' / ' and ', maybe ending ' and N more')
    replaced by one placeholder; the names found, in order, and the count of 'N more'."""
    found = [n for n in names if n and n in text]
    if not found:
        return text, [], 0
    found.sort(key=len, reverse=True)
    alt = "|".join(re.escape(n) for n in found)
    one = rf"(?<![0-9A-Za-z_])(?:{alt})(?![0-9A-Za-z_])"
    run = re.compile(rf"{one}(?:(?:, and |, | and ){one})*(?: and \d+ more)?")
    hits, more = [], 0

    def repl(m):
        nonlocal more
        s = m.group(0)
        mm = _MORE.search(s)
        if mm and s.endswith(mm.group(0)):
            more += int(mm.group(1))
            s = s[: -len(mm.group(0))]
        hits.extend(x.group(0) for x in re.finditer(one, s))
        return _HOLE

    out = run.sub(repl, text)
    return out, hits, more


def group_warnings(doc) -> list:
    """The run's warnings grouped by kind (:class:`WarningGroup`), in the order they first appear.

    Two warnings are of one kind when they read the same once the member names in them are taken out
    (``B2-A1: protection ... assessed ...`` and ``B2-A2: protection ... assessed ...``); exact repeats
    are one warning.
    """
    names = list(dict.fromkeys(m["name"] for m in doc.get("members") or []))
    groups: dict = {}
    for w in doc.get("warnings") or []:
        tmpl, found, more = _name_runs(w, names)
        key = tmpl
        g = groups.get(key)
        if g is None:
            groups[key] = WarningGroup(template=tmpl.replace(_HOLE, "{members}"), members=list(dict.fromkeys(found)),
                                       more=more, count=1, original=w)
        else:
            if w == g.original and g.count == 1:
                continue  # an exact repeat
            g.count += 1
            g.members += [n for n in found if n not in g.members]
            g.more += more
    return list(groups.values())


def warning_lines(doc, most: int | None = None) -> list:
    """The warnings as shown: one (text, count) per kind (:func:`group_warnings`). The warning that
    equivalence routes fall more than 10 % below the direct answer is said as a finding only where it
    changes a conclusion (:func:`route_conflicts`); elsewhere it says that no verdict changes."""
    ms = doc.get("members") or []
    changed = list(dict.fromkeys(m["name"] for m in ms if route_conflicts(doc, m)))
    out = []
    for g in group_warnings(doc):
        if re.search(r"\bunconservative\b", g.template) and "{members}" in g.template:
            n = len(g.members) + g.more
            text = (f"Annex F / CIB W14 times more than 10 % below the equal-steel-temperature time for {n} "
                    f"member{'s' if n != 1 else ''}; ")
            text += (f"unconservative where it changes a conclusion: {names_list(changed, 0, most)}." if changed
                     else "no verdict changes: the direct route governs.")
        else:
            text = g.text(most=most)
        out.append((text, g.count))
    return out


def short_cautions(doc) -> list:
    """Each caution of the document in short form: parentheses dropped, cut at the first ';', lower case."""
    out = []
    for c in doc.get("cautions") or []:
        s = re.sub(r" \([^()]*\)", "", c)
        s = s.split(";", 1)[0].strip().rstrip(".")
        if len(s) > 1 and s[0].isupper() and s[1].islower():
            s = s[0].lower() + s[1:]
        out.append(s)
    return out


# ----------------------------------------------------------------------------------------------
# members that fail or fall short, routes that would accept them


def horizon(doc):
    return (doc.get("analysis") or {}).get("standard_horizon_min")


def std_time_text(doc, v) -> str:
    """A standard-fire time [min] as displayed; null: beyond the standard-fire horizon."""
    if v is None:
        h = horizon(doc)
        return f"> {fmt(h, 'input')}" if h is not None else DASH
    return fixed(v)


def std_time_apart(doc, m) -> str:
    """Member ``m``'s standard-fire time to critical as displayed beside its required period: with the
    decimals that keep the two apart (14.96 beside 15 is shown 14.96, not 15.0)."""
    v, req = m.get("standard_fire_time_to_critical_min"), m.get("required_minutes")
    if is_number(v) and is_number(req):
        return fixed(v, decimals_apart(v, req))
    return std_time_text(doc, v)


def specified_word(m, specified_ok) -> str | None:
    """The word for the specified design of member entry ``m`` in a sizing run: "meets", or where it does not,
    the verdict the check gives at the specified thicknesses (FAIL, SHORT or marginal; ``sizing.specified_*``);
    None: no thickness specified."""
    if specified_ok is None:
        return None
    if specified_ok:
        return "meets"
    s = m.get("sizing") or {}
    if s.get("specified_passes") is False:
        return "FAIL"
    if s.get("specified_meets_required_period") is False:
        return "SHORT"
    if s.get("specified_marginal"):
        return "marginal"
    return "SHORT"   # a document without the specified design's verdicts


def proposed_word(m, proposed_ok) -> str | None:
    """The word for a sizing proposal of member entry ``m``: "meets", or where it does not, the member's own
    verdict word as the verdict tables show it (FAIL, SHORT or marginal); None: nothing proposed."""
    if proposed_ok is None:
        return None
    if proposed_ok:
        return "meets"
    dv, pv = design_fire_verdict(m), period_verdict(m)
    return "FAIL" if dv == "FAIL" else "SHORT" if pv == "SHORT" else "marginal" if "marginal" in (dv, pv) else "SHORT"


def route_conflicts(doc, m) -> list:
    """Routes that would accept member ``m`` where the direct check does not (each a dict: route,
    label, time_min, flagged (the document lists it as unconservative), text).

    Two conclusions are compared. The period: a route's equivalent time within the required period
    (``meets_required[route]``) while the equal-steel-temperature time is not. The member: a route's
    time within the member's own standard-fire time to critical (``resists[route]``) while the member
    fails the design fire or the equal-temperature time exceeds that time. The eq (F.3) route carries
    no flags in the document; it is compared by its time against the same figures.
    """
    e = m.get("equivalence") or {}
    if not e:
        return []
    req = m.get("required_minutes")
    meets = e.get("meets_required") or {}
    resists = e.get("resists") or {}
    unc = set(e.get("unconservative") or [])
    d = e.get("equal_temperature_min")
    t_fi = m.get("standard_fire_time_to_critical_min")
    direct_rejects_member = (m.get("passes") is False) or (resists.get("equal_temperature") is False)
    out = []
    for r in ("annex_f", "annex_f_small_compartment", "cib_w14"):
        t = e.get(ROUTE_KEYS[r])
        if not is_number(t):
            continue
        if r == "annex_f_small_compartment":
            route_meets = is_number(req) and t <= req + 1e-9
            route_resists = t_fi is None or t_fi >= t - 1e-9
        else:
            route_meets = meets.get(r) is True
            route_resists = resists.get(r) is True
        label = ROUTE_LABELS[r]
        why = []
        if route_meets and meets.get("equal_temperature") is False:
            why.append(f"{label} time {fixed(t)} min is within the required {fmt(req, 'input')} min, but the "
                       f"equal-temperature time {std_time_text(doc, d)} min is not")
        if route_resists and direct_rejects_member:
            if m.get("passes") is False:
                direct = (f"the member fails the design fire (peak {fixed(m['peak_steel_temperature_C'])} C > "
                          f"critical {fixed(m['critical_temperature_C'])} C)")
            else:
                direct = f"the equal-temperature time {std_time_text(doc, d)} min exceeds it"
            why.append(f"{label} time {fixed(t)} min is within the member's standard-fire time to critical "
                       f"{std_time_text(doc, t_fi)} min, but {direct}")
        if why:
            flagged = r in unc or (r == "annex_f_small_compartment" and "annex_f" in unc)
            out.append({"route": r, "label": label, "time_min": t, "flagged": flagged, "text": "; ".join(why)})
    return out


@dataclass
class SizingRow:
    """A sized member: the specified thickness, the required one by each criterion, the chosen one."""

    name: str
    protection: str | None
    given_mm: float | None
    standard_period_mm: float | None
    burnout_mm: float | None
    chosen_mm: float | None
    achievable: bool | None
    change: str            # "increase" | "saving" | "none" | "new" | "bare" | "not achievable"
    change_mm: float | None
    specified_ok: bool | None   # None: no thickness specified
    proposed_ok: bool
    specified_reason: str
    note: str


def _proposed_ok(m) -> bool:
    s = m.get("sizing") or {}
    return (bool(s.get("achievable")) and m.get("passes") is True and m.get("meets_required_period") is not False
            and not m.get("marginal"))   # the entry is at the chosen thickness: a verdict within the error is not one


def sizing_rows(doc) -> list:
    """One :class:`SizingRow` per member with a sizing entry, in schedule order.

    The specified thickness is ``sizing.specified_mm`` (``given_mm`` in earlier documents). The
    specified design's verdict is ``sizing.specified_ok`` where the document gives it (the check at
    the specified thicknesses); otherwise the specified thickness must be at least the least thickness
    for each criterion (``standard_period_mm`` where the member has a required period, ``burnout_mm``
    where the document gives one), and a criterion no supplied thickness meets is not met. The reasons
    name each criterion the specified thickness falls below. A bare member keeps its own verdict. The
    proposed design is the run's check at the chosen thicknesses.
    """
    out = []
    for m in doc.get("members") or []:
        s = m.get("sizing")
        if not isinstance(s, dict):
            continue
        given = s.get("specified_mm", s.get("given_mm"))
        chosen = s.get("chosen_mm")
        std, burn = s.get("standard_period_mm"), s.get("burnout_mm")
        prot = m.get("protection")
        reasons = []
        if prot is None:
            spec = s.get("specified_ok") if "specified_ok" in s else None
            if spec is None:
                spec = m.get("passes") is True and m.get("meets_required_period") is not False
            change, change_mm = "bare", None
            if not spec:
                reasons.append("bare steel passes only within the numerical error" if m.get("marginal") and
                               m.get("passes") is True and m.get("meets_required_period") is not False
                               else "bare steel fails")
        else:
            needs = []
            if m.get("required_minutes") is not None:
                needs.append(("standard period", std))
            if burn is not None or s.get("achievable") is False:
                needs.append(("design fire", burn))
            spec = None
            if given is not None:
                spec = True
                for crit, v in needs:
                    if v is None:
                        spec = False
                        reasons.append(f"no supplied thickness meets the {crit} criterion")
                    elif given < v - 1e-9:
                        spec = False
                        reasons.append(f"specified {fmt(given, 'input')} mm is below the {ceiling(v)} mm needed "
                                       f"for the {crit}")
            if "specified_ok" in s and s["specified_ok"] is not None:
                spec = bool(s["specified_ok"])
                if not spec and not reasons:
                    reasons.append(f"the check at the specified {fmt(given, 'input')} mm fails")
                if spec:
                    reasons = []
            if chosen is None:
                change, change_mm = "not achievable", None
            elif given is None:
                change, change_mm = "new", None
            else:
                change_mm = chosen - given
                change = "increase" if change_mm > 1e-9 else ("saving" if change_mm < -1e-9 else "none")
        out.append(SizingRow(name=m["name"], protection=prot, given_mm=given, standard_period_mm=std, burnout_mm=burn,
                             chosen_mm=chosen, achievable=s.get("achievable"), change=change, change_mm=change_mm,
                             specified_ok=spec, proposed_ok=_proposed_ok(m), specified_reason="; ".join(reasons),
                             note=s.get("note") or ""))
    return out


def change_text(r: SizingRow) -> str:
    """The change from the specified to the chosen thickness: '+1.5 mm', '-2.0 mm', 'none', ..."""
    if r.change in ("increase", "saving"):
        return f"{r.change_mm:+.1f}"
    return r.change


def shortfalls(doc) -> list:
    """Members that fail the design fire, fall short of their required period, cannot be sized, or
    (sizing runs) whose specified thickness falls short: (name, [reasons]) in schedule order."""
    sized = {r.name: r for r in sizing_rows(doc)}
    out = []
    for m in doc.get("members") or []:
        why = []
        if m.get("passes") is False:
            peak, crit = fixed_apart(m["peak_steel_temperature_C"], m["critical_temperature_C"])
            why.append(f"peak steel {peak} C exceeds the critical {crit} C in the design fire")
        if m.get("meets_required_period") is False:
            why.append(f"reaches critical after {std_time_apart(doc, m)} min of standard fire, short of the "
                       f"required {fmt(m.get('required_minutes'), 'input')} min")
        if m.get("marginal"):
            why.append("verdict within the numerical error (margin below the error estimated at half the time "
                       "step): not established; run with a smaller time step")
        r = sized.get(m["name"])
        if r is not None:
            if r.achievable is False:
                why.append("sizing not achievable" + (f": {r.note}" if r.note else ""))
            if r.specified_ok is False and r.protection is not None:
                why.append("specified design: " + r.specified_reason)
        if why:
            conflicts = route_conflicts(doc, m)
            if conflicts and (m.get("passes") is False):
                why.append("; ".join(f"{c['label']} would accept it" for c in conflicts))
            out.append((m["name"], why))
    return out


def design_fire_verdict(m) -> str | None:
    """The design-fire verdict a table or figure shows for member entry ``m``: "pass", "FAIL", or
    "marginal" where the member passes by less than the error estimated at half the time step
    (|margin_C| < step_sensitivity_C): a pass within the numerical error is not one to sign. None: not
    checked."""
    p = m.get("passes")
    if p is None:
        return None
    if not p:
        return "FAIL"
    err, margin = m.get("step_sensitivity_C"), m.get("margin_C")
    if m.get("marginal") and is_number(err) and is_number(margin) and abs(margin) < err:
        return "marginal"
    return "pass"


def period_verdict(m) -> str | None:
    """The required-period verdict: "meets", "SHORT", or "marginal" where the standard-fire time to
    critical is within step_sensitivity_min of the required period. None: no period required."""
    p = m.get("meets_required_period")
    if p is None:
        return None
    if not p:
        return "SHORT"
    err, t, req = m.get("step_sensitivity_min"), m.get("standard_fire_time_to_critical_min"), m.get("required_minutes")
    if m.get("marginal") and is_number(err) and is_number(t) and is_number(req) and abs(t - req) < err:
        return "marginal"
    return "meets"


def counts(doc) -> dict:
    """Verdict counts from the members (the document's summary where present says the same)."""
    ms = doc.get("members") or []
    return {"members": len(ms),
            "pass": sum(1 for m in ms if design_fire_verdict(m) == "pass"),
            "marginal": sum(1 for m in ms if m.get("marginal")),
            "fail": sum(1 for m in ms if m.get("passes") is False),
            "with_period": sum(1 for m in ms if m.get("meets_required_period") is not None),
            "short": sum(1 for m in ms if m.get("meets_required_period") is False),
            "ok": sum(1 for m in ms if m.get("passes") is True and m.get("meets_required_period") is not False
                      and not m.get("marginal"))}


def verdict_lines(doc, sizing: bool) -> list:
    """The summary's verdict sentences: one for a check; the specified and the proposed design for a sizing run."""
    c = counts(doc)
    n = c["members"]
    rows = sizing_rows(doc) if sizing else []
    if not rows:
        return [f"{c['ok']} of {n} members pass the design fire and meet their required period"
                + (" (a verdict within the numerical error is not counted)." if any(
                    m.get("marginal") for m in doc.get("members") or []) else ".")]
    spec_ok = sum(1 for r in rows if r.specified_ok is True)
    spec_none = sum(1 for r in rows if r.specified_ok is None)
    prop_ok = sum(1 for r in rows if r.proposed_ok)
    spec = (f"Specified design: {spec_ok} of {len(rows)} members pass the design fire and meet their required "
            "period at the specified thicknesses")
    spec += f" ({spec_none} without a specified thickness)." if spec_none else "."
    prop = (f"Proposed design (chosen thicknesses): {prop_ok} of {len(rows)} members pass the design fire and "
            "meet their required period.")
    return [spec, prop]
