"""The eye-safety cautions printed with every budget that reports optical power."""

CAUTIONS = (
    "Optical links carry laser light, often invisible infrared, that can injure the eye "
    "before any light is seen.",
    "Never look into a fibre end, a connector, a chip facet or a free-space beam, directly or "
    "through optics; check with a power meter, not by eye.",
    "The powers here are estimates from the link file, not a measurement and not a laser-product "
    "classification or hazard-level assessment.",
    "IEC 60825-1 and IEC 60825-2, local regulations and the site's laser safety officer decide "
    "what is safe.",
)
