"""Every tuned number of the wake analysis in one frozen :class:`Tuning`, with its unit and what set it.

The sweeps in ``benchmarks/`` vary a field by argument (``--tune significance_min=6.5``) instead of
patching module globals; ``DEFAULT_TUNING`` is what the program uses.  Change a default only together
with the sweeps named beside it, and say so in the commit message (see DEVELOPERS.md).

Seeds 0-59 of :func:`wakemeter.synth.cases.make_case` are the calibration set; tests use other seeds
(300 and up).  "common practice, no source" marks a working rule we chose, not a measured value.
"""

from __future__ import annotations

from dataclasses import dataclass, fields, replace

from ..errors import ParameterError

#: reach of the wedge and line searches from the vessel, as a fraction of the chip side: the largest
#: radius that stays inside the chip for any track direction (0.5) with a margin for the interpolation
REACH_FRACTION = 0.46


@dataclass(frozen=True)
class Tuning:
    """Thresholds and sizes of the analysis (units in the names; scores are standardised spectral power)."""

    # ---- the wake decision (benchmarks/null_sweep.py: 0 alarms in 354 trials at 640 px, 234 at 1024 px) ----
    presence_line_min: float = 6.0  #: a wake line this significant through the point shows a vessel there
    #: (without one and without a hull the waves belong to a wake whose apex is elsewhere: phantom_sweep.py)
    significance_min: float = 7.0  #: spectral significance needed to call a wake
    side_contrast_min: float = 8.0  #: wake-side contrast needed to call a wake
    #: ... and the spectral box must hold this many of the fitted transverse waves: a fit on one or two is
    #: outside the method's domain (a photo's frame too small for a fast vessel's wake: photo_sweep.py)
    box_waves_min: float = 2.5
    wake_free_trials: int = 588  #: wake-free trials behind the two thresholds (null sweeps, 640 and 1024 px)
    # ---- sizes (pixels of the analysis look) ----
    chip_px: int = 640  #: side of the square chip read around the vessel
    box_px: int = 256  #: side of the spectral box behind (and ahead of) the vessel
    gap_px: int = 12  #: gap between the vessel and the boxes (hull and bow foam)
    snap_radius_m: float = 40.0  #: a bright hull this close to the click is taken as the vessel
    snap_radius_px_max: float = 24.0  #: ... and at most this many look pixels away (centimetre photos)
    # ---- scale choice ----
    coarse_scene_factor: float = 1.6  #: a half-resolution look needs a scene side >= this x chip_px x step
    coarse_wave_box_fraction: float = 0.2  #: look coarser when the transverse wave exceeds this x box_px
    coarse_looks_max: int = 3  #: at most this many halvings
    #: the first look's scale: the coarsest power-of-two step at which the slowest vessel's transverse wave
    #: (3 kn: 1.5 m) still spans this many pixels (1 for pixels of 0.09 m and more; centimetre photos start
    #: coarser, wave_scale_sweep.py and photo_sweep.py)
    slowest_vessel_kn: float = 3.0
    #: a steady pattern imaged through any non-linearity (foam, glint, the sensor's curve) has harmonics at 2k and
    #: 3k, which lie on the curve of a vessel sqrt(2) and sqrt(3) slower; the fit moves to the fundamental when
    #: that scores at least this fraction of the best and this much on its own (noise reaches 2-4: null_sweep.py)
    #: (photo_sweep.py)
    harmonic_keep_fraction: float = 0.6
    harmonic_score_min: float = 4.5
    first_look_px_per_wave: float = 8.0
    # ---- the whitened spectrum (spectral.py; accuracy_sweep.py and null_sweep.py) ----
    #: the reference (ahead) spectrum is an upper envelope (3x3 maximum, then smoothing by this many bins), so a
    #: sharp swell peak present on both sides cancels instead of leaving an excess where plain smoothing would
    #: lower it
    spectrum_smooth_bins: float = 1.0
    #: whitened values are clipped at +/- this many ring spreads: a wake raises the whole curve, a blob a few
    #: points
    spectrum_z_clip: float = 4.0
    spectrum_band_min_waves_per_box: float = 4.0  #: fitting band: at least this many wavelengths across the box ...
    #: ... and crests at least this many pixels apart (below ~2.5 px a crest train aliases)
    spectrum_band_min_pixels_per_wave: float = 2.6
    #: bins either side of k_u = 0 masked: the turbulent-wake ridge along the track is not part of the waves
    spectrum_track_ridge_bins: float = 1.5
    spectrum_ring_min_bins: int = 8  #: a |k| ring is standardised on its own with at least this many bins
    #: correlated samples per independent spectral estimate under a Hann window (common practice, no source)
    spectrum_hann_samples_per_estimate: float = 3.0
    spectrum_curve_min_points: int = 12  #: a curve is scored when at least this many points fall in the band
    # ---- track candidates ----
    turbulent_candidate_min: float = 8.0  #: a turbulent wake this significant is tried as the track
    turbulent_candidate_sep_deg: float = 2.0  #: ... when it differs from the wedge's centre by more than this
    delta_max_deg: float = 20.0  #: track correction searched by the spectral fit
    delta_step_deg: float = 1.5  #: its grid step
    # ---- depth model (accuracy_sweep at Fr_h 0.85/0.92, seeds 420-431, and deep seeds 0-59) ----
    depth_gain_min: float = 1.0  #: joint (speed, depth, track) fit must beat the deep fit by this score
    fr_depth_effect: float = 0.6  #: below this Fr_h depth changes the pattern too little (Havelock: < 0.3 deg)
    fr_rule_out: float = 0.9  #: Fr_h whose fit must score rule_out_min below the best to call deep water
    rule_out_min: float = 1.5  #: score drop that rules a depth out
    fr_open_check: tuple[float, ...] = (0.75, 0.9)  #: Fr_h tried against the best fit for the interval's cover
    #: a given depth is contradicted when deep water or a fitted depth scores this much better (24 cases with the
    #: true depth given, seeds 300-311, 420-425, 430-435: largest gain 0.43; with a wrong depth 19 of 24 above)
    depth_check_gain_min: float = 1.5
    super_gain_min: float = 2.0  #: supercritical curve must beat the others by this (seeds 470-477, Fr_h 1.3)
    super_significance_min: float = 9.0  #: a wake seen only through the supercritical curve needs this
    # ---- crests and arms ----
    transverse_snr_min: float = 5.0  #: transverse crest spacing reported above this SNR of the mean periodogram
    #: the crest profiles fill a band this many transverse wavelengths either side of the track
    transverse_half_width_waves: float = 0.7
    transverse_groups: int = 4  #: contiguous sets of profiles whose peaks' scatter gives the uncertainty
    transverse_block_waves: float = 0.25  #: each profile is the mean of the rows across this many waves
    #: ... and when the profile holds at least this many crests (the analysis looks coarser until the box holds
    #: 5; a photo too small for that gave 35.6 m for 27.9 m at a stated ±1 %: photo_sweep.py)
    transverse_crests_min: float = 5.0
    transverse_band_deep: tuple[float, float] = (0.8, 1.25)  #: crest search band around the predicted lambda_t
    transverse_band_finite: tuple[float, float] = (0.85, 1.18)  #: ... with the depth known or fitted
    transverse_std_inflation: float = 1.25  #: stated crest-spacing uncertainty x this (common practice, no source)
    transverse_rel_std_floor: float = 0.006  #: smallest relative uncertainty of a crest spacing
    arms_k_hi_factor: float = 1.8  #: wave-energy band for the arms: 0.5 to this x the transverse wavenumber
    #: a wave-path line (Kelvin arm ridge, radar narrow V, turbulent wake) is reported when it stands this many
    #: robust spreads above the ahead fan (set on the deep sweep's radar scenes, which have no narrow V: no
    #: false narrow V in 30 scenes; see DEVELOPERS.md)
    wave_line_significance_min: float = 6.0
    arms_draw_max_std_deg: float = 6.0  #: arms drawn and used as the line search centre when this well measured
    turbulent_line_max_off_deg: float = 4.0  #: a turbulent wake line further off the fitted track is not reported
    narrow_arm_margin_deg: float = 2.0  #: arms narrower than Kelvin's by max(2 sigma, this) get the fast-hull caution
    #: added in quadrature to the half-angle's stated uncertainty: where the arms' edges gave 1.5 deg or less,
    #: the errors were -2.0 to +0.1 deg (mean -0.7; one stated 0.5 deg was 1.25 low and sank the Havelock pair's
    #: speed): 10 such among 71 half-angles, deep seeds 0-29 and depth seeds 420-467 at Fr_h 0.75-0.92
    half_angle_sys_std_deg: float = 1.0
    havelock_pair_max_std_deg: float = 4.0  #: half-angle good enough for the Havelock speed-and-depth method
    # ---- uncertainty (accuracy_sweep seeds 0-59: 95th percentile of |error|/sigma 1.07, all intervals held) ----
    spectral_sigma_scale: float = 0.5  #: quarter-box spread x this, optical
    spectral_sigma_scale_radar: float = 0.3  #: ... radar (analysed in dB; 95th pct of |error|/sigma 0.53 at 0.5)
    #: the quarter boxes are refitted in the track frame as found and turned this much (degrees) either way,
    #: and the variances of the three sets pooled (the harbour demo as a plain image, 9 clicks 4 px apart:
    #: widths 0.3-0.8 kn with the look's frame alone)
    spread_turn_deg: float = 1.0
    boot_score_min: float = 3.0  #: a quarter-box refit counts only when its own curve stands out this much
    boot_delta_extra_deg: float = 6.0  #: quarter boxes search the track within |delta| + this
    boot_speed_range: tuple[float, float] = (0.75, 1.33)  #: quarter boxes search this x the full-box speed
    speed_rel_std_floor: float = 0.006  #: smallest relative speed uncertainty before scaling (common practice)
    fitted_depth_rel_std: float = 0.01  #: floor with a fitted depth (seeds 420-431: 19 of 20 within 2 %)
    heading_sigma_scale: float = 0.4  #: quarter-box track spread x this (95th pct |error|/sigma 0.40)
    heading_std_floor_deg: float = 0.3  #: smallest stated heading uncertainty
    fitted_depth_std_floor: float = 0.05  #: smallest relative uncertainty of a fitted depth
    fitted_depth_std_cap: float = 0.5  #: largest relative uncertainty of a fitted depth
    # ---- wake lines on real imagery (benchmarks/real_sweep.py: Sentinel-2 crops, sea tiles, port vessels) ----
    #: a line from a hull this significant against the scene's other lines is a wake (real_sweep.py): on the
    #: clean sea tiles' hull-like specks at most 8.0 (and 12.5 on a blob that looks like a boat with a trail),
    #: at the 94 port vessels without a wake at most 6.7; the wake crops 16-52, small boats on sea tiles
    #: 9.1-16.7.  The margin on the small boats' side is thin: see README, real scenes
    line_significance_min: float = 9.0
    line_chip_px: int = 320  #: side of the square read around the vessel for the line search
    #: ... read at pixels of at least this size (block means): a centimetre photo's 320 pixels would hold the
    #: hull alone (photo_sweep.py); 1 (full resolution) for every scene of 0.25 m pixels and coarser
    line_pixel_min_m: float = 0.25
    line_reach_m: float = 1200.0  #: longest wake line scored, ground metres
    line_snap_radius_m: float = 60.0  #: a hull this close to the click is taken as the vessel
    band_shift_course_max_deg: float = 30.0  #: the hull's shift between bands must follow the wake this closely
    #: smallest standard uncertainty of one band's leading edge (px): the half-peak edge of a blurred hull a few
    #: pixels long moves with its sub-pixel phase; with this floor 95 % of the along-track shifts of 24 synthetic
    #: Sentinel-2-like hulls (benchmarks/multispectral_sweep.py) fell within their 95 % interval
    band_shift_edge_std_floor_px: float = 0.1
    #: standard uncertainty of one band's across-track centre (px), same sweep (largest |error| 0.19 px of 24)
    band_shift_across_std_px: float = 0.1
    band_shift_edge_reach_px: int = 12  #: the edge search runs this far ahead of and behind the vessel (px)
    #: a shift counts as clear when it exceeds this many of its standard uncertainties (the wave fit set aside
    #: against the hull's shift: a real crop, marseille_01 whole, tests/test_real_imagery.py)
    band_shift_clear_sigmas: float = 3.0
    #: a band recorded between the two (Sentinel-2: B08, B03) must show the hull this share of the way from its
    #: first to its last position, within band_shift_clear_sigmas: a moving hull's edge advances with time.  The
    #: bands' times are not used (from memory: B08 0.26 and B03 0.53 of the way); on 17 real moving Sentinel-2
    #: hulls the shares were 0.33-0.73 and one 1.14 (a 0.87 px shift: 0.3 of its uncertainty from 0.85); a
    #: shift of 3.7 px with B08 at -0.09 (a colour edge, not motion) falls out (benchmarks/real_sweep.py)
    band_shift_between_share: tuple[float, float] = (0.15, 0.85)
    # ---- displaced radar hull (apex.py; benchmarks/displaced_hull_sweep.py) ----
    #: the dark line must stand this far below the Radon background (robust spreads) ...
    apex_line_significance_min: float = 5.0
    #: ... and its darkness must step up this far (robust spreads of the along-line profile) at the apex
    apex_step_contrast_min: float = 1.0
    #: a wake line from a displaced start that runs onto the hull (within this many pixels, or this share of
    #: the distance along the line) starts at the far end of the hull's own wake: refused
    apex_far_end_px: float = 3.0
    apex_far_end_share: float = 0.25
    #: with the radar geometry known, a wake start away from the hull must lie on the flight axis through the
    #: hull within this many pixels or this share of their distance (the start is found to a few pixels)
    apex_off_azimuth_px: float = 5.0
    apex_off_azimuth_share: float = 0.25
    # ---- the wake-line search (wakeline.py; values as set with benchmarks/real_sweep.py and the radar line
    # scenes of tests/test_lines.py) ----
    hull_clearance_px: float = 1.5  #: rays start this far beyond the hull's edge (chip pixels)
    #: lines are scored over these lengths (fractions of the longest): short bright wakes and long faint ones
    line_length_fractions: tuple[float, ...] = (0.125, 0.25, 0.5, 1.0)
    #: the rays beside a line that give its local background start this far to its side at mid-length (px) ...
    line_side_gap_px: float = 6.0
    line_side_span_deg: float = 10.0  #: ... and span this many degrees
    line_refine_half_px: float = 8.0  #: half-width of the strip across a line in which its ridge is followed
    line_refine_max_deg: float = 12.0  #: largest correction of the fan's angle by the ridge fit
    #: a second line counts as the other arm of a V at half-angles in this range (radar narrow V to supercritical
    #: arms) ...
    line_partner_min_half_deg: float = 1.0
    line_partner_max_half_deg: float = 70.0
    line_partner_fraction: float = 0.3  #: ... when it reaches this share of the first line's significance
    line_partner_significance_min: float = 8.0  #: ... and at least this
    line_partner_dip: float = 0.5  #: ... and the fan between them falls below this share of the weaker one
    #: a radar target's sidelobe cross (:func:`wakeline.sidelobe_cross`): its weakest arm must stand this far
    #: above the water (standardised) and this far above the median orientation's; arms are measured over
    #: this many pixels and blanked this far either side of their centre line
    radar_cross_min_z: float = 1.0
    radar_cross_margin_z: float = 0.8
    radar_cross_arm_px: float = 24.0
    radar_cross_halfwidth_px: float = 1.5
    narrow_v_max_deg: float = 6.0  #: a radar V narrower than this (half-angle) is the narrow (Bragg) V
    #: in optical scenes a dark line counts only this long (m): a hull's or a quay's shadow is a short dark line
    #: from a bright object, a calm wake in sun glint runs on for kilometres (common practice, no source)
    optical_dark_line_min_m: float = 400.0
    line_null_points: int = 160  #: water points whose best lines make the scene's own background
    line_clip_z: float = 12.0  #: standardised values are clipped here so one very bright spot cannot make a line
    # ---- the line chip: land, quays and the hull (line_chip.py; real_sweep.py) ----
    #: dry areas by the water index: at least this wide (radius, m; at least one pixel) and larger than any hull
    #: (the largest ships are about 400 m x 60 m; some decks are as dry as a quay, NDWI near 0)
    dry_disk_m: float = 10.0
    dry_area_m2: float = 30_000.0
    #: bright areas without a water index: wider than a broad foam wake (radius, m; capped at 20 px) and at least
    #: this area (60 000 m^2 is a 1.2 km x 50 m band; both common practice, no source)
    land_bright_disk_m: float = 150.0
    land_area_m2: float = 60_000.0
    bright_z: float = 4.0  #: standardised brightness above which a pixel counts as bright for the land mask
    moored_gap_px: int = 4  #: a hull this close to land or a quay (pixels) is taken as moored alongside
    #: a hull in optical imagery stands this far above the water (standardised, smoothed): ships on water are
    #: tens of spreads brighter (Sentinel-2 crops: 58-266); a textured photograph's bright parts are not (the
    #: scikit-image rocket: 6.9)
    hull_z: float = 12.0
    #: in radar, in units of the smoothed decibel image's own robust spread (speckle): the prepare stage's rule
    hull_z_radar_spreads: float = 8.0
    # ---- the hull at the head of a wake line (line path) ----
    #: a hull this many times longer than wide shows its axis (common practice, no source)
    hull_elongation_min: float = 2.5
    #: a wake line further off an elongated hull's axis than this (plus twice the heading's standard uncertainty,
    #: model term included) is not its wake.  Real wakes leave their hull's axis as read by the line at up to
    #: 14-17 deg (three clear wakes on 1.5-3 m images held outside the repository; 7 deg by hand on one):
    #: 12 + 2 x 3.5 = 19 deg keeps them; the shared real wakes' angles are in benchmarks/results/real_sweep-.json
    #: (hull_axis_off_deg_of_found_wakes)
    hull_axis_max_deg: float = 12.0
    #: in radar the rule stays at its earlier width (plus twice the line fit's own uncertainty): a line from a hull
    #: displaced in azimuth (Raney 1971) runs obliquely into the wake (tests/test_real_imagery.py, radar 8 m)
    hull_axis_max_deg_radar: float = 10.0
    #: the hull's axis is used to refuse a line only when the hull is at least this many pixels long (a short
    #: blob's axis is noise)
    hull_axis_min_length_px: float = 6.0
    #: standard uncertainty of a line-path heading that the line's own fit does not see (a turning track, foam
    #: drifting with wind or current, one arm of a V followed instead of its axis); added in quadrature.  On 13
    #: real wakes at 1.5-3 m held outside the repository the median |error| against a careful reading by eye was
    #: 2.3 deg with two near 10 deg (then stated as +/-1.1 and +/-1.4): a normal error with that median has
    #: sigma = 2.3 / 0.674 = 3.4 deg, which puts the two at 2.9 sigma instead of 7-9.  The shared real wakes'
    #: coverage is measured by benchmarks/real_sweep.py (README, real scenes)
    line_heading_model_std_deg: float = 3.4
    #: a bright line from the blob at the point is checked for being the rest of the hull when it starts this
    #: bright (standardised; foam and hulls are tens of spreads, benchmarks/real_sweep.py crops 16-52)
    hull_line_min_z: float = 6.0
    #: the longest ship (m; the largest container ships are about 400 m long, from memory)
    hull_length_max_m: float = 400.0
    #: an even plateau (a hull) stays above this share of its start until its edge, which spreads over this many
    #: pixels in a sensor's blur (speckle-free optical noise is a few per cent of a hull's contrast; common
    #: practice, no source)
    hull_plateau_share: float = 0.7
    hull_edge_blur_px: int = 3
    #: ... checked only at pixels this fine (m): the white hulls taken for wakes were on 1.5-3 m images; at 10 m
    #: a small boat with a short even foam tail (a real sea tile, marseille_r768_c512) looks the same
    hull_line_max_pixel_m: float = 5.0
    # ---- a vessel seen as a bright streak fading from its head (foam_streak.py; benchmarks/real_sweep.py) ----
    #: set on the real Sentinel-2 data only (nine wakes of two ports read by eye; the port vessels and sea specks
    #: without a wake); README, real scenes, gives where each case sits against them.  Used at pixels this coarse
    #: (m) and up, where a hull and its foam are one streak (finer, the hull's own outline is read)
    streak_pixel_min_m: float = 5.0
    streak_ring_inner_px: float = 10.0  #: the water around the point: a ring this far out ...
    streak_ring_outer_px: float = 40.0  #: ... to this far (pixels)
    streak_peak_z_min: float = 5.0  #: the streak's peak above that water (robust spreads; wakes 5.3-15.8)
    streak_elongation_min: float = 2.8  #: length over width (second moments; wakes 3.1-6.1)
    streak_length_min_px: float = 10.0  #: along its axis (wakes 10-25 px)
    #: skew of the brightness along the axis (bright head, fading tail; wakes 0.28-0.87, even hulls 0.01-0.22)
    streak_skew_min: float = 0.25
    #: the streak's tail (its rear half) must be darker in the near infrared than in the visible: its excess over
    #: the water in B08 at most this share of its mean excess in the visible bands.  Foam reflects less in the near
    #: infrared than in the visible (Moore et al. 1998, J. Atmos. Oceanic Technol. 15(2), ship-made foam; Kokhanovsky
    #: 2004, JGR 109 C05021; Dierssen 2019, Front. Earth Sci. 7:14); a white or grey hull about as much (share 1, from
    #: memory).  Shared real data (benchmarks/real_sweep.py): foam tails 0.49-0.87, hulls without a wake 0.86-3.1.
    #: The same bound tells a single bright wake line (0.45-0.77) from one along a pier or from a rock (1.06-1.6),
    #: and a long ship's foam core from a pier's (foam_colour.py, line_finding._structure and _not_foam)
    streak_nir_share_max: float = 0.9
    #: a single bright line is foam only where it is about white in the visible (foam_colour.py): its excess over
    #: the water in green at most this times that in blue ... (shared real data: foam lines 0.79-1.08; lines over
    #: shallow turquoise water beside islets off Marseille 1.30 and 1.53, a pale plume at Gdynia 1.52)
    foam_green_blue_max: float = 1.25
    #: ... and in red at least this times that in blue (foam lines 0.52-0.96; the shallow bottom 0.09)
    foam_red_blue_min: float = 0.3
    #: the line search's own best line must run along the streak's axis within this angle (either way) ...
    streak_axis_agree_deg: float = 20.0
    #: ... with at least this significance against the scene's other lines
    streak_line_significance_min: float = 3.0
    # ---- narrow arms and hull length (Rabaud & Moisy 2013) ----
    #: a hull is measured on the image only at pixels this small (m): coarser, its outline cannot be told from
    #: its foam (common practice, no source)
    resolved_hull_pixel_m: float = 2.0
    #: relative standard uncertainty of a hull length (given or measured; common practice, no source)
    hull_length_rel_std: float = 0.05
    #: the hull's outline is separated from its foam when the blob above a quarter of its peak reaches behind the
    #: outline (above half its peak) by at most this many pixels or this share of its length (common practice,
    #: no source: the blur of a resolved edge is 1-2 pixels)
    hull_foam_margin_px: float = 2.0
    hull_foam_margin_rel: float = 0.15
    #: an outline longer than this many widths is a hull with its foam or a line, not a hull: ships' length to
    #: beam ratios lie below about 10 (from memory: fast warships and racing hulls)
    hull_outline_elongation_max: float = 10.0
    #: largest hull Froude number for which the narrow-arms relation gives a speed.  Rabaud & Moisy 2013 found
    #: the Mach-like regime on airborne images above Fr_L ~ 0.5 (the range of their data is not in front of us);
    #: planing-hull model series reach volume Froude numbers of 3.5 (Radojcic et al. 2014, Polish Maritime
    #: Research 21(2), 9-26: USCG and TUNS series, Fn_V 0.6-3.5), that is Fr_L ~ 1.75 at the stubbiest
    #: slenderness L / V^(1/3) = 4; above 2.5 (a margin for racing craft, common practice, no source) a figure
    #: is outside the method's domain and becomes a caution
    narrow_arms_fr_max: float = 2.5
    # ---- the vessel finder (vessel_finder.py; benchmarks/vessel_finder_sweep.py, bench_vessel_finder.py) ----
    #: guard and background windows in metres (the guard holds the longest hull; the ring beyond it is sea)
    finder_guard_m: float = 400.0
    finder_background_m: float = 900.0
    #: pixels finer than this are searched on a grid of block means about this size (a hull is then a compact
    #: blob: its deck's structure and its wake's crests average out)
    finder_pixel_m: float = 2.0
    #: ... at most this many pixels wide (fine pixels; the background keeps its proportion to the guard)
    finder_guard_max_px: int = 160
    #: optical hulls are sought in what is at least this wide (a grey opening; narrower bright lines are wave
    #: crests); it acts where it spans two pixels or more (pixels of 2.3 m and finer).  Most powered craft
    #: worth a wake are at least this wide in beam (common practice, no source)
    finder_solid_m: float = 3.5
    #: detections closer than this (and the crests of one wake) are one object
    finder_merge_m: float = 20.0
    #: a candidate below finder_own_share of a stronger one within this distance is a faint part of that
    #: vessel (the end of its wake, its plume, the true position behind a radar hull seen displaced: the demo
    #: ferry's 144 m; a radar with R/V = 113 s, as Sentinel-1, displaces a hull 113 m per m/s of radial speed,
    #: so a faster one is listed twice here and merged when the analyses of both find the same wake).  A small
    #: boat this close to a far brighter one is folded into it (its count of merged says so)
    finder_suppress_m: float = 200.0
    #: two candidates closer than a hull length are two vessels only if both are at least this many pixels long
    finder_resolved_px: float = 4.0
    #: a candidate needs this many pixels above the threshold (a lone bright pixel is noise or a buoy)
    finder_min_pixels: int = 2
    #: longer or larger blobs are harbour walls, quays or land (the largest ships are about 400 m x 60 m)
    finder_max_length_m: float = 450.0
    finder_max_area_m2: float = 40_000.0
    #: the share of a window's water whose excesses model the tail of the sea clutter
    finder_tail_share: float = 0.01
    #: pixels above this multiple of the normal threshold (hulls, fresh foam) are left out of the sea's tail
    finder_censor_factor: float = 1.0
    #: ... with the whole object around them, grown down to this share of the normal threshold (a vessel's wake:
    #: its faint outer crests would otherwise make the sea's tail heavy; benchmarks/vessel_finder_sweep.py)
    finder_censor_grow: float = 0.5
    #: a detection more than this share of which lies next to dry land (NDWI <= 0) is a quay edge, not a hull;
    #: a moored hull touches its quay along one side only
    finder_dry_share_max: float = 0.5
    #: the hull is the part of a detection above this share of its peak (in the near infrared when there is one;
    #: fresh foam reflects about half as much as a hull there, common practice, no source)
    finder_hull_share: float = 0.65
    #: detections joined by pixels above this share of the threshold are one object (a hull with its foam, its
    #: wake or the plume it stirs up): its weaker parts are not separate vessels (hysteresis grouping, as in Canny
    #: 1986, A computational approach to edge detection, IEEE PAMI 8(6))
    finder_link_share: float = 0.5
    #: ... unless they are at least this share of the strongest part's score (two vessels side by side)
    finder_own_share: float = 0.5
    #: a detection at least this many times longer than wide, and at least finder_trail_min_px long, whose one
    #: end is brighter than its other by finder_trail_fade (mean of the end thirds) is a hull leading its foam
    #: trail, which fades aft; the hull is sought within finder_trail_head_px of the brighter end (a small hull
    #: covers its pixels only in part, so the fresh foam just aft of it can be brighter than the hull; common
    #: practice, no source)
    finder_trail_min_elongation: float = 3.0
    finder_trail_min_px: float = 6.0
    finder_trail_fade: float = 1.5
    finder_trail_head_px: float = 3.0
    #: an object of several detections along a line (a wake's arm, a foam trail) whose end thirds differ in mean
    #: score by this factor has its vessel at the brighter end: the pattern fades aft (common practice, no
    #: source; benchmarks/vessel_finder_sweep.py)
    finder_object_fade: float = 1.2
    #: the detections of an object within this angle of a vessel's wake direction are its wake: a Kelvin wake's
    #: arms lie at 19.47 degrees in deep water (Kelvin 1887) and widen toward 90 degrees as the depth Froude
    #: number nears 1 (Havelock 1908); 60 degrees holds the wide wake of the demo's shoal (Fr_h = 0.91) and a
    #: turning track (benchmarks/vessel_finder_sweep.py; common practice, no source)
    finder_wedge_deg: float = 60.0
    #: its centre is the weighted centre of the pixels next to the peak, weighted by their excess over this share
    #: of the peak
    finder_centre_share: float = 0.5
    #: the position is then refined at full resolution (hull_centre.py): the hull is the connected pixels around
    #: the peak whose excess over the water is at least a share of the peak's (an outline at a fixed fraction
    #: of the peak contrast; common practice, no source; measured against the real ports' hull outlines and
    #: synthetic fleets, benchmarks/vessel_finder_sweep.py), the first of these shares whose outline closes
    finder_refine_shares: tuple[float, ...] = (0.3, 0.4, 0.5, 0.6, 0.7)
    #: ... whose solidity (area over its convex hull's; scikit-image regionprops) is at least this: the 101 real
    #: hull outlines of the Sentinel-2 ports (COCO, drawn by hand) have 0.80-0.95; a hull joined to a wake's crest
    #: or arm is not convex
    finder_refine_solidity: float = 0.75
    #: ... or, for outlines smaller than finder_refine_solidity_min_px, at least finder_refine_solidity_small: a
    #: pixelated outline that small shows its shape poorly.  Convex ellipses 3-30 px long and 1-6 px wide at random
    #: angles and positions, area-averaged to pixels, blurred by the synthetic sensor's point spread (0.57 px) and
    #: cut at 30-70 % of their peak, measure below 0.75 in 15-21 % of cases at 10-50 px and under 1 % from 50 px;
    #: their 1st percentile is 0.61-0.65 below 50 px (4000 shapes, scikit-image regionprops; our measurement, no
    #: source).  A hull joined to a crest stays out (0.53, tests/test_hull_centre.py)
    finder_refine_solidity_min_px: float = 50.0
    finder_refine_solidity_small: float = 0.6
    #: ... and at least this wide (the width of a uniform bar from its second moments): a hull is resolved across
    #: only over two pixels or more (sampling: two samples per period); narrower, the sensor's blur or a foam
    #: streak makes the outline, and the finder's peak is the better centre (the synthetic Sentinel-2-like fleets
    #: at 10 m: 23 of 24 within 2 px either way)
    finder_refine_min_width_px: float = 2.0
    #: ... sought within this share of the detection's length plus finder_merge_m of the candidate, and at least
    #: finder_refine_min_m (the whole detection: a long even hull's peak can lie at one of its ends)
    finder_refine_reach: float = 1.0
    finder_refine_min_m: float = 20.0
    # ---- two analysed rows that are one vessel (same_vessel.py) ----
    #: vessels this close after analysis are one (a hull's length at the sizes the finder keeps; common
    #: practice, no source)
    same_place_m: float = 30.0
    #: ... and vessels within this distance whose wakes agree (heading and speed) are one
    same_wake_m: float = 300.0
    #: slack on the heading agreement beyond three combined standard deviations (common practice, no source)
    same_heading_slack_deg: float = 5.0
    # ---- radar azimuth offset (Raney 1971) ----
    radar_max_radial_mps: float = 20.0  #: largest radial speed searched for the wake line
    radar_wake_line_min: float = 5.0  #: significance of the wake line used for the offset
    radar_offset_std_px: float = 2.0  #: standard uncertainty of the offset, pixels
    #: below this share of the flight direction across the wake line, the hull's distance from the line says
    #: almost nothing about the azimuth offset (the track runs nearly along the flight)
    radar_min_flight_share: float = 0.1
    radar_heading_std_deg: float = 1.0  #: heading uncertainty used in the offset inversion

    def __post_init__(self) -> None:
        for f in fields(self):
            v = getattr(self, f.name)
            vals = v if isinstance(v, tuple) else (v,)
            if any(not isinstance(x, (int, float)) or isinstance(x, bool) or x != x or x < 0 for x in vals):
                raise ParameterError(f"tuning {f.name} must be a number >= 0 (or numbers), got {v!r}")
        if self.box_px * 2 + self.gap_px * 2 > self.chip_px:
            raise ParameterError(
                f"tuning: two boxes of {self.box_px} px and the gap must fit the chip of {self.chip_px} px"
            )

    @property
    def false_alarm_rate_max(self) -> float:
        """Upper 95 % bound of the false-alarm rate per decision (rule of three on the wake-free trials)."""
        return 3.0 / self.wake_free_trials

    @property
    def false_alarm_note(self) -> str:
        return (
            f"false-alarm rate below {100 * self.false_alarm_rate_max:.1f} % per decision: none in "
            f"{self.wake_free_trials} wake-free test scenes"
        )

    def with_overrides(self, items: list[str] | tuple[str, ...]) -> Tuning:
        """A copy with ``name=value`` overrides (the sweeps' ``--tune`` arguments)."""
        known = {f.name: f for f in fields(self)}
        changes: dict = {}
        for item in items:
            name, sep, text = item.partition("=")
            if not sep or name not in known:
                raise ParameterError(f"unknown tuning {item!r}; known: {', '.join(sorted(known))}")
            old = getattr(self, name)
            try:
                if isinstance(old, tuple):
                    changes[name] = tuple(float(x) for x in text.split(","))
                else:
                    changes[name] = type(old)(text)
            except ValueError as err:
                raise ParameterError(f"tuning {name} needs a number, got {text!r}") from err
        return replace(self, **changes)

    def changed_fields(self) -> dict:
        """The fields that differ from the defaults (recorded with sweep results)."""
        return {
            f.name: getattr(self, f.name)
            for f in fields(self)
            if getattr(self, f.name) != getattr(DEFAULT_TUNING, f.name)
        }


DEFAULT_TUNING = Tuning()
