"""Sabine and Eyring checked against pyroomacoustics (PyPI), a general-purpose reference library.

Two levels of check:

1. Formulas. pyroomacoustics 0.10.1 has its own Sabine and Eyring functions
   (``pyroomacoustics.acoustics.rt60_sabine`` / ``rt60_eyring``) and ``ShoeBox.rt60_theory``;
   ours must give the same numbers.  The library's speed of sound is its constant ``c`` = 343.0
   m/s (``pyroomacoustics.constants``); we pass it in so the comparison is exact.
2. Simulation. The library's image-source model (ISM) and its hybrid ISM + ray tracer make a
   room impulse response (RIR) of a 7 x 5 x 3 m shoebox with the same alpha on every wall and no
   air; we take its decay time ourselves (ISO 3382-1 T30 from a Schroeder backward integral).
   A simulated decay follows Eyring only where the sound field is diffuse.  What we measured
   (seed study over 20 seeds, numpy and libroom seed 0-19, written up in docs/validation.md):

   * With walls that scatter fully (scattering 1) the simulation is a diffuse field and T30 is
     1.02 / 1.06 / 1.14 x Eyring at alpha 0.1 / 0.25 / 0.5 (seed sd 0.8-1.5 %): just
     above Eyring, below Sabine.  This needs ``energy_thres`` far below the default 1e-7: the
     library compares that threshold with the absolute energy of each diffuse ray it sends to
     the receiver (rays start with 2 / n_rays), so by default late diffuse energy is dropped and
     T comes out 8-12 % short here (more with more rays or a smaller receiver).
   * With walls that scatter little (0.1) the field is not diffuse where the absorption is high:
     by the time the decay reaches -35 dB a ray has made about 35 / (-10 lg(1 - alpha))
     reflections, 77 at alpha 0.1 but 12 at 0.5, too few for 10 % scattering to mix the
     directions of travel.  T30 then moves from Eyring (0.985 x) towards the specular value
     (1.16 x at 0.25, 1.35 x at 0.5).  The near match at 0.1 is partly two errors cancelling:
     the tracer turns a ray into the blend s * (diffuse direction) + (1 - s) * (mirror
     direction), which shortens the mean free path to 2.62-2.72 m against 4V/S = 2.96 m, so we
     do not assert it; the diffuse-limit runs carry the low-absorption check.
   * With specular walls (pure ISM) a shoebox decays as a mix of exponentials, one per direction
     of travel (grazing, near-axial paths meet few walls), so T30 is 1.42-1.48 x Eyring whatever
     alpha is.  An energy sum over the image lattice, computed here from the geometry alone,
     gives 1.33-1.39 x; the rest is coherent low-frequency (modal) energy in the broadband RIR.

The simulated values below are measured in this run; none is hard-coded as an expected result.
The library's RNGs are seeded with ``pyroomacoustics.random.seed``: ``np.random.seed`` has no
effect on it (0.10.1 keeps its own numpy Generator and a C++ mt19937_64 for the ray tracer's
diffuse directions; measured: two runs after ``np.random.seed(0)`` gave different RIRs).
"""

from __future__ import annotations

import functools

import numpy as np
import pyroomacoustics as pra
import pytest

from roomcalc.engine.reverb import eyring, millington, sabine

# Simulated room and settings (ours; a scenario of our own, not from a handbook).
ROOM = np.array([7.0, 5.0, 3.0])  # [m]
VOLUME = float(np.prod(ROOM))
SURFACE = 2.0 * float(ROOM[0] * ROOM[1] + ROOM[1] * ROOM[2] + ROOM[0] * ROOM[2])
SOURCE = [2.0, 3.1, 1.6]  # [m]
RECEIVER = [5.1, 1.7, 1.3]  # [m], 3.4 m from the source
FS = 16000  # [Hz]
N_RAYS = 10000
RECEIVER_RADIUS = 0.5  # [m], the library's default
HIST_BIN = 0.004  # [s], the library's default energy-histogram resolution
MAX_ORDER_HYBRID = 3  # image sources up to order 3, rays after that
SEED = 3
ALPHAS = (0.1, 0.25, 0.5)


# --------------------------------------------------------------------------------------------
# Decay-time helper


