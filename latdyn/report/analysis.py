"""Everything a report shows, computed by the library and collected in one object.

:func:`analyse_report` loads the aircraft (and variant) files, runs the
pipeline stages — models and modes, assessment, comparison, the standard
responses, transfer functions — and records the inputs' SHA-256.  It adds
no formulas; :mod:`latdyn.report.content` turns the result into blocks.
"""

from __future__ import annotations

import datetime
import hashlib
import os
from dataclasses import dataclass

__all__ = ["generation_time", "ConditionData", "VariantCondition", "AircraftData", "ReportData", "analyse_report", "sha256_of",
           "STANDARD_INPUTS"]

#: The standard responses of every condition, in order.
STANDARD_INPUTS = ("rudder-doublet", "aileron-step")


def sha256_of(path) -> str:
    """SHA-256 of a file's bytes, hexadecimal."""
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for chunk in iter(lambda: handle.read(1 << 16), b""):
            digest.update(chunk)
    return digest.hexdigest()


@dataclass(frozen=True)
class VariantCondition:
    """A variant's condition of the same name as a base condition, for the figures that lay the
    configurations over each other.

    Attributes
    ----------
    aircraft : latdyn.aircraft.Aircraft
        The variant.
    assessment : latdyn.assessment.AircraftAssessment
        The variant's assessment narrowed to this condition.
    result : latdyn.results.ConditionResult
    responses : tuple of latdyn.responses.StandardResponse
        The variant's responses to the base's standard inputs (the same deflections).
    """

    aircraft: object
    assessment: object
    result: object
    responses: tuple


@dataclass(frozen=True)
class ConditionData:
    """One flight condition: model and modes, assessment, standard responses, transfer functions.

    Attributes
    ----------
    result : latdyn.results.ConditionResult
    assessment : latdyn.assessment.ConditionAssessment
    responses : tuple of latdyn.responses.StandardResponse
    transfers : tuple of latdyn.transfer_functions.TransferFunction
    bank_ratios : (float, float) or None
        omega_phi/omega_d and zeta_phi/zeta_d of phi/da (an oscillatory Dutch roll only).
    buildup : latdyn.estimation.BuildUp or None
        The component build-up of the derivatives (an aircraft with geometry tables only).
    variants : tuple of VariantCondition
        The compared variants' conditions of the same name (the base file of a comparison only).
    steady : latdyn.steady.SteadyResult or None
        Steady sideslips, crosswind capability and engine-out control.
    """

    result: object
    assessment: object
    responses: tuple
    transfers: tuple
    bank_ratios: tuple | None
    buildup: object = None
    variants: tuple = ()
    steady: object = None


@dataclass(frozen=True)
class AircraftData:
    """One aircraft analysed in full."""

    aircraft: object
    results: tuple
    assessment: object
    conditions: tuple


@dataclass(frozen=True)
class AugmentationData:
    """One augmented condition of an aircraft (analysed in full or a variant).

    Attributes
    ----------
    aircraft : latdyn.aircraft.Aircraft
    condition : latdyn.assessment.ConditionAssessment
        Its assessment, with the equivalent system and its grades.
    description : str
        The augmentation in words (:func:`latdyn.augmentation.describe`).
    bare_modes, modes : latdyn.modes.ModeSet
        The bare airframe's modes and the closed loop's.
    washout : latdyn.augmentation.WashoutEffect or None
    turbulence : tuple of (condition, label, TurbulenceResult)
        Augmented and bare RMS (empty without a gust).
    """

    aircraft: object
    condition: object
    description: str
    bare_modes: object
    modes: object
    washout: object
    turbulence: tuple = ()


