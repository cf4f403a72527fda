"""Scales: items scored together as one composite (reliability, misfit, scores)."""