def schroeder_decay_time(h, fs, start_db=-5.0, stop_db=-35.0):
    """Decay time of an impulse response by Schroeder backward integration and a line fit.

    Parameters
    ----------
    h : array_like -- impulse response (sound pressure, any unit)
    fs : float -- sampling rate [Hz]
    start_db, stop_db : float -- evaluation range on the decay curve [dB]; -5 and -35 give T30,
        -5 and -25 give T20

    Returns
    -------
    float -- T [s], the time for the fitted line to fall 60 dB

    Notes
    -----
    The method of ISO 3382-1:2009 (reverberation time from the integrated impulse response):
    the decay curve is Schroeder's backward integral of the squared response,
    E(t) = int_t^inf h^2 dtau, in dB re E(0) (M. R. Schroeder, "New method of measuring
    reverberation time", J. Acoust. Soc. Am. 37 (1965) 409); a least-squares line is fitted
    between the first samples at or below ``start_db`` and ``stop_db``, and T = -60 / slope.
    The integral ends where the response ends, which bends the curve down near the end.  So that
    this cannot reach the fitted part, the response's level over its last 10 ms must be at least
    10 dB below its level over the 10 ms from the bottom of the evaluation range (our guard:
    cutting these RIRs where the curve is at -45 dB moved T30 by about 1 %, at -40 dB by 2-4 %,
    measured).
    """
    h = np.asarray(h, dtype=float)
    power = h * h
    energy = np.cumsum(power[::-1])[::-1]
    if energy[0] <= 0.0:
        raise ValueError("h: the impulse response carries no energy")
    with np.errstate(divide="ignore"):
        curve = 10.0 * np.log10(energy / energy[0])
    if curve[-1] > stop_db:
        raise ValueError(f"h: the decay curve reaches only {curve[-1]:.1f} dB, not {stop_db} dB")
    i0 = int(np.argmax(curve <= start_db))
    i1 = int(np.argmax(curve <= stop_db))
    w = max(1, int(round(0.010 * fs)))
    level_fit_end = np.mean(power[i1:i1 + w])
    level_end = np.mean(power[-w:])
    if level_end > level_fit_end * 0.1:
        raise ValueError(f"h: the response ends only "
                         f"{10 * np.log10(level_fit_end / max(level_end, 1e-300)):.1f} dB "
                         f"below its level at {stop_db} dB on the decay curve; 10 dB needed")
    t = np.arange(curve.size) / float(fs)
    slope, _ = np.polyfit(t[i0:i1 + 1], curve[i0:i1 + 1], 1)
    return -60.0 / slope


# --------------------------------------------------------------------------------------------
# Simulations (each run once per session; the library's RNGs are seeded before every run)


@functools.lru_cache(maxsize=None)
def simulated_rir(alpha, scattering, max_order, ray_tracing, energy_thres=1e-7):
    """RIR of the test room from pyroomacoustics, uniform alpha, no air, seeded."""
    pra.random.seed(numpy=SEED, libroom=SEED)
    material = pra.Material(alpha, scattering) if ray_tracing else pra.Material(alpha)
    room = pra.ShoeBox(ROOM, fs=FS, materials=material, max_order=max_order,
                       ray_tracing=ray_tracing, air_absorption=False)
    if ray_tracing:
        room.set_ray_tracing(n_rays=N_RAYS, receiver_radius=RECEIVER_RADIUS,
                             energy_thres=energy_thres, hist_bin_size=HIST_BIN)
    room.add_source(SOURCE)
    room.add_microphone(RECEIVER)
    room.compute_rir()
    return np.asarray(room.rir[0][0], dtype=float)


def t30_diffuse(alpha):
    """T30 [s] of the hybrid simulation with fully scattering walls (the diffuse limit).

    energy_thres = 1e-12 keeps the late diffuse energy that the default 1e-7 drops (see the
    module docstring); rays then run to -120 dB.
    """
    return schroeder_decay_time(simulated_rir(alpha, 1.0, MAX_ORDER_HYBRID, True, 1e-12), FS)


def t30_low_scattering(alpha):
    """T30 [s] of the hybrid simulation with scattering 0.1 and the library's default thresholds."""
    return schroeder_decay_time(simulated_rir(alpha, 0.1, MAX_ORDER_HYBRID, True), FS)


# Image-source orders high enough that every omitted image is at least 15 dB below the bottom
# of the T30 range: order 41 at alpha 0.25 is -51 dB, order 21 at alpha 0.5 is -63 dB.
# (Measured: order 60 instead of 40 at alpha 0.25 moved T30 by 0.3 %.)
ISM_ORDER = {0.25: 40, 0.5: 20}


def t30_ism(alpha):
    """T30 [s] of the pure image-source simulation (specular walls)."""
    return schroeder_decay_time(simulated_rir(alpha, 0.0, ISM_ORDER[alpha], False), FS)


