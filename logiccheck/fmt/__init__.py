"""The spec formatter: one layout for every spec, proved to keep its meaning."""

from logiccheck.fmt.format import FormatError, format_text, meaning

__all__ = ["FormatError", "format_text", "meaning"]
