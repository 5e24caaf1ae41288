"""One module per command, with the text of its answers. May import every layer; nothing below
imports it."""
