"""Heat-treat planning: hold windows for austempering, interrupted quench, isothermal annealing,
and the tempering window of a quench and temper.

Each route scans hold temperatures, tests each against its conditions with a margin
function (positive where the condition holds, in ln s or in K), refines the edges of the
window by bisection to :data:`EDGE_TOLERANCE_K`, and recommends one temperature with the
reason. Where no temperature works, the plan says so with the nearest feasible change.
Every number is a model estimate: a trial heat treatment confirms it.
"""

from __future__ import annotations

import numpy as np

from ..constants import celsius_to_kelvin, kelvin_to_celsius
from ..errors import InputError, choice, number, numbers
from ..products.alloy import check_alloy
from ..readout import format_duration
from ..relations.hardness import hardness_of_mixture
from ..results import PRACTICAL_HORIZON_S, PlanResult
from .cooling import LUMPED_BIOT_LIMIT, constant_rate, cool, default_start_C
from .decomposition import Decomposition, ProductCurve, hold
from .spread import sampled_heats
from .section import BATH_NODES, CENTRE_WITHIN_K, into_baths, section_sizes
from .temper import EMBRITTLEMENT_RANGE_C, temper, temper_for_hardness

#: Above about this the bainite of an austempering hold is upper bainite, coarser and less
#: tough; austempering for toughness is done below it (common practice, from memory).
LOWER_BAINITE_BELOW_C = 400.0
#: Austempering: ferrite + pearlite after the hold must stay under this share of the part.
SOFT_LIMIT = 0.01
#: Austempering a section: a warning where more than this share of the centre transforms before
#: the centre reaches the bath.
TRANSFORMED_ON_THE_WAY = 0.1
#: Window edges are refined to this, K.
EDGE_TOLERANCE_K = 0.01
#: Hold temperatures scanned, K apart.
SCAN_STEP_K = 2.0
#: Defaults of the routes.
DEFAULT_MAX_HOLD_S = 4 * 3600.0
DEFAULT_MARGIN_K = 20.0
DEFAULT_SAFETY = {"austemper": 1.5, "interrupted-quench": 2.0, "anneal": 1.5}
DEFAULT_BUDGET_S = 8 * 3600.0
#: Interrupted quench: hold temperatures from Ms + margin up to this much above Ms, K.
INTERRUPTED_SPAN_K = 60.0
#: Largest margin above Ms, K: far above it no bainite forms, and a window there means a slip.
MAX_MARGIN_K = 500.0
#: Largest safety factor on a hold time.
MAX_SAFETY = 100.0
#: (heat, temperature) pairs whose shares a worst-case plan integrates at once: each pair
#: is integrated over quadrature nodes, so blocks of these bound the memory (about 100 kB a
#: pair here; a 4140 range of 200 heats took 2.2 GB in one block).
BLOCK_PAIRS = 2048
#: Cautions each route's output carries.
ROUTE_CAUTIONS = {
    "austemper": ("Austempering baths are molten salt (or hot oil) near the hold temperature: water or damp parts "
                  "entering molten salt can erupt violently; follow the bath supplier's and the plant's safety rules."),
    "interrupted-quench": ("Martempering uses molten salt or hot oil: fire and splash hazards, and oil above its flash "
                           "point is a fire risk; follow the plant's safety rules."),
    "anneal": "Furnace atmospheres and handling of hot loads follow the plant's safety rules.",
    "quench-and-temper": ("Quench tanks (water, polymer, oil) and tempering furnaces are hazards: oil above its flash "
                          "point is a fire risk and hot loads burn; follow the plant's safety rules."),
}
#: Quench and temper: tempering temperatures scanned, °C, and the default tempering time.
TEMPER_SCAN_C = (150.0, 700.0)
DEFAULT_TEMPER_S = 2 * 3600.0
#: Below this martensite share the part is not fully hardened and a tempering curve of fully
#: hardened specimens overstates its hardness (common practice, from memory: 90 % martensite
#: is the usual through-hardening criterion for quenched and tempered parts).
FULLY_HARDENED_MARTENSITE = 0.9
COMMON_CAUTION = ("The specifications that govern the parts and local codes come first; confirm the plan with a trial "
                  "heat treatment and a qualified metallurgist's sign-off before production.")


def _steel_only(alloy, route):
    check_alloy(alloy)
    if alloy.model != "steel" or alloy.martensite is None:
        raise InputError(None, "route", f"'{route}' plans a steel (it needs Ms and bainite); this alloy is "
                         f"model = '{alloy.model}'; 'anneal' works on any alloy")
    if alloy.batch_shape:
        raise InputError(None, "alloy", "a plan takes one alloy, not a batch")


