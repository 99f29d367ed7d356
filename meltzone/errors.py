"""Exceptions that reach the user as one clear line (the CLI exits with code 2)."""


class MeltzoneError(Exception):
    """Base class: a user's mistake or an input the models cannot handle."""


class ConfigError(MeltzoneError, ValueError):
    """A configuration value is missing, unknown, of the wrong type or out of range."""


class ModelError(MeltzoneError, ValueError):
    """A model (melting curve, table) is unknown or its data are invalid."""


class ConvergenceError(MeltzoneError, RuntimeError):
    """A solver did not converge for these inputs."""


class ResultsFileError(MeltzoneError, OSError):
    """A results file is unreadable, foreign or of an unknown schema."""
