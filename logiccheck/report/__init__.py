"""Stage 6: reporters. Each format is one small emitter over the same records."""
