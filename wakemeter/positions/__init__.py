"""Vessel position reports (AIS): reading them, their positions at the scene's time, and the match with
the vessels seen in the scene."""
