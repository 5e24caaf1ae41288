"""The coefficient library: gasdata records, the NASA file formats, validation. May import:
tablegen.core, and the polynomial forms of tablegen.thermo.polynomial (to check records)."""
