"""Unit systems of room files. The engine is SI; conversion happens here, at the edge."""

from __future__ import annotations

from dataclasses import dataclass

FOOT_M = 0.3048  # exact, by the international yard and pound agreement (1959)


@dataclass(frozen=True)
class Units:
    """Factors from a file's units to SI, and the labels to show."""

    name: str
    length: float
    length_label: str
    area_label: str
    volume_label: str
    temperature_label: str

    @property
    def area(self) -> float:
        return self.length ** 2

    @property
    def volume(self) -> float:
        return self.length ** 3

    def temperature_to_c(self, t: float) -> float:
        return (t - 32.0) * 5.0 / 9.0 if self.name == "imperial" else t

    def temperature_from_c(self, t: float) -> float:
        return t * 9.0 / 5.0 + 32.0 if self.name == "imperial" else t


METRIC = Units("metric", 1.0, "m", "m^2", "m^3", "degC")
IMPERIAL = Units("imperial", FOOT_M, "ft", "ft^2", "ft^3", "degF")
UNITS = {"metric": METRIC, "imperial": IMPERIAL}
