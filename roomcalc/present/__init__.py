"""Presenters: the study's answers as text, markdown, JSON and CSV (and, later, HTML), with one
number formatter (:mod:`roomcalc.present.numbers`). No interface toolkit here; the terminal
interface shows these same sections."""
