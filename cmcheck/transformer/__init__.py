"""Transmission-line and flux-coupled transformers (baluns, ununs) as batched nodal circuits."""
