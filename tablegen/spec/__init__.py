"""Specs: TOML -> frozen dataclasses (book, chart, editions, printed columns). May import:
tablegen.core, data, thermo, calc; never the documents or a drawing library."""
