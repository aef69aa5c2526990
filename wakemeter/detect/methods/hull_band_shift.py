"""Speed over ground from the hull's shift between two bands recorded a published time apart (Heiselberg
2019, Sensors 19(13), 2873; see :mod:`wakemeter.detect.band_shift`).  Runs on a wake seen as lines in an
optical scene whose sensor the band-timing table knows; the shift must follow the wake's heading."""

from __future__ import annotations

import numpy as np

from ...errors import ParameterError
from ..band_shift import measure_band_shift, not_motion, scene_band_timing
from ..findings import Caution, CautionCode
from .base import NOTHING, MethodContext, MethodOutput


class HullBandShift:
    name = "hull shift between bands (speed over ground)"
    reads_depth = False

    def estimate(self, ctx: MethodContext) -> MethodOutput:
        if ctx.lines is None or ctx.lines.chip.radar:
            return NOTHING
        timing = scene_band_timing(ctx.scene)
        if timing is None:
            if ctx.scene.info.count > 1:
                return MethodOutput(
                    why_not="the time between this sensor's bands is not known to the program (recognised: "
                    "Sentinel-2 with named bands B02 and B04), so no speed over ground from the hull's shift "
                    "between bands"
                )
            return NOTHING
        chip, wake = ctx.lines.chip, ctx.lines.wake
        try:
            shift = measure_band_shift(
                ctx.scene, chip.to_scene(*wake.vessel_rc), wake.back_deg, timing, rng=ctx.rng, tuning=ctx.tuning
            )
        except ParameterError:
            return NOTHING
        if shift is None:
            return NOTHING
        off = abs((shift.course_deg - ctx.heading_deg + 180.0) % 360.0 - 180.0)
        if off > ctx.tuning.band_shift_course_max_deg or shift.along_px <= 0:
            return MethodOutput(
                cautions=(
                    Caution(
                        CautionCode.SHIFT_OFF_TRACK,
                        f"the hull's shift between bands (course {shift.course_deg:.0f}\N{DEGREE SIGN}) does not "
                        f"follow its wake (heading {ctx.heading_deg:.0f}\N{DEGREE SIGN}): foam or a neighbour moved "
                        "the hull's edge, so no speed is taken from it",
                    ),
                )
            )
        why = not_motion(shift, ctx.tuning)
        if why is not None:
            return MethodOutput(
                cautions=(Caution(CautionCode.SHIFT_NOT_MOTION, f"{why}, so no speed is taken from it"),)
            )
        caution = Caution(
            CautionCode.OVER_GROUND,
            f"the speed is over ground, from the hull's shift of {np.hypot(*shift.shift_px):.2f} pixels between "
            f"bands recorded {shift.timing.delay_s:.3f} s apart ({shift.timing.source}); it equals the speed "
            f"through the water only in still water. Course over ground {shift.course_deg:.0f}\N{DEGREE SIGN}, "
            f"{off:.0f}\N{DEGREE SIGN} from the wake's heading",
        )
        return MethodOutput((shift.estimate,), cautions=(caution,))