def _augmentation_data(aircraft, assessment, gust):
    """AugmentationData of every augmented condition of an aircraft."""
    from latdyn.augmentation import condition_model, describe, model_modes, washout_effect

    out = []
    for condition, graded in zip(aircraft.conditions, assessment.conditions):
        if getattr(condition, "augmentation", None) is None:
            continue
        model = condition_model(aircraft, condition)
        turbulence = ()
        if gust is not None and aircraft.geometry is not None:
            from latdyn.results import condition_turbulence

            span = aircraft.geometry.span
            turbulence = tuple((condition.name, label, condition_turbulence(aircraft, condition, item, gust, span))
                               for label, item in (("augmented", model), ("bare airframe", model.bare)))
        out.append(AugmentationData(aircraft, graded, describe(condition.augmentation),
                                    model_modes(model.bare), graded.modes, washout_effect(model), turbulence))
    return out


@dataclass(frozen=True)
class ReportData:
    """The results a report is built from.

    Attributes
    ----------
    aircraft : tuple of AircraftData
        The files analysed in full; the first is the base of the comparison.
    variants : tuple of (Aircraft, AircraftAssessment)
    comparisons : tuple of latdyn.compare.Comparison
    inputs : tuple of dict
        ``{"file", "sha256"}`` of every input file (aircraft chains, criteria files).
    generated : str
        Time of the run (ISO 8601, UTC), for the human-readable files only.
    argv : tuple of str or None
        The command line, for the provenance.
    augmentation : tuple of AugmentationData
        Every augmented condition of every file (full and variants).
    gust : latdyn.turbulence.Gust or None
        The turbulence of the RMS tables, when asked for.
    """

    aircraft: tuple
    variants: tuple
    comparisons: tuple
    inputs: tuple
    generated: str
    argv: tuple | None = None
    augmentation: tuple = ()
    gust: object = None

    @property
    def assessments(self) -> list:
        """Assessments of every aircraft, variants last."""
        return [a.assessment for a in self.aircraft] + [s for _, s in self.variants]

    @property
    def all_aircraft(self) -> list:
        return [a.aircraft for a in self.aircraft] + [v for v, _ in self.variants]

    @property
    def criteria(self) -> dict:
        """Every criteria set used, by name, in order of first use."""
        return {c.name: c for a in self.assessments for c in a.criteria}

    @property
    def condition_count(self) -> int:
        return sum(len(a.conditions) for a in self.aircraft)


def _condition(aircraft, result, assessment, step):
    from latdyn.responses import standard_response
    from latdyn.transfer_functions import bank_numerator_ratios, transfer_functions

    label = f"{aircraft.name} / {result.condition.name}"
    responses = tuple(standard_response(result.model, result.modes, kind, label) for kind in STANDARD_INPUTS)
    transfers = tuple(transfer_functions(result.model, modes=result.modes))
    ratios = None
    dutch = result.modes.get("dutch_roll")
    if dutch is not None and dutch.oscillatory:
        phi_da = next((t for t in transfers if t.output == "phi" and t.input == "aileron"), None)
        if phi_da is not None:
            ratios = bank_numerator_ratios(phi_da, dutch.eigenvalue)
    buildup = None
    if getattr(aircraft, "wing", None) is not None:
        from latdyn.estimation import build_up

        buildup = build_up(aircraft, result.condition)
    steady = getattr(assessment, "steady", None)
    if steady is None:
        from latdyn.steady import steady as solve_steady

        (steady,) = solve_steady(aircraft, result.condition.name)
    if step is not None:
        step()
    return ConditionData(result, assessment, responses, transfers, ratios, buildup, steady=steady)


def _with_variants(conditions, variants, assessments):
    """The base's conditions with each variant's condition of the same name (same inputs replayed)."""
    from dataclasses import replace

    from latdyn.responses import replayed_response
    from latdyn.results import analyse_aircraft

    analysed = [({r.condition.name: r for r in analyse_aircraft(v)}, v, s)
                for v, s in zip(variants, assessments)]
    out = []
    for data in conditions:
        name = data.result.condition.name
        found = []
        for results, variant, assessment in analysed:
            graded = next((c for c in assessment.conditions if c.name == name), None)
            result = results.get(name)
            if graded is None or result is None:
                continue
            label = f"{variant.name} / {name}"
            responses = tuple(replayed_response(result.model, standard, label) for standard in data.responses)
            found.append(VariantCondition(variant, replace(assessment, conditions=(graded,)), result, responses))
        out.append(replace(data, variants=tuple(found)))
    return tuple(out)


