"""Test configuration shared by the whole suite.

GUI tests run headless: Qt's offscreen platform is set before anything imports Qt.
"""
import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("MPLBACKEND", "Agg")
