"""Errors that carry a message meant for the user, not a traceback."""


class CalamiError(Exception):
    """A failure the user can act on; the CLI prints it as one line and exits 2."""


class ModelError(CalamiError):
    """The model file is missing, truncated, corrupt or of the wrong version."""


class ConfigError(CalamiError):
    """A configuration file or value is invalid; names the file and line."""
