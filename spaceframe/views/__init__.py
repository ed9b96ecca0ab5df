"""Views of audit results: they only read results."""
