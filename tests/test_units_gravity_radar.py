"""Units, gravity and radar displacement against published definitions."""

import numpy as np
import pytest

from wakemeter.errors import ParameterError
from wakemeter.physics import gravity, radar, units


def test_knot_is_exact():
    # Source: BIPM SI Brochure 9th ed. (2019), Table 8: 1 kn = 1852/3600 m/s.
    assert units.KNOT_MPS == 1852 / 3600
    assert units.mps_to_knots(0.514444) == pytest.approx(1.0, abs=1e-6)
    assert units.knots_to_mps(units.mps_to_knots(7.3)) == pytest.approx(7.3)
    assert units.mps_to_kmh(10.0) == pytest.approx(36.0)
    assert "kn" in units.format_speed(5.0) and "km/h" in units.format_speed(5.0)


def test_standard_and_normal_gravity():
    # Source: CGPM 1901 (g_n = 9.80665); NIMA TR8350.2 (2000) Table 3.4 / eq. 4-1:
    # gamma_e = 9.7803253359, gamma_p = 9.8321849378 m/s^2 (from memory of the table).
    assert gravity.STANDARD_GRAVITY == 9.80665
    assert gravity.normal_gravity(0.0) == pytest.approx(9.7803253359, abs=1e-9)
    assert gravity.normal_gravity(90.0) == pytest.approx(9.8321849378, abs=1e-8)
    assert gravity.normal_gravity(-90.0) == pytest.approx(9.8321849378, abs=1e-8)
    mid = gravity.normal_gravity(np.array([30.0, 45.0, 60.0]))
    assert np.all(np.diff(mid) > 0)
    with pytest.raises(ParameterError, match="latitude_deg"):
        gravity.normal_gravity(91.0)


def test_radar_displacement():
    # Source: Raney 1971 (IEEE TAES 7(3)): dx = -(R/V) v_r; R/V ~ 105-125 s for a spaceborne C-band radar
    # (from memory: slant range ~850 km at ~7.5 km/s), so 5 m/s radial speed shifts the hull ~0.5 km.
    dx = radar.azimuth_offset(5.0, 850_000.0, 7_500.0)
    assert dx == pytest.approx(-566.7, abs=0.1)
    assert 450 < abs(dx) < 650
    assert radar.radial_speed_from_offset(dx, 850_000.0, 7_500.0) == pytest.approx(5.0)
    u = radar.ground_speed_from_radial(2.0, incidence_deg=30.0, heading_deg=90.0, look_bearing_deg=90.0)
    assert u == pytest.approx(4.0)
    with pytest.raises(ParameterError, match="flight direction"):
        radar.ground_speed_from_radial(2.0, incidence_deg=30.0, heading_deg=0.0, look_bearing_deg=90.0)
