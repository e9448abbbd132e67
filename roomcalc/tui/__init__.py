"""The terminal interface (Textual). Only this package imports textual; it calls down into
roomcalc.io and roomcalc.engine, never the other way."""
