"""The command line; ``hcfplan.cli.app:main`` is the console entry point.

Imports flow one way: app -> workflows -> common, output.
"""
