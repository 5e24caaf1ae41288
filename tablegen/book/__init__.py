"""Documents: the table model and its renderers (PDF, CSV, JSON, charts, QA report). May import
every layer below; the renderers get a finished model and never import tablegen.thermo."""
