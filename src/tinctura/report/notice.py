"""The limits of an automated check, stated once for every report and the plugin."""

DISCLAIMER = (
    "This report covers only what software can measure from the built pages: a few WCAG "
    "success criteria, and those only in part. Passing it does not make a site conform to "
    "WCAG; conformance needs a review by qualified people, including use with assistive "
    "technology. APCA lightness contrast, colour-vision-deficiency simulation and viewing "
    "profiles are advice beyond WCAG 2, not its requirements. Safety colours and safety signs (for example warnings in a manual) follow "
    "their own standards, such as ISO 3864 and ANSI Z535, and local regulations: check them "
    "against those, and do not recolour them on the strength of this report alone."
)
