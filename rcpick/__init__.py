"""rcpick: pick standard resistor and capacitor values that hit an RC timing target."""

__version__ = "0.1.0"
