"""``report.html``: one self-contained page per ``simulate``, ``scan`` and ``compare`` folder.

Built from the files already written to the folder (summary, table, comparison, the PNG
figures embedded as base64; nothing is drawn again) and never from the network: the job in one
line, the inputs, the verdict and its reasons, headline results, limits with margins, cautions,
figures, data sources and provenance. Imports flow one way: run, workflows -> page.
"""

from hcfplan.report.run import write_run_report
from hcfplan.report.workflows import write_compare_report, write_scan_report

__all__ = ["write_compare_report", "write_run_report", "write_scan_report"]
