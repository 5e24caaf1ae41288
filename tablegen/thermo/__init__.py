"""The thermodynamic model: NASA polynomial forms, species and mixtures, water saturation, the
inverse. May import: tablegen.core, tablegen.data; never a drawing library, never a spec."""
