"""Calculations built on the model: combustion, process steps, uncertainty, agreement, fitting,
QA comparison, substances by name. May import: tablegen.core, tablegen.data, tablegen.thermo."""
