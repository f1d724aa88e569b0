"""Analyses beyond the Hopf point: fold, Bautin, Bogdanov-Takens.

Pipeline place: beside :mod:`criticality.hopf`; each analysis takes a prepared
problem (:mod:`criticality.local.prepare`) and returns a frozen result, and is
listed in :mod:`criticality.registry`.  A new analysis goes here.
"""
