"""pandas: annotate a DataFrame with one report per row, column by column."""

from shellwright import _engine


def annotate(df, formula="formula", *, prefix="", jobs=None, alternatives=0,
             first_row=1, **column_map):
    """Returns `df` with the report of each row added as columns.

    formula: the column holding formulas. column_map maps other record
    fields to columns (id="sample_id", charge="charge", ...); a None or NaN
    cell leaves that field unset for the row (in the formula column it
    makes the row's report a malformed_record error).

    The report's scalar fields become columns named prefix + field (valid,
    composition_kind, score, ...); its repeated fields (diagnostics,
    oxidation_states, alternatives, ions) become columns of lists of dicts.
    Values are those of `shellwright check`'s JSON lines. A report field
    that echoes an input column of the same name (formula from "formula",
    id from "id") is not added again. Any other clash with an existing
    column raises ValueError: pass a prefix.

    The report's row is first_row + the row's position, unless column_map
    gives row=. Reports are made on `jobs` worker threads straight into
    columns, with no dict per row.
    """
    import pandas as pd

    if not isinstance(df, pd.DataFrame):
        raise TypeError("annotate: expected a pandas DataFrame, got "
                        + type(df).__name__)
    fields = {"formula": formula, **column_map}
    for field, column in fields.items():
        if column not in df.columns:
            raise KeyError(f"{field}: no column {column!r} in the frame")
    columns = {field: df[column].tolist() for field, column in fields.items()}
    echoes = [name for name, column in fields.items()
              if not prefix and name == column]
    out = _engine.annotate_columns(columns, jobs, alternatives, first_row,
                                   echoes)
    if len(df) == 0:
        out = {name: values[:0] for name, values in out.items()}
    clashes = [prefix + name for name in out if prefix + name in df.columns]
    if clashes:
        raise ValueError("annotate: the frame already has column(s) "
                         + ", ".join(repr(c) for c in clashes)
                         + "; pass prefix= to name the report's columns")
    report = pd.DataFrame(
        {prefix + name: values for name, values in out.items()},
        index=df.index, copy=False)
    return pd.concat([df, report], axis=1, copy=False)
