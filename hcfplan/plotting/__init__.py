"""Matplotlib drawing functions: each takes an ``ax`` (or a figure) and a result object and
returns it. Nothing here recomputes physics, calls ``plt.show()`` or changes rcParams globally.
Importing matplotlib is deferred to these modules so that the CLI starts quickly.
"""
