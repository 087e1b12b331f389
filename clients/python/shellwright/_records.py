"""The in-process engine: describe, analyze and analyze_many."""

from shellwright import _engine


def describe(spec, *, charge=None, geometry=None, spin_state=None,
             configuration=None):
    """Describes an element or ion: a dict with the keys of
    `shellwright atom --json`.

    spec: "Fe", "Fe3+", "Fe(III)", "iron", or an atomic number (int).
    charge: net charge (int); must agree with a charge in `spec`.
    geometry: "free", "octahedral", "tetrahedral", "square_planar",
        "trigonal_prismatic", "trigonal_bipyramidal",
        "square_antiprismatic", "linear", "square_pyramidal",
        "trigonal_planar", "pentagonal_bipyramidal" or
        "tricapped_trigonal_prismatic".
    spin_state: "auto", "high", "low" or "intermediate" (square_planar
        or square_pyramidal geometry only).
    configuration: an explicit configuration ("[Ar] 3d5 4s1").

    Raises TypeError for an argument of the wrong type and ValueError, with
    the engine's message, for one it rejects ("spec: unknown element ...").
    The GIL is released while the engine works.
    """
    return _engine.describe(spec, charge, geometry, spin_state, configuration)


def analyze(formula, **record_fields):
    """Analyses one composition record: a dict with the keys of
    `shellwright compound --json`.

    record_fields are the other fields of a record (id, charge,
    declared_states, geometry, spin_state, measured_moment,
    moment_tolerance, measured_saturation_moment,
    saturation_moment_tolerance, structure_family, temperature,
    max_alternatives, variables, row); None or NaN leaves one unset.
    measured_moment is the effective (Curie-Weiss) moment and
    measured_saturation_moment the ordered one, each in μB per formula
    unit. A formula the engine cannot read is not an exception: the report
    says so (valid False, with error diagnostics). Raises TypeError or
    ValueError for an argument that cannot fill its field (analyze(42),
    a formula that is None or NaN, bytes that are not UTF-8).
    """
    return _engine.analyze(formula, record_fields)


def analyze_many(records, *, jobs=None, alternatives=0):
    """Analyses an iterable of records on `jobs` worker threads (default:
    one per core), yielding exactly one report dict per record, in input
    order.

    A record is a formula (str, or UTF-8 bytes) or a mapping of record
    fields. Its report's row is its 1-based position unless it gives one.
    `alternatives` (0..5) applies to records that do not set
    max_alternatives. A record that cannot be read (a number, None, an
    unknown field, non-UTF-8 bytes) gets an error report with code
    malformed_record instead of stopping the iteration.
    """
    return _engine.analyze_many(records, jobs, alternatives)