def generation_time(environ=None) -> datetime.datetime:
    """The time a report is generated at, UTC, to the second.

    Now, unless ``SOURCE_DATE_EPOCH`` (seconds since 1970-01-01 UTC, the
    reproducible-builds.org specification) is set: then that time, so that the
    same inputs give the same bytes (a report kept under version control).

    Examples
    --------
    >>> generation_time({"SOURCE_DATE_EPOCH": "1796169600"}).isoformat()
    '2026-12-02T00:00:00+00:00'
    """
    environ = os.environ if environ is None else environ
    epoch = environ.get("SOURCE_DATE_EPOCH", "").strip()
    if epoch.isdigit():
        return datetime.datetime.fromtimestamp(int(epoch), datetime.timezone.utc)
    return datetime.datetime.now(datetime.timezone.utc).replace(microsecond=0)


def analyse_report(files, variants=(), criteria_sets=None, now=None, argv=None, step=None,
                   gust=None) -> ReportData:
    """Load and analyse the aircraft files of a report.

    Parameters
    ----------
    files : sequence of str
        Aircraft files analysed in full; the first is the base of the comparison.
    variants : sequence of str
        Variant files compared with the first file.
    criteria_sets : sequence of str, optional
        Criteria set names or files; default per aircraft (military with a class).
    now : datetime.datetime, optional
        Time of the run; default now (UTC).
    argv : sequence of str, optional
        The command line, recorded in the provenance.
    step : callable, optional
        Called once per condition analysed (progress).
    gust : latdyn.turbulence.Gust, optional
        Turbulence for the RMS of the augmented conditions beside their bare airframes.

    Returns
    -------
    ReportData

    Raises
    ------
    latdyn.errors.InputError
        Bad input.
    """
    from latdyn.aircraft import load_aircraft
    from latdyn.assessment import assess
    from latdyn.compare import compare_many
    from latdyn.criteria_sets import load_criteria
    from latdyn.results import analyse_aircraft

    now = now or generation_time()
    aircraft_list = [load_aircraft(path) for path in files]
    variant_list = [load_aircraft(path) for path in variants]
    criteria_objects = [load_criteria(c) for c in criteria_sets] if criteria_sets else None
    analyses = [analyse_aircraft(a) for a in aircraft_list]
    assessments = [assess(a, criteria_objects) for a in aircraft_list]
    variant_assessments = [assess(v, criteria_objects) for v in variant_list]
    comparisons = compare_many(aircraft_list[0], variant_list, criteria_objects) if variant_list else ()
    aircraft_data = []
    for number, (aircraft, results, assessment) in enumerate(zip(aircraft_list, analyses, assessments)):
        conditions = tuple(_condition(aircraft, result, condition, step)
                           for result, condition in zip(results, assessment.conditions))
        if number == 0 and variant_list:
            conditions = _with_variants(conditions, variant_list, variant_assessments)
        aircraft_data.append(AircraftData(aircraft, results, assessment, conditions))
    inputs = [{"file": path, "sha256": sha256_of(path)}
              for a in [*aircraft_list, *variant_list] for path in a.files]
    inputs += [{"file": path, "sha256": sha256_of(path)}
               for path in (criteria_sets or ()) if os.path.exists(path)]
    augmentation = []
    for aircraft, assessment in [*zip(aircraft_list, assessments), *zip(variant_list, variant_assessments)]:
        augmentation += _augmentation_data(aircraft, assessment, gust)
    return ReportData(tuple(aircraft_data), tuple(zip(variant_list, variant_assessments)),
                      tuple(comparisons), tuple(inputs), now.isoformat(timespec="seconds"),
                      tuple(argv) if argv else None, tuple(augmentation), gust)
