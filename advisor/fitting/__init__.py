"""Fitting boundary coefficients to measured temperature curves.

``measured`` reads the thermocouple file, ``parameters`` says what is fitted (a constant
coefficient per edge group, a coefficient against time or against surface temperature with
Tikhonov regularisation, an emissivity), ``problem`` runs the solver on one assembled system
for each trial, ``estimate`` does the least-squares fit with its uncertainty and verdict, and
``lumped_fit`` reads a coefficient off each curve the hand way for comparison. Nothing here
prints or writes files; the ``fit`` command and :mod:`advisor.writers.fit_report` do that.
"""
