"""Nominal pipe sizes of audit/io/readers/pipe_sizes.py against the fluids package's tables.

fluids.piping carries the ASME B36.10M outside diameters (NPSSTD/STDo, NPS40/S40o) and, in its
ASME B36.19M stainless tables, the DN designation of each NPS (NPSS10/SS10DN).
"""

import pytest
from fluids import piping

from audit.pipe_sizes import NOMINAL_PIPE_SIZES, NPS_BY_DN, NPS_BY_VALUE, OD_MM_BY_NPS


def test_sizes_are_the_standard_weight_sizes_of_b36_10m():
    # Source: fluids.piping.NPSSTD (ASME B36.10M, standard weight), 1/8 to 48.
    assert sorted(NPS_BY_VALUE) == sorted(piping.NPSSTD)


@pytest.mark.parametrize("text, nps, dn, od_mm", NOMINAL_PIPE_SIZES)
def test_outside_diameter_matches_fluids_b36_10m(text, nps, dn, od_mm):
    # Source: fluids.piping.STDo, ASME B36.10M outside diameters in mm.  Both tables carry the
    # standard's printed metric value, so they agree to float precision.
    expected = piping.STDo[piping.NPSSTD.index(nps)]
    assert od_mm == pytest.approx(expected, abs=1e-9)


@pytest.mark.parametrize("nps", piping.NPS40)
def test_outside_diameter_matches_fluids_nearest_pipe(nps):
    # Source: fluids.piping.nearest_pipe (schedule 40, ASME B36.10M); it returns Do in metres.
    # The OD of one NPS is the same for every schedule, so schedule 40 checks it.
    _, _, do_m, _ = piping.nearest_pipe(NPS=nps, schedule="40")
    assert OD_MM_BY_NPS[NPS_BY_VALUE[nps]] / 1000.0 == pytest.approx(do_m, rel=1e-12)


@pytest.mark.parametrize("nps, dn", list(zip(piping.NPSS10, piping.SS10DN)))
def test_dn_matches_fluids_dn_designation(nps, dn):
    # Source: fluids.piping.NPSS10 / SS10DN, the NPS-DN pairs of ASME B36.19M.
    assert NPS_BY_DN[dn] == NPS_BY_VALUE[nps]


def test_dn_above_nps_4_is_25_times_nps():
    # The DN column of ASME B36.10M for NPS 4 and larger is 25 x NPS (the table's own pattern,
    # which extends the fluids pairs above NPS 30 up to 48).
    for _, nps, dn, _ in NOMINAL_PIPE_SIZES:
        if nps >= 4:
            assert dn == 25 * nps


@pytest.mark.parametrize("schedule", ["40", "80"])
def test_wall_thicknesses_match_fluids_b36_10m(schedule):
    from audit.pipe_sizes import WALL_MM_BY_SCHEDULE
    value_of = {text: value for value, text in NPS_BY_VALUE.items()}
    for nps, wall_mm in WALL_MM_BY_SCHEDULE[schedule].items():
        # fluids.piping.nearest_pipe: ASME B36.10M walls [m]; the table gives 0.01 mm.
        assert wall_mm / 1000 == pytest.approx(
            piping.nearest_pipe(NPS=value_of[nps], schedule=schedule)[3], abs=5e-6), nps
