"""The Python API of hcfplan: what the commands compute, as Python objects.

``import hcfplan`` makes these names available lazily (``hcfplan.simulate`` imports this
package on first use), so the import stays as light as the command line's:

- :func:`load_config` — a TOML file or a mapping, with overrides, validated;
- :func:`simulate` -> :class:`Run` (``summary``, ``arrays``, ``verdict``, ``plot``, ``save``);
- :func:`scan` -> :class:`ScanTable` (rows as dicts, ``to_pandas()``);
- :func:`limits`, :func:`envelope`, :func:`recommend`, :func:`compare`;
- :func:`calibrate` -> fitted values against measured output spectra.

Bad input raises :class:`hcfplan.errors.ConfigError` naming the key, as the command line's
exit code 2 does.
"""

from hcfplan.api.calibration import calibrate
from hcfplan.api.config import load_config
from hcfplan.api.run import Run, simulate
from hcfplan.api.table import Table
from hcfplan.api.workflows import (
    Comparison,
    Envelope,
    Recommendations,
    ScanTable,
    compare,
    envelope,
    limits,
    recommend,
    scan,
)
from hcfplan.errors import ConfigError, HcfplanError

__all__ = ["Comparison", "ConfigError", "Envelope", "HcfplanError", "Recommendations", "Run",
           "ScanTable", "Table", "calibrate", "compare", "envelope", "limits", "load_config",
           "recommend", "scan", "simulate"]
