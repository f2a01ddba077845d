"""The cautions that every user-facing output carries (window, PDF audit, leaflet, command line).

Plain text, no markup. ``CAUTIONS`` holds one sentence or short paragraph per point;
``CAUTIONS_SHORT`` is a one-line summary for a status line or a page footer.
"""

from __future__ import annotations

__all__ = ["CAUTIONS", "CAUTIONS_SHORT", "CAUTIONS_TITLE"]

CAUTIONS_TITLE = "Cautions"

CAUTIONS: tuple[str, ...] = (
    "This is an indicative model. Fall speeds, injury bands and likelihoods are estimates from "
    "simple physics, published veterinary case series and stated assumptions; they rank openings "
    "against each other and do not predict what will happen to a particular cat.",
    "It is not a structural assessment and not a building-code or fire-code compliance check. "
    "Guards, nets, screens and limiters must be chosen, fixed and load-rated by competent people.",
    "Local building and fire codes, the building's owner or governing body, and licensed "
    "professionals (engineers, building control, fire officers) take precedence over anything "
    "shown here.",
    "Never fit a fixed limiter, a permanent net or anything else that blocks an emergency escape "
    "window, fire-service access or a smoke vent; only releasable devices that meet the local code "
    "belong there.",
    "After any fall, take the cat to a veterinarian at once, even if it seems unhurt: chest and "
    "internal injuries are common and often not visible at first.",
)

CAUTIONS_SHORT = (
    "Indicative model only - not a structural or code-compliance assessment. Follow local "
    "building and fire codes and licensed professionals; never block an escape window; see a "
    "veterinarian after any fall."
)
