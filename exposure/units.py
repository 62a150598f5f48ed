"""Physical constants and unit conversions shared by every model.

Constants are CODATA 2018 values (exact where the SI defines them).
"""

from __future__ import annotations

import numpy as np

SPEED_OF_LIGHT = 299_792_458.0
"""Speed of light in vacuum [m/s], exact (SI 2019)."""

FREE_SPACE_IMPEDANCE = 376.730_313_412
"""Characteristic impedance of free space Z0 [ohm], CODATA 2018."""

DBD_TO_DBI = 2.15
"""Gain of a half-wave dipole over an isotropic radiator [dB] (47 CFR 1.1307(b)(3))."""

ERP_TO_EIRP = 1.64
"""EIRP / ERP as a linear factor, the dipole gain (47 CFR 1.1307(b)(3), OET 65)."""

BEAMWIDTH_DIRECTIVITY_DEG2 = 41_253.0
"""Square degrees in a sphere, 4π (180/π)²: D ≈ 41253/(θh·θv) (common practice)."""


def db_to_linear(db):
    """Power ratio from decibels: ``10**(db/10)``."""
    return np.power(10.0, np.asarray(db, dtype=float) / 10.0)


def linear_to_db(ratio):
    """Decibels from a power ratio: ``10*log10(ratio)``."""
    return 10.0 * np.log10(np.asarray(ratio, dtype=float))


def dbm_to_watts(dbm):
    """Power [W] from dBm."""
    return db_to_linear(dbm) * 1e-3


def wavelength_m(frequency_mhz):
    """Free-space wavelength [m] at a frequency [MHz]."""
    return SPEED_OF_LIGHT / (np.asarray(frequency_mhz, dtype=float) * 1e6)
