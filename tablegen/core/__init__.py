"""Numbers, units, text and files: errors, units, constants, compositions as text, JSON and file
writing. No thermodynamics. May import: the standard library and numpy only."""
