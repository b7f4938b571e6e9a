"""The small set of exception and warning classes used across hcfplan."""


class HcfplanError(Exception):
    """Base class of every error the tool reports to the user as one line."""


class ConfigError(HcfplanError, ValueError):
    """Bad input: a config key, a table file, a CSV file or a command-line value.

    The message names the key (or file and key) and the value received, and says what is
    allowed, e.g. ``fiber.core_diameter_um = -50: must be > 0``.
    """


class GasPhaseError(HcfplanError, ValueError):
    """A requested gas fill would be liquid or two-phase at the given pressure and temperature."""


class ValidityWarning(UserWarning):
    """An input lies outside the range over which a model or a fit was validated."""
