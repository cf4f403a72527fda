"""How an export's columns map onto the spec (docs/formats.md); the defaults need no file."""

from __future__ import annotations

import sys
from pathlib import Path
from typing import TYPE_CHECKING, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError, field_validator

if TYPE_CHECKING:
    from logiccheck.model.questionnaire import Questionnaire

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover
    import tomli as tomllib


class MappingError(Exception):
    """A mapping file or table that cannot be used: one line naming file, key and what is allowed."""


class MultiLayout(BaseModel):
    """How a `multi` item sits in the export."""

    model_config = ConfigDict(extra="forbid", strict=True)

    # `columns`: one NAME_N column per option holding 1 / 0 / blank (the default);
    # `delimited`: one column NAME holding the chosen code values, e.g. "1;4".
    layout: Literal["columns", "delimited"] = "columns"
    separator: str = ";"
    # The option column name; {name} and {value} are filled in.
    column: str = "{name}_{value}"

    @field_validator("separator")
    @classmethod
    def _separator(cls, v: str) -> str:
        if not v:
            raise ValueError("must be a non-empty string such as \";\" or \",\"")
        return v

    @field_validator("column")
    @classmethod
    def _column(cls, v: str) -> str:
        if "{name}" not in v or "{value}" not in v:
            raise ValueError("must contain both {name} and {value}, e.g. \"{name}_{value}\"")
        try:
            v.format(name="q", value=1)
        except (KeyError, ValueError, IndexError, AttributeError):
            raise ValueError(
                "is not a column template: only {name} and {value} may stand in braces (write {{ and }} for a brace)"
            ) from None
        return v


class DataMapping(BaseModel):
    """The `[data]` table: id column, multi layout, markers, duration, frame, renames."""

    model_config = ConfigDict(extra="forbid", strict=True)

    id: str = "id"
    multi: MultiLayout = Field(default_factory=MultiLayout)
    # Cell texts that mean no value (after trimming spaces); "" always does.
    blank: list[str] = Field(default_factory=list)
    # Cell texts the fielding tool writes for "not shown" and "shown, not answered".
    # Both mean no value; when given, they are compared with the routing (shown-mismatch).
    not_shown: list[str] = Field(default_factory=list)
    unanswered: list[str] = Field(default_factory=list)
    duration: str = "duration"
    frame: str | None = None
    # Spec name -> export column name, for items whose column is called differently.
    columns: dict[str, str] = Field(default_factory=dict)
    # Export columns to ignore silently (not reported as unknown-column).
    ignore: list[str] = Field(default_factory=list)
    # The CSV delimiter: ",", ";", "tab" or "|" (None: detected from the header line).
    delimiter: str | None = None

    @field_validator("delimiter")
    @classmethod
    def _delimiter(cls, v: str | None) -> str | None:
        if v is None:
            return v
        named = {"comma": ",", "semicolon": ";", "tab": "\t", "\\t": "\t", "pipe": "|"}
        value = named.get(v.lower(), v)
        if value not in (",", ";", "\t", "|"):
            raise ValueError('must be ",", ";", "tab" or "|"')
        return value

    # How coded answers are written: numeric codes, answer labels ("Yes", matched after
    # trimming and ignoring case; a label's name such as `yes` too), or either per cell.
    values: Literal["codes", "labels", "auto"] = "codes"
    # The decimal mark of numbers: "," reads 2,5 as 2.5.
    decimal: Literal[".", ","] = "."

    def column_of(self, name: str) -> str:
        return self.columns.get(name, name)

    def option_column(self, name: str, value: int) -> str:
        """One option column of a multi item: its own key (`NAME_N`) first, then the item's."""
        own = self.multi.column.format(name=name, value=value)
        if own in self.columns and self.multi.layout == "columns":
            return self.columns[own]
        if name in self.columns and self.multi.layout == "columns":
            base = self.columns[name]
        else:
            base = name
        return self.multi.column.format(name=base, value=value)

    def blank_markers(self) -> set[str]:
        return {"", *(b.strip() for b in self.blank)}


def _describe_error(err: ValidationError, where: str) -> str:
    first = err.errors()[0]
    key = ".".join(str(p) for p in first["loc"]) or "(table)"
    if first["type"] == "extra_forbidden":
        allowed = ", ".join(_allowed(first["loc"]))
        return f"{where}: unknown key `{key}`; allowed keys: {allowed}"
    msg = first["msg"]
    if msg.startswith("Value error, "):
        msg = msg[len("Value error, ") :]
    return f"{where}: key `{key}`: {msg}"


def _allowed(loc: tuple) -> list[str]:
    model: type[BaseModel] = DataMapping
    if len(loc) > 1 and loc[0] == "multi":
        model = MultiLayout
    return list(model.model_fields)


def mapping_from_dict(table: dict, where: str = "mapping") -> DataMapping:
    """Validate a `[data]` table; errors become one-line `MappingError`s."""
    try:
        return DataMapping.model_validate(table)
    except ValidationError as err:
        raise MappingError(_describe_error(err, where)) from None


def load_mapping(path: str | Path) -> DataMapping:
    """Read a mapping TOML file; keys top-level or under a `[data]` table."""
    path = Path(path)
    try:
        raw = path.read_bytes()
    except OSError as err:
        raise MappingError(f"{path}: cannot read the mapping file ({err.strerror})") from None
    try:
        doc = tomllib.loads(raw.decode("utf-8"))
    except UnicodeDecodeError as err:
        raise MappingError(f"{path}: not UTF-8 text (byte {err.start}); save the mapping as UTF-8") from None
    except tomllib.TOMLDecodeError as err:
        raise MappingError(f"{path}: not valid TOML ({err})") from None
    table = doc.get("data", doc) if isinstance(doc.get("data"), dict) else doc
    if table is not doc and set(doc) - {"data"}:
        # Other tables (policy, quality) may sit beside [data]; only [data] is ours.
        pass
    return mapping_from_dict(table, str(path))


def check_mapping(mapping: DataMapping, q: Questionnaire, where: str = "[data.columns]") -> None:
    """Stop on a mapping that cannot be right: a key naming nothing in the spec, two
    names mapped to one column, or a name mapped to the respondent id column."""
    from logiccheck.suggest import did_you_mean

    names: list[str] = []
    for e in q.items():
        names.append(e.name)
        if e.stmt.type.kind == "multi":
            codes = q.item_codes(e.stmt)
            names += [mapping.multi.column.format(name=e.name, value=o.value) for o in (codes.options if codes else [])]
    names += [e.name for e in q.entries if e.kind not in ("stop", "check") and e.name not in names]
    known = set(names)
    seen: dict[str, str] = {}
    for key, column in mapping.columns.items():
        if key not in known:
            raise MappingError(f"{where}: `{key}` names no item, grid row or option column of the spec{did_you_mean(key, names)}")
        if column == mapping.id:
            raise MappingError(f"{where}: `{key}` is mapped to `{column}`, the respondent id column; map it to its own column")
        if column in seen:
            raise MappingError(f"{where}: `{seen[column]}` and `{key}` are both mapped to column `{column}`; each needs its own column")
        seen[column] = key