def image_lattice_energy(alpha, max_order, fs=FS, c=343.0):
    """Energy response of the test room by summing its image sources, no wave effects.

    Image (kx, ky, kz) of a rectangular room with reflection factor sqrt(1 - alpha) on every
    wall: per axis the images lie at 2 k L + x_s (|2k| reflections) and 2 k L - x_s (|2k - 1|
    reflections) (J. B. Allen & D. A. Berkley, J. Acoust. Soc. Am. 65 (1979) 943).  Each adds
    (1 - alpha)^n / r^2 at t = r / c.  Independent of pyroomacoustics.
    """
    k = np.arange(-(max_order // 2) - 1, max_order // 2 + 2)
    pos, order = [], []
    for d in range(3):
        pos.append(np.concatenate([2 * k * ROOM[d] + SOURCE[d], 2 * k * ROOM[d] - SOURCE[d]])
                   - RECEIVER[d])
        order.append(np.concatenate([np.abs(2 * k), np.abs(2 * k - 1)]))
    px, py, pz = np.meshgrid(*pos, indexing="ij", sparse=True)
    ox, oy, oz = np.meshgrid(*order, indexing="ij", sparse=True)
    n = (ox + oy + oz).ravel()
    r = np.sqrt(px * px + py * py + pz * pz).ravel()
    keep = n <= max_order
    n, r = n[keep], r[keep]
    return np.bincount(np.round(r / c * fs).astype(int), weights=(1.0 - alpha) ** n / r ** 2)


# --------------------------------------------------------------------------------------------
# 1. Formulas


@pytest.mark.parametrize("c", [343.0, 331.3, 346.1])
@pytest.mark.parametrize("m", [0.0, 0.001, 0.01])
@pytest.mark.parametrize("volume,surface", [(VOLUME, SURFACE), (3000.0, 1340.0), (30.0, 58.0)])
def test_formulas_match_pyroomacoustics_functions(volume, surface, m, c):
    alpha = np.array([0.01, 0.1, 0.25, 0.5, 0.8, 0.95])
    ours_sabine = sabine(volume, alpha * surface, m=m, c=c)
    ours_eyring = eyring(volume, surface, alpha * surface, m=m, c=c)
    # Source: pyroomacoustics 0.10.1 (PyPI), acoustics.rt60_sabine(S, V, a, m, c) and
    # acoustics.rt60_eyring(S, V, a, m, c), the same equations in float64: rtol 1e-12 allows
    # only rounding.
    ref_sabine = pra.acoustics.rt60_sabine(surface, volume, alpha, m, c)
    np.testing.assert_allclose(ours_sabine, ref_sabine, rtol=1e-12)
    # Known difference: the library's rt60_eyring computes -K V / (S ln(1 - a) + 4 m V), which
    # subtracts the air term (with air its T comes out longer than without: 1.163 s against
    # 1.131 s for this room at alpha 0.1, m = 0.001 1/m).  Eyring's formula adds it, as ours
    # does, so the library is our check for Eyring without air only.
    ref_eyring = pra.acoustics.rt60_eyring(surface, volume, alpha, 0.0, c)
    np.testing.assert_allclose(eyring(volume, surface, alpha * surface, c=c), ref_eyring,
                               rtol=1e-12)
    # Common practice (analytic): -ln(1 - a) > a for 0 < a < 1, so Eyring < Sabine always, and
    # air absorption shortens both.
    assert np.all(ours_eyring < ours_sabine)
    assert np.all(ref_eyring < pra.acoustics.rt60_sabine(surface, volume, alpha, 0.0, c))
    if m > 0:
        assert np.all(ours_eyring < eyring(volume, surface, alpha * surface, c=c))
        assert np.all(ours_sabine < sabine(volume, alpha * surface, c=c))


@pytest.mark.parametrize("dims", [(7.0, 5.0, 3.0), (4.0, 3.0, 2.5), (20.0, 15.0, 8.0)])
@pytest.mark.parametrize("alpha", [0.05, 0.1, 0.25, 0.5, 0.8])
def test_shoebox_rt60_theory_uniform_walls(dims, alpha):
    room = pra.ShoeBox(dims, fs=FS, materials=pra.Material(alpha), max_order=1)
    # Source: pyroomacoustics 0.10.1 (PyPI), parameters.py: default speed of sound c = 343.0
    # m/s ("speed of sound at 20 C in dry air"); the room takes it when no temperature is given.
    assert room.c == pra.constants.get("c") == 343.0
    lx, ly, lz = dims
    v = lx * ly * lz
    s = 2.0 * (lx * ly + ly * lz + lx * lz)
    # Source: pyroomacoustics 0.10.1 (PyPI), ShoeBox.rt60_theory('sabine' / 'eyring'), no air
    # (with air it adds 4 m V once per wall, six times in a box, so air is left out here).
    # rtol 1e-6: the library stores wall corners and coefficients in float32 (eps 1.2e-7);
    # measured difference 1.6e-7.
    assert sabine(v, alpha * s, c=room.c) == pytest.approx(room.rt60_theory("sabine"), rel=1e-6)
    assert eyring(v, s, alpha * s, c=room.c) == pytest.approx(room.rt60_theory("eyring"),
                                                              rel=1e-6)


def test_shoebox_rt60_theory_per_wall():
    alphas = {"west": 0.2, "east": 0.1, "south": 0.4, "north": 0.3, "floor": 0.5, "ceiling": 0.6}
    lx, ly, lz = ROOM
    areas = {"west": ly * lz, "east": ly * lz, "south": lx * lz, "north": lx * lz,
             "floor": lx * ly, "ceiling": lx * ly}
    room = pra.ShoeBox(ROOM, fs=FS, materials={k: pra.Material(a) for k, a in alphas.items()},
                       max_order=1)
    names = list(alphas)
    s_i = np.array([areas[k] for k in names])
    a_i = np.array([[alphas[k]] for k in names])
    # The library sums 1 / T over walls: for Sabine that is A = sum S_i alpha_i, and for
    # 'eyring' it is -sum S_i ln(1 - alpha_i), i.e. Millington-Sette (Millington 1932; Sette
    # 1933), not Eyring, once the walls differ.
    # Source: pyroomacoustics 0.10.1 (PyPI), ShoeBox.rt60_theory; rtol 1e-6 for float32 walls.
    assert sabine(VOLUME, float(s_i @ a_i[:, 0])) == pytest.approx(room.rt60_theory("sabine"),
                                                                    rel=1e-6)
    assert millington(VOLUME, s_i, a_i)[0] == pytest.approx(room.rt60_theory("eyring"),
                                                            rel=1e-6)
    # and our Eyring (mean alpha) is a different, longer value for these walls
    assert eyring(VOLUME, SURFACE, float(s_i @ a_i[:, 0])) > 1.05 * room.rt60_theory("eyring")


# --------------------------------------------------------------------------------------------
# 2. The decay-time helper


def test_decay_time_helper_on_exponential():
    # Analytic: the backward integral of an exponential decay is the same exponential, so an
    # RIR whose level falls 60 dB in T gives T (here T = 0.8 s, 180 dB of decay in 3 s).
    t = np.arange(3 * FS) / FS
    h = 10.0 ** (-3.0 * t / 0.8)
    assert schroeder_decay_time(h, FS) == pytest.approx(0.8, rel=1e-9)
    assert schroeder_decay_time(h, FS, -5.0, -25.0) == pytest.approx(0.8, rel=1e-9)
    with pytest.raises(ValueError, match="ends only"):
        schroeder_decay_time(h[: int(0.3 * FS)], FS)  # cut after 22.5 dB of decay


def test_decay_time_helper_matches_measure_rt60():
    h = simulated_rir(0.25, 0.1, MAX_ORDER_HYBRID, True)
    # Source: pyroomacoustics 0.10.1 (PyPI), experimental.rt60.measure_rt60(decay_db=30):
    # Schroeder integral of the whole RIR (direct sound included), least-squares line from the
    # first sample below -5 dB to the first below -35 dB, extrapolated to -60 dB, i.e. T30.
    # rtol 1e-3: the two differ only in the choice of end samples (measured 1e-4 at most).
    ref = pra.experimental.measure_rt60(h, fs=FS, decay_db=30)
    assert schroeder_decay_time(h, FS) == pytest.approx(ref, rel=1e-3)


# --------------------------------------------------------------------------------------------
# 3. Simulation, diffuse limit: fully scattering walls


def test_diffuse_simulation_agrees_with_eyring_at_low_absorption():
    t_eyring = float(eyring(VOLUME, SURFACE, 0.1 * SURFACE))
    # Source: pyroomacoustics 0.10.1 (PyPI), ShoeBox hybrid ISM + ray tracing, scattering 1;
    # T30 measured in this run.  Tolerance 6 %: over 20 seeds T30 / Eyring was 1.011-1.041
    # (mean 1.024, sd 0.008).  Slightly above Eyring is expected: with diffuse reflection the
    # free paths spread about their mean 4V/S (common practice), and a spread of reflection
    # counts makes the mean energy decay slower than exp(mean) (an independent throwaway Monte
    # Carlo of ours, Lambert reflections in this box, gave 1.022, measured).
    assert t30_diffuse(0.1) == pytest.approx(t_eyring, rel=0.06)


@pytest.mark.parametrize("alpha", ALPHAS)
def test_diffuse_simulation_lies_between_eyring_and_sabine(alpha):
    t_eyring = float(eyring(VOLUME, SURFACE, alpha * SURFACE))
    t_sabine = float(sabine(VOLUME, alpha * SURFACE))
    t = t30_diffuse(alpha)
    # Source: pyroomacoustics 0.10.1 (PyPI), hybrid simulation, scattering 1, T30 measured in
    # this run.  Over 20 seeds T30 / Eyring was 1.011-1.041, 1.034-1.081, 1.103-1.162 at alpha
    # 0.1, 0.25, 0.5, against Sabine / Eyring 1.054, 1.151, 1.386; 3 % each side is two to four
    # seed-to-seed standard deviations (sd 0.008, 0.011, 0.015).
    assert 0.97 * t_eyring <= t <= 1.03 * t_sabine


def test_diffuse_simulation_decays_faster_with_more_absorption():
    # Source: pyroomacoustics 0.10.1 (PyPI), hybrid simulation, scattering 1, T30 measured in
    # this run; the diffuse formulas order the same way.
    t = [t30_diffuse(a) for a in ALPHAS]
    assert t[0] > t[1] > t[2]
    assert np.all(np.diff(eyring(VOLUME, SURFACE, np.array(ALPHAS) * SURFACE)) < 0)


# --------------------------------------------------------------------------------------------
# 4. Simulation, away from the diffuse limit: little scattering and specular walls


def test_low_scattering_simulation_departs_from_eyring_as_absorption_rises():
    t = np.array([t30_low_scattering(a) for a in ALPHAS])
    ratio = t / eyring(VOLUME, SURFACE, np.array(ALPHAS) * SURFACE)
    # Source: pyroomacoustics 0.10.1 (PyPI), hybrid simulation, scattering 0.1, default
    # thresholds, T30 measured in this run.  Over 20 seeds T30 / Eyring was 0.969-0.999,
    # 1.133-1.205, 1.237-1.467 at alpha 0.1, 0.25, 0.5 (each seed in this order, and each seed's
    # T falling): fewer reflections fall in the T30 range
    # as alpha rises, so 10 % scattering diffuses the field less and less.
    assert t[0] > t[1] > t[2]
    assert ratio[0] < ratio[1] < ratio[2]
    # The departure is the missing diffusion, not the formula: with fully scattering walls the
    # same room at alpha 0.5 is much nearer Eyring (seed means 1.35 x against 1.14 x; the
    # margin 0.05 is half the smallest gap seen for one seed, 0.095).
    assert ratio[2] > t30_diffuse(0.5) / eyring(VOLUME, SURFACE, 0.5 * SURFACE) + 0.05


@pytest.mark.parametrize("alpha", (0.25, 0.5))
def test_specular_simulation_matches_image_lattice_energy(alpha):
    t_eyring = float(eyring(VOLUME, SURFACE, alpha * SURFACE))
    t_ism = t30_ism(alpha)
    t_lattice = schroeder_decay_time(np.sqrt(image_lattice_energy(alpha, ISM_ORDER[alpha])), FS)
    # Source: pyroomacoustics 0.10.1 (PyPI), ShoeBox pure image-source model, T30 measured in
    # this run, against our own energy sum over the same image lattice (Allen & Berkley 1979).
    # The library's broadband pressure RIR adds coherent low-frequency (modal) energy that the
    # energy sum leaves out: measured 6-7 % longer, so the band is 0 to +12 %.
    assert t_lattice <= t_ism <= 1.12 * t_lattice
    # A specular box with uniform walls is not a diffuse field: measured T30 / Eyring 1.42 and
    # 1.48 for the library, 1.34 and 1.39 for the lattice sum; 1.25 leaves room for both.
    assert t_ism > 1.25 * t_eyring
    assert t_lattice > 1.25 * t_eyring


@pytest.mark.parametrize("alpha", (0.25, 0.5))
def test_low_scattering_simulation_lies_between_diffuse_and_specular_limits(alpha):
    # Source: pyroomacoustics 0.10.1 (PyPI), all three simulations measured in this run.  Some
    # scattering gives a decay between fully diffuse walls and specular walls.  Seed ranges of
    # T30 / Eyring over 20 seeds (scattering 1 | 0.1 | specular, which has no random part):
    # 1.034-1.081 | 1.133-1.205 | 1.42 at alpha 0.25; 1.103-1.162 | 1.237-1.467 | 1.48 at 0.5.
    # 3 % each side for seed spread.
    assert 0.97 * t30_diffuse(alpha) <= t30_low_scattering(alpha) <= 1.03 * t30_ism(alpha)
