"""Test set-up: the tests import the slow reference implementations from this folder."""

import os
import sys

sys.path.insert(0, os.path.dirname(__file__))
