"""Typer command modules; each registers its commands on the apps in :mod:`inkshift.cli`."""
