#!/usr/bin/env python3
"""Tools for reading the journal."""

import os  # the standard library


class Journal:
    """A journal of changes, newest last."""

    limit = 10
    """How many entries to keep."""

    def read(self, path):
        """Read the journal at the given path."""
        text = "a # inside a string"
        other = '''triple # inside'''
        # Skip empty lines before parsing.
        return text
