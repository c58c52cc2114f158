"""ledlint: a design-rule checker for LED drive circuits."""

__version__ = "0.1.0"
