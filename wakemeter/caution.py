"""The one caution that goes with every speed wakemeter shows or exports (results panel, CLI, PDF, JSON)."""

CAUTION = (
    "These figures are estimates from imagery, for analysis; they are not certified measurements. "
    "Local regulations, certified measuring instruments and licensed professionals decide any "
    "enforcement. Verify scene timing and georeferencing independently."
)