def _checked(worst_case=None, safety=None, margin_K=None, limit_s=None, limit_key="max_hold_s", target_hv=None):
    """The plan's options through the shared checks (the ones given): safety from 1 to
    :data:`MAX_SAFETY`, a margin from 0 to :data:`MAX_MARGIN_K`, a time limit above 0 and at
    most the practical horizon; the worst case a batch of heats."""
    if worst_case is not None:
        check_alloy(worst_case, "worst_case")
    if safety is not None:
        number("safety", safety, 1.0, MAX_SAFETY)
    if margin_K is not None:
        number("margin_K", margin_K, 0.0, MAX_MARGIN_K, unit="K")
    if limit_s is not None:
        number(limit_key, limit_s, 0.0, PRACTICAL_HORIZON_S, low_open=True, unit="s")
    if target_hv is not None:
        number("target_hv", target_hv, 0.0, 1500.0, low_open=True, unit="HV")


def _in_blocks(evaluate, model, T):
    """``evaluate(T)`` (a tuple of arrays along T) over blocks of the scan of at most
    :data:`BLOCK_PAIRS` (heat, temperature) pairs, joined: the same numbers, bounded memory."""
    T = np.asarray(T, dtype=float)
    step = max(1, BLOCK_PAIRS // max(int(np.prod(model.batch_shape)), 1))
    if T.size <= step:
        return evaluate(T)
    pieces = [evaluate(T[i:i + step]) for i in range(0, T.size, step)]
    return tuple(np.concatenate(p) for p in zip(*pieces))


def _over(model, T):
    """T laid out for a model that may hold a batch (the samples of a worst-case plan)."""
    return np.asarray(T, dtype=float).reshape((1,) * len(model.batch_shape) + np.shape(T))


def _worst(values, model, pick=np.max):
    """The worst over a batch's members (max of a time that must stay short, min of one that
    must stay long); the value itself for one alloy."""
    axes = tuple(range(len(model.batch_shape)))
    return pick(values, axis=axes) if axes else values


def _times(alloy, T, names, share):
    """Seconds until each named product makes up ``share`` of the part by itself (within the
    decomposition), at temperatures T; min over the names."""
    by_name = {p.name: p for p in alloy.products}
    out = np.full(np.shape(T), np.inf)
    for name in names:
        if name in by_name:
            out = np.minimum(out, ProductCurve(alloy, by_name[name]).time_to_fraction(T, share))
    return out


def _edges(margin, T_scan, ok):
    """Window edges: where ``ok`` changes between scan points, the root of ``margin`` by bisection,
    every edge at once (one call of ``margin`` per halving)."""
    k = np.nonzero(ok[1:] != ok[:-1])[0]
    if k.size == 0:
        return []
    lo, hi, inside_low = T_scan[k].astype(float), T_scan[k + 1].astype(float), ok[k]
    while np.max(hi - lo) > EDGE_TOLERANCE_K:
        mid = 0.5 * (lo + hi)
        keep_low = (margin(mid) >= 0.0) == inside_low
        lo, hi = np.where(keep_low, mid, lo), np.where(keep_low, hi, mid)
    return list(np.where(inside_low, lo, hi))


def _section(shape, size_m, thickness_m, heat_transfer_W_m2K, severity_per_in, htc_table, section_model,
             worst_case):
    """The section a plan quenches into its baths, as :func:`isokin.compute.section.into_baths`
    takes it, or None without one. ``thickness_m`` is ``size_m`` under its earlier name (a
    plate's, unless ``shape`` says otherwise); a size goes with exactly one surface condition."""
    if size_m is not None and thickness_m is not None:
        raise InputError(None, "thickness_m", "give the section's size once: size_m (thickness_m is the same)")
    size_key = "size_m" if thickness_m is None else "thickness_m"
    size = size_m if thickness_m is None else thickness_m
    surface = {k: v for k, v in (("heat_transfer_W_m2K", heat_transfer_W_m2K), ("severity_per_in", severity_per_in),
                                 ("htc_table", htc_table)) if v is not None}
    if size is None:
        if surface:
            raise InputError(None, "size_m", "give the section's size with the bath's surface condition")
        if shape is not None:
            raise InputError(None, "shape", "goes with a section size")
        return None
    if not surface:
        raise InputError(None, size_key, "give the bath's surface condition with the section: a heat-transfer "
                         "coefficient, a Grossmann severity or a table of h against the surface temperature")
    size = section_sizes(size, size_key)
    if size.size != 1:
        raise InputError(None, size_key, "give one section size")
    if worst_case is not None:
        raise InputError(None, "worst_case", "a worst-case plan over the heats of a range does not take a section "
                         "(yet): plan the section on the nominal analysis, or the range without a section")
    return {"shape": shape or ("plate" if thickness_m is not None else "bar"), "size_m": float(size[0]),
            "model": section_model, **surface}


def _arrival(alloy, section, start_C, T):
    """The section quenched from ``start_C`` into baths at T (K): one batch of the conduction
    solver (or of the lumped body below Biot 0.1)."""
    return into_baths(alloy, section["shape"], section["size_m"], kelvin_to_celsius(T), start_C,
                      **{k: v for k, v in section.items() if k not in ("shape", "size_m")})


def _section_options(section, arrived):
    """What a plan records of its section: shape, size, surface, and which cooling model ran."""
    if section is None:
        return {}
    how = ("conduction through the section" if arrived.model == "conduction" else
           f"lumped (Biot below {LUMPED_BIOT_LIMIT:g})")
    return {"shape": section["shape"], "size_m": section["size_m"], "surface": arrived.surface,
            "biot_number": arrived.biot_number, "cooling_model": how,
            **({"section_nodes": BATH_NODES} if arrived.model == "conduction" else {})}


def required_rates(alloy, start_C, hold_C, avoid=("ferrite", "pearlite")):
    """Per hold temperature: the slowest constant rate from start_C to it with the named
    products under 1 % on arrival (additivity), by bisection on ln(rate) to 1 %.

    The named products cannot form below the lowest of their lower bounds, so every path
    that ends below it has the same share of them on arrival as one that ends there: those
    holds share one bisection."""
    hold_C = np.atleast_1d(hold_C)
    lowest = min((float(np.min(p.lower_K)) for p in alloy.products if p.name in avoid), default=0.0)
    ends, back = np.unique(np.maximum(hold_C, kelvin_to_celsius(lowest)), return_inverse=True)
    return _bisected_rates(alloy, start_C, ends, avoid)[back]


def _bisected_rates(alloy, start_C, hold_C, avoid):
    lo, hi = np.full(hold_C.shape, np.log(1e-3)), np.full(hold_C.shape, np.log(1e4))

    def soft(rates):
        paths = [constant_rate(r, start_C, h) for r, h in zip(rates, hold_C)]
        final = cool(alloy, paths).final
        return sum(final.get(n, 0.0) for n in avoid)

    never = soft(np.exp(hi)) >= 0.01
    always = soft(np.exp(lo)) < 0.01
    for _ in range(30):
        if np.all(hi - lo < np.log(1.01)):
            break
        mid = 0.5 * (lo + hi)
        good = soft(np.exp(mid)) < 0.01
        hi, lo = np.where(good, mid, hi), np.where(good, lo, mid)
    return np.where(never, np.nan, np.where(always, 1e-3, np.exp(hi)))


def _start_C(alloy, austenitizing_C):
    return default_start_C(alloy) if austenitizing_C is None else float(austenitizing_C)


def _microstructure(alloy, T_C, hold_s):
    """The phases after the hold and the quench, and the carbon of the austenite the martensite formed from."""
    after = hold(alloy, T_C, hold_s, milestones=False)
    return {name: np.asarray(v, dtype=float) for name, v in after.fractions.items()}, after.austenite_carbon


def _hardness(alloy, fractions, rate_K_s, carbon):
    """HV of the structure after the hold and quench (Maynier et al. 1978 for bainite and ferrite
    + pearlite with the quench rate at 700 °C, ASTM A255 for martensite of the austenite's carbon)."""
    rate = np.nan_to_num(np.asarray(rate_K_s, dtype=float), nan=1.0) * 3600.0
    return hardness_of_mixture(alloy.composition, fractions, rate, carbon)


def austemper(alloy, max_hold_s=DEFAULT_MAX_HOLD_S, margin_K=DEFAULT_MARGIN_K, safety=None, target_hv=None,
              austenitizing_C=None, worst_case=None, shape=None, size_m=None, heat_transfer_W_m2K=None,
              severity_per_in=None, htc_table=None, section_model="auto"):
    """The austempering window: hold temperatures above Ms + margin where bainite completes
    (99 % of what can transform) within the maximum hold divided by the safety factor, and
    where neither ferrite nor pearlite reaches 1 % of the part by the end of the hold.

    With a section (``size_m``, m, of a ``shape`` "plate", "bar" or "sphere", default bar, and
    the bath's surface condition: ``heat_transfer_W_m2K``, ``severity_per_in`` or ``htc_table``,
    as :func:`isokin.section` takes them) the section is quenched into every candidate bath by
    the conduction model (one batch; the lumped body where its Biot number is below 0.1,
    or as ``section_model`` says): ferrite + pearlite formed by the time the centre comes
    within 5 K of the bath (the larger of centre and surface) count with those of the hold,
    and the hold counts from the centre's arrival (hold = arrival + completion x safety; the
    bainite formed before it is not credited).

    Returns
    -------
    PlanResult
        Each candidate temperature with its hold time (completion x safety), when a
        diffusional product would start, the microstructure and hardness after the hold and
        quench, and the slowest quench to the bath that keeps ferrite + pearlite under 1 %;
        with a section, the centre's arrival and the ferrite + pearlite formed by then; the
        window, its edges, and the recommendation with the reason. With
        ``worst_case`` (True: the alloy's own composition range, sampled as ``plan
        --worst-case`` does; or a batch of the alloy's heats) a temperature is feasible only
        where it is for every heat, hold times are the
        longest over the heats and Ms the highest; the other columns stay the nominal's.
    """
    _steel_only(alloy, "austemper")
    worst_case = _heats(alloy, worst_case)
    safety = DEFAULT_SAFETY["austemper"] if safety is None else safety
    _checked(worst_case, safety, margin_K, max_hold_s, target_hv=target_hv)
    section = _section(shape, size_m, None, heat_transfer_W_m2K, severity_per_in, htc_table, section_model, worst_case)
    start_C = _start_C(alloy, austenitizing_C)
    model = worst_case if worst_case is not None else alloy
    ms = float(np.max(model.critical_K["Ms"]))
    bs = float(np.min(model.critical_K["Bs"]))
    low = ms + margin_K
    T = T_scan = np.arange(low, max(bs, low + SCAN_STEP_K), SCAN_STEP_K)
    soft = ("ferrite", "pearlite")

    def block(T):
        d = Decomposition(model, _over(model, T))
        hold_s = d.time_to_total(0.99) * safety
        shares = d.shares(np.where(np.isfinite(hold_s), hold_s, 0.0))
        soft_share = np.where(np.isfinite(hold_s), sum(shares[n] for n in soft if n in shares), 1.0)
        return _worst(hold_s, model), _worst(soft_share, model)

    # the section quenched into every bath of the scan: one batch; between the scan's baths (the
    # edges' bisection) its arrival and ferrite + pearlite are read linearly, so that an edge
    # never rests on another batch's time steps
    arrived = _arrival(alloy, section, start_C, T) if section is not None else None
    if arrived is not None:
        scan_soft = sum(arrived.on_arrival[n] for n in soft if n in arrived.on_arrival).max(axis=-1)
        centre_transformed = sum(arrived.on_arrival[p.name] for p in alloy.products)[:, 0]

    def parts(T):
        """(hold, ferrite + pearlite in all, the isothermal hold, the centre's arrival, ferrite +
        pearlite on arrival) at T; the last two 0 without a section."""
        hold_s, soft_share = _in_blocks(block, model, T)
        arrival_s = soft_arrival = np.zeros(np.shape(T))
        if arrived is not None:
            arrival_s, soft_arrival = np.interp(T, T_scan, arrived.arrival_s), np.interp(T, T_scan, scan_soft)
        return hold_s + arrival_s, soft_share + soft_arrival, hold_s, arrival_s, soft_arrival

    def margin(T, known=None):
        hold_s, soft_share = (parts(T) if known is None else known)[:2]
        with np.errstate(divide="ignore", invalid="ignore"):
            m = np.minimum(np.log(max_hold_s) - np.log(hold_s), np.log(SOFT_LIMIT) - np.log(soft_share))
        return np.where(T >= low, np.nan_to_num(m, nan=-np.inf, posinf=np.inf), -np.inf)

    scan = parts(T)
    hold_s, soft_share, isothermal_s, arrival_s, soft_arrival = scan
    start_soft = _worst(_times(model, _over(model, T), soft, 0.01), model, np.min)
    ok = margin(T, scan) >= 0.0
    with np.errstate(divide="ignore", invalid="ignore"):
        by_time = np.log(max_hold_s / hold_s) <= np.log(SOFT_LIMIT / soft_share)
    if section is None:
        governing = np.where(by_time, "bainite completion x safety vs the maximum hold",
                             "ferrite + pearlite after the hold vs 1 %")
    else:
        governing = np.where(by_time, "centre arrival + bainite completion x safety vs the maximum hold",
                             "ferrite + pearlite by the centre's arrival and the hold vs 1 %")
    extra = _austemper_extra(alloy, T, isothermal_s, start_soft, start_C)
    extra["upper_bainite"] = kelvin_to_celsius(T) > LOWER_BAINITE_BELOW_C
    if section is not None:
        extra.update(centre_arrival_s=arrival_s, ferrite_pearlite_on_arrival=soft_arrival,
                     centre_transformed_on_arrival=centre_transformed)
    rows = _rows(alloy, T, hold_s, ok, governing, extra)
    edges = _edges(margin, T, ok) if 0 < ok.sum() < ok.size else []
    lower = ok & ~extra["upper_bainite"]
    choice, reason = _choose(rows, lower if lower.any() and target_hv is None else ok, target_hv,
                             "shortest complete hold" + (f" at or below {LOWER_BAINITE_BELOW_C:g} °C (lower bainite)"
                                                         if lower.any() else ""))
    nearest = None
    if not ok.any():
        finite = np.isfinite(hold_s)
        if section is not None and finite.any() and np.all(soft_arrival[finite] >= SOFT_LIMIT):
            nearest = (f"no bath temperature works for this section: ferrite + pearlite reach at least "
                       f"{float(np.min(soft_arrival[finite])) * 100:.1f} % of it by the time its centre comes within "
                       f"{CENTRE_WITHIN_K:g} K of the bath, at every temperature above Ms + margin; a thinner section, "
                       "a more severe bath (more agitation) or a more hardenable steel is the nearer change")
        elif finite.any() and np.all(soft_share[finite] >= SOFT_LIMIT):
            worst = float(np.min(soft_share[finite]))
            nearest = (f"no hold temperature works: ferrite + pearlite reach at least {worst * 100:.1f} % of the part "
                       "before bainite completes at every temperature above Ms + margin; a quench and temper, a "
                       "richer alloy or a tighter composition range is the nearer route")
        elif finite.any():
            fastest = float(np.min(hold_s[finite]))
            nearest = (f"no hold temperature works within the maximum hold: the shortest complete hold (x {safety:g}"
                       f"{', from the centre reaching the bath' if section is not None else ''}) "
                       f"is {_duration(fastest)}; allow that much")
        else:
            nearest = "no hold temperature works: bainite does not complete above Ms + margin"
    options = {"max_hold_s": max_hold_s, "margin_K": margin_K, "safety": safety, "target_hv": target_hv,
               "austenitizing_C": start_C, **_worst_note(worst_case)}
    options.update(_section_options(section, arrived))
    warnings = []
    if section is not None and choice is not None and centre_transformed[choice] >= TRANSFORMED_ON_THE_WAY:
        warnings.append(f"at {kelvin_to_celsius(T[choice]):.0f} °C {centre_transformed[choice] * 100:.0f} % of the "
                        "section's centre transforms before it comes within 5 K of the bath (its heat holds the centre "
                        "above the bath): that bainite forms hotter than the bath, and the hold counted from the "
                        "arrival is long on the safe side")
    return _result("austemper", alloy, rows, ok, edges, choice, reason, nearest, options, warnings)


def _austemper_extra(alloy, T, hold_s, start_soft, start_C):
    T_C = kelvin_to_celsius(T)
    finite = np.where(np.isfinite(hold_s), hold_s, 1.0)
    structure, carbon = _microstructure(alloy, T_C, finite)
    rates = required_rates(alloy, start_C, T_C)
    hv = _hardness(alloy, structure, rates, carbon)
    return {"ferrite_pearlite_alone_1pct_s": start_soft, "required_rate_K_s": rates, "hardness_HV": hv,
            **{f"after_{name}": v for name, v in structure.items()}}


def interrupted_quench(alloy, margin_K=10.0, safety=None, span_K=INTERRUPTED_SPAN_K, thickness_m=None,
                       heat_transfer_W_m2K=None, shape=None, austenitizing_C=None, worst_case=None, size_m=None,
                       severity_per_in=None, htc_table=None, section_model="auto"):
    """Interrupted quench (martempering): for bath temperatures just above Ms, the longest
    equalizing time before 1 % of any product forms, divided by the safety factor.

    With a section (``size_m``, m, of a ``shape`` "plate", "bar" or "sphere", default bar;
    ``thickness_m`` is the same size, of a plate by default; and the bath's surface
    condition: ``heat_transfer_W_m2K``, ``severity_per_in`` or ``htc_table``) the section is
    quenched into every candidate bath by the conduction model (one batch; the lumped body
    where its Biot number is below 0.1, or as ``section_model`` says). The safe time then
    counts from the centre's arrival within 5 K of the bath: the model's start time at the
    bath over the safety factor, less what the quench used of it (Scheil's sum of dt /
    t_start(T) up to the arrival, the largest anywhere in the section, in full). A bath is
    feasible only where that is positive and no product has reached 1 % at the centre or the
    surface by the arrival; ``equalize_s`` is the arrival.
    """
    _steel_only(alloy, "interrupted-quench")
    worst_case = _heats(alloy, worst_case)
    safety = DEFAULT_SAFETY["interrupted-quench"] if safety is None else safety
    _checked(worst_case, safety, margin_K)
    section = _section(shape, size_m, thickness_m, heat_transfer_W_m2K, severity_per_in, htc_table, section_model,
                       worst_case)
    model = worst_case if worst_case is not None else alloy
    ms = float(np.max(model.critical_K["Ms"]))
    T = np.arange(ms + margin_K, ms + margin_K + span_K + 0.5 * SCAN_STEP_K, SCAN_STEP_K)
    start = _worst(Decomposition(model, _over(model, T)).time_to_total(0.01), model, np.min)
    safe = start / safety
    ok = np.isfinite(safe) & (safe > 0)
    extra = {"start_any_s": start}
    governing = np.full(T.shape, "start of any product (1 %) / safety")
    warnings = []
    arrived = None
    if section is not None:
        arrived = _arrival(alloy, section, _start_C(alloy, austenitizing_C), T)
        formed = sum(arrived.on_arrival[p.name] for p in alloy.products).max(axis=-1)
        safe = np.maximum(start * (1.0 / safety - arrived.start_used), 0.0)
        ok = np.isfinite(safe) & (safe > 0) & (formed < SOFT_LIMIT)
        extra.update(equalize_s=arrived.arrival_s, start_used_on_arrival=arrived.start_used,
                     formed_on_arrival=formed)
        governing = np.where(
            formed >= SOFT_LIMIT, [f"{x * 100:.1f} % transformed before the centre arrives" for x in formed],
            np.where(ok, "start (1 %) / safety from the centre's arrival, less what the quench used",
                     [f"equalizing ({_duration(a)}) uses up the safe time ({_duration(s / safety)})"
                      for a, s in zip(arrived.arrival_s, start)]))
        late = int(np.count_nonzero(~ok & np.isfinite(start)))
        if 0 < late < T.size:
            warnings.append(f"at {late} of {T.size} bath temperatures the section's surface (or centre) would start "
                            "transforming, by the model over the safety factor, before the centre reaches the bath: "
                            "choose a hotter bath, a thinner section or a more severe quench")
    rows = _rows(alloy, T, safe, ok, governing, extra)
    choice, reason = _choose(rows, ok, None, "longest safe time", prefer="longest")
    nearest = None if ok.any() else ("no bath temperature gives the section time to equalize before 1 % of any "
                                     "product forms: use a thinner section, a stronger quench or a hotter bath"
                                     if section is not None else "no bath temperature has time before 1 % of any "
                                     "product forms")
    return _result("interrupted-quench", alloy, rows, ok, [], choice, reason, nearest,
                   {"margin_K": margin_K, "safety": safety, "span_K": span_K, **_section_options(section, arrived),
                    **_worst_note(worst_case)}, warnings)


#: What an isothermal anneal aims at: the softest, coarsest structure (the hottest hold that
#: completes within the budget, as practice anneals just below Ae1) or the shortest cycle.
ANNEAL_GOALS = ("soft", "shortest")
#: An anneal's hold transforms at least this share of the part (all of the austenite, to rounding).
WHOLE_SHARE = 0.99


def anneal(alloy, budget_s=DEFAULT_BUDGET_S, safety=None, worst_case=None, goal="soft"):
    """Isothermal annealing: hold temperatures where the transformation completes (99 % of what
    can transform, x safety) within the budget without bainite (under 1 % after the hold), and
    where all the austenite can transform (below Ae1; an intercritical hold is no anneal).
    The recommendation follows the goal: ``"soft"`` (the default) the hottest of them, whose
    pearlite is the coarsest and softest (common practice: isothermal annealing holds just
    below Ae1), ``"shortest"`` the fastest."""
    if check_alloy(alloy).batch_shape:
        raise InputError(None, "alloy", "a plan takes one alloy, not a batch")
    choice("goal", goal, ANNEAL_GOALS)
    worst_case = _heats(alloy, worst_case)
    safety = DEFAULT_SAFETY["anneal"] if safety is None else safety
    _checked(worst_case, safety, limit_s=budget_s, limit_key="budget_s")
    model = worst_case if worst_case is not None else alloy
    bs = float(np.max(model.critical_K.get("Bs", 0.0)))
    upper = min(float(np.min(p.upper_K)) for p in model.products if p.name != "bainite") if worst_case is not None \
        else max(float(p.upper_K) for p in alloy.products if p.name != "bainite")
    lower = max(bs, min(float(np.min(p.lower_K)) for p in model.products), 0.4 * upper)
    T = np.arange(lower, upper, SCAN_STEP_K)
    by_name = [p.name for p in alloy.products]

    def parts(T):
        d = Decomposition(model, _over(model, T))
        return _worst(d.time_to_total(0.99) * safety, model), _worst(d.transformable, model, np.min)

    def margin(T):
        hold_s, transformable = parts(T)
        with np.errstate(divide="ignore", invalid="ignore"):
            m = np.log(budget_s) - np.log(hold_s)
        bainite = (_worst(_times(model, _over(model, T), ["bainite"], 0.01), model, np.min) if "bainite" in by_name
                   else np.full(np.shape(T), np.inf))
        with np.errstate(divide="ignore", invalid="ignore"):
            m = np.minimum(m, np.log(bainite) - np.log(hold_s))
            # an anneal transforms all of the austenite in the hold: not an intercritical hold above Ae1
            m = np.minimum(m, np.log(transformable / WHOLE_SHARE))
        return np.nan_to_num(m, nan=-np.inf, posinf=np.inf)

    hold_s, transformable = parts(T)
    ok = margin(T) >= 0.0  # (its completion times again: cheap here, no shares are integrated)
    extra = {"transformable_share": transformable}
    if alloy.martensite is not None:
        finite = np.where(np.isfinite(hold_s), hold_s, 1.0)
        extra.update({f"after_{k}": v for k, v in _microstructure(alloy, kelvin_to_celsius(T), finite)[0].items()})
    rows = _rows(alloy, T, hold_s, ok, np.full(T.shape, "completion x safety vs the budget"), extra)
    edges = _edges(margin, T, ok) if 0 < ok.sum() < ok.size else []
    if goal == "soft" and ok.any():
        chosen = int(np.nonzero(ok)[0][-1])
        reason = "hottest hold where all the austenite transforms within the budget (the softest, coarsest structure)"
    else:
        chosen, reason = _choose(rows, ok, None, "fastest complete transformation")
    nearest = None
    if not ok.any():
        fastest = float(np.nanmin(hold_s)) if np.isfinite(hold_s).any() else None
        nearest = (f"no temperature completes within the budget: the fastest needs {_duration(fastest)} "
                   f"(x {safety:g})" if fastest else "no temperature completes the transformation")
    return _result("anneal", alloy, rows, ok, edges, chosen, reason, nearest,
                   {"budget_s": budget_s, "safety": safety, "goal": goal, **_worst_note(worst_case)})


def _heats(alloy, worst_case):
    """The heats of a worst-case plan: ``True`` samples the alloy's own composition range
    (the default heats and seed, as ``plan --worst-case``), ``False`` or None plans the
    nominal alone, and a batch of heats is taken as given."""
    if worst_case is True:
        return sampled_heats(alloy)
    return None if worst_case is False else worst_case


def _worst_note(worst_case):
    if worst_case is None:
        return {}
    return {"worst_case_heats": int(np.prod(worst_case.batch_shape)),
            "worst_case": "feasible only where every heat of the range is; hold times the longest, safe times the "
                          "shortest over the heats"}


def _duration(t_s):
    return format_duration(t_s) if t_s is not None and np.isfinite(t_s) else "never"


def _rows(alloy, T, hold_s, ok, governing, extra):
    rows = {"temperature_C": kelvin_to_celsius(T), "feasible": ok, "hold_time_s": hold_s, "governing": governing}
    rows.update({k: np.asarray(v) for k, v in extra.items()})
    return rows


def _choose(rows, ok, target_hv, default_reason, prefer="shortest"):
    if not ok.any():
        return None, None
    idx = np.nonzero(ok)[0]
    if target_hv is not None and "hardness_HV" in rows:
        hv = rows["hardness_HV"][idx]
        k = idx[int(np.nanargmin(np.abs(hv - target_hv)))]
        if np.nanmin(hv) <= target_hv <= np.nanmax(hv):
            return int(k), f"hardness closest to the target {target_hv:g} HV"
        return int(k), (f"the target {target_hv:g} HV is out of reach in this window (it gives "
                        f"{np.nanmin(hv):.0f} to {np.nanmax(hv):.0f} HV): the nearest, {rows['hardness_HV'][k]:.0f} HV, "
                        f"is at {rows['temperature_C'][k]:.0f} °C")
    hold_s = rows["hold_time_s"][idx]
    k = idx[int(np.argmax(hold_s) if prefer == "longest" else np.argmin(hold_s))]
    return int(k), default_reason


def _result(route, alloy, rows, ok, edges, choice, reason, nearest, options, warnings=()):
    if ok.any():
        lo, hi = float(rows["temperature_C"][ok].min()), float(rows["temperature_C"][ok].max())
        window = [lo, hi]
        refined = [float(kelvin_to_celsius(e)) for e in edges]
        for e in refined:  # an edge found by bisection replaces the scan point next to it
            if abs(e - lo) <= SCAN_STEP_K:
                window[0] = e
            elif abs(e - hi) <= SCAN_STEP_K:
                window[1] = e
    else:
        window = None
    recommendation = None
    if choice is not None:
        recommendation = {"temperature_C": float(rows["temperature_C"][choice]),
                          "hold_time_s": float(rows["hold_time_s"][choice]), "reason": reason}
        for key in ("required_rate_K_s", "hardness_HV"):
            if key in rows and np.isfinite(rows[key][choice]):
                recommendation[key] = float(rows[key][choice])
    return PlanResult(route=route, alloy=alloy.name, rows=rows, window_C=window, recommendation=recommendation,
                      no_window=nearest, options=options, critical_K=dict(alloy.critical_K),
                      cautions=(ROUTE_CAUTIONS[route], COMMON_CAUTION),
                      warnings=tuple(alloy.warnings) + tuple(warnings), inputs=alloy.inputs,
                      provenance=dict(alloy.provenance))


def quench_and_temper(alloy, curve, target_hv, temper_s=DEFAULT_TEMPER_S, quench_rate_K_s=None,
                      austenitizing_C=None, avoid_embrittlement=True):
    """Quench and temper: the window of tempering temperatures whose hardness, read from the
    grade's measured tempering curve by the Hollomon-Jaffe parameter, lies in the target
    range after a temper of ``temper_s``; tempers in the tempered-martensite-embrittlement
    range (250-400 °C) are left out unless ``avoid_embrittlement`` is False.

    Parameters
    ----------
    curve : TemperingCurve
        The grade's measured tempering curve (:func:`isokin.read_tempering_curve`).
    target_hv : float or (float, float)
        Hardness after tempering, HV: a value or the range the drawing gives.
    quench_rate_K_s : float, optional
        The quench, as a constant rate from the austenitizing temperature: the plan reports the
        as-quenched phases and hardness and warns where under 90 % martensite forms (the curve
        is for fully hardened specimens). Without it the part is taken as fully hardened.

    Returns
    -------
    PlanResult
        Each candidate tempering temperature with the tempering time (``hold_time_s``), the
        hardness, whether it lies in the embrittlement range; the window; the recommendation,
        the temperature giving the middle of the target range (nearest feasible to it).

    Examples
    --------
    >>> import isokin
    >>> steel = isokin.steel({"C": 0.4, "Mn": 0.8, "Cr": 1.0, "Mo": 0.2}, 7.0)
    >>> curve = isokin.tempering_curve([400, 500, 600, 700], [480, 400, 320, 250])
    >>> plan = quench_and_temper(steel, curve, (320, 360), temper_s=3600.0)
    >>> round(plan.recommendation["temperature_C"], 1)
    575.0
    """
    _steel_only(alloy, "quench-and-temper")
    low, high = _target_range(target_hv)
    number("temper_s", temper_s, 0.0, PRACTICAL_HORIZON_S, low_open=True, unit="s")
    T_C = np.arange(TEMPER_SCAN_C[0], TEMPER_SCAN_C[1] + 0.5 * SCAN_STEP_K, SCAN_STEP_K)
    tempered = temper(alloy, T_C, temper_s, curve)
    hv = tempered.hardness_HV
    embrittle = tempered.embrittlement
    in_range = (hv >= low) & (hv <= high)
    ok = in_range & (~embrittle if avoid_embrittlement else True)
    ends = temper_for_hardness(alloy, [low, high], curve, time_s=temper_s).temperatures_C
    warnings = []
    covered = T_C[np.isfinite(hv)]
    if covered.size < T_C.size:
        span = f"{covered.min():.0f} to {covered.max():.0f} °C" if covered.size else "none of them"
        warnings.append(f"the tempering curve covers {span} of the {TEMPER_SCAN_C[0]:g}-{TEMPER_SCAN_C[1]:g} °C "
                        f"scanned for a {_duration(temper_s)} temper; the rest are not candidates")
    options = {"target_HV": [low, high], "temper_s": temper_s, "avoid_embrittlement": avoid_embrittlement,
               "tempering_curve": curve.source, "hollomon_jaffe_constant": tempered.constant}
    extra = {"hardness_HV": hv, "embrittlement_range": embrittle}
    if quench_rate_K_s is not None:
        start_C = _start_C(alloy, austenitizing_C)
        quenched = cool(alloy, constant_rate(quench_rate_K_s, start_C))
        martensite = float(quenched.final.get(alloy.martensite.name, np.array([0.0]))[0])
        options.update({"quench_rate_K_s": float(quench_rate_K_s), "austenitizing_C": start_C,
                        "as_quenched_martensite": martensite,
                        "as_quenched_HV": float(quenched.hardness_HV[0]) if quenched.hardness_HV is not None else None})
        if martensite < FULLY_HARDENED_MARTENSITE:
            warnings.append(f"the quench at {quench_rate_K_s:g} K/s leaves {martensite * 100:.0f} % martensite (under "
                            f"{FULLY_HARDENED_MARTENSITE * 100:.0f} %): the tempering curve is for fully hardened "
                            "specimens, so the part will temper softer than planned; quench faster or choose a more "
                            "hardenable grade")
    governing = np.where(embrittle & in_range & avoid_embrittlement,
                         "in the tempered-martensite embrittlement range (250-400 °C)",
                         "hardness after tempering vs the target")
    rows = _rows(alloy, celsius_to_kelvin(T_C), np.full(T_C.shape, float(temper_s)), ok, governing, extra)
    edges = [celsius_to_kelvin(e) for e in ends if np.isfinite(e)]
    choice = reason = None
    if ok.any():
        middle = 0.5 * (low + high)
        idx = np.nonzero(ok)[0]
        choice = int(idx[int(np.nanargmin(np.abs(hv[idx] - middle)))])
        reason = f"hardness nearest the middle of {low:.0f}-{high:.0f} HV"
    nearest = None
    if not ok.any():
        reachable = hv[np.isfinite(hv)]
        if in_range.any():
            nearest = ("the target is reached only by tempering in the embrittlement range (250-400 °C); "
                       "accept it where toughness allows (plan with embrittlement allowed) or change the target")
        elif reachable.size:
            nearest = (f"no temper of {_duration(temper_s)} reaches {low:.0f}-{high:.0f} HV: the curve gives "
                       f"{reachable.min():.0f} to {reachable.max():.0f} HV at {TEMPER_SCAN_C[0]:g}-"
                       f"{TEMPER_SCAN_C[1]:g} °C; change the target, the tempering time or the grade")
        else:
            nearest = "the tempering curve does not cover 150-700 °C for this tempering time"
    result = _result("quench-and-temper", alloy, rows, ok, edges if 0 < ok.sum() < ok.size else [], choice, reason,
                     nearest, options, warnings)
    if choice is not None:  # the exact temperature of the middle hardness where it is feasible, not the scan point
        exact = float(temper_for_hardness(alloy, 0.5 * (low + high), curve, time_s=temper_s).temperatures_C[0])
        lo_C, hi_C = EMBRITTLEMENT_RANGE_C
        if np.isfinite(exact) and not (avoid_embrittlement and lo_C <= exact <= hi_C):
            result.recommendation.update(temperature_C=exact, hardness_HV=0.5 * (low + high))
    return result


def _target_range(target_hv):
    values = np.atleast_1d(numbers("target_hv", target_hv, 0.0, 1500.0, low_open=True, unit="HV"))
    if values.size not in (1, 2):
        raise InputError(None, "target_hv", f"give a target hardness or a range of two, in HV, e.g. 330 or (320, 360); "
                         f"got {values.size} values")
    return float(values.min()), float(values.max())
