"""Annotated images, reports and provenance. No Qt in the composition logic."""
