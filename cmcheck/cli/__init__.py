"""The ``cmcheck`` command line: parse options, call the library, render the result."""

from .app import app
from .main import main

__all__ = ["app", "main"]
