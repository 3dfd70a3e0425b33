"""The certificate reads changes at rounding level as converged, not as a diverging series."""

from sections import layered_wall, run

from coldseam.thermal.levels import tail_estimate


def test_rounding_changes_give_no_remaining_change():
    values = [0.26153558752101608, 0.26153558752101558, 0.26153558752101635]
    assert tail_estimate(values, relative=True) == 0.0
    assert tail_estimate([14.871, 14.871 + 3e-15, 14.871 - 2e-15], relative=False) == 0.0


def test_a_real_change_is_still_judged():
    assert tail_estimate([1.0, 1.001, 1.0015], relative=True) > 0
    assert tail_estimate([1.0, 1.001, 1.003], relative=True) is None  # growing changes


def test_a_plain_wall_is_certified_on_the_first_three_levels():
    # A 1D field is exact in P2 on any mesh (ISO 6946 U-value, see test_validation), so the
    # levels agree to rounding and the certificate needs no more than its minimum of three.
    layers = [("render", 0.87, 12.0), ("eps", 0.032, 140.0), ("concrete", 2.3, 180.0)]
    result = run({"section": layered_wall(layers)})
    assert result["mesh"]["target_met"]
    assert len(result["mesh"]["levels"]) == 3
